/**
 * Warped degenerate bands of cubic crystals: the form of Dresselhaus, Kip & Kittel (Phys. Rev. 98, 368
 * (1955)) for the two branches meeting at a degenerate extremum,
 *     E(k) = E0 + (ħ²/2m_e) [ A k² ± √(B² k⁴ + C² (kx² ky² + ky² kz² + kz² kx²)) ],
 * with A, B, C dimensionless (in units of ħ²/2m_e) and k along the cubic axes (cartesian here).
 *
 * Fitting is linear: the mean of the two branches is E0 + (ħ²/2m_e) A k², and the square of their half
 * splitting is (ħ²/2m_e)² (B² k⁴ + C² Q), Q = kx²ky² + ky²kz² + kz²kx², linear in B² and C². With two shells
 * of points (h and 2h) the next cubic invariants are fitted too (k⁴ and Q in the mean, k⁶, k²Q and kx²ky²kz²
 * in the squared splitting), so the curvature is separated from the higher-order terms.
 *
 * Along a unit direction u the dispersion is quadratic: 1/m(u) = A ± √(B² + C² f(u)), f = ux²uy² + uy²uz² +
 * uz²ux² (0 along [100], 1/4 along [110], 1/3 along [111]), masses in m_e, signed (negative at a maximum).
 * A branch's density-of-states mass is ⟨|m(u)|^(3/2)⟩^(2/3), the average over all directions (the number of
 * states below a given energy is proportional to ∫ dΩ k(Ω)³).
 */
import type { Vec3 } from '../model';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import { leastSquares } from './fits/leastSquares';

/** Unit of A, B and C. */
export const WARPING_UNIT = 'hbar^2/(2 m_e)';
const C0 = HBAR2_OVER_ME_EV_A2 / 2;

export interface WarpingParameters {
  A: number;
  /** |B|: the fit determines B² only. */
  B: number;
  /** |C|: the fit determines C² only. */
  C: number;
}

export interface WarpedFit extends WarpingParameters {
  stderr: { A: number; B: number; C: number };
  /** Energy at the centre, eV. */
  e0: number;
  points: number;
  /** Root-mean-square residual of the two branch energies, meV. */
  residual_meV: number;
  /** True when the higher-order cubic invariants were fitted beside A, B, C (two shells). */
  higherOrder: boolean;
  warnings: string[];
}

/** The cubic anisotropy function f(u) = ux²uy² + uy²uz² + uz²ux² of a unit vector. */
export function cubicAnisotropy(u: Vec3): number {
  const n2 = u[0] * u[0] + u[1] * u[1] + u[2] * u[2];
  const x = (u[0] * u[0]) / n2;
  const y = (u[1] * u[1]) / n2;
  const z = (u[2] * u[2]) / n2;
  return x * y + y * z + z * x;
}

/** Energies (eV, relative to E0) of the upper (+) and lower (−) branch at cartesian k (Å⁻¹). */
export function warpedEnergies(p: WarpingParameters, k: Vec3): { upper: number; lower: number } {
  const k2 = k[0] * k[0] + k[1] * k[1] + k[2] * k[2];
  const q = k[0] * k[0] * k[1] * k[1] + k[1] * k[1] * k[2] * k[2] + k[2] * k[2] * k[0] * k[0];
  const root = Math.sqrt(p.B * p.B * k2 * k2 + p.C * p.C * q);
  return { upper: C0 * (p.A * k2 + root), lower: C0 * (p.A * k2 - root) };
}

/** Signed inverse mass (1/m_e) of the upper (+1) or lower (−1) branch along u. */
export function warpedInverseMass(p: WarpingParameters, u: Vec3, branch: 1 | -1): number {
  return p.A + branch * Math.sqrt(p.B * p.B + p.C * p.C * cubicAnisotropy(u));
}

export interface BranchMasses {
  /** Signed masses along [100], [110], [111], m_e. */
  m100: number;
  m110: number;
  m111: number;
}

/**
 * Heavy and light branch masses along the three cubic directions. The heavy branch is the one with the
 * smaller |1/m| along [100] (the upper branch when A < 0, i.e. at a maximum).
 */
export function heavyLightMasses(p: WarpingParameters): { heavy: BranchMasses; light: BranchMasses; heavyBranch: 1 | -1 } {
  const heavyBranch: 1 | -1 = Math.abs(warpedInverseMass(p, [1, 0, 0], 1)) <= Math.abs(warpedInverseMass(p, [1, 0, 0], -1)) ? 1 : -1;
  const along = (b: 1 | -1): BranchMasses => ({
    m100: 1 / warpedInverseMass(p, [1, 0, 0], b),
    m110: 1 / warpedInverseMass(p, [1, 1, 0], b),
    m111: 1 / warpedInverseMass(p, [1, 1, 1], b),
  });
  return { heavy: along(heavyBranch), light: along(heavyBranch === 1 ? -1 : 1), heavyBranch };
}

// Angular quadrature: product rule, Gauss–Legendre in μ = cos θ on [0, 1] × midpoint rule in φ over one
// period [0, π/2) of f. f is even in μ and π/2-periodic in φ (cubic symmetry), so one octant's μ-range and a
// quarter turn in φ average the whole sphere; the midpoint rule is spectrally accurate for a smooth periodic
// integrand, and 24 Gauss nodes integrate polynomials in μ to degree 47.
const GL_NODES = 24;
const PHI_NODES = 48;
let glCache: { x: Float64Array; w: Float64Array } | null = null;

/** Gauss–Legendre nodes and weights on [−1, 1] (Newton iteration on P_n; Golub–Welsch not needed at n = 24). */
function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-15) break;
    }
    x[i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  return { x, w };
}

/** Average of g(u) over all unit vectors, for g with cubic symmetry (even in each component, any permutation). */
export function cubicSphereAverage(g: (u: Vec3) => number): number {
  if (!glCache) glCache = gaussLegendre(GL_NODES);
  const { x, w } = glCache;
  let sum = 0;
  for (let i = 0; i < GL_NODES; i++) {
    const mu = (x[i]! + 1) / 2; // map [−1, 1] → [0, 1]
    const wi = w[i]! / 2;
    const s = Math.sqrt(1 - mu * mu);
    let inner = 0;
    for (let j = 0; j < PHI_NODES; j++) {
      const phi = ((j + 0.5) * (Math.PI / 2)) / PHI_NODES;
      inner += g([s * Math.cos(phi), s * Math.sin(phi), mu]);
    }
    sum += wi * (inner / PHI_NODES);
  }
  return sum;
}

/**
 * Density-of-states mass (positive, m_e) of one branch: ⟨|m(u)|^(3/2)⟩^(2/3) over the sphere. Null when the
 * branch's curvature changes sign with direction (not an extremum in every direction: no finite DOS mass).
 */
export function warpedDosMass(p: WarpingParameters, branch: 1 | -1): number | null {
  let pos = false;
  let neg = false;
  const avg = cubicSphereAverage((u) => {
    const inv = warpedInverseMass(p, u, branch);
    if (inv > 0) pos = true;
    else neg = true;
    return Math.abs(inv) ** -1.5;
  });
  if (pos && neg) return null;
  return avg ** (2 / 3);
}

export interface WarpedSamples {
  /** Displacements from the extremum, cartesian Å⁻¹ along the cubic axes, n × 3. */
  d: Float64Array;
  /** Upper and lower branch energies, eV. */
  upper: Float64Array;
  lower: Float64Array;
}

/**
 * Fit A, B, C to the two branches. `higherOrder` adds the next cubic invariants (needs points at two
 * distances at least); `energySigma` is the rounding of the energies (eV), a floor on the fit error.
 * Null when the points do not determine the parameters (fewer than needed, or all along one kind of line).
 */
export function fitWarpedBands(s: WarpedSamples, higherOrder: boolean, energySigma = 0): WarpedFit | null {
  const n = s.upper.length;
  let rmax = 0;
  for (let i = 0; i < n; i++) rmax = Math.max(rmax, Math.hypot(s.d[3 * i]!, s.d[3 * i + 1]!, s.d[3 * i + 2]!));
  if (!(rmax > 0)) return null;
  // Scaled coordinates (|x| ≤ 1) keep the columns comparable.
  const pm = higherOrder ? 4 : 2;
  const ps = higherOrder ? 5 : 2;
  const am = new Float64Array(n * pm);
  const ym = new Float64Array(n);
  const as = new Float64Array(n * ps);
  const ys = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = s.d[3 * i]! / rmax;
    const y = s.d[3 * i + 1]! / rmax;
    const z = s.d[3 * i + 2]! / rmax;
    const k2 = x * x + y * y + z * z;
    const q = x * x * y * y + y * y * z * z + z * z * x * x;
    const mean = (s.upper[i]! + s.lower[i]!) / 2;
    const half = (s.upper[i]! - s.lower[i]!) / 2;
    am.set(higherOrder ? [1, k2, k2 * k2, q] : [1, k2], i * pm);
    ym[i] = mean;
    as.set(higherOrder ? [k2 * k2, q, k2 * k2 * k2, k2 * q, x * x * y * y * z * z] : [k2 * k2, q], i * ps);
    ys[i] = half * half;
  }
  const fm = leastSquares(am, ym, n, pm, (energySigma * energySigma) / 2);
  // Rounding σ of each energy gives σ(half²) ≈ |half|·σ·√2; a floor from the largest splitting.
  let halfMax = 0;
  for (let i = 0; i < n; i++) halfMax = Math.max(halfMax, Math.abs(s.upper[i]! - s.lower[i]!) / 2);
  const fs = leastSquares(as, ys, n, ps, (halfMax * energySigma) ** 2 * 2);
  if (!fm || !fs) return null;
  const r2 = rmax * rmax;
  const A = fm.coef[1]! / r2 / C0;
  const sA = Math.sqrt(Math.max(fm.cov[1 * pm + 1]!, 0)) / r2 / C0;
  const B2 = fs.coef[0]! / (r2 * r2) / (C0 * C0);
  const sB2 = Math.sqrt(Math.max(fs.cov[0]!, 0)) / (r2 * r2) / (C0 * C0);
  const C2 = fs.coef[1]! / (r2 * r2) / (C0 * C0);
  const sC2 = Math.sqrt(Math.max(fs.cov[ps + 1]!, 0)) / (r2 * r2) / (C0 * C0);
  const warnings: string[] = [];
  if (B2 < 0) warnings.push(`The fit gives B² = ${B2.toPrecision(3)} < 0 (within its error ${sB2.toPrecision(2)} of zero?): B taken as 0.`);
  if (C2 < 0) warnings.push(`The fit gives C² = ${C2.toPrecision(3)} < 0 (within its error ${sC2.toPrecision(2)} of zero?): C taken as 0.`);
  const B = Math.sqrt(Math.max(B2, 0));
  const C = Math.sqrt(Math.max(C2, 0));
  // δ√x = δx / (2√x); when x ≈ 0 the error of √x is √δx.
  const sqrtErr = (v: number, sv: number): number => (v > 0 ? Math.min(sv / (2 * Math.sqrt(v)), Math.sqrt(sv)) : Math.sqrt(sv));
  // Residual of the branch energies themselves, from the fitted model (including higher-order terms).
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const mean = fm.coef.reduce((acc, c, j) => acc + c * am[i * pm + j]!, 0);
    const h2 = fs.coef.reduce((acc, c, j) => acc + c * as[i * ps + j]!, 0);
    const half = Math.sqrt(Math.max(h2, 0));
    rss += (s.upper[i]! - (mean + half)) ** 2 + (s.lower[i]! - (mean - half)) ** 2;
  }
  return {
    A,
    B,
    C,
    stderr: { A: sA, B: sqrtErr(B2, sB2), C: sqrtErr(C2, sC2) },
    e0: fm.coef[0]!,
    points: n,
    residual_meV: Math.sqrt(rss / (2 * n)) * 1000,
    higherOrder,
    warnings,
  };
}

/**
 * True when every operation is a signed permutation matrix (within tolerance): the cartesian axes are the
 * cubic axes, so kx, ky, kz in the form above are the cartesian components.
 */
export function cubicAxesAreCartesian(cartesianOps: readonly (readonly (readonly number[])[])[]): boolean {
  if (cartesianOps.length < 24) return false;
  return cartesianOps.every((r) =>
    r.every((row) => {
      let ones = 0;
      for (const x of row) {
        if (Math.abs(Math.abs(x) - 1) < 1e-6) ones++;
        else if (Math.abs(x) > 1e-6) return false;
      }
      return ones === 1;
    }),
  );
}

/**
 * A, B, C from directional inverse masses of the two branches (1/m_e, signed) along unit directions u:
 * A = mean of the branches, (half difference)² = B² + C² f(u). Needs directions with at least two values of
 * f (e.g. [100] and [111]). Null otherwise.
 */
export function warpingFromDirections(items: { u: Vec3; upper: number; lower: number }[]): WarpingParameters | null {
  const fs = items.map((x) => cubicAnisotropy(x.u));
  if (Math.max(...fs) - Math.min(...fs) < 0.05) return null;
  const A = items.reduce((s, x) => s + (x.upper + x.lower) / 2, 0) / items.length;
  const n = items.length;
  const a = new Float64Array(n * 2);
  const y = new Float64Array(n);
  items.forEach((x, i) => {
    a[2 * i] = 1;
    a[2 * i + 1] = fs[i]!;
    y[i] = ((x.upper - x.lower) / 2) ** 2;
  });
  const f = leastSquares(a, y, n, 2);
  if (!f) return null;
  return { A, B: Math.sqrt(Math.max(f.coef[0]!, 0)), C: Math.sqrt(Math.max(f.coef[1]!, 0)) };
}

// ---------------------------------------------------------------------------------------------------------
// Three degenerate bands without spin-orbit (the threefold Γ top of diamond and zincblende crystals): to order
// k² the bands are the eigenvalues of the 3×3 form of Dresselhaus, Kip & Kittel (1955), in units of ħ²/2m_e,
//     H_ii = L k_i² + M (k² − k_i²),   H_ij = N k_i k_j  (i ≠ j).
// Along [100] its eigenvalues are L and M (twice); along [111] (L + 2M + 2N)/3 and (L + 2M − N)/3 (twice).

export interface ThreefoldParameters {
  L: number;
  M: number;
  N: number;
}

/** Signed inverse masses (1/m_e) of the three branches along unit u, highest band first. */
export function threefoldInverseMasses(p: ThreefoldParameters, u: Vec3): [number, number, number] {
  const n2 = u[0] * u[0] + u[1] * u[1] + u[2] * u[2];
  const k = u.map((x) => x / Math.sqrt(n2));
  const h = [0, 1, 2].map((i) => [0, 1, 2].map((j) => (i === j ? p.L * k[i]! * k[i]! + p.M * (1 - k[i]! * k[i]!) : p.N * k[i]! * k[j]!)));
  return symmetricEigenvalues3(h).sort((a, b) => b - a) as [number, number, number];
}

/** Eigenvalues of a symmetric 3×3 matrix (closed form by the trigonometric method, common practice). */
function symmetricEigenvalues3(a: number[][]): number[] {
  const p1 = a[0]![1]! ** 2 + a[0]![2]! ** 2 + a[1]![2]! ** 2;
  const q = (a[0]![0]! + a[1]![1]! + a[2]![2]!) / 3;
  if (p1 === 0) return [a[0]![0]!, a[1]![1]!, a[2]![2]!];
  const p2 = (a[0]![0]! - q) ** 2 + (a[1]![1]! - q) ** 2 + (a[2]![2]! - q) ** 2 + 2 * p1;
  const p = Math.sqrt(p2 / 6);
  const b = a.map((r, i) => r.map((x, j) => (x - (i === j ? q : 0)) / p));
  const detB =
    b[0]![0]! * (b[1]![1]! * b[2]![2]! - b[1]![2]! * b[2]![1]!) -
    b[0]![1]! * (b[1]![0]! * b[2]![2]! - b[1]![2]! * b[2]![0]!) +
    b[0]![2]! * (b[1]![0]! * b[2]![1]! - b[1]![1]! * b[2]![0]!);
  const r = Math.max(-1, Math.min(1, detB / 2));
  const phi = Math.acos(r) / 3;
  const e1 = q + 2 * p * Math.cos(phi);
  const e3 = q + 2 * p * Math.cos(phi + (2 * Math.PI) / 3);
  return [e1, 3 * q - e1 - e3, e3];
}

/**
 * L, M, N from the three branches' signed inverse masses along directions that include [100] (L: the single
 * value there, M: the double one) and at least one other direction (N² from the sum of squares of the
 * eigenvalues, its sign from the best match of the sorted values). Null when [100] is missing.
 */
export function threefoldFromDirections(items: { u: Vec3; inv: number[] }[]): ThreefoldParameters | null {
  const axial = items.find((x) => cubicAnisotropy(x.u) < 1e-9 && x.inv.length === 3);
  const others = items.filter((x) => cubicAnisotropy(x.u) > 0.05 && x.inv.length === 3);
  if (!axial || !others.length) return null;
  const v = [...axial.inv].sort((a, b) => a - b);
  // The double value is the pair closer together.
  const [L, M] = v[1]! - v[0]! < v[2]! - v[1]! ? [v[2]!, (v[0]! + v[1]!) / 2] : [v[0]!, (v[1]! + v[2]!) / 2];
  let n2 = 0;
  for (const x of others) {
    const n = Math.hypot(...x.u);
    const k = x.u.map((c) => c / n);
    const diag = k.reduce((s, c) => s + (L * c * c + M * (1 - c * c)) ** 2, 0);
    n2 += (x.inv.reduce((s, e) => s + e * e, 0) - diag) / (2 * cubicAnisotropy(x.u));
  }
  const N0 = Math.sqrt(Math.max(n2 / others.length, 0));
  const mismatch = (N: number): number =>
    others.reduce((s, x) => {
      const model = threefoldInverseMasses({ L, M, N }, x.u);
      const data = [...x.inv].sort((a, b) => b - a);
      return s + model.reduce((t, e, i) => t + (e - data[i]!) ** 2, 0);
    }, 0);
  return { L, M, N: mismatch(N0) <= mismatch(-N0) ? N0 : -N0 };
}

/** Each branch's DOS mass (positive, m_e; highest band first), or null for a branch whose curvature changes sign. */
export function threefoldDosMasses(p: ThreefoldParameters): (number | null)[] {
  return [0, 1, 2].map((b) => {
    let pos = false;
    let neg = false;
    const avg = cubicSphereAverage((u) => {
      const inv = threefoldInverseMasses(p, u)[b]!;
      if (inv > 0) pos = true;
      else neg = true;
      return Math.abs(inv) ** -1.5;
    });
    return pos && neg ? null : avg ** (2 / 3);
  });
}
