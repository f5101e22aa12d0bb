import assert from 'node:assert/strict';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { symmetryContext } from '../../../src/core/analysis/valleyCount';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { MAX_INTERPOLATION_POINTS } from '../../../src/core/interpolation/meshInterpolation';
import { diamondStructure, fccLattice, parabolicBand, pointsModel } from '../../support/models';

// Which operations a run's analysis uses: runs the mesh interpolation may take keep the library's operations in the
// library's order (its star sums follow that order); paths and runs too large for it get the same set of operations,
// for a crystal on a cubic lattice found without the library. Reference: the library (moyo) on the same structure;
// diamond's point group m-3m has 48 operations (International Tables vol. A).
const key = (m: Mat3): string => m.map((r) => r.join(',')).join(';');

describe('the symmetry a run is analysed with', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  const a = 5.43;
  const structure = diamondStructure(a, 'Si');
  const points = (n: number): Vec3[] => Array.from({ length: n }, (_, i) => [(i % 17) / 17, Math.floor(i / 17) / 97, 0.1]);
  const run = (n: number, sampling: 'path' | 'points') =>
    pointsModel({ lattice: fccLattice(a), bands: [parabolicBand(0, 1)], electrons: 2, kpoints: points(n), structure, sampling });

  it('a run the interpolation may take: the library operations, in its order, also after a path run of the same structure', () => {
    const path = symmetryContext(run(40, 'path')).sym!;
    const mesh = symmetryContext(run(40, 'points')).sym!;
    const lib = crystalSymmetry(structure);
    assert.deepEqual(mesh.pointGroup.map(key), lib.pointGroup.map(key));
    assert.equal(path.pointGroup.length, 48);
    assert.deepEqual(path.pointGroup.map(key).sort(), lib.pointGroup.map(key).sort());
  });

  it('a point run too large for the interpolation: the same operations as the library', () => {
    const sym = symmetryContext(run(MAX_INTERPOLATION_POINTS + 1, 'points')).sym!;
    assert.deepEqual(sym.reciprocalPointGroup.map(key).sort(), crystalSymmetry(structure).reciprocalPointGroup.map(key).sort());
  });
});
