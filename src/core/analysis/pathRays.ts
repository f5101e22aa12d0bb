/**
 * The directions leaving a k-point along a band path. A point is found at every place the path visits it
 * (the same k, or one equal to it modulo a reciprocal lattice vector); from each visit, the path segments
 * that contain it give one direction each way: both sides of an interior point, both segments at a turn or
 * a repeated corner. A direction is a ray of sampled points running to the segment's far end.
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
  /** Identity of each k index modulo reciprocal lattice vectors. */
  keyOf: string[];
  occurrences: Map<string, number[]>;
  raysFrom(index: number): Ray[];
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

export function fractionalText(k: Vec3): string {
  return `(${k.map((x) => String(Number(x.toFixed(4)))).join(', ')})`;
}

export function pathNetwork(bs: BandStructure, geometry: PathGeometry = pathGeometry(bs)): PathNetwork {
  const keyOf: string[] = [];
  const occurrences = new Map<string, number[]>();
  for (let i = 0; i < bs.nk; i++) {
    const key = kKey(kpointAt(bs, i));
    keyOf.push(key);
    const list = occurrences.get(key);
    if (list) list.push(i);
    else occurrences.set(key, [i]);
  }
  const segmentsAt: number[][] = Array.from({ length: bs.nk }, () => []);
  geometry.segments.forEach((s, si) => {
    for (let i = s.start; i <= s.end; i++) segmentsAt[i]!.push(si);
  });
  const cart = geometry.cartesian;
  const hasLengths = cart !== null || geometry.units === 'written';
  const cache = new Map<string, Ray[]>();

  const position = (i: number): Vec3 => (cart ? [cart[3 * i]!, cart[3 * i + 1]!, cart[3 * i + 2]!] : kpointAt(bs, i));
  const makeRay = (from: number, to: number): Ray | null => {
    const step = to > from ? 1 : -1;
    const n = Math.abs(to - from) + 1;
    if (n < 2) return null;
    const indices = new Int32Array(n);
    const t = new Float64Array(n);
    const p0 = position(from);
    for (let m = 0; m < n; m++) {
      const i = from + m * step;
      indices[m] = i;
      if (cart) {
        const p = position(i);
        t[m] = Math.hypot(p[0] - p0[0], p[1] - p0[1], p[2] - p0[2]);
      } else t[m] = Math.abs(geometry.distance[i]! - geometry.distance[from]!);
    }
    const pe = position(to);
    const d: Vec3 = [pe[0] - p0[0], pe[1] - p0[1], pe[2] - p0[2]];
    const len = Math.hypot(...d);
    if (!(len > 0)) return null;
    const direction: Vec3 = cart ? [d[0] / len, d[1] / len, d[2] / len] : [0, 0, 0];
    const towards = labelAt(bs, to) ?? fractionalText(kpointAt(bs, to));
    return { indices, t, direction, towards };
  };
  const unitFractional = (r: Ray): Vec3 => {
    const a = kpointAt(bs, r.indices[0]!);
    const b = kpointAt(bs, r.indices[r.indices.length - 1]!);
    const d: Vec3 = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
    const len = Math.hypot(...d);
    return [d[0] / len, d[1] / len, d[2] / len];
  };

  const raysFrom = (index: number): Ray[] => {
    const key = keyOf[index]!;
    const hit = cache.get(key);
    if (hit) return hit;
    const rays: Ray[] = [];
    const dirs: Vec3[] = [];
    for (const j of occurrences.get(key) ?? [index]) {
      for (const si of segmentsAt[j]!) {
        const s = geometry.segments[si]!;
        for (const end of [s.start, s.end]) {
          if (end === j) continue;
          const r = makeRay(j, end);
          if (!r) continue;
          const u = cart ? r.direction : unitFractional(r);
          const same = dirs.findIndex((d) => d[0] * u[0] + d[1] * u[1] + d[2] * u[2] > 1 - 1e-6);
          if (same >= 0) {
            // The same direction seen twice (a path walked twice): keep the better-sampled ray.
            if (r.indices.length > rays[same]!.indices.length) rays[same] = r;
            continue;
          }
          rays.push(r);
          dirs.push(u);
        }
      }
    }
    cache.set(key, rays);
    return rays;
  };
  return { geometry, hasLengths, keyOf, occurrences, raysFrom };
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
