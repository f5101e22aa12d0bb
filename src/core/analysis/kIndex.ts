/** The k index of a k-point as written (fractional, within 1e-7 per component), or null when the run has none there. */
import type { BandStructure, Vec3 } from '../model';

export function kIndexOf(bs: BandStructure, k: Vec3): number | null {
  for (let i = 0; i < bs.nk; i++) {
    if (
      Math.abs(bs.kpoints[3 * i]! - k[0]) < 1e-7 &&
      Math.abs(bs.kpoints[3 * i + 1]! - k[1]) < 1e-7 &&
      Math.abs(bs.kpoints[3 * i + 2]! - k[2]) < 1e-7
    )
      return i;
  }
  return null;
}
