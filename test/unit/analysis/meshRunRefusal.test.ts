import assert from 'node:assert/strict';
import type { Vec3 } from '../../../src/core/model';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { interpolateRun, meshRunInput, tooManyPointsRefusal } from '../../../src/core/interpolation/fromBandStructure';
import { MAX_INTERPOLATION_POINTS, MeshInterpolation, tooManyPointsReason } from '../../../src/core/interpolation/meshInterpolation';
import { diamondStructure, parabolicBand, pointsModel } from '../../support/models';

// A run with more irreducible points than the interpolation takes is refused before its bands are copied, with
// the reason the interpolation itself gives, and after the reasons that come first (a path run stays a path run).
// The model: two parabolic bands (free-electron form, common practice) on silicon's diamond structure
// (a = 5.43 Å, handbook value (memory)).

function run(nk: number, sampling: 'points' | 'path') {
  const kpoints: Vec3[] = Array.from({ length: nk }, (_, i) => [(0.5 * i) / nk, 0.1, 0.2]);
  return pointsModel({
    bands: [parabolicBand(0, -1), parabolicBand(1, 1)],
    electrons: 2,
    structure: diamondStructure(5.43, 'Si'),
    lattice: diamondStructure(5.43, 'Si').lattice,
    kpoints,
    sampling,
  });
}

describe('mesh run refusal before the bands are copied', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('too many points: the interpolation’s own reason, the same as from the full input', () => {
    const bs = run(MAX_INTERPOLATION_POINTS + 1, 'points');
    const early = interpolateRun(bs, { spin: 0, firstBand: 0, lastBand: 1 });
    assert.equal(early.run, null);
    const full = meshRunInput(bs, { spin: 0, firstBand: 0, lastBand: 1 });
    assert.ok(full.input);
    const late = MeshInterpolation.create(full.input);
    assert.equal(late.run, null);
    assert.equal(early.reason, late.reason);
    assert.equal(early.reason, tooManyPointsReason(MAX_INTERPOLATION_POINTS + 1));
  });

  it('a path run with too many points is refused as a path, the earlier reason', () => {
    const r = interpolateRun(run(MAX_INTERPOLATION_POINTS + 1, 'path'));
    assert.equal(r.reason, 'The k-points form a path, not a mesh.');
  });

  it('bands outside the run are said before the number of points', () => {
    const r = interpolateRun(run(MAX_INTERPOLATION_POINTS + 1, 'points'), { firstBand: 0, lastBand: 5 });
    assert.match(r.reason ?? '', /not within the run's 2 bands/);
  });

  it('at the limit, no refusal for the number of points', () => {
    assert.equal(tooManyPointsReason(MAX_INTERPOLATION_POINTS), null);
  });

  it('the refusal asked before any band is chosen is the one interpolateRun gives', () => {
    const many = run(MAX_INTERPOLATION_POINTS + 1, 'points');
    assert.equal(tooManyPointsRefusal(many, { spin: 0 }), interpolateRun(many, { spin: 0, firstBand: 0, lastBand: 1 }).reason);
    assert.equal(tooManyPointsRefusal(run(MAX_INTERPOLATION_POINTS + 1, 'path')), null);
    assert.equal(tooManyPointsRefusal(run(20, 'points')), null);
  });
});
