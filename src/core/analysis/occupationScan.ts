/**
 * One pass over one spin channel's occupations (as fractions of a full state): which bands are filled at some
 * k-points and empty at others, which are partly filled beyond smearing tails, the largest tail, and the
 * highest filled and lowest empty energies. The evidence conductionClass.ts weighs first.
 *
 * Written for speed on large runs: one loop in k order over typed arrays (the layout the readers write),
 * per-band results in typed arrays, one result object of a fixed shape, no allocation per state.
 * Pure: no I/O.
 */
import type { OccupationArray } from '../model';
import type { KPointEdges } from './gap';

/** What one channel's occupations show. Per-band arrays are indexed by the 0-based band. */
export interface OccupationScan {
  /** 1 where the band is filled (above half of full) at some k-point. */
  filledSomewhere: Uint8Array;
  /** 1 where the band is not filled at some k-point. */
  emptySomewhere: Uint8Array;
  /** 1 where the band is partly filled (further than `tailLimit` from both 0 and 1) at some k-point. */
  partial: Uint8Array;
  /** The partly filled state furthest from 0 and 1: its band (−1: none) and fraction. */
  partlyFilledBand: number;
  partlyFilledValue: number;
  /** The largest deviation from 0 or 1 within the tail limit (0 when none). */
  largestTail: number;
  /** Highest energy of a filled state, lowest of an empty one (±Infinity when none). */
  maxFilled: number;
  minEmpty: number;
  /** Per k-point, the highest filled and lowest empty state (gap.ts's KPointEdges, found in the same pass). */
  kEdges: KPointEdges;
}

/**
 * Scan occupations `occ` (written values; `full` is what a full state holds, 1 or 2) beside the energies of the
 * same layout [k × nBands + band]. The fraction of a state is occ / full, as occupationFractions computes it.
 */
export function scanOccupations(
  occ: OccupationArray,
  energies: Float64Array,
  full: 1 | 2,
  nk: number,
  nb: number,
  tailLimit: number,
): OccupationScan {
  const filledSomewhere = new Uint8Array(nb);
  const emptySomewhere = new Uint8Array(nb);
  const partial = new Uint8Array(nb);
  // Per band: the largest deviation beyond the tail limit, first k-point first on ties.
  const bestDev = new Float64Array(nb);
  const bestValue = new Float64Array(nb);
  let largestTail = 0;
  let maxFilled = -Infinity;
  let minEmpty = Infinity;
  const hi = new Float64Array(nk);
  const hb = new Int32Array(nk);
  const lo = new Float64Array(nk);
  const lb = new Int32Array(nk);
  for (let k = 0; k < nk; k++) {
    const row = k * nb;
    // gap.ts's per-k edges, with its comparisons: the highest band among equal filled values, the lowest empty.
    let h = -Infinity;
    let l = Infinity;
    let hbk = -1;
    let lbk = -1;
    for (let b = 0; b < nb; b++) {
      const o = occ[row + b]!;
      const en = energies[row + b]!;
      // Whole states (most of them): no deviation from 0 or 1 to weigh. (o === full is o / full === 1, and
      // o === 0 is o / full === 0: full is 1 or 2, whose division is exact.)
      if (o === full) {
        filledSomewhere[b] = 1;
        maxFilled = Math.max(maxFilled, en);
        if (en >= h) {
          h = en;
          hbk = b;
        }
        continue;
      }
      if (o === 0) {
        emptySomewhere[b] = 1;
        minEmpty = Math.min(minEmpty, en);
        if (en < l) {
          l = en;
          lbk = b;
        }
        continue;
      }
      const x = o / full;
      if (x > 0.5) {
        filledSomewhere[b] = 1;
        maxFilled = Math.max(maxFilled, en);
        if (en >= h) {
          h = en;
          hbk = b;
        }
      } else {
        emptySomewhere[b] = 1;
        minEmpty = Math.min(minEmpty, en);
        if (en < l) {
          l = en;
          lbk = b;
        }
      }
      const dev = Math.min(Math.abs(x), Math.abs(x - 1));
      if (dev > tailLimit) {
        if (partial[b] === 0 || dev > bestDev[b]!) {
          bestDev[b] = dev;
          bestValue[b] = x;
        }
        partial[b] = 1;
      } else if (dev > largestTail) largestTail = dev;
    }
    hi[k] = h;
    hb[k] = hbk;
    lo[k] = l;
    lb[k] = lbk;
  }
  // Across bands in band order, the first on ties (as a scan band by band would find it).
  let partlyFilledBand = -1;
  let partlyFilledValue = 0;
  let best = 0;
  for (let b = 0; b < nb; b++) {
    if (partial[b] === 1 && (partlyFilledBand < 0 || bestDev[b]! > best)) {
      partlyFilledBand = b;
      partlyFilledValue = bestValue[b]!;
      best = bestDev[b]!;
    }
  }
  const kEdges = { hi, hb, lo, lb };
  return { filledSomewhere, emptySomewhere, partial, partlyFilledBand, partlyFilledValue, largestTail, maxFilled, minEmpty, kEdges };
}
