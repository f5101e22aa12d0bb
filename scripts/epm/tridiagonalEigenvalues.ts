/**
 * Eigenvalues of a real symmetric tridiagonal matrix by the implicit QL method with Wilkinson-type shifts
 * (the textbook algorithm: e.g. Wilkinson & Reinsch, Handbook for Automatic Computation II (1971); Golub & Van
 * Loan, Matrix Computations, ch. 8). Written here because only eigenvalues are needed and the matrices are
 * small (≈ 100–300); the solver is checked against matrices with analytic eigenvalues in the tests.
 *
 * `diagonal` (length n) and `offDiagonal` (length n − 1, element i couples rows i and i + 1) are not modified.
 * Returns the n eigenvalues in ascending order.
 */
export function tridiagonalEigenvalues(diagonal: Float64Array, offDiagonal: Float64Array): Float64Array {
  const n = diagonal.length;
  if (offDiagonal.length !== Math.max(0, n - 1)) {
    throw new Error(`tridiagonalEigenvalues: ${n} diagonal elements need ${n - 1} off-diagonal ones, got ${offDiagonal.length}`);
  }
  const d = Float64Array.from(diagonal);
  // e[i] couples d[i] and d[i + 1]; e[n - 1] is a zero sentinel.
  const e = new Float64Array(n);
  e.set(offDiagonal);
  const eps = Number.EPSILON;
  for (let l = 0; l < n; l++) {
    let iterations = 0;
    for (;;) {
      let m = l;
      for (; m < n - 1; m++) {
        const dd = Math.abs(d[m]!) + Math.abs(d[m + 1]!);
        if (Math.abs(e[m]!) <= eps * dd) break;
      }
      if (m === l) break;
      if (++iterations > 60) throw new Error('tridiagonalEigenvalues: the QL iteration did not converge');
      // Shift from the leading 2×2 block.
      let g = (d[l + 1]! - d[l]!) / (2 * e[l]!);
      let r = Math.hypot(g, 1);
      g = d[m]! - d[l]! + e[l]! / (g + (g >= 0 ? r : -r));
      let s = 1;
      let c = 1;
      let p = 0;
      let i = m - 1;
      let underflow = false;
      for (; i >= l; i--) {
        const f = s * e[i]!;
        const b = c * e[i]!;
        r = Math.hypot(f, g);
        e[i + 1] = r;
        if (r === 0) {
          // Recover from underflow: the matrix splits here.
          d[i + 1] = d[i + 1]! - p;
          e[m] = 0;
          underflow = true;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1]! - p;
        r = (d[i]! - g) * s + 2 * c * b;
        p = s * r;
        d[i + 1] = g + p;
        g = c * r - b;
      }
      if (underflow) continue;
      d[l] = d[l]! - p;
      e[l] = g;
      e[m] = 0;
    }
  }
  return d.sort();
}
