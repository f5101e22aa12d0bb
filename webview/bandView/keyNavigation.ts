/**
 * Where an arrow key moves the selection among the extrema a click can reach. The band edges and the
 * extrema the analysis lists come first: Left/Right walk through the listed ones in path order (any band),
 * Up/Down to the nearest listed one on a band above/below; only past the last listed one in that direction
 * do the keys go on to the other local extrema (same band for Left/Right, nearest band for Up/Down). Pure.
 */

import type { ExtremumMark, SetAsideMark } from '../../src/protocol';
import type { ExtremaSet } from './localExtrema';
import { isMaximumKind } from './markers';
import { setAsideAt, SET_ASIDE_REACH } from './setAside';

/** A reachable extremum: a listed one (the report's, with its kind) or another local extremum of a band. */
export interface Candidate {
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  eV: number;
  /** +1 maximum, −1 minimum. */
  sign: number;
  /** Report kind when this is a report extremum. */
  kind: string | null;
}

/** Bands within this of a set-aside band at the same k-point share its fate (the other band of a crossing), eV. */
export const SET_ASIDE_DEGENERACY_EV = 1e-3;

/**
 * What a click or an arrow key can reach: the report's extrema first (listed), then the local extrema of the
 * drawn arrays that the analysis did not set aside (saddles, crossings, path ends, rounding are never offered;
 * nor is a band that meets a set-aside one at that k-point, the other branch of the same crossing, when
 * `energy(spin, k, band0)` is given).
 */
export function reachableCandidates(
  marks: readonly ExtremumMark[],
  extrema: ExtremaSet,
  setAside: readonly SetAsideMark[] | undefined,
  energy?: (spin: number, k: number, band0: number) => number,
): Candidate[] {
  const asideNear = (spin: number, k: number, band0: number, eV: number): boolean => {
    if (setAsideAt(setAside, spin, k, band0)) return true;
    if (!energy || !setAside) return false;
    return setAside.some(
      (m) =>
        m.spin === spin &&
        m.band0 !== band0 &&
        Math.abs(m.kIndex - k) <= SET_ASIDE_REACH &&
        Math.abs(energy(spin, m.kIndex, m.band0) - eV) <= SET_ASIDE_DEGENERACY_EV,
    );
  };
  const out: Candidate[] = [];
  const seen = new Set<string>();
  for (const m of marks) {
    const key = `${m.spin}:${m.kIndex}:${m.band0}`;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push({ spin: m.spin, kIndex: m.kIndex, band0: m.band0, eV: m.eV, sign: isMaximumKind(m.kind) ? 1 : -1, kind: m.kind });
  }
  const x = extrema;
  for (let i = 0; i < x.count; i++) {
    const key = `${x.spin[i]}:${x.kIndex[i]}:${x.band0[i]}`;
    if (seen.has(key)) continue;
    if (asideNear(x.spin[i]!, x.kIndex[i]!, x.band0[i]!, x.energy[i]!)) continue;
    out.push({ spin: x.spin[i] as 0 | 1, kIndex: x.kIndex[i]!, band0: x.band0[i]!, eV: x.energy[i]!, sign: x.sign[i]!, kind: null });
  }
  return out;
}

export interface NavCandidate {
  spin: number;
  kIndex: number;
  band0: number;
  /** The analysis's kind when it lists this extremum (vbm, cbm, valley, peak); null for other local extrema. */
  kind: string | null;
}

export type ArrowKey = 'ArrowLeft' | 'ArrowRight' | 'ArrowUp' | 'ArrowDown';

/**
 * The candidate the key moves to from `cur` (null: nothing selected yet, then the CBM for Up/Right and the
 * VBM for Down/Left). `x(k)`: the path position of k-point k. Returns `cur` when there is nowhere to go.
 */
export function nextCandidate<C extends NavCandidate>(
  list: readonly C[],
  cur: C | null,
  key: ArrowKey,
  x: (k: number) => number,
): C | null {
  if (list.length === 0) return null;
  if (!cur) {
    const want = key === 'ArrowDown' || key === 'ArrowLeft' ? 'vbm' : 'cbm';
    return list.find((c) => c.kind === want) ?? list.find((c) => c.kind !== null) ?? list[0]!;
  }
  const listed = list.filter((c) => c.kind !== null && c.spin === cur.spin);
  const same = (a: NavCandidate, b: NavCandidate): boolean => a.spin === b.spin && a.kIndex === b.kIndex && a.band0 === b.band0;
  const x0 = x(cur.kIndex);
  if (key === 'ArrowLeft' || key === 'ArrowRight') {
    const dir = key === 'ArrowRight' ? 1 : -1;
    // Path order: position, then band (two listed extrema at one k: the lower band first going right).
    const after = (c: NavCandidate): boolean => {
      const dx = (x(c.kIndex) - x0) * dir;
      if (dx !== 0) return dx > 0;
      const dk = (c.kIndex - cur.kIndex) * dir;
      if (dk !== 0) return dk > 0;
      return (c.band0 - cur.band0) * dir > 0;
    };
    const closest = (pool: readonly C[]): C | null => {
      let best: C | null = null;
      for (const c of pool) {
        if (same(c, cur) || !after(c)) continue;
        if (!best) {
          best = c;
          continue;
        }
        const d = (x(c.kIndex) - x0) * dir - (x(best.kIndex) - x0) * dir;
        if (d < 0 || (d === 0 && ((c.kIndex - best.kIndex) * dir < 0 || (c.kIndex === best.kIndex && (c.band0 - best.band0) * dir < 0))))
          best = c;
      }
      return best;
    };
    return closest(listed) ?? closest(list.filter((c) => c.spin === cur.spin && c.band0 === cur.band0 && c.kind === null)) ?? cur;
  }
  // Up/Down: the listed extremum on the nearest band above/below (nearest in x), then any local extremum.
  const dir = key === 'ArrowUp' ? 1 : -1;
  const nearestOnNextBand = (pool: readonly C[]): C | null => {
    let bestBand = -1;
    let best: C | null = null;
    for (const c of pool) {
      if (c.spin !== cur.spin || (c.band0 - cur.band0) * dir <= 0) continue;
      const closerBand = best === null || (c.band0 - bestBand) * dir < 0;
      const sameBandCloserX = best !== null && c.band0 === bestBand && Math.abs(x(c.kIndex) - x0) < Math.abs(x(best.kIndex) - x0);
      if (closerBand || sameBandCloserX) {
        best = c;
        bestBand = c.band0;
      }
    }
    return best;
  };
  return nearestOnNextBand(listed) ?? nearestOnNextBand(list) ?? cur;
}
