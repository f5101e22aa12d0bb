/**
 * A local model of two bands that touch near an extremum (a degenerate zone face or point one or two mesh
 * steps away), from standard k·p reasoning: where a pair of bands is isolated from the others, its energies
 * are the eigenvalues of a 2×2 Hermitian block H(k) analytic in k, e = s ∓ √d with the pair's symmetric
 * invariants s = (e₁ + e₂)/2 = tr H / 2 and d = ((e₂ − e₁)/2)² = (tr H)²/4 − det H. Both are smooth through the
 * touching, where each band by index has a kink, so s and d are fitted by least squares with low-order
 * polynomials in Δk to the mesh points (expanded to the full zone, which carries the site symmetry) within a
 * small radius, and the band is taken back as s ∓ √d with its analytic gradient and Hessian.
 *
 * A trial, measured by meshMassSurvey.ts and NOT used by the analysis: on 12³ and 16³ EPM meshes the bands
 * are not low-order polynomials over the two or three mesh steps the fit needs (residuals of tens of meV), and
 * the masses it gives change by tens of per cent with the radius and the order.
 */
import type { Mat3, Vec3 } from '../../src/core/model';
import type { RegularMesh } from '../../src/core/interpolation/regularMesh';
import { meshPointsNear } from '../../src/core/interpolation/meshNeighbourhood';
import { choleskyFactor, choleskySolve } from '../../src/core/interpolation/cholesky';
import type { BandDerivatives, SmoothBand } from '../../src/core/interpolation/starInterpolant';

/** One mesh point near the centre: cartesian offset (Å⁻¹), the pair's energies, the irreducible point it images. */
export interface PairSample {
  dk: Vec3;
  lower: number;
  upper: number;
  irreducible: number;
}

/**
 * The full-zone mesh points within `radius` (Å⁻¹) of fractional `centreFrac`, with the energies of the two
 * bands (given at the irreducible points).
 */
export function pairSamples(
  mesh: RegularMesh,
  reciprocal: Mat3,
  lower: ArrayLike<number>,
  upper: ArrayLike<number>,
  centreFrac: Vec3,
  radius: number,
): PairSample[] {
  return meshPointsNear(mesh, reciprocal, centreFrac, radius).map((p) => ({
    dk: p.dk,
    lower: lower[p.irreducible]!,
    upper: upper[p.irreducible]!,
    irreducible: p.irreducible,
  }));
}

/** Exponent triples of the monomials of degree ≤ n in three variables. */
function exponents(n: number): number[][] {
  const out: number[][] = [];
  for (let t = 0; t <= n; t++) for (let a = t; a >= 0; a--) for (let b = t - a; b >= 0; b--) out.push([a, b, t - a - b]);
  return out;
}

/** A polynomial in the scaled offset u = Δk / scale, with its value, gradient and Hessian in Δk. */
export class LocalPolynomial {
  constructor(
    readonly powers: readonly number[][],
    readonly coefficients: Float64Array,
    readonly scale: number,
  ) {}

  derivatives(dk: Vec3): BandDerivatives {
    const u = dk.map((x) => x / this.scale);
    const pw = (x: number, n: number): number => (n < 0 ? 0 : x ** n);
    let value = 0;
    const g = [0, 0, 0];
    const h = [
      [0, 0, 0],
      [0, 0, 0],
      [0, 0, 0],
    ];
    this.powers.forEach((e, m) => {
      const c = this.coefficients[m]!;
      if (c === 0) return;
      const term = (d: readonly number[]): number => {
        let f = c;
        for (let i = 0; i < 3; i++) {
          const n = e[i]!;
          const k = d[i]!;
          if (k > n) return 0;
          f *= (k === 0 ? 1 : k === 1 ? n : n * (n - 1)) * pw(u[i]!, n - k);
        }
        return f;
      };
      value += term([0, 0, 0]);
      for (let i = 0; i < 3; i++) {
        const di = [0, 0, 0];
        di[i] = 1;
        g[i] = g[i]! + term(di);
        for (let j = i; j < 3; j++) {
          const dij = [0, 0, 0];
          dij[i] = 1;
          dij[j] = dij[j]! + 1;
          const v = term(dij);
          h[i]![j] = h[i]![j]! + v;
          if (j !== i) h[j]![i] = h[j]![i]! + v;
        }
      }
    });
    const s = this.scale;
    return { value, gradient: g.map((x) => x / s) as Vec3, hessian: h.map((r) => r.map((x) => x / (s * s))) as Mat3 };
  }
}

/** Least-squares polynomial of degree `degree` through (dk, value), or null when the points cannot fix it. */
export function fitLocalPolynomial(
  dk: readonly Vec3[],
  values: readonly number[],
  degree: number,
  scale: number,
  weights: readonly number[] | null = null,
): LocalPolynomial | null {
  const powers = exponents(degree);
  const n = powers.length;
  if (dk.length < n + 2) return null;
  const ata = new Float64Array(n * n);
  const atb = new Float64Array(n);
  const row = new Float64Array(n);
  dk.forEach((k, i) => {
    const u = k.map((x) => x / scale);
    powers.forEach((e, m) => (row[m] = u[0]! ** e[0]! * u[1]! ** e[1]! * u[2]! ** e[2]!));
    const w = weights ? weights[i]! : 1;
    for (let p = 0; p < n; p++) {
      atb[p] = atb[p]! + w * row[p]! * values[i]!;
      for (let q = 0; q <= p; q++) ata[p * n + q] = ata[p * n + q]! + w * row[p]! * row[q]!;
    }
  });
  for (let p = 0; p < n; p++) for (let q = 0; q < p; q++) ata[q * n + p] = ata[p * n + q]!;
  const l = choleskyFactor(ata, n);
  if (!l) return null;
  const c = choleskySolve(l, n, atb);
  return c.every(Number.isFinite) ? new LocalPolynomial(powers, c, scale) : null;
}

/** One band of the pair, s ∓ √d, about a cartesian centre; `branch` −1 for the lower band, +1 for the upper. */
export class LocalPairBand implements SmoothBand {
  constructor(
    readonly centre: Vec3,
    readonly s: LocalPolynomial,
    readonly d: LocalPolynomial,
    readonly branch: -1 | 1,
    /** Largest residual of the two fits at their points, eV (s) and eV² (d). */
    readonly residual: { s: number; d: number },
  ) {}

  value(k: Vec3): number {
    return this.derivatives(k).value;
  }

  derivatives(k: Vec3): BandDerivatives {
    const dk = [0, 1, 2].map((i) => k[i]! - this.centre[i]!) as Vec3;
    const s = this.s.derivatives(dk);
    const d = this.d.derivatives(dk);
    // At d ≤ 0 the two bands meet: e = s there, and the square root has no derivative (a conical touching).
    if (!(d.value > 0)) return { value: s.value, gradient: s.gradient, hessian: s.hessian };
    const r = Math.sqrt(d.value);
    const sg = this.branch;
    const gradient = [0, 1, 2].map((i) => s.gradient[i]! + (sg * d.gradient[i]!) / (2 * r)) as Vec3;
    const hessian = [0, 1, 2].map((i) =>
      [0, 1, 2].map((j) => s.hessian[i]![j]! + sg * (d.hessian[i]![j]! / (2 * r) - (d.gradient[i]! * d.gradient[j]!) / (4 * r * d.value))),
    ) as Mat3;
    return { value: s.value + sg * r, gradient, hessian };
  }
}

/**
 * The pair model from samples about `centre` (cartesian), leaving out the samples of irreducible point
 * `exclude` when given; null when the samples cannot fix the polynomials.
 */
export function fitLocalPair(
  samples: readonly PairSample[],
  centre: Vec3,
  degree: number,
  scale: number,
  branch: -1 | 1,
  exclude: number | null = null,
  width: number | null = null,
): LocalPairBand | null {
  const kept = exclude === null ? samples : samples.filter((x) => x.irreducible !== exclude);
  const dk = kept.map((x) => x.dk);
  const sv = kept.map((x) => (x.lower + x.upper) / 2);
  const dv = kept.map((x) => ((x.upper - x.lower) / 2) ** 2);
  const w = width === null ? null : dk.map((k) => Math.exp(-(k[0] ** 2 + k[1] ** 2 + k[2] ** 2) / (2 * width * width)));
  const s = fitLocalPolynomial(dk, sv, degree, scale, w);
  const d = fitLocalPolynomial(dk, dv, degree, scale, w);
  if (!s || !d) return null;
  let rs = 0;
  let rd = 0;
  kept.forEach((x, i) => {
    rs = Math.max(rs, Math.abs(s.derivatives(x.dk).value - sv[i]!));
    rd = Math.max(rd, Math.abs(d.derivatives(x.dk).value - dv[i]!));
  });
  // Offsets of the polynomials are about the centre; the samples' dk already are.
  return new LocalPairBand(centre, s, d, branch, { s: rs, d: rd });
}
