/**
 * The directions leaving a k-point along a band path. A point is found at every place the path visits it
 * (the same k, or one equal to it modulo a reciprocal lattice vector); from each visit, the path segments
 * that contain it give one direction each way: both sides of an interior point, both segments at a turn or
 * a repeated corner. A direction is a ray of sampled points running towards the segment's far end, cut
 * where the caller says it has enough (rays are built on demand, so memory stays linear in the path).
 */
import type { BandStructure, Vec3 } from '../model';
import { kpointAt, labelAt } from '../model';
import { pathGeometry, type PathGeometry } from '../lattice/kpath';

export interface Ray {
  /** k indices from the point outwards, the point first. */
  indices: Int32Array;
  /** Distance from the point, Å⁻¹ (or the file's own path units when no lattice is known). */
  t: Float64Array;
  /** Cartesian unit vector of the direction; zeros when the lattice is unknown. */
  direction: Vec3;
  /** Label of the far end, or its fractional k written as text. */
  towards: string;
}

export interface PathNetwork {
  geometry: PathGeometry;
  /** Whether distances are in Å⁻¹ (a lattice is known, or the file wrote distances). */
  hasLengths: boolean;
  /** Identity of each k index modulo reciprocal lattice vectors (kKeyNumber). */
  keyOf: Float64Array;
  /** The first index at which the path visits each k index's point (itself when it is the first). */
  firstOf: Int32Array;
  /** Every index at which the path visits the point of k index `index`, in path order. */
  visitsOf(index: number): number[];
  /**
   * The rays leaving a point, one per direction. Without `extent` each runs to its segment's far end (cost
   * proportional to the segment); with it, only as far as the caller needs.
   */
  raysFrom(index: number, extent?: RayExtent): Ray[];
  /** The first sampled point along each direction leaving a point (a view into a table built once). */
  neighboursOf(index: number): Int32Array;
  /**
   * The neighbour table itself: the neighbours of first visit f are list[start[f]] .. list[start[f + 1] − 1]
   * (empty for later visits). For loops over every point.
   */
  neighbourTable(): { start: Int32Array; list: Int32Array };
  /** True when the point (at any of its visits) is a corner of the path: a segment starts or ends there. */
  isCorner(index: number): boolean;
}

/** A key equal for k-points that differ by a reciprocal lattice vector. */
export function kKey(k: Vec3): string {
  return k
    .map((x) => {
      let r = x - Math.floor(x + 1e-6);
      r = Math.round(r * 1e5);
      if (r === 100000 || r === 0) r = 0;
      return r;
    })
    .join(',');
}

/** kKey as one number (three 5-digit fractions packed; exact in a double): cheap to build for every k. */
export function kKeyNumber(x: number, y: number, z: number): number {
  return (keyPart(x) * 100000 + keyPart(y)) * 100000 + keyPart(z);
}

/** One fractional coordinate of kKeyNumber: its part in [0, 1) in steps of 1e-5. */
function keyPart(v: number): number {
  let r = v - Math.floor(v + 1e-6);
  r = Math.round(r * 1e5);
  return r === 100000 ? 0 : r;
}

export function fractionalText(k: Vec3): string {
  return `(${k.map((x) => String(Number(x.toFixed(4)))).join(', ')})`;
}

/**
 * Which sampled points a ray keeps beyond its first two: called with the k index and the position m ≥ 2 along
 * the ray; the ray stops before the first point for which it returns false. Without it a ray runs to the
 * segment's far end.
 */
export type RayExtent = (kIndex: number, m: number) => boolean;

/**
 * The identity of each k-point modulo reciprocal lattice vectors (keyOf) and the first index with the same
 * identity (firstOf): the point a repeated k is judged at.
 */
export function kIdentities(bs: BandStructure): { keyOf: Float64Array; firstOf: Int32Array } {
  const nk = bs.nk;
  const keyOf = new Float64Array(nk);
  const firstOf = new Int32Array(nk);
  const kp = bs.kpoints;
  // An open-addressing table of first indices (+1; 0 is empty), at most half full: no Map of boxed keys.
  let cap = 16;
  while (cap < 2 * nk) cap *= 2;
  const table = new Int32Array(cap);
  const mask = cap - 1;
  for (let i = 0; i < nk; i++) {
    const key = kKeyNumber(kp[3 * i]!, kp[3 * i + 1]!, kp[3 * i + 2]!);
    keyOf[i] = key;
    let slot = keyHash(key) & mask;
    let f = -1;
    for (;;) {
      const at = table[slot]!;
      if (at === 0) {
        table[slot] = i + 1;
        break;
      }
      const other = keyOf[at - 1]!;
      // The same key (NaN keys are one key, as a Map has them).
      if (other === key || (other !== other && key !== key)) {
        f = at - 1;
        break;
      }
      slot = (slot + 1) & mask;
    }
    firstOf[i] = f >= 0 ? f : i;
  }
  return { keyOf, firstOf };
}

/** A 32-bit hash of a key (a whole number below 2⁵³, or NaN). */
function keyHash(key: number): number {
  const lo = key % 4294967296;
  const hi = (key - lo) / 4294967296;
  return (Math.imul(lo | 0, 0x9e3779b1) ^ Math.imul(hi | 0, 0x85ebca6b)) >>> 0;
}

export function pathNetwork(bs: BandStructure, geometry: PathGeometry = pathGeometry(bs)): PathNetwork {
  // Visits of the same point: firstOf[i] is the first visit, nextVisit[i] the following one (−1: none).
  const { keyOf, firstOf } = kIdentities(bs);
  const nextVisit = new Int32Array(bs.nk).fill(-1);
  const lastVisit = new Int32Array(bs.nk).fill(-1);
  for (let i = 0; i < bs.nk; i++) {
    const f = firstOf[i]!;
    if (f !== i) nextVisit[lastVisit[f]!] = i;
    lastVisit[f] = i;
  }
  const visitsOf = (index: number): number[] => {
    const out: number[] = [];
    for (let j = firstOf[index]!; j >= 0; j = nextVisit[j]!) out.push(j);
    return out;
  };
  // Segments are index ranges that overlap only at a shared corner: a point lies in at most two of them.
  const segA = new Int32Array(bs.nk).fill(-1);
  const segB = new Int32Array(bs.nk).fill(-1);
  geometry.segments.forEach((s, si) => {
    for (let i = s.start; i <= s.end; i++) {
      if (segA[i] === -1) segA[i] = si;
      else segB[i] = si;
    }
  });
  const cart = geometry.cartesian;
  const hasLengths = cart !== null || geometry.units === 'written';
  // Full rays are built only for the points asked about (extrema, clicks), and only the last few are kept:
  // memory stays linear in the path length.
  const cache = new Map<number, Ray[]>();
  const CACHE_SIZE = 32;

  const position = (i: number): Vec3 => (cart ? [cart[3 * i]!, cart[3 * i + 1]!, cart[3 * i + 2]!] : kpointAt(bs, i));
  const distanceBetween = (a: number, b: number): number => {
    if (cart) return Math.hypot(cart[3 * b]! - cart[3 * a]!, cart[3 * b + 1]! - cart[3 * a + 1]!, cart[3 * b + 2]! - cart[3 * a + 2]!);
    return Math.abs(geometry.distance[b]! - geometry.distance[a]!);
  };
  /** Unit vector from one sampled point towards another (cartesian with a lattice, fractional without). */
  const unitBetween = (a: number, b: number): Vec3 | null => {
    const pa = position(a);
    const pb = position(b);
    const d: Vec3 = [pb[0] - pa[0], pb[1] - pa[1], pb[2] - pa[2]];
    const len = Math.hypot(...d);
    return len > 0 ? [d[0] / len, d[1] / len, d[2] / len] : null;
  };
  const makeRay = (from: number, to: number, extent?: RayExtent): Ray | null => {
    const step = to > from ? 1 : -1;
    const full = Math.abs(to - from) + 1;
    if (full < 2) return null;
    const u = unitBetween(from, to);
    if (!u) return null;
    let n = Math.min(full, 2);
    while (n < full && (!extent || extent(from + n * step, n))) n++;
    const indices = new Int32Array(n);
    const t = new Float64Array(n);
    for (let m = 0; m < n; m++) {
      const i = from + m * step;
      indices[m] = i;
      t[m] = distanceBetween(from, i);
    }
    const direction: Vec3 = cart ? u : [0, 0, 0];
    const towards = labelAt(bs, to) ?? fractionalText(kpointAt(bs, to));
    return { indices, t, direction, towards };
  };

  /**
   * The segment ends reachable from a point, one per distinct direction, with the occurrence they start
   * from (a path walked twice: the longer run is kept).
   */
  const legsFrom = (index: number): { from: number; to: number; u: Vec3 }[] => {
    const legs: { from: number; to: number; u: Vec3 }[] = [];
    for (const j of visitsOf(index)) {
      for (const si of [segA[j]!, segB[j]!]) {
        if (si < 0) continue;
        const s = geometry.segments[si]!;
        for (const end of [s.start, s.end]) {
          if (end === j) continue;
          // Direction from the segment's far end: the first step alone is short against the k-points' digits.
          const u = unitBetween(j, end);
          if (!u) continue;
          const same = legs.findIndex((l) => l.u[0] * u[0] + l.u[1] * u[1] + l.u[2] * u[2] > 1 - 1e-6);
          if (same >= 0) {
            if (Math.abs(end - j) > Math.abs(legs[same]!.to - legs[same]!.from)) legs[same] = { from: j, to: end, u };
            continue;
          }
          legs.push({ from: j, to: end, u });
        }
      }
    }
    return legs;
  };

  const raysFrom = (index: number, extent?: RayExtent): Ray[] => {
    const key = firstOf[index]!;
    if (!extent) {
      const hit = cache.get(key);
      if (hit) return hit;
    }
    const rays: Ray[] = [];
    for (const l of legsFrom(index)) {
      const r = makeRay(l.from, l.to, extent);
      if (r) rays.push(r);
    }
    if (!extent) {
      if (cache.size >= CACHE_SIZE) cache.delete(cache.keys().next().value as number);
      cache.set(key, rays);
    }
    return rays;
  };
  const corner = new Uint8Array(bs.nk);
  for (const sg of geometry.segments) {
    corner[firstOf[sg.start]!] = 1;
    corner[firstOf[sg.end]!] = 1;
  }
  // Neighbours of every point, built once on first use (one pass over the distinct k, linear memory):
  // nbrStart[i]..nbrStart[i + 1] indexes nbrList for the first occurrence of each k.
  let nbrStart: Int32Array | null = null;
  let nbrList: Int32Array | null = null;
  const buildNeighbours = (): void => {
    // Count, then fill: two passes over the points, typed arrays only (no list per point).
    const start = new Int32Array(bs.nk + 1);
    const special = new Map<number, number[]>();
    const kind = (i: number): 0 | 1 | 2 => (firstOf[i] !== i || segA[i]! < 0 ? 0 : corner[i] === 0 && nextVisit[i] === -1 ? 1 : 2);
    let total = 0;
    for (let i = 0; i < bs.nk; i++) {
      start[i] = total;
      const c = kind(i);
      if (c === 1) total += 2;
      else if (c === 2) {
        // A corner, or a point the path visits more than once: one neighbour per distinct direction.
        const l = legsFrom(i).map((g) => (g.to > g.from ? g.from + 1 : g.from - 1));
        special.set(i, l);
        total += l.length;
      }
    }
    start[bs.nk] = total;
    const list = new Int32Array(total);
    for (let i = 0; i < bs.nk; i++) {
      let at = start[i]!;
      const l = special.get(i);
      if (l) for (const j of l) list[at++] = j;
      else if (start[i + 1]! - at === 2) {
        list[at] = i - 1;
        list[at + 1] = i + 1;
      }
    }
    nbrStart = start;
    nbrList = list;
  };
  const neighboursOf = (index: number): Int32Array => {
    if (!nbrStart) buildNeighbours();
    const f = firstOf[index]!;
    // Only first occurrences have lists, so the next start ends this one.
    return nbrList!.subarray(nbrStart![f], nbrStart![f + 1]);
  };
  const isCorner = (index: number): boolean => corner[firstOf[index]!] === 1;
  const neighbourTable = (): { start: Int32Array; list: Int32Array } => {
    if (!nbrStart) buildNeighbours();
    return { start: nbrStart!, list: nbrList! };
  };
  return { geometry, hasLengths, keyOf, firstOf, visitsOf, raysFrom, neighboursOf, neighbourTable, isCorner };
}

/** The ray running the opposite way along the same line, when there is one. */
export function oppositeRay(rays: Ray[], r: Ray): Ray | null {
  const u = r.direction;
  if (u[0] === 0 && u[1] === 0 && u[2] === 0) return null;
  for (const o of rays) {
    const v = o.direction;
    if (u[0] * v[0] + u[1] * v[1] + u[2] * v[2] < -1 + 1e-6) return o;
  }
  return null;
}
