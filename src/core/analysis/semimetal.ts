/**
 * The semimetal test for one spin channel of a metal (physics.md, "Metals, semimetals and smearing").
 */
import type { BandStructure } from '../model';

/** Two bands closer than this at some k touch or cross: not "clearly distinct" (eV). */
export const DISTINCT_BANDS_EV = 0.01;

const eV = (x: number): string => `${x.toFixed(4)} eV`;

/**
 * Semimetal test for one channel of a metal: exactly bands n−1 and n cross (n whole bands filled), band n−1
 * dips above E_F (hole pockets), band n below (electron pockets), and the two never touch.
 */
export function semimetalVerdict(
  bs: BandStructure,
  spin: number,
  crossing: number[],
  nFilled: number | null,
): { semimetal: boolean | null; detail: string } {
  const offset = bs.bandNumberOffset ?? 0;
  // Two adjacent bands must cross; whether they hold whole bands' worth of electrons needs the count.
  if (crossing.length !== 2 || crossing[1] !== crossing[0]! + 1) return { semimetal: false, detail: '' };
  if (nFilled === null) {
    return {
      semimetal: null,
      detail: ` Bands ${crossing[0]! + 1 + offset} and ${crossing[1] + 1 + offset} both cross the Fermi level; without the electron count, whether this is a semimetal (whole bands filled, electron and hole pockets) cannot be told.`,
    };
  }
  const lower = nFilled - 1;
  const upper = nFilled;
  if (crossing[0] !== lower || upper >= bs.nBands || lower < 0) return { semimetal: false, detail: '' };
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  let closest = Infinity;
  let lowerMax = -Infinity;
  let upperMin = Infinity;
  for (let k = 0; k < bs.nk; k++) {
    const a = e[k * nb + lower]!;
    const c = e[k * nb + upper]!;
    closest = Math.min(closest, c - a);
    lowerMax = Math.max(lowerMax, a);
    upperMin = Math.min(upperMin, c);
  }
  if (closest < DISTINCT_BANDS_EV) {
    return {
      semimetal: false,
      detail: ` Bands ${lower + 1 + offset} and ${upper + 1 + offset} touch or cross (${(closest * 1000).toFixed(1)} meV apart at closest), so the overlap is not between distinct bands.`,
    };
  }
  return {
    semimetal: true,
    detail: ` Semimetal: band ${lower + 1 + offset} has hole pockets and band ${upper + 1 + offset} electron pockets; they overlap by ${eV(lowerMax - upperMin)} (a negative indirect gap of ${eV(upperMin - lowerMax)}).`,
  };
}
