/**
 * Filling the sampled states with electrons: the k weights, electrons per band, the occupations as fractions
 * of a full state, the electrons they hold, whole bands per channel, and the Fermi level that fills a count
 * (by bisection on the counting function).
 */
import type { BandStructure, OccupationArray } from '../model';
import type { OccupationRule } from './occupation';

/** Energies within this of each other are one level (eV), as in gap.ts. */
export const LEVEL_EV = 1e-4;

/** Normalised k weights (equal when the file gives none, or none that sum to a positive number). */
export function kWeights(bs: BandStructure): Float64Array {
  const w = new Float64Array(bs.nk);
  let sum = 0;
  if (bs.weights) for (let k = 0; k < bs.nk; k++) sum += Math.max(0, bs.weights[k]!);
  for (let k = 0; k < bs.nk; k++) w[k] = sum > 0 ? Math.max(0, bs.weights![k]!) / sum : 1 / bs.nk;
  return w;
}

/** Electrons per band of one channel. */
export function electronsPerBand(bs: BandStructure, occ: OccupationRule | null): 1 | 2 {
  return occ?.perBand ?? (bs.nSpin === 1 && !bs.spinorbit ? 2 : 1);
}

/**
 * The Fermi level that fills `electrons` into the sampled states (k weights normalised), by bisection on the
 * counting function: an estimate, exact only as the sampling becomes dense.
 */
export function fillingFermiLevel(bs: BandStructure, electrons: number, perBand: 1 | 2): number | null {
  if (!(electrons > 0) || bs.nk === 0) return null;
  const w = kWeights(bs);
  let lo = Infinity;
  let hi = -Infinity;
  for (const e of bs.energies)
    for (let i = 0; i < e.length; i++) {
      if (e[i]! < lo) lo = e[i]!;
      if (e[i]! > hi) hi = e[i]!;
    }
  const count = (ef: number): number => {
    let n = 0;
    for (const e of bs.energies)
      for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) if (e[k * bs.nBands + b]! <= ef) n += w[k]! * perBand;
    return n;
  };
  if (count(hi) < electrons - 1e-9) return null;
  // Smallest level holding the electrons, then the midpoint to the next state above it.
  for (let it = 0; it < 80; it++) {
    const mid = 0.5 * (lo + hi);
    if (count(mid) >= electrons - 1e-9) hi = mid;
    else lo = mid;
  }
  let next = Infinity;
  for (const e of bs.energies) for (let i = 0; i < e.length; i++) if (e[i]! > hi + LEVEL_EV && e[i]! < next) next = e[i]!;
  return Number.isFinite(next) ? 0.5 * (hi + next) : hi;
}

/** Whole bands per channel the electrons fill, when they fill a whole number; null otherwise. */
export function wholeBandsPerChannel(bs: BandStructure, occ: OccupationRule | null, fractions: Float64Array | null): number | null {
  const perBand = electronsPerBand(bs, occ);
  if (bs.nSpin === 1 && bs.electrons !== null) {
    const slots = bs.electrons / perBand;
    return Math.abs(slots - Math.round(slots)) < 1e-6 ? Math.round(slots) : null;
  }
  // Spin-polarised (or no count): the channel's own filling, from its occupations (k-weighted mean).
  if (!fractions) return null;
  const w = kWeights(bs);
  let n = 0;
  for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) n += w[k]! * fractions[k * bs.nBands + b]!;
  return Math.abs(n - Math.round(n)) < 0.05 ? Math.round(n) : null;
}

/** The largest value of one occupation array (0 when none is positive). A small function: it is compiled for its loop alone. */
function largestOccupation(o: OccupationArray): number {
  let maxOcc = 0;
  for (let i = 0; i < o.length; i++) if (o[i]! > maxOcc) maxOcc = o[i]!;
  return maxOcc;
}

/** What a full state holds as the file writes occupations: fractions (0..1, Methfessel-Paxton slightly beyond) → 1, electrons (0..2) → 2. */
export function fullOccupation(occupations: readonly OccupationArray[]): 1 | 2 {
  let maxOcc = 0;
  for (const o of occupations) {
    let m = largestValues.get(o);
    if (m === undefined) largestValues.set(o, (m = largestOccupation(o)));
    maxOcc = Math.max(maxOcc, m);
  }
  return maxOcc > 1.5 ? 2 : 1;
}
/** The largest value of each occupation array seen (the occupation rule and the classification both ask). Arrays read are not changed. */
const largestValues = new WeakMap<OccupationArray, number>();

/**
 * fullOccupation of all `occupations`, and out[s][i] = 1 where occupations[s][i] is above half of it (a filled
 * state) for each channel s of `out`; `any`: some state of those channels is. One pass over the occupations that
 * also finds their largest value, with the full value the first k-point's values point to (the largest of all
 * is at least theirs); when the largest of all says otherwise, the states are marked again. `out` starts zeroed.
 */
export function markFilled(occupations: readonly OccupationArray[], nb: number, out: Uint8Array[]): { full: 1 | 2; any: boolean } {
  let firstMax = 0;
  for (const o of occupations) for (let i = 0; i < Math.min(nb, o.length); i++) if (o[i]! > firstMax) firstMax = o[i]!;
  const guess: 1 | 2 = firstMax > 1.5 ? 2 : 1;
  occupations.forEach((o, s) => {
    const m = s < out.length ? markAboveFindingLargest(o, 0.5 * guess, out[s]!) : undefined;
    if (!largestValues.has(o)) largestValues.set(o, m ?? largestOccupation(o));
  });
  const full = fullOccupation(occupations);
  if (full !== guess) {
    out.forEach((marks, s) => {
      marks.fill(0);
      markAboveFindingLargest(occupations[s]!, 0.5 * full, marks);
    });
  }
  // Some state is above the threshold exactly when the largest value of its channel is (the largest starts at 0).
  const any = out.some((_, s) => largestValues.get(occupations[s]!)! > 0.5 * full);
  return { full, any };
}

/** Set out[i] = 1 where values[i] > threshold; returns the largest value (0 when none is positive). A small function: compiled for its loop alone. */
function markAboveFindingLargest(values: OccupationArray, threshold: number, out: Uint8Array): number {
  let maxOcc = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (v > maxOcc) maxOcc = v;
    if (v > threshold) out[i] = 1;
  }
  return maxOcc;
}

/** Occupation fractions (0..1 of a full state) per channel, as the file writes them. */
export function occupationFractions(bs: BandStructure): Float64Array[] {
  const full = fullOccupation(bs.occupations!);
  // A plain loop: TypedArray.from with a mapping function goes through a JS list of every value on the way
  // (tens of MB of heap on a large run).
  return bs.occupations!.map((o) => {
    const f = new Float64Array(o.length);
    for (let i = 0; i < o.length; i++) f[i] = o[i]! / full;
    return f;
  });
}

export function totalElectrons(bs: BandStructure, fractions: Float64Array[], perBand: 1 | 2): number {
  const w = kWeights(bs);
  let n = 0;
  for (const f of fractions)
    for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) n += w[k]! * perBand * f[k * bs.nBands + b]!;
  return n;
}
