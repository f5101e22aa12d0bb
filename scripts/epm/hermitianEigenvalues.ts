/**
 * Eigenvalues of a Hermitian matrix (complex, or real symmetric as the special case): Householder reduction
 * to real symmetric tridiagonal form, then the implicit QL method (tridiagonalEigenvalues.ts).
 *
 * The reduction is the standard one (Householder 1958; Golub & Van Loan, Matrix Computations, §8.3), done
 * here with complex reflectors H = I − 2vv†, ‖v‖ = 1, applied as the rank-2 update A ← A − 2(vq† + qv†) with
 * p = Av, β = v†p, q = p − βv. A Hermitian tridiagonal matrix with off-diagonal elements e_k is unitarily
 * similar (by a diagonal matrix of phases) to the real one with |e_k|, so only the norms are kept.
 *
 * Matrices are dense n×n, row-major, as separate real and imaginary Float64Arrays; only the lower triangle
 * (with the diagonal) is read, and the input is not modified.
 */
import { tridiagonalEigenvalues } from './tridiagonalEigenvalues';

/** Ascending eigenvalues of the Hermitian matrix re + i·im (im null or omitted: real symmetric). */
export function hermitianEigenvalues(n: number, re: Float64Array, im: Float64Array | null = null): Float64Array {
  if (re.length !== n * n || (im && im.length !== n * n)) {
    throw new Error(`hermitianEigenvalues: expected ${n}×${n} = ${n * n} elements`);
  }
  const { diagonal, offDiagonal } = im ? reduceHermitian(n, re, im) : reduceSymmetric(n, re);
  return tridiagonalEigenvalues(diagonal, offDiagonal);
}

/** Householder reduction of a complex Hermitian matrix: the real diagonal and |off-diagonal| of the result. */
export function reduceHermitian(n: number, reIn: Float64Array, imIn: Float64Array): { diagonal: Float64Array; offDiagonal: Float64Array } {
  const ar = Float64Array.from(reIn);
  const ai = Float64Array.from(imIn);
  const diagonal = new Float64Array(n);
  const offDiagonal = new Float64Array(Math.max(0, n - 1));
  const vr = new Float64Array(n);
  const vi = new Float64Array(n);
  const qr = new Float64Array(n);
  const qi = new Float64Array(n);
  for (let k = 0; k < n - 1; k++) {
    diagonal[k] = ar[k * n + k]!;
    const j0 = k + 1;
    let norm2 = 0;
    for (let j = j0; j < n; j++) norm2 += ar[j * n + k]! ** 2 + ai[j * n + k]! ** 2;
    const xnorm = Math.sqrt(norm2);
    offDiagonal[k] = xnorm;
    if (k === n - 2 || xnorm === 0) continue;
    const x0r = ar[j0 * n + k]!;
    const x0i = ai[j0 * n + k]!;
    const r0 = Math.hypot(x0r, x0i);
    const ph_r = r0 > 0 ? x0r / r0 : 1;
    const ph_i = r0 > 0 ? x0i / r0 : 0;
    // v = x + phase·‖x‖·e1, normalised: ‖v‖² = 2‖x‖(‖x‖ + |x0|).
    const inv = 1 / Math.sqrt(2 * xnorm * (xnorm + r0));
    for (let j = j0; j < n; j++) {
      vr[j] = ar[j * n + k]! * inv;
      vi[j] = ai[j * n + k]! * inv;
    }
    vr[j0] = ph_r * (r0 + xnorm) * inv;
    vi[j0] = ph_i * (r0 + xnorm) * inv;
    // p = B v (B the trailing block, read from its lower triangle), β = v† p.
    qr.fill(0, j0);
    qi.fill(0, j0);
    for (let i = j0; i < n; i++) {
      const row = i * n;
      const vri = vr[i]!,
        vii = vi[i]!;
      let sr = ar[row + i]! * vri;
      let si = ar[row + i]! * vii;
      for (let j = j0; j < i; j++) {
        const br = ar[row + j]!,
          bi = ai[row + j]!;
        const vrj = vr[j]!,
          vij = vi[j]!;
        // B_ij v_j into p_i, conj(B_ij) v_i into p_j.
        sr += br * vrj - bi * vij;
        si += br * vij + bi * vrj;
        qr[j] = qr[j]! + br * vri + bi * vii;
        qi[j] = qi[j]! + br * vii - bi * vri;
      }
      qr[i] = qr[i]! + sr;
      qi[i] = qi[i]! + si;
    }
    let beta = 0;
    for (let i = j0; i < n; i++) beta += vr[i]! * qr[i]! + vi[i]! * qi[i]!;
    for (let i = j0; i < n; i++) {
      qr[i] = qr[i]! - beta * vr[i]!;
      qi[i] = qi[i]! - beta * vi[i]!;
    }
    // B ← B − 2(v q† + q v†), lower triangle only.
    for (let i = j0; i < n; i++) {
      const row = i * n;
      const vri = vr[i]!,
        vii = vi[i]!,
        qri = qr[i]!,
        qii = qi[i]!;
      for (let j = j0; j <= i; j++) {
        const qrj = qr[j]!,
          qij = qi[j]!,
          vrj = vr[j]!,
          vij = vi[j]!;
        ar[row + j] = ar[row + j]! - 2 * (vri * qrj + vii * qij + qri * vrj + qii * vij);
        ai[row + j] = ai[row + j]! - 2 * (vii * qrj - vri * qij + qii * vrj - qri * vij);
      }
    }
  }
  if (n > 0) diagonal[n - 1] = ar[(n - 1) * n + (n - 1)]!;
  return { diagonal, offDiagonal };
}

/** The same reduction for a real symmetric matrix (about four times cheaper). */
export function reduceSymmetric(n: number, aIn: Float64Array): { diagonal: Float64Array; offDiagonal: Float64Array } {
  const a = Float64Array.from(aIn);
  const diagonal = new Float64Array(n);
  const offDiagonal = new Float64Array(Math.max(0, n - 1));
  const v = new Float64Array(n);
  const q = new Float64Array(n);
  for (let k = 0; k < n - 1; k++) {
    diagonal[k] = a[k * n + k]!;
    const j0 = k + 1;
    let norm2 = 0;
    for (let j = j0; j < n; j++) norm2 += a[j * n + k]! ** 2;
    const xnorm = Math.sqrt(norm2);
    offDiagonal[k] = xnorm;
    if (k === n - 2 || xnorm === 0) continue;
    const x0 = a[j0 * n + k]!;
    const sign = x0 >= 0 ? 1 : -1;
    const inv = 1 / Math.sqrt(2 * xnorm * (xnorm + Math.abs(x0)));
    for (let j = j0; j < n; j++) v[j] = a[j * n + k]! * inv;
    v[j0] = (x0 + sign * xnorm) * inv;
    q.fill(0, j0);
    for (let i = j0; i < n; i++) {
      const row = i * n;
      const vi = v[i]!;
      let s = a[row + i]! * vi;
      for (let j = j0; j < i; j++) {
        const aij = a[row + j]!;
        s += aij * v[j]!;
        q[j] = q[j]! + aij * vi;
      }
      q[i] = q[i]! + s;
    }
    let beta = 0;
    for (let i = j0; i < n; i++) beta += v[i]! * q[i]!;
    for (let i = j0; i < n; i++) q[i] = q[i]! - beta * v[i]!;
    for (let i = j0; i < n; i++) {
      const row = i * n;
      const vi = v[i]!,
        qi = q[i]!;
      for (let j = j0; j <= i; j++) a[row + j] = a[row + j]! - 2 * (vi * q[j]! + qi * v[j]!);
    }
  }
  if (n > 0) diagonal[n - 1] = a[(n - 1) * n + (n - 1)]!;
  return { diagonal, offDiagonal };
}
