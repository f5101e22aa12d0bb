/** Dense Cholesky factorisation A = L Lᵀ of a symmetric positive definite matrix (row-major n×n) and solves. */

/** The lower factor L (row-major, upper part zero), or null when A is not positive definite. */
export function choleskyFactor(a: Float64Array, n: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * n + j]!;
      for (let p = 0; p < j; p++) s -= l[i * n + p]! * l[j * n + p]!;
      if (i === j) {
        if (!(s > 0)) return null;
        l[i * n + i] = Math.sqrt(s);
      } else {
        l[i * n + j] = s / l[j * n + j]!;
      }
    }
  }
  return l;
}

/** x with L Lᵀ x = b. */
export function choleskySolve(l: Float64Array, n: number, b: Float64Array): Float64Array {
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let p = 0; p < i; p++) s -= l[i * n + p]! * y[p]!;
    y[i] = s / l[i * n + i]!;
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let p = i + 1; p < n; p++) s -= l[p * n + i]! * x[p]!;
    x[i] = s / l[i * n + i]!;
  }
  return x;
}
