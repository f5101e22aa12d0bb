import type { BandStructure } from '../../src/core/model';
import { writeVasprun } from './writers/vasprun';

/**
 * vasprun.xml of the round-trip model (test/support/writers/roundTripModel.ts) with a line-mode generation of
 * 21 points per segment whose corners are Γ, X | X, S (fractional), as VASP lists them before the k-points.
 */
export function modelVasprun(model: BandStructure): string {
  return writeVasprun(model, {
    generation: {
      divisions: 21,
      ends: [
        [0, 0, 0],
        [0.5, 0, 0],
        [0.5, 0, 0],
        [0.5, 0.5, 0],
      ],
    },
  });
}
