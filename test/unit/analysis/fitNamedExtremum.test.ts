/**
 * A fit of an extremum the caller names (the band view's listed or local extremum, a saved fit) is made
 * exactly there: never moved to "the nearest minimum" of another part of the band. Data: silicon from the
 * empirical pseudopotential model of Cohen & Bergstresser, Phys. Rev. 141, 789 (1966), on the standard fcc
 * path (fixtures/epm/si, VASP layout), whose lowest conduction band has its minimum on Γ–X, about 85 % of the
 * way to X (Cohen & Bergstresser; common practice for Si), so a click at X itself is nearer that minimum.
 */
import { strict as assert } from 'node:assert';
import { join } from 'node:path';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { loadRun } from '../../../src/core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { fitExtremumAt } from '../../../src/core/analysis/massEngine';
import { massWindowScan } from '../../../src/core/analysis/windowScan';
import { withChosenFits } from '../../../src/core/annotations/chosenFits';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { kpointAt, type BandStructure } from '../../../src/core/model';

const SI = join(__dirname, '../../../fixtures/epm/si/EIGENVAL');

function indexOf(bs: BandStructure, k: readonly number[]): number {
  for (let i = 0; i < bs.nk; i++) if (kpointAt(bs, i).every((x, j) => Math.abs(x - k[j]!) < 1e-6)) return i;
  return -1;
}

describe('analysis: fitting a named extremum', () => {
  let bs: BandStructure;
  before(async () => {
    await ensureSymmetryReady();
    bs = await loadRun(nodeFileAccessor, SI);
  });

  it('at X on the lowest conduction band: named, it stays at X; unnamed (a click), it walks to the Γ–X minimum', () => {
    // X = (1/2, 0, 1/2) in fcc reciprocal coordinates (common practice).
    const kX = indexOf(bs, [0.5, 0, 0.5]);
    assert.ok(kX >= 0, 'the path passes through X');
    const cb0 = analyzeBandStructure(bs, DEFAULT_SETTINGS).gap!.cbm.band - 1;
    const named = fitExtremumAt(bs, 0, kX, cb0, DEFAULT_SETTINGS, { maximum: false });
    assert.deepEqual(named.k, kpointAt(bs, kX));
    assert.ok(!named.warnings.some((w) => /Moved/.test(w)), named.warnings.join(' | '));
    assert.equal(named.kind, 'valley');
    // Control (the test can fail): the snapping fit of a click at X moves along Γ–X to the band's minimum,
    // at 0.75–0.9 of Γ–X (Cohen & Bergstresser 1966: about 0.85).
    const clicked = fitExtremumAt(bs, 0, kX, cb0, DEFAULT_SETTINGS);
    assert.equal(clicked.kind, 'cbm');
    const frac = clicked.k[0] / 0.5;
    assert.ok(clicked.k[1] === 0 && frac > 0.75 && frac < 0.9, `CBM at ${clicked.k}`);
    // The window scan of a named extremum stays there too.
    const scan = massWindowScan(bs, 0, kX, cb0, DEFAULT_SETTINGS, [20, 60], { maximum: false });
    const direct = fitExtremumAt(bs, 0, kX, cb0, { ...DEFAULT_SETTINGS, window_meV: 60 }, { maximum: false });
    assert.deepEqual(
      scan[1]!.masses.map((m) => m.mass),
      direct.masses.map((m) => m.mass),
    );
  });

  it('a saved fit named as a minimum at X is redone at X, and added beside the analysis’s own extrema', () => {
    const kX = indexOf(bs, [0.5, 0, 0.5]);
    const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
    const cb0 = report.gap!.cbm.band - 1;
    const out = withChosenFits(bs, report, DEFAULT_SETTINGS, [
      { spin: 0, kIndex: kX, band0: cb0, window_meV: 40, method: 'parabola', maximum: false },
    ]);
    assert.equal(out.report.extrema.length, report.extrema.length + 1);
    const added = out.report.extrema[out.report.extrema.length - 1]!;
    assert.deepEqual(added.k, kpointAt(bs, kX));
    assert.ok(added.valley, 'the added extremum has a valley (its identity in the annotations file)');
  });
});
