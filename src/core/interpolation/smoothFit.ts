/**
 * The smoothness-constrained star-function fit (Shankland 1971; Koelling & Wood, J. Comput. Phys. 67, 253
 * (1986); Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721 (1988)): the interpolant
 *     ε(k) = Σ_m c_m S_m(k)
 * passes exactly through the N data points and, among all such sums over the stars of the basis (more stars
 * than points), minimises the roughness Σ_{m≥1} ρ(R_m) c_m². With a reference point r, Lagrange multipliers
 * λ solve H λ = ε_i − ε_r, H_ij = Σ_{m≥1} ΔS_m(k_i) ΔS_m(k_j) / ρ_m, ΔS_m(k_i) = S_m(k_i) − S_m(k_r); then
 * c_m = Σ_i λ_i ΔS_m(k_i) / ρ_m (m ≥ 1) and c_0 = ε_r − Σ_{m≥1} c_m S_m(k_r).
 *
 * H depends only on the k-points: it is built once, factored once per set of points kept (all, or all but
 * one star of points for leave-one-out) and then serves every band.
 */
import type { Vec3 } from '../model';
import { choleskyFactor, choleskySolve } from './cholesky';
import { roughness } from './roughness';
import { starValues, type StarBasis } from './starBasis';
import { StarInterpolant } from './starInterpolant';

export class SmoothStarFit {
  readonly n: number;
  /** S_m(k_i), row-major N × M. */
  private readonly s: Float64Array;
  private readonly inverseRoughness: Float64Array;
  /** H relative to reference point 0, N × N (row and column 0 are zero). */
  private readonly h: Float64Array;
  private readonly factors = new Map<number, Float64Array>();

  /** `kCart`: the data k-points (irreducible, one per star of k), cartesian Å⁻¹, 3 numbers each. */
  constructor(
    readonly basis: StarBasis,
    kCart: Float64Array,
  ) {
    const n = kCart.length / 3;
    const m = basis.count;
    if (!Number.isInteger(n) || n < 2) throw new RangeError('The fit needs at least two k-points.');
    if (m <= n) throw new RangeError(`The fit needs more stars (${m}) than k-points (${n}).`);
    this.n = n;
    this.s = new Float64Array(n * m);
    const row = new Float64Array(m);
    for (let i = 0; i < n; i++) {
      starValues(basis, [kCart[3 * i]!, kCart[3 * i + 1]!, kCart[3 * i + 2]!], row);
      this.s.set(row, i * m);
    }
    const rMin = basis.radius[1]!;
    this.inverseRoughness = new Float64Array(m);
    for (let j = 1; j < m; j++) this.inverseRoughness[j] = 1 / roughness(basis.radius[j]!, rMin);
    // D_i = S(k_i) − S(k_0) scaled by 1/√ρ: H = D Dᵀ.
    const d = new Float64Array(n * m);
    for (let i = 1; i < n; i++) {
      for (let j = 1; j < m; j++) d[i * m + j] = (this.s[i * m + j]! - this.s[j]!) * Math.sqrt(this.inverseRoughness[j]!);
    }
    this.h = new Float64Array(n * n);
    for (let i = 1; i < n; i++) {
      for (let q = 1; q <= i; q++) {
        let acc = 0;
        const oi = i * m;
        const oq = q * m;
        for (let j = 1; j < m; j++) acc += d[oi + j]! * d[oq + j]!;
        this.h[i * n + q] = acc;
        this.h[q * n + i] = acc;
      }
    }
  }

  /**
   * The interpolant through `energies` (one per data point, eV), leaving out data point `exclude` when given
   * (leave-one-out). Throws when the system is singular (two data points at the same k).
   */
  fit(energies: ArrayLike<number>, exclude: number | null = null): StarInterpolant {
    const { n, s, basis } = this;
    const m = basis.count;
    if (energies.length !== n) throw new RangeError(`Expected ${n} energies, got ${energies.length}.`);
    const kept: number[] = [];
    for (let i = 0; i < n; i++) if (i !== exclude) kept.push(i);
    const r = kept[0]!;
    const rest = kept.slice(1);
    const size = rest.length;
    const factor = this.factorFor(exclude ?? -1, r, rest);
    const rhs = new Float64Array(size);
    for (let a = 0; a < size; a++) rhs[a] = energies[rest[a]!]! - energies[r]!;
    const lambda = choleskySolve(factor, size, rhs);
    const c = new Float64Array(m);
    for (let a = 0; a < size; a++) {
      const la = lambda[a]!;
      const oi = rest[a]! * m;
      for (let j = 1; j < m; j++) c[j] = c[j]! + la * (s[oi + j]! - s[r * m + j]!);
    }
    let c0 = energies[r]!;
    for (let j = 1; j < m; j++) {
      c[j] = c[j]! * this.inverseRoughness[j]!;
      c0 -= c[j]! * s[r * m + j]!;
    }
    c[0] = c0;
    return new StarInterpolant(basis, c);
  }

  private factorFor(cacheKey: number, r: number, rest: number[]): Float64Array {
    const hit = this.factors.get(cacheKey);
    if (hit) return hit;
    const { n, h } = this;
    const size = rest.length;
    const a = new Float64Array(size * size);
    for (let p = 0; p < size; p++) {
      const i = rest[p]!;
      for (let q = 0; q < size; q++) {
        const j = rest[q]!;
        a[p * size + q] = h[i * n + j]! - h[i * n + r]! - h[r * n + j]! + h[r * n + r]!;
      }
    }
    const l = choleskyFactor(a, size);
    if (!l) throw new RangeError('The interpolation system is singular: two data k-points are equivalent by symmetry or coincide.');
    this.factors.set(cacheKey, l);
    return l;
  }
}

/** Cartesian k of fractional k (rows of `reciprocal`, Å⁻¹), for many points. */
export function toCartesian(kFrac: Float64Array, reciprocal: readonly Vec3[]): Float64Array {
  const out = new Float64Array(kFrac.length);
  for (let i = 0; i < kFrac.length / 3; i++) {
    const a = kFrac[3 * i]!;
    const b = kFrac[3 * i + 1]!;
    const c = kFrac[3 * i + 2]!;
    for (let x = 0; x < 3; x++) out[3 * i + x] = a * reciprocal[0]![x]! + b * reciprocal[1]![x]! + c * reciprocal[2]![x]!;
  }
  return out;
}
