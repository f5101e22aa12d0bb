/**
 * The one pass over k-points × the bands near the edges that lists candidate extrema and saddles, and the
 * choice of those bands.
 */
import type { BandStructure } from '../model';
import type { EdgeState } from './gap';
import { standingOf, TIE_EV } from './pathLocalExtrema';

/**
 * The bands that can hold a candidate: those with an occupied state above `valenceFloor` or an empty one
 * below `conductionCeiling`. Band indices order states by energy at every k, so the highest occupied energy
 * of band b never exceeds that of band b + 1: walking down from the top valence band (up from the bottom
 * conduction band) and stopping at the first band out of range reads only the bands near the edges.
 */
export function bandsInRange(
  bs: BandStructure,
  spin: number,
  occupied: Uint8Array,
  edges: { vbm: EdgeState | null; cbm: EdgeState | null } | undefined,
  valenceFloor: number,
  conductionCeiling: number,
): number[] {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const extreme = (b: number, valence: boolean): number => {
    let best = valence ? -Infinity : Infinity;
    for (let k = 0; k < bs.nk; k++) {
      const i = k * nb + b;
      if ((occupied[i] === 1) !== valence) continue;
      const x = e[i]!;
      if (valence ? x > best : x < best) best = x;
    }
    return best;
  };
  const out = new Set<number>();
  if (edges?.vbm) {
    for (let b = edges.vbm.band; b >= 0; b--) {
      if (extreme(b, true) < valenceFloor) break;
      out.add(b);
    }
    // Occupied states in bands above the top band (not expected with a gap): looked at too.
    for (let b = edges.vbm.band + 1; b < nb && extreme(b, true) >= valenceFloor; b++) out.add(b);
  }
  if (edges?.cbm) {
    for (let b = edges.cbm.band; b < nb; b++) {
      if (extreme(b, false) > conductionCeiling) break;
      out.add(b);
    }
    for (let b = edges.cbm.band - 1; b >= 0 && extreme(b, false) <= conductionCeiling; b--) out.add(b);
  }
  return [...out].sort((a, b) => a - b);
}

export interface CandidateList {
  k: Int32Array;
  band: Int32Array;
  /** 1 when the band rises along some directions and falls along others (a saddle to test), 0 for a candidate minimum or maximum. */
  mixed: Uint8Array;
  count: number;
}

/**
 * The one pass over k-points × bands near the edges: a point is a candidate maximum of a valence band when no
 * neighbour is higher (minimum of a conduction band: none lower), and a saddle to test when neighbours lie
 * both above and below (the point test of pathLocalExtrema.ts) where `saddleTest` is 1 (the path's corners:
 * elsewhere such a point is the band running through it, and is not listed). Plain loops over typed arrays (this runs
 * over the whole path; everything after it only over the candidates).
 */
export function scanCandidates(
  e: Float64Array,
  occupied: Uint8Array,
  nb: number,
  nk: number,
  firstOf: Int32Array,
  start: Int32Array,
  list: Int32Array,
  bands: Int32Array,
  valenceFloor: number,
  conductionCeiling: number,
  saddleTest: Uint8Array | null,
): CandidateList {
  let cap = 64;
  let k = new Int32Array(cap);
  let band = new Int32Array(cap);
  let mixed = new Uint8Array(cap);
  let count = 0;
  const push = (i: number, b: number, m: number): void => {
    if (count === cap) {
      cap *= 2;
      const k2 = new Int32Array(cap);
      k2.set(k);
      k = k2;
      const b2 = new Int32Array(cap);
      b2.set(band);
      band = b2;
      const m2 = new Uint8Array(cap);
      m2.set(mixed);
      mixed = m2;
    }
    k[count] = i;
    band[count] = b;
    mixed[count] = m;
    count++;
  };
  for (let i = 0; i < nk; i++) {
    if (firstOf[i] !== i) continue;
    const q0 = start[i]!;
    const q1 = start[i + 1]!;
    if (q1 === q0) continue;
    // Whether a point whose neighbours lie both above and below is listed here (as a saddle to test).
    const testable = q1 - q0 >= 2 && saddleTest !== null && saddleTest[i] === 1;
    for (let t = 0; t < bands.length; t++) {
      const b = bands[t]!;
      const x = e[i * nb + b]!;
      const valence = occupied[i * nb + b] === 1;
      if (valence ? x < valenceFloor : x > conductionCeiling) continue;
      // compareNeighbour's test with its two bounds computed once; the count stops once the outcome is known
      // (a valence point with a higher neighbour is no candidate unless it is testable, and so on).
      const above = x + TIE_EV;
      const below = x - TIE_EV;
      let up = 0;
      let down = 0;
      for (let q = q0; q < q1; q++) {
        const y = e[list[q]! * nb + b]!;
        if (y > above) {
          up++;
          if (valence ? !testable || down > 0 : down > 0) break;
        } else if (y < below) {
          down++;
          if (valence ? up > 0 : !testable || up > 0) break;
        }
      }
      // A level point is a candidate too: its plateau is walked next (pathLocalExtrema.ts's rule).
      const standing = standingOf(up, down);
      if (standing === 'level' || standing === (valence ? 'maximum' : 'minimum')) push(i, b, 0);
      else if (standing === 'mixed' && q1 - q0 >= 2 && saddleTest !== null && saddleTest[i] === 1) push(i, b, 1);
    }
  }
  return { k, band, mixed, count };
}
