import assert from 'node:assert/strict';
import { kIdentities } from '../../../src/core/analysis/pathRays';
import { makeBands } from '../../support/bandStructure';

// k and k + G (G a reciprocal lattice vector, integer in fractional coordinates) are one point of the zone
// (common practice: E(k + G) = E(k)). Each k-point's first visit is the first index of its class.
describe('k-point identities modulo reciprocal lattice vectors', () => {
  it('gives every k-point the first index of the points equal to it modulo G', () => {
    const kpoints = [
      [0, 0, 0],
      [0.5, 0, 0.5],
      [0.25, 0.125, 0],
      [1, 0, 0], // Γ + G
      [-0.5, 1, 0.5], // X + G
      [0.25, 0.125, 1e-9], // the third point within the key's resolution (1e-5)
      [0.25, 0.126, 0],
      [0, 0, 0],
    ];
    const bs = makeBands({ kpoints, energies: [kpoints.map(() => [0])] });
    const { keyOf, firstOf } = kIdentities(bs);
    assert.deepEqual([...firstOf], [0, 1, 2, 0, 1, 2, 6, 0]);
    assert.equal(keyOf[3], keyOf[0]);
    assert.notEqual(keyOf[6], keyOf[2]);
  });

  it('finds the first visit of each point on a long path written twice (every class found once)', () => {
    const n = 5000;
    const kpoints: number[][] = [];
    for (let pass = 0; pass < 2; pass++) for (let i = 0; i < n; i++) kpoints.push([i / n + pass, 0.5 * pass, 0]);
    // The second pass is shifted by (1, 0.5, 0): x by a lattice vector, y by half of one, so no point repeats.
    const bs = makeBands({ kpoints, energies: [kpoints.map(() => [0])] });
    const { firstOf } = kIdentities(bs);
    for (let i = 0; i < n; i++) assert.equal(firstOf[i], i);
    for (let i = n; i < 2 * n; i++) assert.equal(firstOf[i], i, 'y = 0.5 is another point');
    const shifted = makeBands({ kpoints: kpoints.map(([x]) => [x!, 0, 0]), energies: [kpoints.map(() => [0])] });
    const f2 = kIdentities(shifted).firstOf;
    for (let i = n; i < 2 * n; i++) assert.equal(f2[i], i - n);
  });
});
