/**
 * Eigenvalues and eigenvectors of a real symmetric 3×3 matrix by cyclic Jacobi rotations (Golub & Van Loan,
 * Matrix Computations, §8.5). Small, exact to rounding, and free of a linear-algebra bundle in the webview.
 */
import type { Mat3, Vec3 } from '../model';

export interface SymmetricEigen {
  /** Eigenvalues in ascending order. */
  values: Vec3;
  /** Unit eigenvectors as rows, in the order of `values`. */
  vectors: Mat3;
}

export function symmetricEigen3(m: Mat3): SymmetricEigen {
  const a: number[][] = m.map((r) => [...r]);
  const v = [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  for (let sweep = 0; sweep < 50; sweep++) {
    const off = a[0]![1]! ** 2 + a[0]![2]! ** 2 + a[1]![2]! ** 2;
    const scale = a[0]![0]! ** 2 + a[1]![1]! ** 2 + a[2]![2]! ** 2 + off;
    if (off <= 1e-30 * Math.max(scale, 1e-300)) break;
    for (const [p, q] of [
      [0, 1],
      [0, 2],
      [1, 2],
    ] as const) {
      const apq = a[p]![q]!;
      if (apq === 0) continue;
      const theta = (a[q]![q]! - a[p]![p]!) / (2 * apq);
      const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1);
      const s = t * c;
      for (let k = 0; k < 3; k++) {
        const akp = a[k]![p]!;
        const akq = a[k]![q]!;
        a[k]![p] = c * akp - s * akq;
        a[k]![q] = s * akp + c * akq;
      }
      for (let k = 0; k < 3; k++) {
        const apk = a[p]![k]!;
        const aqk = a[q]![k]!;
        a[p]![k] = c * apk - s * aqk;
        a[q]![k] = s * apk + c * aqk;
      }
      for (let k = 0; k < 3; k++) {
        const vkp = v[k]![p]!;
        const vkq = v[k]![q]!;
        v[k]![p] = c * vkp - s * vkq;
        v[k]![q] = s * vkp + c * vkq;
      }
    }
  }
  const order = [0, 1, 2].sort((i, j) => a[i]![i]! - a[j]![j]!);
  const values = order.map((i) => a[i]![i]!) as Vec3;
  const vectors = order.map((i) => {
    const col: Vec3 = [v[0]![i]!, v[1]![i]!, v[2]![i]!];
    // A fixed sign convention: the largest component positive.
    const big = col.reduce((best, x, j) => (Math.abs(x) > Math.abs(col[best]!) ? j : best), 0);
    return col[big]! < 0 ? (col.map((x) => -x) as Vec3) : col;
  }) as Mat3;
  return { values, vectors };
}
