/**
 * Band runs with a hybrid functional in VASP list the weighted self-consistent mesh first and the band path
 * after it as zero-weight k-points (common practice). Both VASP readers drop the mesh by this one rule.
 */
import type { InputWarning, OccupationArray } from '../../model';

/** The per-k arrays of a run, as a reader holds them before building its BandStructure. */
export interface KArrays {
  kpoints: Float64Array;
  weights: Float64Array | null;
  energies: Float64Array[];
  occupations: OccupationArray[] | null;
  nk: number;
}

/**
 * How many leading k-points form a weighted mesh before a zero-weight path: all of the first z weights are
 * positive, all after them are zero, and the path has at least 2 points. 0 when the run is not of that kind.
 */
export function meshPointsBeforePath(weights: ArrayLike<number> | null, nk: number): number {
  if (!weights || nk <= 1 || !(weights[0]! > 0)) return 0;
  let z = nk;
  while (z > 0 && weights[z - 1] === 0) z--;
  if (z === 0 || z === nk || nk - z < 2) return 0;
  for (let i = 0; i < z; i++) if (!(weights[i]! > 0)) return 0;
  return z;
}

/**
 * The arrays without the mesh points (unchanged when there is no mesh before a path), and the warning that
 * says so (null when nothing was dropped).
 */
export function dropMeshBeforePath<T extends KArrays>(arrays: T, nBands: number): { arrays: T; warning: InputWarning | null } {
  const z = meshPointsBeforePath(arrays.weights, arrays.nk);
  if (z === 0) return { arrays, warning: null };
  const { kpoints, weights, energies, occupations, nk } = arrays;
  const kept: T = {
    ...arrays,
    kpoints: kpoints.slice(3 * z),
    weights: weights ? weights.slice(z) : null,
    energies: energies.map((e) => e.slice(z * nBands)),
    occupations: occupations ? occupations.map((e) => e.slice(z * nBands)) : null,
    nk: nk - z,
  };
  return {
    arrays: kept,
    warning: {
      code: 'mesh-points-dropped',
      message: `The first ${z} k-points carry weights (the self-consistent mesh of a hybrid-functional run); the band path is the ${nk - z} zero-weight points after them.`,
    },
  };
}
