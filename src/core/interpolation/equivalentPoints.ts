/**
 * A mesh run whose code reduced the mesh by fewer operations than the crystal has (VASP's ISYM = 0, time
 * reversal only, or ISYM = −1, the whole mesh; pw.x with nosym) lists points that the crystal's symmetry makes
 * equivalent. Where their energies agree, the electronic structure has the crystal's symmetry: one point per
 * star is kept, carrying the star's summed weight, and the run is interpolated as an irreducible one. Where they
 * do not agree (magnetic order, spin–orbit coupling with a moment, a field), the crystal's operations are not
 * symmetries of the bands and the run is not interpolated with them: the reason says so.
 */
import type { MeshRunInput } from './meshInterpolation';

/** Largest difference of a band's energies at equivalent listed points still read as one point, eV. */
export const EQUIVALENT_ENERGY_TOLERANCE_EV = 1e-3;

export interface MergedPoints {
  /** Points the file lists. */
  listed: number;
  /** Points kept, one per star. */
  kept: number;
  /** Largest difference of a band's energies between merged points, eV. */
  largestDifference_eV: number;
}

export function mergeEquivalentPoints(
  input: MeshRunInput,
  duplicateOf: Int32Array,
): { input: MeshRunInput; merged: MergedPoints; reason: null } | { input: null; merged: null; kind: 'lower-symmetry'; reason: string } {
  const nk = input.kpoints.length / 3;
  let largest = 0;
  let worst: [number, number] | null = null;
  for (const e of input.bands) {
    for (let i = 0; i < nk; i++) {
      const owner = duplicateOf[i]!;
      if (owner < 0) continue;
      const d = Math.abs(e[i]! - e[owner]!);
      if (!(d <= largest)) {
        largest = d;
        worst = [owner, i];
      }
    }
  }
  if (worst && !(largest <= EQUIVALENT_ENERGY_TOLERANCE_EV)) {
    const [owner, i] = worst;
    return {
      input: null,
      merged: null,
      kind: 'lower-symmetry',
      reason: `k-points ${owner + 1} and ${i + 1} are equivalent by the crystal's symmetry, but an interpolated band's energies differ there by ${(1000 * largest).toFixed(1)} meV (more than ${1000 * EQUIVALENT_ENERGY_TOLERANCE_EV} meV): the bands have less symmetry than the crystal (magnetic order, spin–orbit coupling with a magnetic moment, an applied field), so the run is not interpolated with the crystal's operations.`,
    };
  }
  const keep: number[] = [];
  for (let i = 0; i < nk; i++) if (duplicateOf[i]! < 0) keep.push(i);
  const kpoints = new Float64Array(3 * keep.length);
  keep.forEach((i, at) => kpoints.set(input.kpoints.subarray(3 * i, 3 * i + 3), 3 * at));
  let weights: Float64Array | null = null;
  if (input.weights) {
    const sum = new Float64Array(nk);
    for (let i = 0; i < nk; i++) sum[duplicateOf[i]! >= 0 ? duplicateOf[i]! : i]! += input.weights[i]!;
    weights = Float64Array.from(keep, (i) => sum[i]!);
  }
  const bands = input.bands.map((e) => Float64Array.from(keep, (i) => e[i]!));
  return {
    input: { ...input, kpoints, weights, bands },
    merged: { listed: nk, kept: keep.length, largestDifference_eV: largest },
    reason: null,
  };
}
