/**
 * The region of a band around a candidate extremum: the climb from an edge point to the sampled extremum it
 * belongs to, the connected plateau of equal (or rounding-close) values, and the point standing for it.
 * The plateau rule itself (what is equal, which point stands for a run) is pathLocalExtrema.ts's.
 */
import type { BandStructure } from '../model';
import type { NeighbourFn } from './kNeighbours';
import { plateauMiddle, TIE_EV } from './pathLocalExtrema';
import { timeReversalInvariantK } from './candidateChecks';

/** From an edge point, move along the band to the sampled extremum it belongs to (edges are found within a tolerance). */
export function climb(bs: BandStructure, spin: number, band: number, k: number, up: boolean, neighbours: NeighbourFn | null): number {
  if (!neighbours) return k;
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  for (let steps = 0; steps < bs.nk; steps++) {
    let best = k;
    const around = neighbours(k);
    for (let n = 0; n < around.length; n++) {
      const j = around[n]!;
      const y = e[j * nb + band]!;
      if (up ? y > e[best * nb + band]! : y < e[best * nb + band]!) best = j;
    }
    if (best === k) break;
    k = best;
  }
  return k;
}

export interface TopRegion {
  /** 'top' when nothing higher (for a maximum) lies within the tolerance; else why not. */
  outcome: 'top' | 'higher' | 'flat';
  /** k index of the middle of the plateau of equal top values. */
  representative: number;
  /** Every k index of the region (first occurrences). */
  members: number[];
}

/**
 * The region of a band around a candidate (connected through the neighbours) within `tol` below it (above,
 * for a minimum): a plateau of equal rounded values, or values closer than the rounding can tell apart,
 * is one extremum. Cost: the size of the region.
 */
export function topRegion(
  bs: BandStructure,
  e: Float64Array,
  nb: number,
  band: number,
  start: number,
  maximum: boolean,
  tol: number,
  neighbours: NeighbourFn,
  firstOf: Int32Array,
  nk: number,
): TopRegion {
  const x = e[start * nb + band]!;
  const sign = maximum ? 1 : -1;
  const seen = new Set<number>([start]);
  const queue = [start];
  const plateau: number[] = [];
  let outcome: TopRegion['outcome'] = 'top';
  let dropSeen = false;
  for (let q = 0; q < queue.length; q++) {
    const i = queue[q]!;
    if (sign * (e[i * nb + band]! - x) >= -TIE_EV) plateau.push(i);
    const around = neighbours(i);
    for (let n = 0; n < around.length; n++) {
      const j0 = around[n]!;
      const j = firstOf[j0]!;
      if (seen.has(j)) continue;
      const d = sign * (e[j0 * nb + band]! - x);
      if (d > TIE_EV) {
        outcome = 'higher';
        break;
      }
      if (d >= -tol) {
        seen.add(j);
        queue.push(j);
      } else dropSeen = true;
    }
    if (outcome === 'higher') break;
    if (queue.length > nk) break;
  }
  if (outcome === 'top' && !dropSeen) outcome = 'flat';
  return { outcome, representative: outcome === 'higher' ? start : plateauCentre(bs, plateau, neighbours, firstOf), members: queue };
}

/**
 * The point that stands for a plateau of equal values: a time-reversal-invariant k on it (E is even about
 * such a point, so the plateau is centred there), else the middle of the plateau's longest run of
 * neighbours (two breadth-first passes; cost: the plateau's size).
 */
function plateauCentre(bs: BandStructure, plateau: number[], neighbours: NeighbourFn, firstOf: Int32Array): number {
  if (plateau.length <= 2) return Math.min(...plateau);
  for (const i of plateau) if (timeReversalInvariantK(bs, i)) return i;
  const inside = new Set(plateau);
  const walk = (from: number): { far: number; parent: Map<number, number> } => {
    const parent = new Map<number, number>([[from, -1]]);
    const queue = [from];
    for (let q = 0; q < queue.length; q++) {
      for (const j0 of neighbours(queue[q]!)) {
        const j = firstOf[j0]!;
        if (!inside.has(j) || parent.has(j)) continue;
        parent.set(j, queue[q]!);
        queue.push(j);
      }
    }
    return { far: queue[queue.length - 1]!, parent };
  };
  const a = walk(Math.min(...plateau)).far;
  const { far: b, parent } = walk(a);
  const chain: number[] = [];
  for (let x = b; x !== -1; x = parent.get(x)!) chain.push(x);
  return plateauMiddle(chain);
}
