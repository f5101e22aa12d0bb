/**
 * Header bombs in every companion reader (POSCAR/CONTCAR, KPOINTS, INCAR, Wannier90 _band.kpt,
 * _band.labelinfo.dat and .win, the pw.x XML beside bands.x output, a pw.x XML given as a structure; and the
 * band counts of bands.x output and CASTEP .bands): small
 * files whose headers claim hundreds of millions to billions of items. Each must end in a sentence (a reader
 * error, or a warning while the rest of the run is read) or be ignored harmlessly, never an "internal error" or
 * a V8 abort, and must not allocate in proportion to the claim. Memory is measured in a fresh child process
 * (headerBombCases.ts) by the rise of its peak resident size (getrusage maxRSS) during each case.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';

interface CaseResult {
  name: string;
  kind: string;
  sentence: string | null;
  warnings: string[];
  peakRiseMB: number;
}

/**
 * A claim of 10^8 atoms would need 2.4 GB of positions (3 doubles each) if allocated; 32 MB is far below
 * any proportional allocation and above the noise of parsing a small file.
 */
const PEAK_RISE_BOUND_MB = 32;

/** Cases whose claim itself must be refused with a sentence that names the claimed count. */
const MUST_REFUSE: [RegExp, RegExp][] = [
  [/^POSCAR atoms/, /announces .* atoms/],
  [/^POSCAR scale/, /not finite or larger/],
  [/^KPOINTS path end at 1e300/, /beyond/],
  [/^_band\.kpt announcing/, /announces .* k-points/],
  [/^pw\.x XML with <nks>/, /announces 2000000000 k-points/],
  [/^pw\.x XML with <nbnd>/, /says 2000000000 bands/],
  [/^Wannier90 run with num_wann/, /num_wann = 2000000000/],
  [/^bands\.x output with nbnd/, /announces 5000000000 bands/],
  [/^CASTEP \.bands with/, /announces 5000000000 eigenvalues per k-point/],
  [/^BXSF grid of 3000/, /3000 × 3000 × 3000 points\) needs more values/],
];

/** Runs that go on without the bad companion must say so in a warning naming it. */
const MUST_WARN: [RegExp, RegExp][] = [
  [/^EIGENVAL run with a bomb POSCAR/, /POSCAR:\d+: the header announces 2000000000 atoms/],
  [/^bands\.x output with a bomb pw\.x XML/, /data-file-schema\.xml:\d+: the file announces 2000000000 k-points/],
];

describe('header bombs in companion files', function () {
  this.timeout(120000);
  let results: CaseResult[] = [];
  let stderr = '';

  before(() => {
    const child = join(__dirname, 'headerBombCases.ts');
    const r = spawnSync(process.execPath, ['--import', 'tsx', child], { cwd: resolve('.'), encoding: 'utf8', maxBuffer: 16 * 1024 * 1024 });
    stderr = r.stderr;
    assert.equal(r.status, 0, `the child ended with ${r.status} ${r.signal ?? ''}: ${r.stderr}`);
    results = r.stdout
      .split('\n')
      .filter(Boolean)
      .map((l) => JSON.parse(l) as CaseResult);
  });

  it('every case ran, none ended in an internal error, and none allocated for its claim', () => {
    assert.equal(stderr.trim(), '', 'nothing on stderr (no V8 abort, no unhandled error)');
    assert.ok(results.length >= 20, `${results.length} cases`);
    for (const r of results) {
      assert.ok(r.kind === 'none' || r.kind === 'ReaderError', `${r.name}: ${r.kind} ${r.sentence ?? ''}`);
      assert.ok(r.peakRiseMB < PEAK_RISE_BOUND_MB, `${r.name}: peak memory rose by ${r.peakRiseMB.toFixed(1)} MB`);
    }
  });

  it('claims that cannot be true are refused with a sentence naming the claim', () => {
    for (const [name, sentence] of MUST_REFUSE) {
      const hits = results.filter((r) => name.test(r.name));
      assert.ok(hits.length > 0, `a case for ${name}`);
      for (const r of hits) {
        assert.equal(r.kind, 'ReaderError', `${r.name} is refused`);
        assert.match(r.sentence!, sentence, r.name);
      }
    }
  });

  it('a run whose companion is a bomb is read without it, and a warning says which file and why', () => {
    for (const [name, warning] of MUST_WARN) {
      const r = results.find((x) => name.test(x.name));
      assert.ok(r, `a case for ${name}`);
      assert.equal(r.kind, 'none', `${r.name}: the run itself is read`);
      assert.ok(
        r.warnings.some((w) => warning.test(w)),
        `${r.name}: warnings ${JSON.stringify(r.warnings)}`,
      );
    }
  });
});
