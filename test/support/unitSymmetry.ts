import type { Mat3 } from '../../src/core/model';
import { crystalSymmetry, type CrystalSymmetry } from '../../src/core/lattice/symmetry';

/** The symmetry of a Bravais lattice: one atom at the origin of `lattice` (call ensureSymmetryReady first). */
export function latticeSymmetry(lattice: Mat3): CrystalSymmetry {
  return crystalSymmetry({ lattice, species: ['X'], positions: new Float64Array([0, 0, 0]) });
}
