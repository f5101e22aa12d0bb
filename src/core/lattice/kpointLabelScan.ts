/**
 * The special-point label of every k-point of a run (specialPoints.ts's labelOfK, point by point), for runs
 * without a path file that can hold tens of thousands of points: the images in one typed array, bucketed by
 * their first coordinate modulo 1, no array per point. Pure.
 */
import type { KLabel } from '../model';
import type { SpecialPointMap } from './specialPoints';
import { mat3Inverse } from './linalg';

/**
 * labelOfK for every k-point of a run (nk × 3 fractional), with the images in one typed array and no array per
 * point: runs without a path file can hold tens of thousands of points. The same arithmetic and order as labelOfK.
 */
export function labelsOfKpoints(map: SpecialPointMap, kpoints: Float64Array, nk: number, tol: number): KLabel[] {
  const invM = mat3Inverse(map.M);
  const imageK: number[] = [];
  const imageLabel: number[] = [];
  map.images.forEach((p, li) => {
    for (const q of p.k) {
      imageK.push(q[0], q[1], q[2]);
      imageLabel.push(li);
    }
  });
  const q = Float64Array.from(imageK);
  const n = imageLabel.length;
  const buckets = bucketsByFirstCoordinate(q, n);
  const [m0, m1, m2] = invM;
  const labels: KLabel[] = [];
  for (let i = 0; i < nk; i++) {
    const k0 = kpoints[3 * i]!;
    const k1 = kpoints[3 * i + 1]!;
    const k2 = kpoints[3 * i + 2]!;
    const s0 = m0[0] * k0 + m0[1] * k1 + m0[2] * k2;
    const s1 = m1[0] * k0 + m1[1] * k1 + m1[2] * k2;
    const s2 = m2[0] * k0 + m2[1] * k1 + m2[2] * k2;
    // On a special point itself first, then on one modulo a reciprocal lattice vector (sameModuloG); the first
    // image in table order. Only the images whose first coordinate is near this one's modulo 1 can match.
    const near = Number.isFinite(s0) && Number.isFinite(s1) && Number.isFinite(s2) && tol * BUCKETS < 0.5;
    let found = -1;
    let first = -1;
    if (near) {
      const b = bucketOf(s0);
      for (const c of [b, (b + 1) % BUCKETS, (b + BUCKETS - 1) % BUCKETS]) {
        for (let t = buckets.start[c]!; t < buckets.start[c + 1]!; t++) {
          const j = buckets.list[t]!;
          if (first >= 0 && j > first) break;
          if (onImage(q, j, s0, s1, s2, tol)) first = j;
        }
      }
      if (first < 0) {
        for (const c of [b, (b + 1) % BUCKETS, (b + BUCKETS - 1) % BUCKETS]) {
          for (let t = buckets.start[c]!; t < buckets.start[c + 1]!; t++) {
            const j = buckets.list[t]!;
            if (first >= 0 && j > first) break;
            if (onImageModuloG(q, j, s0, s1, s2, tol)) first = j;
          }
        }
      }
    } else {
      for (let j = 0; j < n && first < 0; j++) if (onImage(q, j, s0, s1, s2, tol)) first = j;
      for (let j = 0; j < n && first < 0; j++) if (onImageModuloG(q, j, s0, s1, s2, tol)) first = j;
    }
    if (first >= 0) found = imageLabel[first]!;
    const label = found >= 0 ? map.images[found]!.label : '';
    if (label) labels.push({ index: i, label });
  }
  return labels;
}

const onImage = (q: Float64Array, j: number, s0: number, s1: number, s2: number, tol: number): boolean =>
  Math.max(Math.abs(q[3 * j]! - s0), Math.abs(q[3 * j + 1]! - s1), Math.abs(q[3 * j + 2]! - s2)) < tol;
const onImageModuloG = (q: Float64Array, j: number, s0: number, s1: number, s2: number, tol: number): boolean =>
  !(offG(q[3 * j]! - s0) > tol || offG(q[3 * j + 1]! - s1) > tol || offG(q[3 * j + 2]! - s2) > tol);

/** Buckets of the first coordinate modulo 1 (each far wider than the label tolerance). */
const BUCKETS = 256;
const bucketOf = (x: number): number => Math.floor((x - Math.floor(x)) * BUCKETS) % BUCKETS;

/** The images (nk × 3 in q) by bucket of their first coordinate, each bucket in table order. */
function bucketsByFirstCoordinate(q: Float64Array, n: number): { start: Int32Array; list: Int32Array } {
  const start = new Int32Array(BUCKETS + 1);
  for (let j = 0; j < n; j++) start[bucketOf(q[3 * j]!) + 1]!++;
  for (let c = 0; c < BUCKETS; c++) start[c + 1]! += start[c]!;
  const fill = start.slice(0, BUCKETS);
  const list = new Int32Array(n);
  for (let j = 0; j < n; j++) list[fill[bucketOf(q[3 * j]!)]!++] = j;
  return { start, list };
}

/** Distance of d from the nearest integer. */
const offG = (d: number): number => Math.abs(d - Math.round(d));
