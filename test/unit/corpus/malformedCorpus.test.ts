/**
 * The malformed-input corpus: every reader's valid sample, damaged in each way real files get damaged
 * (truncated at every structural point, Fortran overflow fields, NaN/Inf, wrong header counts, Windows line
 * endings, a byte-order mark, empty, binary junk, a huge line), run through the CLI as a user would.
 * Each outcome must be either the same result as the clean file (harmless damage) or a non-zero exit with one
 * sentence naming the file (and the line, when the damage has one). Never a stack trace, never exit 0 with a
 * different result. A summary of every class and its outcome is written to test-artifacts/corpus-summary.md.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, basename } from 'node:path';
import { main } from '../../../src/cli/main';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { capture } from '../../support/unitCliCapture';

interface Sample {
  format: string;
  /** A valid file in the reader's layout (real layout, small). */
  path: string;
  /** Lines that hold numbers the reader must read (for overflow and NaN injection), 1-based. */
  numberLines?: number[];
}

/** Samples from fixtures; a reader joins the corpus by adding its sample here. */
const SAMPLES: Sample[] = [
  { format: 'vasp-eigenval', path: 'test/unit/corpus/samples/EIGENVAL' },
  ...[
    ['qe-xml', 'fixtures/qe/si.xml'],
    ['qe-bands', 'fixtures/qe/si.bands.dat'],
    ['vasprun-xml', 'fixtures/vasprun/vasprun.xml'],
    ['wannier90-band', 'fixtures/wannier90/si_band.dat'],
    ['bxsf', 'fixtures/bxsf/model.bxsf'],
    ['castep-bands', 'fixtures/castep/si.bands'],
  ]
    .filter(([, p]) => existsSync(p!))
    .map(([format, path]) => ({ format: format!, path: path! })),
];

interface Damage {
  name: string;
  /** 'same': must give the clean result; 'error': must fail with a located sentence; 'either'. */
  expect: 'same' | 'error' | 'either';
  apply(text: string): string | Uint8Array;
}

function lines(t: string): string[] {
  return t.split('\n');
}

function numberToken(line: string): RegExpMatchArray | null {
  return line.match(/-?\d+\.\d+(?:[EeDd][+-]?\d+)?/);
}

function damages(text: string): Damage[] {
  const ls = lines(text);
  const out: Damage[] = [
    { name: 'empty file', expect: 'error', apply: () => '' },
    { name: 'binary junk', expect: 'error', apply: () => Uint8Array.from({ length: 4096 }, (_, i) => (i * 7919 + 13) % 256) },
    { name: 'Windows line endings', expect: 'same', apply: (t) => t.replace(/\n/g, '\r\n') },
    { name: 'byte-order mark', expect: 'same', apply: (t) => `\uFEFF${t}` },
    {
      name: 'a huge line inserted',
      expect: 'error',
      apply: (t) => {
        const l = lines(t);
        l.splice(Math.min(8, l.length - 1), 0, 'x'.repeat(2_000_000));
        return l.join('\n');
      },
    },
  ];
  // Truncation at structural points: after each of the first lines, then at a spread of later lines, and
  // in the middle of a line.
  const cuts = new Set<number>();
  for (let i = 1; i < Math.min(12, ls.length - 1); i++) cuts.add(i);
  for (let f = 0.2; f < 1; f += 0.2) cuts.add(Math.floor(ls.length * f));
  for (const c of [...cuts].sort((a, b) => a - b)) {
    if (ls.slice(c).join('').trim() === '') continue;
    out.push({ name: `truncated after line ${c}`, expect: 'error', apply: () => ls.slice(0, c).join('\n') + '\n' });
  }
  const mid = Math.floor(text.length * 0.6);
  out.push({ name: 'truncated mid-line', expect: 'error', apply: (t) => t.slice(0, mid) });
  // Overflow and NaN in a number on a data line near the middle.
  let target = -1;
  for (let i = Math.floor(ls.length / 2); i < ls.length; i++)
    if (numberToken(ls[i]!)) {
      target = i;
      break;
    }
  if (target >= 0) {
    const tok = numberToken(ls[target]!)![0];
    out.push({
      name: `overflow field (****) on line ${target + 1}`,
      expect: 'error',
      apply: () => {
        const l = [...ls];
        l[target] = l[target]!.replace(tok, '*'.repeat(tok.length));
        return l.join('\n');
      },
    });
    out.push({
      name: `NaN on line ${target + 1}`,
      expect: 'error',
      apply: () => {
        const l = [...ls];
        l[target] = l[target]!.replace(tok, 'NaN');
        return l.join('\n');
      },
    });
    out.push({
      name: `Infinity on line ${target + 1}`,
      expect: 'error',
      apply: () => {
        const l = [...ls];
        l[target] = l[target]!.replace(tok, 'Infinity');
        return l.join('\n');
      },
    });
  }
  return out;
}

interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

async function run(file: string): Promise<Outcome> {
  const io = capture();
  const code = await main(['analyze', file, '--json'], io);
  return { code, stdout: io.stdout, stderr: io.stderr };
}

const strip = (s: string, file: string): string => {
  const j = JSON.parse(s);
  delete j.file;
  void file;
  return JSON.stringify(j);
};

describe('malformed-input corpus (every reader)', function () {
  this.timeout(120000);
  const summary: string[] = ['| format | damage | expected | outcome |', '|---|---|---|---|'];
  const dir = mkdtempSync(join(tmpdir(), 'vs-corpus-'));
  before(async () => {
    await ensureSymmetryReady();
  });
  after(() => {
    mkdirSync('test-artifacts', { recursive: true });
    writeFileSync('test-artifacts/corpus-summary.md', `# Malformed-input corpus\n\n${summary.join('\n')}\n`);
  });

  for (const sample of SAMPLES) {
    const clean = readFileSync(sample.path, 'utf8');
    for (const d of damages(clean)) {
      it(`${sample.format}: ${d.name}`, async () => {
        const sub = join(dir, `${sample.format}-${d.name.replace(/[^a-z0-9]+/gi, '_')}`);
        mkdirSync(sub, { recursive: true });
        const file = join(sub, basename(sample.path));
        const cleanFile = join(sub, `clean-${basename(sample.path)}`);
        writeFileSync(cleanFile, clean);
        const damaged = d.apply(clean);
        writeFileSync(file, damaged);
        const started = Date.now();
        const o = await run(file);
        const elapsed = Date.now() - started;
        assert.ok(elapsed < 30000, `took ${elapsed} ms`);
        assert.doesNotMatch(o.stderr, /\n\s+at |internal error/, `stack trace or internal error: ${o.stderr}`);
        let outcome: string;
        if (o.code === 0) {
          const ref = await run(cleanFile);
          assert.equal(ref.code, 0, `the clean sample must read: ${ref.stderr}`);
          assert.equal(strip(o.stdout, file), strip(ref.stdout, cleanFile), 'exit 0 must mean the same result as the clean file');
          assert.notEqual(d.expect, 'error', `expected an error, got the clean result`);
          outcome = 'read, same result as the clean file';
        } else {
          assert.notEqual(d.expect, 'same', `harmless damage must read: ${o.stderr}`);
          const msg = o.stderr.trim();
          assert.equal(msg.split('\n').length, 1, `one sentence: ${msg}`);
          assert.ok(msg.includes(basename(file)), `names the file: ${msg}`);
          outcome = `refused: ${msg.replace(sub + '/', '').replace(/^valleyscope: /, '')}`;
        }
        summary.push(`| ${sample.format} | ${d.name} | ${d.expect} | ${outcome.replace(/\|/g, '\\|')} |`);
      });
    }
  }
});
