/**
 * The point group of a bare lattice (its holohedry) found without the crystal-symmetry library, for the standard
 * primitive cells of specialPoints.ts: every integer matrix W with entries −1, 0, 1 that keeps the metric
 * G = A Aᵀ (A: cell rows), Wᵀ G W = G. In a reduced cell such as these, every lattice symmetry has such entries
 * (common practice: the search of lattice symmetries in a reduced basis). Pure.
 */
import type { Mat3 } from '../model';
import { det3, mat3Inverse, transpose3 } from './linalg';

/** The 26 nonzero integer vectors with entries −1, 0, 1. */
const STEPS: readonly (readonly [number, number, number])[] = (() => {
  const out: [number, number, number][] = [];
  for (let a = -1; a <= 1; a++) for (let b = -1; b <= 1; b++) for (let c = -1; c <= 1; c++) if (a || b || c) out.push([a, b, c]);
  return out;
})();

/**
 * Every integer matrix W with entries −1, 0, 1 and determinant ±1 that keeps the cell's metric within what a change
 * of `delta` Å in each vector allows (W acts on fractional real-space coordinates: column j is the image of cell
 * vector j). Null when the cell spans no length, or when more than `most` are found.
 */
export function latticeOperations(cell: Mat3, delta: number, most: number): Mat3[] | null {
  const g: Mat3 = [0, 1, 2].map((i) =>
    [0, 1, 2].map((j) => cell[i]![0] * cell[j]![0] + cell[i]![1] * cell[j]![1] + cell[i]![2] * cell[j]![2]),
  ) as Mat3;
  const maxLen = Math.sqrt(Math.max(g[0][0], g[1][1], g[2][2]));
  if (!Number.isFinite(maxLen) || maxLen <= 0) return null;
  // A change δ of a vector changes the metric by about 2 δ |a|.
  const tol = 2 * delta * maxLen + delta * delta;
  const dotG = (u: readonly number[], v: readonly number[]): number => {
    let x = 0;
    for (let a = 0; a < 3; a++) x += u[a]! * (g[a]![0] * v[0]! + g[a]![1] * v[1]! + g[a]![2] * v[2]!);
    return x;
  };
  // Column j of W is the image of cell vector j in cell coordinates: a lattice vector as long as it.
  const columns = [0, 1, 2].map((j) => STEPS.filter((c) => Math.abs(dotG(c, c) - g[j]![j]!) < tol));
  const found: Mat3[] = [];
  for (const c0 of columns[0]!) {
    for (const c1 of columns[1]!) {
      if (Math.abs(dotG(c0, c1) - g[0][1]) >= tol) continue;
      for (const c2 of columns[2]!) {
        if (Math.abs(dotG(c0, c2) - g[0][2]) >= tol || Math.abs(dotG(c1, c2) - g[1][2]) >= tol) continue;
        const w: Mat3 = [
          [c0[0], c1[0], c2[0]],
          [c0[1], c1[1], c2[1]],
          [c0[2], c1[2], c2[2]],
        ];
        if (Math.abs(det3(w)) !== 1) continue;
        found.push(w);
        if (found.length > most) return null;
      }
    }
  }
  return found;
}

/**
 * The lattice's point group acting on fractional reciprocal coordinates, (W⁻¹)ᵀ for each W (the convention of
 * CrystalSymmetry.reciprocalPointGroup), found with a tolerance looser than the symmetry library's (ten times its
 * position tolerance): a lattice near a higher symmetry then shows more operations than `expected`, and the
 * caller asks the library instead. Null unless exactly `expected` operations are found.
 */
export function latticeHolohedry(cell: Mat3, symprec: number, expected: number): Mat3[] | null {
  const found = latticeOperations(cell, 10 * symprec, expected);
  if (!found || found.length !== expected) return null;
  return found.map((w) => transpose3(mat3Inverse(w)).map((r) => r.map((x) => Math.round(x) + 0)) as Mat3);
}
