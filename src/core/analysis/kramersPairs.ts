/**
 * Kramers pairs in a spinor run. With spin–orbit coupling each band holds one electron; where the crystal has
 * inversion symmetry (and no magnetic order), time reversal and inversion together make every band twofold
 * degenerate at every k (common practice; Kramers' theorem with inversion). Such a pair is the spin degeneracy
 * of a run without spin–orbit coupling: for masses it is one band, and the averaged masses count it once. Told
 * from the data: the bands of a degenerate set pair up (b, b + 1) with equal energies at every k-point of the run.
 */
import type { BandStructure } from '../model';

/** Largest energy difference, eV, within a pair still read as degenerate (files round to 1e-4–1e-6 eV). */
export const KRAMERS_PAIR_TOLERANCE_EV = 1e-3;

/**
 * The bands of `group` (0-based, ascending, consecutive) that stand for their Kramers pairs — one per pair, of the
 * same parity as `band` — or null when the run has no spinors or the group does not pair up everywhere.
 */
export function kramersRepresentatives(bs: BandStructure, spin: 0 | 1, group: readonly number[], band: number): number[] | null {
  if (!bs.spinorbit || group.length % 2 !== 0 || group.length === 0) return null;
  const first = group[0]!;
  for (let p = 0; p < group.length; p += 2) {
    const a = group[p]!;
    if (group[p + 1] !== a + 1) return null;
    if (!pairsWithNext(bs, spin, a)) return null;
  }
  return group.filter((b) => (b - first) % 2 === (band - first) % 2);
}

/**
 * Per channel's energy array: for each band b, whether b and b + 1 are within the tolerance at every k-point
 * (1), not (0), or not yet asked (−1). Each pair is scanned once per run and channel however many extrema (and
 * mesh channels) ask; the energies are assumed not to change in place.
 */
const pairing = new WeakMap<Float64Array, Int8Array>();

function pairsWithNext(bs: BandStructure, spin: 0 | 1, a: number): boolean {
  const e = bs.energies[spin]!;
  let known = pairing.get(e);
  if (!known || known.length !== bs.nBands) pairing.set(e, (known = new Int8Array(bs.nBands).fill(-1)));
  if (known[a] === -1) known[a] = pairedEverywhere(e, bs.nk, bs.nBands, a) ? 1 : 0;
  return known[a] === 1;
}

function pairedEverywhere(e: Float64Array, nk: number, nb: number, a: number): boolean {
  for (let k = 0; k < nk; k++) {
    if (!(Math.abs(e[k * nb + a]! - e[k * nb + a + 1]!) <= KRAMERS_PAIR_TOLERANCE_EV)) return false;
  }
  return true;
}
