/**
 * Batch commands: the JSON Lines contract (one line per run, failures as lines), the same output for any
 * --jobs, and the shards of a job array merged by compare and check giving one machine's result.
 * Runs are the one-band tight-binding model of tinyRun.ts (E = E0 ∓ 2t cos ka, a published analytic model):
 * its gap is exactly the E_g each run is written with, direct at Γ.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../../src/cli/main';
import type { CliIO } from '../../../../src/cli/io';
import { writeTinyRun, eigenvalText } from '../../annotations/tinyRun';
import { reportFromJson } from '../../../../src/cli/batch/reportFromJson';
import { reportToJson } from '../../../../src/core/report/reportJson';

function capture(progress = false): CliIO & { stdout: string; stderr: string; shown: string[] } {
  const io = {
    stdout: '',
    stderr: '',
    shown: [] as string[],
    out: (t: string) => void (io.stdout += t.endsWith('\n') ? t : `${t}\n`),
    err: (t: string) => void (io.stderr += t.endsWith('\n') ? t : `${t}\n`),
    ...(progress ? { progress: (t: string) => void io.shown.push(t) } : {}),
  };
  return io;
}

const lines = (text: string) =>
  text
    .split('\n')
    .filter((l) => l !== '')
    .map((l) => JSON.parse(l) as Record<string, unknown>);

/** The gap each run is written with (eV); the tight-binding model's gap is exactly this, direct at Γ. */
const GAPS: Record<string, number> = { 'a-gap1.0': 1.0, 'b-gap1.5': 1.5, 'group/d-gap2.0': 2.0, 'group/e-gap0.5': 0.5, 'zz/f-gap1.2': 1.2 };

function makeScreen(): string {
  const root = join(mkdtempSync(join(tmpdir(), 'vs-batch-')), 'screen');
  for (const [name, gap] of Object.entries(GAPS)) writeTinyRun(join(root, name), { gap_eV: gap });
  // A run whose EIGENVAL holds an overflowed number: the reader refuses it with a sentence.
  const broken = join(root, 'c-broken');
  writeTinyRun(broken);
  writeFileSync(join(broken, 'EIGENVAL'), eigenvalText().replace(/ {3}1\.500000 {3}/, '   ******** '));
  // A folder with no run in it is searched and left out.
  mkdirSync(join(root, 'notes'));
  writeFileSync(join(root, 'notes', 'README.txt'), 'not a run\n');
  return root;
}

describe('batch commands: JSON Lines, jobs and shards', function () {
  this.timeout(120000);
  const root = makeScreen();
  const made = [dirname(root)];
  after(() => {
    for (const d of made) rmSync(d, { recursive: true, force: true });
  });
  const expectedPaths = [...Object.keys(GAPS), 'c-broken']
    .map((n) => `${root}/${n}`)
    .sort((a, b) => {
      const x = a.split('/');
      const y = b.split('/');
      for (let i = 0; i < Math.min(x.length, y.length); i++) if (x[i] !== y[i]) return x[i]! < y[i]! ? -1 : 1;
      return x.length - y.length;
    });

  let oneMachine = '';
  it('analyze --jsonl: one line per run in path order, a failing run as a line with "error", exit 1', async () => {
    const io = capture();
    const code = await main(['analyze', root, '--jsonl', '--jobs', '2'], io);
    assert.equal(code, 1, io.stderr);
    const recs = lines(io.stdout);
    assert.deepEqual(
      recs.map((r) => r.path),
      expectedPaths,
    );
    for (const r of recs) {
      const name = (r.path as string).slice(root.length + 1);
      if (name === 'c-broken') {
        assert.deepEqual(Object.keys(r), ['path', 'error']);
        assert.match(r.error as string, /EIGENVAL:\d+:\d+: /);
        continue;
      }
      for (const key of ['path', 'file', 'format', 'nk', 'nbands', 'nspin', 'electrons', 'metal', 'gap', 'extrema', 'warnings', 'cautions'])
        assert.ok(key in r, key);
      const gap = r.gap as { eV: number; direct: boolean; vbm: { band: number }; cbm: { band: number } };
      // Analytic model: gap E_g exactly (written with 6 decimals), direct at Γ, band 1 → band 2 (1-based).
      assert.ok(Math.abs(gap.eV - GAPS[name]!) < 2e-6, `${name}: ${gap.eV}`);
      assert.equal(gap.direct, true);
      assert.equal(gap.vbm.band, 1);
      assert.equal(gap.cbm.band, 2);
    }
    oneMachine = io.stdout;
  });

  it('a line is the --json object of the same run plus path (and the crystal compare needs)', async () => {
    const run = `${root}/b-gap1.5`;
    const io = capture();
    assert.equal(await main(['analyze', run, '--json'], io), 0, io.stderr);
    const single = JSON.parse(io.stdout) as Record<string, unknown>;
    const rec = lines(oneMachine).find((r) => r.path === run)!;
    const { path, lattice, rotations, ...rest } = rec;
    assert.equal(path, run);
    assert.deepEqual(rest, single);
    // POSCAR: simple cubic, a = 4 Å; its point group m-3m has 48 rotations (International Tables, Vol. A).
    assert.deepEqual(lattice, [
      [4, 0, 0],
      [0, 4, 0],
      [0, 0, 4],
    ]);
    assert.equal((rotations as unknown[]).length, 48);
  });

  it('gives the same lines with one job (in this thread) as with a pool of workers', async () => {
    const io = capture();
    assert.equal(await main(['analyze', root, '--jsonl', '--jobs', '1'], io), 1);
    assert.equal(io.stdout, oneMachine);
  });

  it('shows progress only where a terminal can show it, and clears it at the end', async () => {
    const quiet = capture(false);
    await main(['analyze', root, '--jsonl', '--jobs', '1'], quiet);
    assert.doesNotMatch(quiet.stderr, /\//);
    const tty = capture(true);
    await main(['analyze', root, '--jsonl', '--jobs', '1'], tty);
    assert.ok(
      tty.shown.some((t) => /^valleyscope: 6\/6 runs analysed, 1 failed$/.test(t)),
      tty.shown.join('|'),
    );
    assert.equal(tty.shown.at(-1), '');
    assert.equal(tty.stdout, oneMachine);
  });

  it('a report read back from its line writes the same JSON again', () => {
    for (const r of lines(oneMachine).filter((x) => !('error' in x))) {
      // The line's additions to the report (the energy zero and each extremum's path position, written by
      // cli/analysisJson.ts) are not part of the Report: compare the rest.
      const { path: _p, lattice: _l, rotations: _r, energyZero: _z, ...rest } = r;
      const extrema = (rest.extrema as Record<string, unknown>[]).map(({ pathPosition: _pp, ...x }) => x);
      assert.deepEqual(reportToJson(reportFromJson(r, 'test')), { ...rest, extrema });
    }
  });

  it('a hostile record is refused with a sentence naming file, line and field', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-jsonl-bad-'));
    made.push(dir);
    const good = lines(oneMachine).filter((x) => !('error' in x));
    const gap = good[1]!.gap as { vbm: object };
    const bad = { ...good[1]!, gap: { ...gap, vbm: { ...gap.vbm, band: -3 } } };
    const f = join(dir, 'bad.jsonl');
    writeFileSync(f, `${JSON.stringify(good[0])}\n${JSON.stringify(bad)}\n`);
    const io = capture();
    assert.equal(await main(['compare', f], io), 1);
    assert.match(io.stderr, /bad\.jsonl:2: "gap\.vbm\.band" should be a whole number/);
    const cut = join(dir, 'cut.jsonl');
    writeFileSync(cut, `${JSON.stringify(good[0])}\n${JSON.stringify(good[1]).slice(0, 200)}\n`);
    const io2 = capture();
    assert.equal(await main(['compare', cut], io2), 1);
    assert.match(io2.stderr, /cut\.jsonl:2: not a JSON object/);
  });

  it('shards: every run in exactly one shard; compare of the merged shards equals one machine', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-shards-'));
    made.push(dir);
    const files: string[] = [];
    const seen: string[] = [];
    for (let i = 1; i <= 3; i++) {
      const io = capture();
      await main(['analyze', root, '--jsonl', '--jobs', '1', '--shard', `${i}/3`], io);
      const f = join(dir, `shard-${i}.jsonl`);
      writeFileSync(f, io.stdout);
      files.push(f);
      seen.push(...lines(io.stdout).map((r) => r.path as string));
    }
    assert.deepEqual([...seen].sort(), [...expectedPaths].sort());
    const all = join(dir, 'one-machine.jsonl');
    writeFileSync(all, oneMachine);
    for (const format of ['json', 'table']) {
      const merged = capture();
      assert.equal(await main(['compare', ...[...files].reverse(), '--format', format], merged), 0, merged.stderr);
      const one = capture();
      assert.equal(await main(['compare', all, '--format', format], one), 0, one.stderr);
      assert.equal(merged.stdout, one.stdout);
      assert.equal(merged.stderr, one.stderr);
      assert.match(one.stderr, /c-broken: left out of the comparison/);
    }
    // The merged comparison has the five good runs, the first in path order as the reference.
    const j = capture();
    await main(['compare', ...files, '--format', 'json'], j);
    const c = JSON.parse(j.stdout) as { reference: string; runs: { name: string; gap_eV: number }[] };
    assert.equal(c.reference, `${root}/a-gap1.0`);
    assert.deepEqual(
      c.runs.map((r) => r.name),
      expectedPaths.filter((p) => !p.endsWith('c-broken')),
    );
    // A run given twice (shards merged twice) is refused.
    const twice = capture();
    // (Which shard holds which run depends on the paths, here under a random temporary folder.)
    const nonEmpty = files.find((f) => readFileSync(f, 'utf8').trim() !== '')!;
    assert.equal(await main(['compare', nonEmpty, nonEmpty], twice), 1);
    assert.match(twice.stderr, /already given/);
  });

  it("check: the shards of --jsonl merged give one machine's report and exit code", async () => {
    const io = capture();
    assert.equal(await main(['annotate', root, '--jobs', '2'], io), 1, io.stderr); // c-broken cannot be annotated
    assert.match(io.stderr, /c-broken/);
    // Change one run's data: its annotations become stale (new bytes) and drifted (gap 1.5 → 1.7 eV).
    writeTinyRun(`${root}/b-gap1.5`, { gap_eV: 1.7 });
    const dir = mkdtempSync(join(tmpdir(), 'vs-check-shards-'));
    made.push(dir);
    const files: string[] = [];
    for (let i = 1; i <= 2; i++) {
      const s = capture();
      await main(['check', root, '--jsonl', '--shard', `${i}/2`, '--jobs', '1'], s);
      const f = join(dir, `check-${i}.jsonl`);
      writeFileSync(f, s.stdout);
      files.push(f);
    }
    for (const format of ['text', 'md']) {
      const one = capture();
      const oneCode = await main(['check', root, '--format', format, '--jobs', '2'], one);
      const merged = capture();
      const mergedCode = await main(['check', ...files, '--format', format], merged);
      assert.equal(oneCode, 1);
      assert.equal(mergedCode, oneCode);
      assert.equal(merged.stdout, one.stdout);
    }
    const text = capture();
    await main(['check', ...files], text);
    assert.match(text.stdout, /5 annotations files checked: 4 match their data, 1 stale or drifted, 0 could not be checked\./);
    assert.match(text.stdout, /STALE, DRIFTED +.*b-gap1\.5/);
  });

  it('annotate --jsonl: one line per run with its messages, the failing run as a line with "error"', async () => {
    const io = capture();
    assert.equal(await main(['annotate', root, '--jsonl', '--jobs', '2'], io), 1);
    const recs = lines(io.stdout);
    assert.deepEqual(
      recs.map((r) => r.path),
      expectedPaths,
    );
    for (const r of recs) {
      if ((r.path as string).endsWith('c-broken')) {
        assert.match(r.error as string, /EIGENVAL:\d+:\d+: /);
        continue;
      }
      assert.equal(r.error, undefined);
      assert.match((r.messages as string[])[0]!, /\.valleys\.json: (unchanged|updated)/);
    }
  });
  it('analyze and annotate over folders holding no run (workers prestarted): a sentence and exit 1', async () => {
    const empty = mkdtempSync(join(tmpdir(), 'vs-batch-empty-'));
    made.push(empty);
    mkdirSync(join(empty, 'nothing-here'));
    for (const argv of [
      ['analyze', empty, '--jsonl', '--jobs', '2'],
      ['annotate', empty, '--jobs', '2'],
    ]) {
      const io = capture();
      assert.equal(await main(argv, io), 1);
      assert.match(io.stderr, new RegExp(`valleyscope ${argv[0]}: no eigenvalue files found under`));
      assert.equal(io.stdout, '');
    }
  });
});
