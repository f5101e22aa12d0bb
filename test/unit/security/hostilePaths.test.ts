/**
 * Hostile paths, as in a pull request whose author wrote the annotations file and the run folder: every path
 * field of the annotations file, the data file it implies, the annotations file itself, and every companion a
 * reader opens, pointed at
 *   - a sentinel file outside the run (by "..", or by a symbolic link),
 *   - /dev/zero (endless bytes; by a link, or as an absolute path),
 *   - a FIFO (a read would block forever; inside the run, or outside behind a link),
 * through `check`, `annotate`, `compare` and `analyze`. Each case must end within the deadline, with exit
 * code 1 and a sentence, with bounded memory (sampled in this process), and the sentinel's content must not
 * appear in any output or in any file written. The policy is SECURITY.md's; the expected behaviour is the
 * issue's requirement, not a recalled value.
 */
import { strict as assert } from 'node:assert';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeTinyRun } from '../annotations/tinyRun';
import { collinearModel } from '../../support/writers/roundTripModel';
import { writeWannier90 } from '../../support/writers/wannier90';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { writeVasprun } from '../../support/writers/vasprun';
import { SENTINEL_TEXT, TOKEN, filesContainingToken, mkfifo, runCli, type Outcome } from './hostileSupport';

/** Growth of resident memory a refused case may cause, MB (the issue saw gigabytes; a refusal needs ~none). */
const MEMORY_BOUND_MB = 150;

const base = mkdtempSync(join(tmpdir(), 'vs-hostile-'));
const sentinel = join(base, 'secret.txt');
const outsideFifo = join(base, 'outside.fifo');
const cases = join(base, 'cases');
let caseNo = 0;

/** A fresh folder for one case. */
function caseDir(name: string): string {
  const d = join(cases, `${String(caseNo++).padStart(3, '0')}-${name.replace(/[^A-Za-z0-9]+/g, '-')}`);
  mkdirSync(d, { recursive: true });
  return d;
}

type Target = 'link-to-sentinel' | 'link-to-dev-zero' | 'fifo' | 'link-to-outside-fifo';
const TARGETS: Target[] = ['link-to-sentinel', 'link-to-dev-zero', 'fifo', 'link-to-outside-fifo'];

/** Put the hostile thing at `path`. */
function plant(path: string, t: Target): void {
  rmSync(path, { force: true });
  if (t === 'link-to-sentinel') symlinkSync(sentinel, path);
  else if (t === 'link-to-dev-zero') symlinkSync('/dev/zero', path);
  else if (t === 'fifo') mkfifo(path);
  else symlinkSync(outsideFifo, path);
}

/** The common promises of every case. */
function assertContained(o: Outcome, what: string, sentence: RegExp, codes: number[] = [1]): void {
  assert.notEqual(o.code, 'hung', `${what}: did not end within the deadline`);
  assert.ok(codes.includes(o.code as number), `${what}: exit code ${codes.join(' or ')}, got ${o.code} (out: ${o.out} err: ${o.err})`);
  const text = o.out + o.err;
  assert.ok(!text.includes(TOKEN), `${what}: the sentinel's content appears in the output:\n${text}`);
  assert.match(text, sentence, `${what}: says why in a sentence`);
  assert.doesNotMatch(text, /internal error|EACCES|ENOENT|at .*\.ts:\d+/, `${what}: no raw error or stack`);
  assert.ok(o.peakGrowthMB < MEMORY_BOUND_MB, `${what}: memory grew by ${o.peakGrowthMB.toFixed(0)} MB`);
  assert.deepEqual(filesContainingToken(cases), [], `${what}: a written file holds the sentinel's content`);
}

const REFUSED = /not opened|not a regular file|FIFO|character device|outside the run's folder|climbs out|absolute path/;

/** A tiny VASP run with its annotations written by `annotate`; returns the folder and the annotations path. */
async function annotatedRun(name: string): Promise<{ dir: string; ann: string }> {
  const dir = caseDir(name);
  writeTinyRun(dir);
  const r = await runCli(['annotate', dir]);
  assert.equal(r.code, 0, r.err);
  return { dir, ann: join(dir, 'EIGENVAL.valleys.json') };
}

function editAnnotations(ann: string, edit: (doc: Record<string, unknown>) => void): void {
  const doc = JSON.parse(readFileSync(ann, 'utf8')) as Record<string, unknown>;
  edit(doc);
  writeFileSync(ann, JSON.stringify(doc, null, 2));
}

let reference = '';

before(async function () {
  this.timeout(60000);
  writeFileSync(sentinel, SENTINEL_TEXT);
  mkfifo(outsideFifo);
  reference = join(base, 'reference');
  writeTinyRun(reference);
});

after(() => {
  rmSync(base, { recursive: true, force: true });
});

/** Values for a path field: by "..", absolute, and each planted target inside the run folder. */
const FIELD_VALUES: { name: string; value: string; plant?: Target }[] = [
  { name: 'traversal to the sentinel', value: '../../secret.txt' },
  { name: 'absolute /dev/zero', value: '/dev/zero' },
  { name: 'hidden folder', value: '.git/config' },
  ...TARGETS.map((t) => ({ name: t, value: `planted-${t}`, plant: t })),
];

describe('hostile paths: settings.structureFile of an annotations file', function () {
  this.timeout(30000);
  for (const v of FIELD_VALUES) {
    it(`${v.name}: check and annotate refuse it, naming the field`, async () => {
      const { dir, ann } = await annotatedRun(`structure-${v.name}`);
      if (v.plant) plant(join(dir, v.value), v.plant);
      if (v.value === '.git/config') {
        mkdirSync(join(dir, '.git'));
        writeFileSync(join(dir, '.git', 'config'), SENTINEL_TEXT);
      }
      editAnnotations(ann, (d) => {
        (d.settings as Record<string, unknown>).structureFile = v.value;
      });
      const sentence = /settings\.structureFile in .*(not opened|not a regular file)/;
      assertContained(await runCli(['check', dir]), `check (${v.name})`, sentence);
      assertContained(await runCli(['check', '--format', 'md', dir]), `check --format md (${v.name})`, sentence);
      assertContained(await runCli(['annotate', dir]), `annotate (${v.name})`, sentence);
    });
  }
});

describe('hostile paths: sources[].path of an annotations file', function () {
  this.timeout(30000);
  for (const v of FIELD_VALUES) {
    it(`${v.name}: compare does not open it and says so; check never opens it`, async () => {
      const { dir, ann } = await annotatedRun(`source-${v.name}`);
      if (v.plant) plant(join(dir, v.value), v.plant);
      if (v.value === '.git/config') {
        mkdirSync(join(dir, '.git'));
        writeFileSync(join(dir, '.git', 'config'), SENTINEL_TEXT);
      }
      editAnnotations(ann, (d) => {
        (d.sources as unknown[]).push({ path: v.value, role: 'structure', sha256: '0'.repeat(64) });
      });
      const o = await runCli(['compare', ann, reference]);
      // compare still compares (the saved numbers), marks the run stale, and names the refused field.
      assert.notEqual(o.code, 'hung');
      assert.ok(!(o.out + o.err).includes(TOKEN), `compare (${v.name}) leaked the sentinel`);
      assert.match(o.err, /sources\[3\]\.path in .*(not opened|not a regular file)/);
      assert.ok(o.peakGrowthMB < MEMORY_BOUND_MB);
      const c = await runCli(['check', dir]);
      assert.notEqual(c.code, 'hung');
      assert.ok(!(c.out + c.err).includes(TOKEN));
      assert.deepEqual(filesContainingToken(cases), []);
    });
  }
});

describe('hostile paths: the data file an annotations file names (its name minus .valleys.json)', function () {
  this.timeout(30000);
  for (const t of TARGETS) {
    it(`${t}: check and compare refuse it`, async () => {
      const { dir, ann } = await annotatedRun(`data-${t}`);
      plant(join(dir, 'EIGENVAL'), t);
      assertContained(await runCli(['check', dir]), `check (${t})`, REFUSED);
      const o = await runCli(['compare', ann, reference]);
      assert.notEqual(o.code, 'hung');
      assert.ok(!(o.out + o.err).includes(TOKEN));
      assert.ok(o.peakGrowthMB < MEMORY_BOUND_MB);
    });
  }
});

describe('hostile paths: the annotations file itself', function () {
  this.timeout(30000);
  for (const t of TARGETS) {
    it(`${t}: check (searching) and annotate refuse it`, async () => {
      const dir = caseDir(`annotations-${t}`);
      writeTinyRun(dir);
      plant(join(dir, 'EIGENVAL.valleys.json'), t);
      assertContained(await runCli(['check', dir]), `check (${t})`, REFUSED);
      assertContained(await runCli(['annotate', dir]), `annotate (${t})`, REFUSED);
      if (t !== 'link-to-sentinel') {
        // Named on the command line it may be anywhere, but is still read only if it is a regular file.
        assertContained(await runCli(['compare', join(dir, 'EIGENVAL.valleys.json'), reference]), `compare (${t})`, REFUSED);
      }
    });
  }
});

describe('hostile companions of a VASP run (POSCAR, CONTCAR, KPOINTS, INCAR, KPOINTS_OPT)', function () {
  this.timeout(30000);
  for (const name of ['POSCAR', 'CONTCAR', 'KPOINTS', 'INCAR', 'KPOINTS_OPT']) {
    for (const t of [...TARGETS, 'link-to-hidden' as const]) {
      it(`${name} ${t}: analyze and annotate end with a sentence`, async () => {
        const dir = caseDir(`vasp-${name}-${t}`);
        writeTinyRun(dir);
        if (t === 'link-to-hidden') {
          mkdirSync(join(dir, '.git'));
          writeFileSync(join(dir, '.git', 'config'), SENTINEL_TEXT);
          rmSync(join(dir, name), { force: true });
          symlinkSync(join('.git', 'config'), join(dir, name));
        } else plant(join(dir, name), t);
        assertContained(await runCli(['analyze', dir]), `analyze (${name} ${t})`, REFUSED);
        assertContained(await runCli(['analyze', '--json', dir]), `analyze --json (${name} ${t})`, REFUSED);
        assertContained(await runCli(['annotate', dir]), `annotate (${name} ${t})`, REFUSED);
      });
    }
  }
});

describe('hostile KPOINTS and KPOINTS_OPT beside vasprun.xml', function () {
  this.timeout(30000);
  for (const name of ['KPOINTS', 'KPOINTS_OPT'])
    for (const t of TARGETS) {
      it(`${name} ${t}: analyze ends with a sentence`, async () => {
        const dir = caseDir(`vasprun-${name}-${t}`);
        writeFileSync(join(dir, 'vasprun.xml'), writeVasprun(collinearModel()));
        plant(join(dir, name), t);
        assertContained(await runCli(['analyze', dir]), `analyze (${name} ${t})`, REFUSED);
      });
    }
});

describe('hostile companions of a Wannier90 run (_band.kpt, _band.labelinfo.dat, .win)', function () {
  this.timeout(30000);
  const w = writeWannier90(collinearModel(), { fermiEnergy: 0.6 });
  for (const name of ['seed_band.kpt', 'seed_band.labelinfo.dat', 'seed.win']) {
    for (const t of TARGETS) {
      it(`${name} ${t}: analyze ends with a sentence`, async () => {
        const dir = caseDir(`w90-${name}-${t}`);
        writeFileSync(join(dir, 'seed_band.dat'), w.bandDat);
        writeFileSync(join(dir, 'seed_band.kpt'), w.kpt);
        writeFileSync(join(dir, 'seed_band.labelinfo.dat'), w.labelinfo);
        writeFileSync(join(dir, 'seed.win'), w.win);
        plant(join(dir, name), t);
        assertContained(await runCli(['analyze', dir]), `analyze (${name} ${t})`, REFUSED);
      });
    }
  }
});

describe('hostile companion of bands.x output (the pw.x XML beside it)', function () {
  this.timeout(30000);
  const model = collinearModel();
  for (const t of TARGETS) {
    it(`data-file-schema.xml ${t}: analyze ends with a sentence`, async () => {
      const dir = caseDir(`bandsx-${t}`);
      writeFileSync(join(dir, 'bands.out'), writeBandsx(model, 4));
      plant(join(dir, 'data-file-schema.xml'), t);
      assertContained(await runCli(['analyze', join(dir, 'bands.out')]), `analyze (${t})`, REFUSED);
    });
  }
  it('a regular pw.x XML beside it is still used (the policy refuses only what it must)', async () => {
    const dir = caseDir('bandsx-regular');
    writeFileSync(join(dir, 'bands.out'), writeBandsx(model, 4));
    writeFileSync(join(dir, 'data-file-schema.xml'), writeQeXml(model, { alat: 4 }));
    const o = await runCli(['analyze', '--json', join(dir, 'bands.out')]);
    assert.equal(o.code, 0, o.err);
  });
});

describe('hostile paths on the command line (may go anywhere, but only regular files are read)', function () {
  this.timeout(30000);
  it('--structure /dev/zero, a FIFO, or a link to either: analyze and annotate end with a sentence', async () => {
    const dir = caseDir('cli-structure');
    writeTinyRun(dir);
    const fifo = join(dir, 'structure.fifo');
    mkfifo(fifo);
    const link = join(dir, 'zero-link');
    symlinkSync('/dev/zero', link);
    for (const s of ['/dev/zero', fifo, link, outsideFifo]) {
      // analyze reports a bad --structure as a usage error (exit 2), as for a missing file.
      assertContained(
        await runCli(['analyze', dir, '--structure', s]),
        `analyze --structure ${s}`,
        /not a regular file|FIFO|character device|not opened/,
        [2],
      );
      assertContained(
        await runCli(['annotate', dir, '--structure', s]),
        `annotate --structure ${s}`,
        /not a regular file|FIFO|character device|not opened/,
      );
    }
  });
  it('the data path itself: /dev/zero or a FIFO end with a sentence', async () => {
    const fifo = join(caseDir('cli-data'), 'EIGENVAL');
    mkfifo(fifo);
    for (const p of ['/dev/zero', fifo]) {
      assertContained(await runCli(['analyze', p]), `analyze ${p}`, /not a regular file|FIFO|character device|not opened/);
      assertContained(await runCli(['annotate', p]), `annotate ${p}`, /not a regular file|FIFO|character device|not opened/);
    }
  });
});

describe('links that stay inside the run folder are followed', function () {
  this.timeout(30000);
  it('a linked EIGENVAL and a linked POSCAR in a run folder are read like the files themselves', async () => {
    const store = caseDir('linked-store');
    writeTinyRun(store);
    const dir = caseDir('linked-run');
    mkdirSync(join(dir, 'data'));
    for (const n of ['EIGENVAL', 'POSCAR', 'KPOINTS']) copyFileSync(join(store, n), join(dir, 'data', n));
    symlinkSync(join('data', 'EIGENVAL'), join(dir, 'EIGENVAL'));
    symlinkSync(join('data', 'POSCAR'), join(dir, 'POSCAR'));
    symlinkSync(join('data', 'KPOINTS'), join(dir, 'KPOINTS'));
    const linked = await runCli(['analyze', '--json', dir]);
    const plain = await runCli(['analyze', '--json', store]);
    assert.equal(linked.code, 0, linked.err);
    const a = JSON.parse(linked.out) as { gap: unknown; extrema: unknown; file: string };
    const b = JSON.parse(plain.out) as { gap: unknown; extrema: unknown };
    // Same bytes, same analysis: the gap and the extrema (with their masses in m_e, which need the POSCAR).
    assert.deepEqual(a.gap, b.gap);
    assert.deepEqual(a.extrema, b.extrema);
  });
});
