import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { crystalSymmetry, ensureSymmetryReady, starOfK } from '../../../src/core/lattice/symmetry';
import { irreducibleMesh, recogniseMesh } from '../../../src/core/interpolation/regularMesh';
import { latticeSymmetry } from '../../support/unitSymmetry';
import { cubicLattice } from '../../support/models';

// Regular meshes k = (j + s)/n (Monkhorst & Pack, Phys. Rev. B 13, 5188 (1976); Γ-centred when s = 0) reduced
// by the crystal's point group and time reversal: each irreducible point stands for the mesh points of its
// star, and the weights are the star sizes over the mesh size (common practice).

const fcc = (a: number): Mat3 => [
  [0, a / 2, a / 2],
  [a / 2, 0, a / 2],
  [a / 2, a / 2, 0],
];

describe('regular k-meshes: recognition and expansion by symmetry', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('a Γ-centred 12×12×12 mesh of diamond: recognised, every mesh point covered once, star sizes = orbit sizes', () => {
    const sym = crystalSymmetry({ lattice: fcc(5.43), species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const { kpoints, weights } = irreducibleMesh([12, 12, 12], [0, 0, 0], sym.reciprocalPointGroup);
    const rec = recogniseMesh(kpoints, weights, sym.reciprocalPointGroup);
    assert.ok(rec.mesh, rec.reason ?? '');
    assert.deepEqual(rec.mesh.divisions, [12, 12, 12]);
    assert.deepEqual(rec.mesh.shift, [0, 0, 0]);
    const nk = kpoints.length / 3;
    let sum = 0;
    for (let i = 0; i < nk; i++) {
      const k: [number, number, number] = [kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!];
      // The star of k under the point group and time reversal, counted by the lattice module independently.
      assert.equal(rec.mesh.starSize[i], starOfK(sym, k).length, JSON.stringify(k));
      sum += rec.mesh.starSize[i]!;
    }
    assert.equal(sum, 12 ** 3);
    assert.ok(rec.mesh.irreducibleOf.every((x) => x >= 0 && x < nk));
  });

  it('a shifted 4×4×4 Monkhorst–Pack mesh of a simple cubic crystal is recognised with shift ½', () => {
    const sym = latticeSymmetry(cubicLattice(3));
    const { kpoints, weights } = irreducibleMesh([4, 4, 4], [0.5, 0.5, 0.5], sym.reciprocalPointGroup);
    // Written with integer multiplicities as a code's irreducible list does: the normalisation is free.
    const rec = recogniseMesh(
      kpoints,
      weights.map((w) => Math.round(w * 64)),
      sym.reciprocalPointGroup,
    );
    assert.ok(rec.mesh, rec.reason ?? '');
    assert.deepEqual(rec.mesh.divisions, [4, 4, 4]);
    assert.deepEqual(rec.mesh.shift, [0.5, 0.5, 0.5]);
    // ±1/8, ±3/8 per axis under Oh: the stars (1,1,1), (3,1,1), (3,3,1), (3,3,3)/8 (common practice).
    assert.equal(kpoints.length / 3, 4);
  });

  it('refuses, with the reason, weights that disagree with the stars, a missing point, an equivalent pair, and points off any mesh', () => {
    const sym = crystalSymmetry({ lattice: fcc(5.43), species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const { kpoints, weights } = irreducibleMesh([6, 6, 6], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const badWeights = Float64Array.from(weights);
    // Two weights exchanged (Γ, a star of one, with its neighbour): the total is unchanged, Γ is now wrong.
    [badWeights[0], badWeights[1]] = [badWeights[1]!, badWeights[0]!];
    assert.match(recogniseMesh(kpoints, badWeights, sym.reciprocalPointGroup).reason ?? '', /weight of k-point 1 .*star \(1 of 216/);
    assert.equal(recogniseMesh(kpoints, badWeights, sym.reciprocalPointGroup).kind, 'weights');
    const dropped = kpoints.slice(0, 3 * (nk - 1));
    assert.match(recogniseMesh(dropped, null, sym.reciprocalPointGroup).reason ?? '', /uncovered/);
    assert.equal(recogniseMesh(dropped, null, sym.reciprocalPointGroup).kind, 'not-a-mesh');
    const k1 = [kpoints[3]!, kpoints[4]!, kpoints[5]!];
    const doubled = Float64Array.from([...kpoints, -k1[0]!, -k1[1]!, -k1[2]!]);
    assert.match(recogniseMesh(doubled, null, sym.reciprocalPointGroup).reason ?? '', /equivalent by symmetry/);
    const nanWeights = Float64Array.from(weights);
    nanWeights[2] = NaN;
    assert.match(recogniseMesh(kpoints, nanWeights, sym.reciprocalPointGroup).reason ?? '', /weight of k-point 3 is not a finite/);
    const off = Float64Array.from([0, 0, 0, 0.1234567, 0.3, 0.05]);
    assert.match(recogniseMesh(off, null, sym.reciprocalPointGroup).reason ?? '', /no regular mesh|uncovered/);
  });
});

describe('mesh interpolation refuses hostile band data with a reason', () => {
  before(async () => {
    await ensureSymmetryReady();
  });
  it('non-finite energies, a band of the wrong length', async () => {
    const { MeshInterpolation } = await import('../../../src/core/interpolation/meshInterpolation');
    const lattice: Mat3 = [
      [3, 0, 0],
      [0, 3, 0],
      [0, 0, 3],
    ];
    const sym = latticeSymmetry(lattice);
    const { kpoints, weights } = irreducibleMesh([4, 4, 4], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const bad = new Float64Array(nk).fill(1);
    bad[1] = Infinity;
    assert.match(
      MeshInterpolation.create({ lattice, kpoints, weights, bands: [new Float64Array(nk), bad], sym }).reason ?? '',
      /Band 2 has energies that are not finite/,
    );
    assert.match(
      MeshInterpolation.create({ lattice, kpoints, weights, bands: [new Float64Array(nk + 1)], sym }).reason ?? '',
      /Band 1 has/,
    );
    assert.equal(MeshInterpolation.create({ lattice, kpoints, weights, bands: [new Float64Array(nk + 1)], sym }).kind, 'energies');
  });
});
