/**
 * A band's extremum on a line that ends where it touches its neighbour (a point P fixed by inversion modulo G,
 * such as a zone-face centre), from the two bands' energies on the mesh points of that line. Where two bands
 * are isolated from the others their energies are the eigenvalues of a 2×2 Hermitian block analytic in k
 * (standard k·p reasoning): e = s ∓ √d with s = (e₁ + e₂)/2 and d = ((e₂ − e₁)/2)² smooth through P, where each
 * band by index has a kink. About P both are even in the distance q from P, so each is fitted by least squares
 * as a polynomial in q²; the band s ∓ √d then has its extremum, energy and curvature along the line in closed form.
 * The uncertainty is the largest change when one line point (other than P) is left out, or when the polynomials
 * are one order higher (when the points allow it).
 */
import { choleskyFactor, choleskySolve } from './cholesky';

export interface LinePairData {
  /** Distance from P along the line, Å⁻¹, ascending from 0 (P itself). */
  q: readonly number[];
  /** The two bands, lower and upper, at those points, eV. */
  lower: readonly number[];
  upper: readonly number[];
  /** −1 for the lower band of the pair, +1 for the upper. */
  branch: -1 | 1;
  kind: 'min' | 'max';
}

export interface LinePairExtremum {
  /** Distance of the extremum from P, Å⁻¹. */
  q: number;
  energy_eV: number;
  /** Second derivative along the line, eV·Å². */
  curvature: number;
}

export interface LinePairResult extends LinePairExtremum {
  /** Order of the polynomials in q² and the number of line points. */
  order: number;
  points: number;
  /** Largest changes: position (Å⁻¹), energy (eV), curvature (eV·Å²). */
  uncertainty: { q: number; energy_eV: number; curvature: number };
}

/** Least-squares coefficients of Σ_i c_i (q²)^i, i = 0…order; null when singular. */
export function fitEven(q: readonly number[], y: readonly number[], order: number): number[] | null {
  const n = order + 1;
  const ata = new Float64Array(n * n);
  const atb = new Float64Array(n);
  q.forEach((x, r) => {
    const row = Array.from({ length: n }, (_, i) => (x * x) ** i);
    for (let i = 0; i < n; i++) {
      atb[i] = atb[i]! + row[i]! * y[r]!;
      for (let j = 0; j < n; j++) ata[i * n + j] = ata[i * n + j]! + row[i]! * row[j]!;
    }
  });
  const l = choleskyFactor(ata, n);
  if (!l) return null;
  const c = [...choleskySolve(l, n, atb)];
  return c.every(Number.isFinite) ? c : null;
}

/** Value, first and second derivative in q of Σ c_i q^{2i}. */
export function evenPoly(c: readonly number[], q: number): [number, number, number] {
  let v = 0;
  let d1 = 0;
  let d2 = 0;
  c.forEach((a, i) => {
    v += a * q ** (2 * i);
    if (i > 0) d1 += a * 2 * i * q ** (2 * i - 1);
    if (i > 0) d2 += a * 2 * i * (2 * i - 1) * q ** (2 * i - 2);
  });
  return [v, d1, d2];
}

/** The extremum of s ∓ √d on (0, q_max) by golden section; null when it sits at an end (no interior extremum). */
function extremumOf(data: LinePairData, keep: readonly number[], order: number): LinePairExtremum | null {
  const q = keep.map((i) => data.q[i]!);
  const s = fitEven(
    q,
    keep.map((i) => (data.lower[i]! + data.upper[i]!) / 2),
    order,
  );
  const d = fitEven(
    q,
    keep.map((i) => ((data.upper[i]! - data.lower[i]!) / 2) ** 2),
    order,
  );
  if (!s || !d) return null;
  const band = (x: number): [number, number] => {
    const [sv, , s2] = evenPoly(s, x);
    const [dv, d1, d2] = evenPoly(d, x);
    if (!(dv > 0)) return [sv, NaN];
    const r = Math.sqrt(dv);
    return [sv + data.branch * r, s2 + data.branch * (d2 / (2 * r) - (d1 * d1) / (4 * r * dv))];
  };
  const sign = data.kind === 'min' ? 1 : -1;
  const qMax = Math.max(...q);
  let lo = 0;
  let hi = qMax;
  for (let it = 0; it < 120; it++) {
    const m1 = lo + (hi - lo) / 3;
    const m2 = hi - (hi - lo) / 3;
    if (sign * band(m1)[0] < sign * band(m2)[0]) hi = m2;
    else lo = m1;
  }
  const at = (lo + hi) / 2;
  if (at < 1e-3 * qMax || at > (1 - 1e-3) * qMax) return null;
  const [energy_eV, curvature] = band(at);
  if (!(sign * curvature > 0)) return null;
  return { q: at, energy_eV, curvature };
}

/**
 * The extremum from polynomials of order 2 in q² (order 3 too, for the uncertainty, when the points allow),
 * or null when the line cannot give one (too few points, no interior extremum, a refit that loses it).
 */
export function linePairExtremum(data: LinePairData): LinePairResult | null {
  const all = data.q.map((_, i) => i);
  const order = 2;
  if (all.length < order + 2) return null;
  const best = extremumOf(data, all, order);
  if (!best) return null;
  const others: (LinePairExtremum | null)[] = all.slice(1).map((drop) =>
    extremumOf(
      data,
      all.filter((i) => i !== drop),
      order,
    ),
  );
  if (all.length >= order + 3) others.push(extremumOf(data, all, order + 1));
  if (others.some((x) => x === null)) return null;
  const spread = (f: (x: LinePairExtremum) => number): number => Math.max(0, ...others.map((x) => Math.abs(f(x!) - f(best))));
  return {
    ...best,
    order,
    points: all.length,
    uncertainty: { q: spread((x) => x.q), energy_eV: spread((x) => x.energy_eV), curvature: spread((x) => x.curvature) },
  };
}
