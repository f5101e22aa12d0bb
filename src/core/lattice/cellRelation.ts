/**
 * How a user's cell relates to a standard cell: the integer matrix M with A_user = M · A_std up to a rigid
 * rotation, found by comparing metric tensors, after a pairwise (Gauss–Lagrange) reduction of the user's rows.
 */
import type { Mat3, Vec3 } from '../model';
import { det3, mat3Inverse, mulMat } from './linalg';

function metric(m: Mat3): Mat3 {
  const g: Mat3 = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) g[i]![j] = m[i]![0] * m[j]![0] + m[i]![1] * m[j]![1] + m[i]![2] * m[j]![2];
  return g;
}

/**
 * Integer matrix M with A_user = M · A_std up to a rigid rotation (metric tensors equal within `relTol`),
 * searching lattice vectors of the standard cell with coefficients in [-range, range]. |det M| is the
 * number of standard primitive cells in the user's cell (1 for a primitive cell). Null when none is found.
 */
export function relateCells(user: Mat3, std: Mat3, relTol = 2e-3, range = 3): Mat3 | null {
  // Search from a reduced (short-vector) form of the user's cell, then carry the result back: a skewed but
  // valid primitive cell (long combinations of short vectors) is related as well as a reduced one.
  const { reduced, T } = reduceCell(user);
  const m = relateReduced(reduced, std, relTol, range);
  return m ? roundMat3(mulMat(mat3Inverse(T), m)) : null;
}

/**
 * Pairwise (Gauss–Lagrange) reduction of lattice rows: subtract integer multiples of one row from another
 * while that shortens it. Returns the reduced rows and the integer matrix T with reduced = T · lattice.
 */
export function reduceCell(lattice: Mat3): { reduced: Mat3; T: Mat3 } {
  const r = lattice.map((row) => [...row]) as Mat3;
  const T: Mat3 = [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  for (let pass = 0; pass < 100; pass++) {
    let changed = false;
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        if (i === j) continue;
        const q = Math.round(dot3(r[i]!, r[j]!) / dot3(r[j]!, r[j]!));
        if (q === 0) continue;
        const next: Vec3 = [r[i]![0] - q * r[j]![0], r[i]![1] - q * r[j]![1], r[i]![2] - q * r[j]![2]];
        if (dot3(next, next) < dot3(r[i]!, r[i]!) * (1 - 1e-12)) {
          r[i] = next;
          T[i] = [T[i]![0] - q * T[j]![0], T[i]![1] - q * T[j]![1], T[i]![2] - q * T[j]![2]];
          changed = true;
        }
      }
    }
    if (!changed) break;
  }
  return { reduced: r, T };
}

function dot3(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

function roundMat3(m: Mat3): Mat3 {
  return m.map((row) => row.map((x) => Math.round(x) + 0)) as Mat3;
}

function relateReduced(user: Mat3, std: Mat3, relTol: number, range: number): Mat3 | null {
  const gu = metric(user);
  const gs = metric(std);
  const ratio = Math.abs(det3(user) / det3(std));
  const cells = Math.round(ratio);
  if (cells < 1 || Math.abs(ratio - cells) > 1e-2 * cells) return null;
  const vecs: { n: Vec3; len2: number }[] = [];
  for (let x = -range; x <= range; x++) {
    for (let y = -range; y <= range; y++) {
      for (let z = -range; z <= range; z++) {
        if (x === 0 && y === 0 && z === 0) continue;
        const n: Vec3 = [x, y, z];
        vecs.push({ n, len2: quad(gs, n, n) });
      }
    }
  }
  const cand = [0, 1, 2].map((i) => vecs.filter((v) => Math.abs(v.len2 - gu[i]![i]!) <= relTol * gu[i]![i]!).map((v) => v.n));
  const close = (x: number, i: number, j: number): boolean => Math.abs(x - gu[i]![j]!) <= relTol * Math.sqrt(gu[i]![i]! * gu[j]![j]!);
  for (const n1 of cand[0]!) {
    for (const n2 of cand[1]!) {
      if (!close(quad(gs, n1, n2), 0, 1)) continue;
      for (const n3 of cand[2]!) {
        if (!close(quad(gs, n1, n3), 0, 2) || !close(quad(gs, n2, n3), 1, 2)) continue;
        const m: Mat3 = [n1, n2, n3];
        if (Math.abs(Math.abs(det3(m)) - cells) < 0.5) return m;
      }
    }
  }
  return null;
}

function quad(g: Mat3, a: Vec3, b: Vec3): number {
  let s = 0;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += a[i]! * g[i]![j]! * b[j]!;
  return s;
}
