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
 * one star of points for leave-one-out) and then serves every band. On a mesh whose every frequency the basis
 * holds, H is not built at all: the system is solved by one Fourier transform per band (meshFourier.ts).
 */
import type { Vec3 } from '../model';
import { choleskyFactor, choleskySolve } from './cholesky';
import { MeshSpectralSolver, meshFitMatrix, meshIndexOf, meshKernelSpectrum, meshStarSums, type SpectralSolution } from './meshFourier';
import type { RegularMesh } from './regularMesh';
import { inverseRoughnessOf } from './roughness';
import { starValues, type StarBasis } from './starBasis';
import { StarInterpolant } from './starInterpolant';

/** The data points as points of a regular mesh (meshFourier.ts): the fit is then built by Fourier sums. */
export interface MeshLayout {
  mesh: RegularMesh;
  /** The data k-points, fractional, 3 numbers each (the same points as `kCart`). */
  kFrac: Float64Array;
}

interface Solution {
  lambda: Float64Array;
  sums: Float64Array;
  energies?: Float64Array;
}

/** Left-out points whose corrections are kept. */
const MAX_CORRECTIONS = 64;

export class SmoothStarFit {
  readonly n: number;
  /** S_m(k_i), row-major N × M, when the data are not laid out on a mesh (else null). */
  private readonly s: Float64Array | null;
  private readonly mesh: RegularMesh | null;
  private readonly inverseRoughness: Float64Array;
  /** H_ij = Σ_{m≥1} S_m(k_i) S_m(k_j)/ρ_m, N × N (null when the system is solved in Fourier space). */
  private readonly h: Float64Array | null;
  private factorL: Float64Array | null = null;
  /** The solver in Fourier space on a mesh, or null. */
  private readonly spectral: MeshSpectralSolver | null = null;
  private readonly spectralSolutions = new WeakMap<object, SpectralSolution & { energies: Float64Array }>();
  private readonly spectralCorrections = new Map<number, SpectralSolution & { multipliers: Float64Array }>();
  private readonly solutions = new WeakMap<object, Solution>();
  private readonly corrections = new Map<number, Solution>();
  private readonly referenceStars = new Map<number, Float64Array>();

  /**
   * `kCart`: the data k-points (irreducible, one per star of k), cartesian Å⁻¹, 3 numbers each. With `layout`
   * (the same points on a regular mesh) the matrices come from Fourier sums over the mesh, much faster.
   */
  constructor(
    readonly basis: StarBasis,
    kCart: Float64Array,
    layout: MeshLayout | null = null,
  ) {
    const n = kCart.length / 3;
    const m = basis.count;
    if (!Number.isInteger(n) || n < 2) throw new RangeError('The fit needs at least two k-points.');
    if (m <= n) throw new RangeError(`The fit needs more stars (${m}) than k-points (${n}).`);
    this.n = n;
    this.inverseRoughness = inverseRoughnessOf(basis);
    const own = layout && layout.kFrac.length === kCart.length ? meshIndexOf(layout.mesh, layout.kFrac) : null;
    if (layout && own) {
      this.mesh = layout.mesh;
      this.s = null;
      const spectrum = meshKernelSpectrum(basis, layout.mesh);
      this.spectral = spectrum ? new MeshSpectralSolver(basis, layout.mesh, spectrum, own) : null;
      this.h = spectrum ? null : meshFitMatrix(basis, this.inverseRoughness, layout.mesh, own);
      return;
    }
    this.mesh = null;
    const s = new Float64Array(n * m);
    const row = new Float64Array(m);
    for (let i = 0; i < n; i++) {
      starValues(basis, [kCart[3 * i]!, kCart[3 * i + 1]!, kCart[3 * i + 2]!], row);
      s.set(row, i * m);
    }
    this.s = s;
    // D_i = S(k_i) scaled by 1/√ρ (m ≥ 1): H = D Dᵀ.
    const d = new Float64Array(n * m);
    for (let i = 0; i < n; i++) {
      for (let j = 1; j < m; j++) d[i * m + j] = s[i * m + j]! * Math.sqrt(this.inverseRoughness[j]!);
    }
    const h = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let q = 0; q <= i; q++) {
        let acc = 0;
        const oi = i * m;
        const oq = q * m;
        for (let j = 1; j < m; j++) acc += d[oi + j]! * d[oq + j]!;
        h[i * n + q] = acc;
        h[q * n + i] = acc;
      }
    }
    this.h = h;
  }

  /** True when the fit was built by Fourier sums over a mesh (solved in Fourier space, or by its matrix). */
  get onMesh(): boolean {
    return this.mesh !== null;
  }

  /**
   * The interpolant through `energies` (one per data point, eV), leaving out data point `exclude` when given
   * (leave-one-out). Throws when the system is singular (two data points at the same k). `memberBuffer`: see
   * StarInterpolant (an interpolant for brief use).
   *
   * With the reference point 0 the multipliers solve A λ = ε − ε_0 over the other points (A the matrix of the
   * differences S(k_i) − S(k_0)); one factorisation of A serves every band and every point left out. Leaving
   * out p ≠ 0: the reduced solution is x − (x_p/z_p) z, x = A⁻¹(ε − ε_0), z = A⁻¹ e_p (the multiplier of p is
   * then zero and the other equations hold). Leaving out 0: the differences to point 1 still hold if every
   * equation is shifted alike, λ = x + β A⁻¹ 1, with β making the multiplier of point 0, −Σλ, zero.
   */
  fit(energies: ArrayLike<number>, exclude: number | null = null, memberBuffer?: Float64Array): StarInterpolant {
    const { n } = this;
    if (energies.length !== n) throw new RangeError(`Expected ${n} energies, got ${energies.length}.`);
    if (exclude !== null && !(Number.isInteger(exclude) && exclude >= 0 && exclude < n)) {
      throw new RangeError(`There is no data point ${exclude + 1} to leave out.`);
    }
    if (this.spectral) return this.spectralFit(energies, exclude, memberBuffer);
    // Everything is linear in the multipliers: Σ_i μ_i S_m(k_i) of the band's solution x, less f times that of z.
    const base = this.solved(energies);
    let c = base.sums;
    if (exclude !== null) {
      const out = this.leftOut(exclude);
      const x = base.lambda;
      const z = out.lambda;
      const f = exclude > 0 ? x[exclude - 1]! / z[exclude - 1]! : sum(x) / sum(z);
      c = new Float64Array(c.length);
      for (let j = 0; j < c.length; j++) c[j] = base.sums[j]! - f * out.sums[j]!;
    } else {
      c = c.slice();
    }
    // The constant: the interpolant passes through a kept point r.
    const r = exclude === 0 ? 1 : 0;
    const sr = this.starsAt(r);
    let c0 = energies[r]!;
    for (let j = 1; j < c.length; j++) {
      c[j] = c[j]! * this.inverseRoughness[j]!;
      c0 -= c[j]! * sr[j]!;
    }
    c[0] = c0;
    return new StarInterpolant(this.basis, c, memberBuffer);
  }

  /**
   * The fit in Fourier space. Leaving out p: the multipliers μ(ε) − f μ(e_p) with f = μ_p(ε)/μ_p(e_p) give p a
   * zero multiplier and keep every other equation (up to the free constant), as the reduced-system solution
   * above; the constant is then the mean of ε over the mesh less f times that of e_p (c_p/N). The map from
   * values to multipliers is symmetric (the bordered system is), so μ_p(ε) = Σ_i μ_i(e_p) ε_i: only e_p's
   * multipliers are needed, the same for every band.
   */
  private spectralFit(energies: ArrayLike<number>, exclude: number | null, memberBuffer?: Float64Array): StarInterpolant {
    const solver = this.spectral!;
    const key = typeof energies === 'object' ? (energies as object) : null;
    let base = key ? this.spectralSolutions.get(key) : undefined;
    // Kept with a copy of the energies: an array changed in place is solved again.
    if (!base || !sameValues(base.energies, energies)) {
      base = { ...solver.solve(energies), energies: Float64Array.from(energies) };
      if (key) this.spectralSolutions.set(key, base);
    }
    const c = base.sums.slice();
    let c0 = base.mean;
    if (exclude !== null) {
      let out = this.spectralCorrections.get(exclude);
      if (!out) {
        out = solver.indicator(exclude);
        if (this.spectralCorrections.size >= MAX_CORRECTIONS)
          this.spectralCorrections.delete(this.spectralCorrections.keys().next().value!);
        this.spectralCorrections.set(exclude, out);
      }
      const mu = out.multipliers;
      let muOfEnergies = 0;
      for (let i = 0; i < this.n; i++) muOfEnergies += mu[i]! * energies[i]!;
      const f = muOfEnergies / mu[exclude]!;
      for (let j = 0; j < c.length; j++) c[j] = c[j]! - f * out.sums[j]!;
      c0 -= f * out.mean;
    }
    for (let j = 1; j < c.length; j++) c[j] = c[j]! * this.inverseRoughness[j]!;
    c[0] = c0;
    return new StarInterpolant(this.basis, c, memberBuffer);
  }

  /** The multipliers λ of a band and their star sums (kept per energies array: leave-one-out reuses them). */
  private solved(energies: ArrayLike<number>): Solution {
    const key = typeof energies === 'object' ? (energies as object) : null;
    const hit = key ? this.solutions.get(key) : undefined;
    // Kept with a copy of the energies: an array changed in place is solved again.
    if (hit && sameValues(hit.energies!, energies)) return hit;
    const size = this.n - 1;
    const rhs = new Float64Array(size);
    for (let a = 0; a < size; a++) rhs[a] = energies[a + 1]! - energies[0]!;
    const out = { ...this.withSums(choleskySolve(this.factor(), size, rhs)), energies: Float64Array.from(energies) };
    if (key) this.solutions.set(key, out);
    return out;
  }

  /** z = A⁻¹ e_p (p > 0) or A⁻¹ 1 (p = 0) and its star sums: the same for every band. */
  private leftOut(p: number): Solution {
    let hit = this.corrections.get(p);
    if (!hit) {
      const size = this.n - 1;
      const unit = new Float64Array(size);
      if (p > 0) unit[p - 1] = 1;
      else unit.fill(1);
      hit = this.withSums(choleskySolve(this.factor(), size, unit));
      if (this.corrections.size >= MAX_CORRECTIONS) this.corrections.delete(this.corrections.keys().next().value!);
      this.corrections.set(p, hit);
    }
    return hit;
  }

  /** μ_i (the multipliers, with μ_0 = −Σ λ, the reference's share of the differences) and Σ_i μ_i S_m(k_i). */
  private withSums(lambda: Float64Array): Solution {
    const mu = new Float64Array(this.n);
    mu.set(lambda, 1);
    mu[0] = -sum(lambda);
    return { lambda, sums: this.starSums(mu) };
  }

  /** Σ_i μ_i S_m(k_i) for every star. */
  private starSums(mu: Float64Array): Float64Array {
    if (this.mesh) return meshStarSums(this.basis, this.mesh, mu);
    const m = this.basis.count;
    const s = this.s!;
    const out = new Float64Array(m);
    for (let i = 0; i < this.n; i++) {
      const w = mu[i]!;
      if (w === 0) continue;
      const o = i * m;
      for (let j = 0; j < m; j++) out[j] = out[j]! + w * s[o + j]!;
    }
    return out;
  }

  /** S_m(k_r) for every star. */
  private starsAt(r: number): Float64Array {
    let hit = this.referenceStars.get(r);
    if (!hit) {
      const m = this.basis.count;
      hit = this.s ? this.s.slice(r * m, (r + 1) * m) : this.starSums(Float64Array.from({ length: this.n }, (_, i) => (i === r ? 1 : 0)));
      this.referenceStars.set(r, hit);
    }
    return hit;
  }

  /** The Cholesky factor of A (relative to point 0), made once. */
  private factor(): Float64Array {
    if (this.factorL) return this.factorL;
    const { n } = this;
    const h = this.h!;
    const size = n - 1;
    const a = new Float64Array(size * size);
    const h00 = h[0]!;
    for (let p = 0; p < size; p++) {
      const hp0 = h[(p + 1) * n]!;
      for (let q = 0; q <= p; q++) {
        const v = h[(p + 1) * n + q + 1]! - hp0 - h[q + 1]! + h00;
        a[p * size + q] = v;
        a[q * size + p] = v;
      }
    }
    const l = choleskyFactor(a, size);
    if (!l) throw new RangeError('The interpolation system is singular: two data k-points are equivalent by symmetry or coincide.');
    this.factorL = l;
    return l;
  }
}

/** Every value of a equal (===) to the value of b at the same place (b at least as long as a). */
function sameValues(a: Float64Array, b: ArrayLike<number>): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function sum(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v;
  return s;
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
