/**
 * The one rule for what counts as a local extremum of a band along a path, used by the analysis's candidate
 * scan (extrema.ts, over the path network or a grid) and by the band view's snapping (over connected pieces).
 *
 *   - Two energies closer than TIE_EV are equal (the same written number read twice).
 *   - A point, or a run of equal energies connected along the path (a plateau), is a local maximum when no
 *     neighbour of the run is higher and at least one is lower (a minimum: the reverse). A band that only
 *     stays level has no extremum there; one with neighbours both higher and lower is not an extremum (at a
 *     corner of the path it may be a saddle, tested separately).
 *   - A plateau stands at a time-reversal-invariant point on it (E(k) is even about such a point, so the
 *     plateau is centred there) when it is longer than two points, else at the middle of the run (the
 *     lower middle for an even count; the first of two).
 *   - A path end is judged against its one neighbour; whether the extremum really lies there is a later
 *     question (extrema.ts rejects an end with the band still rising or falling beyond it).
 *
 * Pure; typed arrays in, typed arrays out.
 */

/** Energies that differ by less than this are equal (eV). */
export const TIE_EV = 1e-9;

/** How a point (or a run) stands against its neighbours. */
export type Standing = 'maximum' | 'minimum' | 'level' | 'mixed';

/** Whether two energies are equal under the rule. */
export function sameEnergy(a: number, b: number): boolean {
  return Math.abs(a - b) <= TIE_EV;
}

/** Standing from the number of neighbours higher (`up`) and lower (`down`) than the point by more than TIE_EV. */
export function standingOf(up: number, down: number): Standing {
  if (up === 0 && down === 0) return 'level';
  if (up === 0) return 'maximum';
  if (down === 0) return 'minimum';
  return 'mixed';
}

/** Counts a neighbour energy `y` against the point's `x`: +1 higher, −1 lower, 0 equal. */
export function compareNeighbour(x: number, y: number): 1 | -1 | 0 {
  if (y > x + TIE_EV) return 1;
  if (y < x - TIE_EV) return -1;
  return 0;
}

/**
 * The point standing for a plateau given as a chain of k indices in path order: a time-reversal-invariant
 * point on it when the chain is longer than two, else its middle.
 */
export function plateauMiddle(chain: readonly number[], timeReversalInvariant?: (k: number) => boolean): number {
  if (chain.length > 2 && timeReversalInvariant) for (const k of chain) if (timeReversalInvariant(k)) return k;
  return chain[Math.floor((chain.length - 1) / 2)]!;
}

/** One local extremum of a band along a piece. */
export interface PieceExtremum {
  /** k index the extremum stands at. */
  k: number;
  /** +1 for a maximum, −1 for a minimum. */
  sign: 1 | -1;
  /** First and last k index of its plateau (equal when it is a single point). */
  first: number;
  last: number;
}

/**
 * Local extrema of one band along a connected piece [i0, i1) of the path, `at(i)` giving its energy at k
 * index i: runs of equal energies judged by their outer neighbours, ends by their one neighbour.
 * Cost: one pass over the piece.
 */
export function pieceExtrema(
  at: (i: number) => number,
  i0: number,
  i1: number,
  timeReversalInvariant?: (k: number) => boolean,
): PieceExtremum[] {
  const out: PieceExtremum[] = [];
  if (i1 - i0 < 2) return out;
  let i = i0;
  while (i < i1) {
    const v = at(i);
    let j = i;
    while (j + 1 < i1 && sameEnergy(at(j + 1), v)) j++;
    let up = 0;
    let down = 0;
    for (const n of [i - 1, j + 1]) {
      if (n < i0 || n >= i1) continue;
      const c = compareNeighbour(v, at(n));
      if (c > 0) up++;
      else if (c < 0) down++;
    }
    const s = standingOf(up, down);
    if (s === 'maximum' || s === 'minimum') {
      const chain: number[] = [];
      for (let m = i; m <= j; m++) chain.push(m);
      out.push({ k: plateauMiddle(chain, timeReversalInvariant), sign: s === 'maximum' ? 1 : -1, first: i, last: j });
    }
    i = j + 1;
  }
  return out;
}
