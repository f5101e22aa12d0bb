/**
 * A band structure's k-points must be finite and of a size a calculation can have: every reader's output
 * passes here (load.ts), so a coordinate of 1e300 or NaN is refused with a sentence instead of being
 * labelled, fitted and printed as "-Infinity ± NaN".
 */
import type { BandStructure } from '../model';
import { ReaderError } from '../errors';

/**
 * Largest fractional k coordinate accepted. Band paths and meshes stay within a few reciprocal-lattice
 * vectors of Γ (common practice: |k| ≤ 1 in fractional coordinates, paths sometimes extend to 2–3 for
 * unfolded supercells); 1000 leaves a wide margin and still refuses overflowed or garbage fields.
 */
export const MAX_FRACTIONAL_K = 1000;

export function refuseAbsurdKpoints(bs: BandStructure): BandStructure {
  const k = bs.kpoints;
  const n = Math.min(bs.nk * 3, k.length);
  for (let i = 0; i < n; i++) {
    const x = k[i]!;
    if (Number.isFinite(x) && Math.abs(x) <= MAX_FRACTIONAL_K) continue;
    const point = Math.floor(i / 3) + 1;
    const axis = ['1st', '2nd', '3rd'][i % 3];
    const what = Number.isFinite(x) ? `${x.toExponential(2)}, beyond ±${MAX_FRACTIONAL_K} reciprocal-lattice units` : 'not a finite number';
    throw new ReaderError(
      bs.source.format,
      bs.source.file,
      { line: 0, column: 0 },
      `k-point ${point} has a ${axis} coordinate that is ${what}: no calculation produces such a k-point, so the file was not analysed`,
    );
  }
  return bs;
}
