/**
 * The rounding of the energies as written (e.g. 4 or 6 decimals): its standard deviation, q/√12 for a
 * rounding step q, is the smallest error any fit to these numbers can claim.
 */
import type { BandStructure } from '../model';

/** The decimal step the energies are written with (eV), or 0 when they carry more than 8 decimals. */
export function energyRoundingStep(bs: BandStructure, maxSamples = 4000): number {
  const e = bs.energies[0];
  if (!e || e.length === 0) return 0;
  const stride = Math.max(1, Math.floor(e.length / maxSamples));
  for (let d = 1; d <= 8; d++) {
    const q = 10 ** -d;
    let ok = true;
    for (let i = 0; i < e.length && ok; i += stride) {
      const x = e[i]! / q;
      if (Math.abs(x - Math.round(x)) > 1e-3 * Math.max(1, Math.abs(x) * 1e-9)) ok = false;
    }
    if (ok) return q;
  }
  return 0;
}

/** Standard deviation of one energy from rounding, eV. */
export function energySigma(bs: BandStructure): number {
  return energyRoundingStep(bs) / Math.sqrt(12);
}
