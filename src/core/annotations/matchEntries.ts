/**
 * Which entry of an older document is which entry of a newer one. First by id (kind, spin channel, band
 * counted from the edge, valley); then, for what is left, the same kind and band from the edge whose valley
 * or k lies within K_MATCH_DISTANCE in fractional coordinates (a fitted extremum that shifted a little, or an
 * older file whose valley was named without the crystal's symmetry, is the same extremum and its note
 * belongs to it). The absolute band index is never used while an edge is known (a deep band added below
 * shifts it). Periodic images (k differing by a reciprocal lattice vector) count as the same point.
 *
 * Spin: between runs that are both spin-polarised (or both not), channels must be equal. A run that changed
 * between spin-polarised and not pairs an entry with the same extremum in either channel (spin up first);
 * when a spin-polarised run becomes unpolarised, the second channel's entry is "folded" into the one entry
 * that now stands for both.
 */
import type { AnnotatedEntry, AnnotatedMass } from './annotationsModel';

export const K_MATCH_DISTANCE = 0.05;

/** Largest fractional-coordinate difference between two k-points, modulo whole reciprocal lattice vectors. */
export function kDistance(a: readonly number[], b: readonly number[]): number {
  let d = 0;
  for (let i = 0; i < 3; i++) {
    const x = a[i]! - b[i]!;
    d = Math.max(d, Math.abs(x - Math.round(x)));
  }
  return d;
}

export interface EntryMatch {
  /** Index pairs [older, newer]. */
  pairs: [number, number][];
  /** Older entries of a spin-polarised run whose extremum is now one entry of an unpolarised run: [older, newer]. */
  folded: [number, number][];
  /** Older entries with no partner. */
  onlyOld: number[];
  /** Newer entries with no partner. */
  onlyNew: number[];
}

/** Distance between two entries' places (valley or k, whichever is closer), or Infinity when they cannot be one extremum. */
function placeDistance(a: AnnotatedEntry, b: AnnotatedEntry): number {
  if (a.kind !== b.kind) return Infinity;
  if (a.spinPolarised === b.spinPolarised && a.spin !== b.spin) return Infinity;
  if (a.edgeBand !== null && b.edgeBand !== null) {
    if (a.edgeBand !== b.edgeBand) return Infinity;
  } else if (a.edgeBand !== b.edgeBand || a.band !== b.band) {
    // Without an edge on both sides the absolute band is all there is.
    return Infinity;
  }
  const d = Math.min(kDistance(a.valley, b.valley), kDistance(a.k, b.k), kDistance(a.valley, b.k), kDistance(a.k, b.valley));
  return d < K_MATCH_DISTANCE ? d : Infinity;
}

export function matchEntries(older: readonly AnnotatedEntry[], newer: readonly AnnotatedEntry[]): EntryMatch {
  const pairs: [number, number][] = [];
  const usedOld = new Set<number>();
  const usedNew = new Set<number>();
  const newById = new Map<string, number>();
  newer.forEach((e, j) => {
    if (!newById.has(e.id)) newById.set(e.id, j);
  });
  older.forEach((e, i) => {
    const j = newById.get(e.id);
    if (j !== undefined && !usedNew.has(j) && e.spinPolarised === newer[j]!.spinPolarised) {
      pairs.push([i, j]);
      usedOld.add(i);
      usedNew.add(j);
    }
  });
  // Nearest remaining candidates, same spin channel before another, closest first, so the result does not
  // depend on list order.
  const candidates: { i: number; j: number; d: number; spinDiffers: number }[] = [];
  older.forEach((a, i) => {
    if (usedOld.has(i)) return;
    newer.forEach((b, j) => {
      if (usedNew.has(j)) return;
      const d = placeDistance(a, b);
      if (d !== Infinity) candidates.push({ i, j, d, spinDiffers: a.spin === b.spin ? 0 : 1 });
    });
  });
  candidates.sort((x, y) => x.spinDiffers - y.spinDiffers || x.d - y.d || x.i - y.i || x.j - y.j);
  for (const c of candidates) {
    if (usedOld.has(c.i) || usedNew.has(c.j)) continue;
    pairs.push([c.i, c.j]);
    usedOld.add(c.i);
    usedNew.add(c.j);
  }
  // A spin-polarised run that became unpolarised: the other channel's entry of an extremum now paired.
  const folded: [number, number][] = [];
  older.forEach((a, i) => {
    if (usedOld.has(i) || !a.spinPolarised) return;
    let best: { j: number; d: number } | null = null;
    for (const [, j] of pairs) {
      const b = newer[j]!;
      if (b.spinPolarised) continue;
      const d = placeDistance(a, b);
      if (d !== Infinity && (!best || d < best.d)) best = { j, d };
    }
    if (best) {
      folded.push([i, best.j]);
      usedOld.add(i);
    }
  });
  return {
    pairs: pairs.sort((x, y) => x[1] - y[1]),
    folded,
    onlyOld: older.map((_, i) => i).filter((i) => !usedOld.has(i)),
    onlyNew: newer.map((_, j) => j).filter((j) => !usedNew.has(j)),
  };
}

/**
 * A directional fit's identity inside an entry: where it points, the branch it follows at a degenerate
 * edge, and which of several alike it is (both sides of an interior extremum can point to the same label).
 */
export function massKeys(masses: readonly AnnotatedMass[]): string[] {
  const count = new Map<string, number>();
  return masses.map((m) => {
    const base = m.branch === null ? m.towards : `${m.towards}|branch ${m.branch}`;
    const n = count.get(base) ?? 0;
    count.set(base, n + 1);
    return `${base}|${n}`;
  });
}
