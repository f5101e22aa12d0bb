/**
 * `check --format md` on the demo runs (fixtures/demo: model bands of Cohen & Bergstresser's empirical
 * pseudopotentials in VASP layouts) is short enough for a review comment: under 40 lines for all seven runs,
 * one table row per run, the cautions once. And a path file that exists but does not parse is named with the
 * reader's own sentence, not as "missing".
 */
import { strict as assert } from 'node:assert';
import { cpSync, mkdtempSync, readdirSync, rmSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { cli } from './runCli';

describe('check --format md on the demo runs', function () {
  this.timeout(120000);
  let dir = '';
  let runs: string[] = [];
  before(async () => {
    dir = mkdtempSync(join(tmpdir(), 'vs-demo-md-'));
    cpSync(join('fixtures', 'demo'), dir, { recursive: true, filter: (p) => !p.endsWith('.valleys.json') && !p.endsWith('.svg') });
    const strain = readdirSync(join(dir, 'si-strain'), { withFileTypes: true })
      .filter((d) => d.isDirectory())
      .map((d) => join(dir, 'si-strain', d.name));
    runs = [join(dir, 'si-bulk'), join(dir, 'gaas-bulk'), ...strain];
    const r = await cli('annotate', ...runs);
    assert.equal(r.code, 0, r.err);
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('fits on one screen: a summary table, a collapsed details block, the cautions once', async () => {
    const r = await cli('check', dir, '--format', 'md');
    assert.equal(r.code, 0, r.out + r.err);
    const lines = r.out.trimEnd().split('\n');
    assert.ok(lines.length < 40, `${lines.length} lines:\n${r.out}`);
    assert.equal(lines.filter((l) => /^\| `.*EIGENVAL\.valleys\.json` \| ok \|/.test(l)).length, runs.length);
    assert.equal(lines.filter((l) => l.startsWith('<details>')).length, 1);
    assert.equal(lines.filter((l) => l === 'Cautions:').length, 1);
    const cautions = lines.slice(lines.indexOf('Cautions:') + 1);
    assert.equal(new Set(cautions).size, cautions.length, 'each caution once');
    // A spin-degenerate run names no spin channel anywhere (spin is named only in spin-polarised runs).
    assert.doesNotMatch(r.out, /spin (0|1|up|down)/);
  });

  it('names the reader’s error for a path file that exists but does not parse', async () => {
    const run = join(dir, 'si-bulk');
    const kpoints = join(run, 'KPOINTS');
    const good = readFileSync(kpoints, 'utf8');
    try {
      const lines = good.split('\n');
      lines[5] = '   0.5 abc 0.5   ! X';
      writeFileSync(kpoints, lines.join('\n'));
      const r = await cli('check', run);
      assert.equal(r.code, 1);
      // The KPOINTS reader's sentence with file, line and column (VASP line mode: line 6 is a path end point).
      assert.match(r.out, /source KPOINTS \(kpath\) exists but could not be read: .*KPOINTS:6:\d+: /);
      assert.doesNotMatch(r.out, /no longer read with the run/);
    } finally {
      writeFileSync(kpoints, good);
    }
  });
});

describe('review comments never quote an undetermined mass as a number', () => {
  it('writes "undetermined" in the compact mass list of check --format md', async () => {
    const { compactMasses } = await import('../../../src/core/annotations/checkMarkdown');
    const mass = (towards: string, m: number, determined: boolean | null) => ({
      towards,
      direction: [1, 0, 0] as [number, number, number],
      mass: m,
      stderr: 0.01,
      points: 5,
      window_meV: 25,
      method: 'parabola',
      alpha_per_eV: null,
      residual_meV: null,
      branch: null,
      determined,
      warnings: [],
    });
    // A stand-in entry: only its masses matter to the compact list (numbers chosen for the check, not physics).
    const entry = { masses: [mass('Γ', 1.354, true), mass('X', -33.88, false), mass('L', 0.5, null)] } as unknown as Parameters<
      typeof compactMasses
    >[0];
    const text = compactMasses(entry);
    assert.match(text, /Γ 1\.354/);
    assert.match(text, /X undetermined/);
    assert.doesNotMatch(text, /33\.88/);
    // Files written before the flag existed (null) keep their number.
    assert.match(text, /L 0\.500/);
  });
});
