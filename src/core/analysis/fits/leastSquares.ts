/**
 * Linear least squares for the small problems of curvature fitting (at most ten unknowns): columns are
 * scaled to unit length, the normal equations are solved by Gauss-Jordan elimination with partial pivoting,
 * and the inverse gives the covariance of the coefficients.
 */

export interface LeastSquaresResult {
  /** Fitted coefficients, one per column. */
  coef: Float64Array;
  /** Covariance of the coefficients (p × p, row-major), scaled by the residual variance. */
  cov: Float64Array;
  /** Residual variance used for the covariance: RSS/(n-p), never below the floor given. */
  sigma2: number;
  /** Residual sum of squares. */
  rss: number;
  n: number;
  p: number;
}

/**
 * Minimise |A x - y|² for A given row-major (n × p). Returns null when the columns are linearly dependent
 * (the points do not determine the unknowns). `sigma2Floor` bounds the residual variance from below (e.g.
 * the rounding of the energies as written), so an exact fit still carries the error of its inputs.
 */
export function leastSquares(a: Float64Array, y: Float64Array, n: number, p: number, sigma2Floor = 0): LeastSquaresResult | null {
  if (n < p || p === 0) return null;
  const colScale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += a[i * p + j]! ** 2;
    colScale[j] = s > 0 ? 1 / Math.sqrt(s) : 0;
    if (s === 0) return null;
  }
  // Normal matrix N = Bᵀ B and right side Bᵀ y with B the scaled design, augmented with the identity.
  const w = 2 * p;
  const m = new Float64Array(p * w);
  const rhs = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    for (let k = j; k < p; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += a[i * p + j]! * a[i * p + k]!;
      s *= colScale[j]! * colScale[k]!;
      m[j * w + k] = s;
      m[k * w + j] = s;
    }
    m[j * w + p + j] = 1;
    let r = 0;
    for (let i = 0; i < n; i++) r += a[i * p + j]! * y[i]!;
    rhs[j] = r * colScale[j]!;
  }
  // Gauss-Jordan inversion with partial pivoting.
  for (let c = 0; c < p; c++) {
    let piv = c;
    for (let r = c + 1; r < p; r++) if (Math.abs(m[r * w + c]!) > Math.abs(m[piv * w + c]!)) piv = r;
    const pv = m[piv * w + c]!;
    if (!(Math.abs(pv) > 1e-13)) return null;
    if (piv !== c) {
      for (let k = 0; k < w; k++) {
        const t = m[c * w + k]!;
        m[c * w + k] = m[piv * w + k]!;
        m[piv * w + k] = t;
      }
    }
    for (let k = 0; k < w; k++) m[c * w + k] = m[c * w + k]! / pv;
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = m[r * w + c]!;
      if (f === 0) continue;
      for (let k = 0; k < w; k++) m[r * w + k] = m[r * w + k]! - f * m[c * w + k]!;
    }
  }
  const coef = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let k = 0; k < p; k++) s += m[j * w + p + k]! * rhs[k]!;
    coef[j] = s * colScale[j]!;
  }
  let rss = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += a[i * p + j]! * coef[j]!;
    rss += (y[i]! - f) ** 2;
  }
  const sigma2 = Math.max(n > p ? rss / (n - p) : 0, sigma2Floor);
  const cov = new Float64Array(p * p);
  for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) cov[j * p + k] = m[j * w + p + k]! * colScale[j]! * colScale[k]! * sigma2;
  return { coef, cov, sigma2, rss, n, p };
}
