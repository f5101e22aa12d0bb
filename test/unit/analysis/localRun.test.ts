/**
 * A run that samples only a small neighbourhood of one point (a tensor run for the mass tensor) gives no gap
 * and reports only the extremum at its centre; a metal's annotations hold no gap entry.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { fitExtremumAt } from '../../../src/core/analysis/massEngine';
import { LOCAL_RUN_FRACTION, localRun } from '../../../src/core/analysis/localRun';
import { kpointsToCartesian, reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { planTensorRun } from '../../../src/core/lattice/tensorKpoints';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { reportToJson } from '../../../src/core/report/reportJson';
import { summaryText } from '../../../src/core/report/summaryText';
import type { Vec3 } from '../../../src/core/model';
import { ellipsoidalValley, fccLattice, parabolicBand, pointsModel } from '../../support/models';
import { smearedFreeElectronMetal } from '../../support/metalModels';
import { collinearModel } from '../../support/writers/roundTripModel';

describe('local runs', () => {
  const aSi = 5.43;
  const unit = (2 * Math.PI) / aSi;
  // A conduction valley at 0.85 of Γ–X (physics.md, step 6: silicon-like, common practice), masses 0.98 / 0.19
  // (handbook, memory: Sze & Ng); the valence maximum at Γ lies far outside the tensor run.
  const valley = ellipsoidalValley(1.1, [0, 0.85 * unit, 0], [0, 1, 0], 0.98, 0.19);
  const k0: Vec3 = [0.425, 0, 0.425];

  it('a tensor run around the valley: no gap, the reason said, only the CBM at the centre', () => {
    // Every point of the two shells (no symmetry reduction), as a tensor run computes them.
    const st = { points: planTensorRun(k0, 0.02, fccLattice(aSi), null, false).allPoints };
    const bs = pointsModel({ lattice: fccLattice(aSi), bands: [parabolicBand(0, -0.3), valley], electrons: 2, kpoints: st.points });
    assert.ok(localRun(bs));
    const r = analyzeBandStructure(bs);
    assert.equal(r.gap, null);
    assert.equal(r.metal, false);
    assert.match(r.gapReason ?? '', /small neighbourhood/);
    assert.deepEqual(
      r.extrema.map((e) => e.kind),
      ['cbm'],
    );
    assert.deepEqual(r.extrema[0]!.k, k0);
    const j = reportToJson(r);
    assert.equal(j.gap, null);
    assert.match(String(j.gapReason), /only the extremum at the centre/);
    assert.match(summaryText(r), /No gap: The k-points cover only a small neighbourhood/);
    assert.doesNotMatch(summaryText(r), /Band gap/);
  });

  it('a path across the zone is not a local run', () => {
    assert.equal(localRun(collinearModel()), null);
    assert.ok(analyzeBandStructure(collinearModel()).gap);
  });

  it("a metal's annotations hold no gap entry", () => {
    const bs = smearedFreeElectronMetal('gaussian', 0.1);
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, true);
    const doc = buildAnnotations(r, { format: 'model', file: 'model', files: [] }, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
    assert.equal(doc.gap, null);
    assert.equal(doc.metal, true);
    assert.ok(!doc.entries.some((e) => e.kind === 'vbm' || e.kind === 'cbm'));
  });

  it('a fit clicked in a metal is a peak or a valley, never a band edge', () => {
    const bs = smearedFreeElectronMetal('fermi-dirac', 0.1);
    // Band 1 at Γ (k index 0) is the free-electron minimum (analytic model).
    const e = fitExtremumAt(bs, 0, 0, 0, DEFAULT_SETTINGS);
    assert.equal(e.kind, 'valley');
    assert.equal(e.band, 1);
  });

  it('is local exactly when every point lies within the set fraction of the shortest reciprocal vector from the centroid', () => {
    // The rule as defined (localRun.ts), computed the long way: the centroid, the farthest point from it, over the
    // shortest reciprocal vector. Clouds from tight patches to spreads over the zone, around random centres.
    const lattice = fccLattice(aSi);
    const rec = reciprocalLattice(lattice);
    const shortest = Math.min(...rec.map((r) => Math.hypot(r[0], r[1], r[2])));
    const cloud = fc.record({
      centre: fc.tuple(
        fc.double({ min: -0.5, max: 0.5, noNaN: true }),
        fc.double({ min: -0.5, max: 0.5, noNaN: true }),
        fc.double({ min: -0.5, max: 0.5, noNaN: true }),
      ),
      spread: fc.double({ min: 0.001, max: 0.6, noNaN: true }),
      offsets: fc.array(
        fc.tuple(
          fc.double({ min: -1, max: 1, noNaN: true }),
          fc.double({ min: -1, max: 1, noNaN: true }),
          fc.double({ min: -1, max: 1, noNaN: true }),
        ),
        { minLength: 3, maxLength: 40 },
      ),
    });
    fc.assert(
      fc.property(cloud, ({ centre, spread, offsets }) => {
        const kpoints = offsets.map((o) => o.map((x, i) => centre[i]! + spread * x) as Vec3);
        const bs = pointsModel({ lattice, bands: [parabolicBand(0, 1)], electrons: 2, kpoints });
        const xyz = kpointsToCartesian(bs.kpoints, rec);
        const n = kpoints.length;
        const c = [0, 1, 2].map((a) => kpoints.reduce((sum, _, k) => sum + xyz[3 * k + a]! / n, 0));
        let extent = 0;
        for (let k = 0; k < n; k++)
          extent = Math.max(extent, Math.hypot(xyz[3 * k]! - c[0]!, xyz[3 * k + 1]! - c[1]!, xyz[3 * k + 2]! - c[2]!));
        const fraction = extent / shortest;
        const local = fraction > 0 && fraction < LOCAL_RUN_FRACTION;
        assert.equal(localRun(bs) !== null, local);
      }),
      { numRuns: 300, seed: 16 },
    );
  });
});
