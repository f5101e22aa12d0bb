import assert from 'node:assert/strict';
import type { Vec3 } from '../../../src/core/model';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { interpolateRun, meshRunInput, tooManyPointsRefusal } from '../../../src/core/interpolation/fromBandStructure';
import {
  MAX_INTERPOLATION_POINTS,
  MAX_LISTED_POINTS,
  MeshInterpolation,
  tooManyListedReason,
  tooManyPointsReason,
} from '../../../src/core/interpolation/meshInterpolation';
import { crystalSymmetry } from '../../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { cubicLattice, diamondStructure, parabolicBand, pointsModel, simpleCubicStructure } from '../../support/models';

// A run listing more points than the mesh recognition takes is refused before its bands are copied, with the
// reason the interpolation itself gives, and after the reasons that come first (a path run stays a path run); the
// bound on interpolated points applies to the irreducible points (after any merging).
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

  it('too many points listed: the interpolation’s own reason, the same as from the full input', () => {
    const bs = run(MAX_LISTED_POINTS + 1, 'points');
    const early = interpolateRun(bs, { spin: 0, firstBand: 0, lastBand: 1 });
    assert.equal(early.run, null);
    const full = meshRunInput(bs, { spin: 0, firstBand: 0, lastBand: 1 });
    assert.ok(full.input);
    const late = MeshInterpolation.create(full.input);
    assert.equal(late.run, null);
    assert.equal(early.reason, late.reason);
    assert.equal(early.reason, tooManyListedReason(MAX_LISTED_POINTS + 1));
  });

  it('a long list that is no mesh (a path written as points) is refused from its listed points, before any symmetry image', () => {
    // Along axis 1 the points are multiples of 1/(2 nk): a mesh of 2 nk > MAX_DIVISIONS divisions.
    const made = interpolateRun(run(MAX_INTERPOLATION_POINTS + 1, 'points'), { spin: 0, firstBand: 0, lastBand: 1 });
    assert.equal(made.run, null);
    assert.equal(made.kind, 'not-a-mesh');
    assert.match(made.reason!, /^Along reciprocal axis 1 the k-points lie on no regular mesh of up to \d+ divisions\.$/);
  });

  it('more irreducible points than the interpolation takes: refused after the mesh is recognised', () => {
    // A Γ-centred 40³ mesh of a simple cubic crystal (m-3m, 48 operations): its irreducible points (counted by
    // irreducibleMesh) are more than MAX_INTERPOLATION_POINTS and fewer than MAX_LISTED_POINTS.
    const sym = crystalSymmetry(simpleCubicStructure(4));
    const { kpoints, weights } = irreducibleMesh([40, 40, 40], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    assert.ok(nk > MAX_INTERPOLATION_POINTS && nk <= MAX_LISTED_POINTS, `${nk}`);
    const made = MeshInterpolation.create({ lattice: cubicLattice(4), kpoints, weights, bands: [new Float64Array(nk)], sym });
    assert.equal(made.run, null);
    assert.equal(made.reason, tooManyPointsReason(nk));
    assert.equal(made.kind, 'too-many');
  });

  it('a path run with too many points is refused as a path, the earlier reason', () => {
    const r = interpolateRun(run(MAX_LISTED_POINTS + 1, 'path'));
    assert.equal(r.reason, 'The k-points form a path, not a mesh.');
    assert.equal(r.kind, 'not-a-mesh');
  });

  it('bands outside the run are said before the number of points', () => {
    const r = interpolateRun(run(MAX_LISTED_POINTS + 1, 'points'), { firstBand: 0, lastBand: 5 });
    assert.match(r.reason ?? '', /not within the run's 2 bands/);
  });

  it('at the limit, no refusal for the number of points', () => {
    assert.equal(tooManyPointsReason(MAX_INTERPOLATION_POINTS), null);
    assert.equal(tooManyListedReason(MAX_LISTED_POINTS), null);
  });

  it('the refusal asked before any band is chosen is the one interpolateRun gives', () => {
    const many = run(MAX_LISTED_POINTS + 1, 'points');
    const early = tooManyPointsRefusal(many, { spin: 0 });
    const late = interpolateRun(many, { spin: 0, firstBand: 0, lastBand: 1 });
    assert.equal(early?.reason, late.reason);
    assert.equal(early?.kind, 'too-many');
    assert.equal(late.kind, 'too-many');
    assert.equal(tooManyPointsRefusal(run(MAX_LISTED_POINTS + 1, 'path')), null);
    assert.equal(tooManyPointsRefusal(run(20, 'points')), null);
  });
});
