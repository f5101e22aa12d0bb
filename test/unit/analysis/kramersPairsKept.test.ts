import assert from 'node:assert/strict';
import type { BandStructure, Vec3 } from '../../../src/core/model';
import { kramersRepresentatives, KRAMERS_PAIR_TOLERANCE_EV } from '../../../src/core/analysis/kramersPairs';
import { cosineBand, cubicLattice, pointsModel, simpleCubicStructure, type Dispersion } from '../../support/models';

// Whether bands pair is worked out once per run and channel and kept: the answers must not depend on the order
// in which extrema ask, nor leak from one run to another. Model: simple cubic cosine tight-binding bands (a
// published analytic form, invented numbers); bands 1–2 are an exact pair, bands 3–4 split by 2 meV (more than
// KRAMERS_PAIR_TOLERANCE_EV) at one k-point.
const A = 4;
const kpoints: Vec3[] = Array.from({ length: 12 }, (_, i) => [i / 24, (i % 3) / 12, 0]);

function run(split: number): BandStructure {
  const v = cosineBand(-3, [-0.5, -0.5, -0.5]);
  const c = cosineBand(1, [0.6, 0.6, 0.6]);
  const c2: Dispersion = (kc, kf) => c(kc, kf) + (kf[0] === 0.25 ? split : 0);
  const bs = pointsModel({ lattice: cubicLattice(A), bands: [v, v, c, c2], electrons: 2, kpoints, structure: simpleCubicStructure(A) });
  bs.spinorbit = true;
  return bs;
}

describe('Kramers pairs: worked out once per run and kept', () => {
  it('the same answers in any order of asking, and per run', () => {
    const fresh = (): BandStructure => run(2 * KRAMERS_PAIR_TOLERANCE_EV);
    const a = fresh();
    assert.equal(kramersRepresentatives(a, 0, [2, 3], 2), null, 'split by 2 meV at one point: not a pair');
    assert.deepEqual(kramersRepresentatives(a, 0, [0, 1], 1), [1]);
    assert.equal(kramersRepresentatives(a, 0, [0, 1, 2, 3], 0), null, 'a group holding the split pair');
    assert.equal(kramersRepresentatives(a, 0, [2, 3], 3), null, 'asked again: the same');
    const b = fresh();
    assert.deepEqual(kramersRepresentatives(b, 0, [0, 1], 0), [0]);
    assert.equal(kramersRepresentatives(b, 0, [2, 3], 2), null);
    // Another run whose pair 3–4 is exact: its own answer, not the first run's.
    const c = run(0);
    assert.deepEqual(kramersRepresentatives(c, 0, [0, 1, 2, 3], 3), [1, 3]);
    assert.deepEqual(kramersRepresentatives(a, 0, [0, 1], 0), [0]);
  });
});
