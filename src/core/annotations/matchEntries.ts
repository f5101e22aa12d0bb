/**
 * Which entry of an older document is which entry of a newer one. First by id (kind, spin, band and k
 * alike); then, for what is left, the same kind, spin and band whose k moved by less than
 * K_MATCH_DISTANCE in fractional coordinates (a fitted extremum that shifted a little is the same
 * extremum, and its note belongs to it). Periodic images (k differing by a reciprocal lattice vector) count
 * as the same point.
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
  /** Older entries with no partner. */
  onlyOld: number[];
  /** Newer entries with no partner. */
  onlyNew: number[];
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
    if (j !== undefined && !usedNew.has(j)) {
      pairs.push([i, j]);
      usedOld.add(i);
      usedNew.add(j);
    }
  });
  // Nearest remaining candidates, closest pairs first, so the result does not depend on list order.
  const candidates: { i: number; j: number; d: number }[] = [];
  older.forEach((a, i) => {
    if (usedOld.has(i)) return;
    newer.forEach((b, j) => {
      if (usedNew.has(j) || a.kind !== b.kind || a.spin !== b.spin || a.band !== b.band) return;
      const d = kDistance(a.k, b.k);
      if (d < K_MATCH_DISTANCE) candidates.push({ i, j, d });
    });
  });
  candidates.sort((x, y) => x.d - y.d || x.i - y.i || x.j - y.j);
  for (const c of candidates) {
    if (usedOld.has(c.i) || usedNew.has(c.j)) continue;
    pairs.push([c.i, c.j]);
    usedOld.add(c.i);
    usedNew.add(c.j);
  }
  return {
    pairs: pairs.sort((x, y) => x[1] - y[1]),
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
