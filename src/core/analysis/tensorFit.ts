/**
 * The full mass tensor from k-points around an extremum (a uniform grid, or a list of points around it): least squares
 * of the quadratic form E = E0 + g·d + ½ dᵀ H d over the displacements d (cartesian Å⁻¹), gradient free
 * so an extremum between points is allowed. The inverse mass tensor is H/(ħ²/m_e); its eigenvectors are the
 * principal axes and ħ²/(m_e λ) the principal (signed) masses. (physics.md step 5.)
 */
import type { BandStructure, Mat3, MassTensor, Vec3 } from '../model';
import { kpointAt } from '../model';
import { reciprocalLattice } from '../lattice/reciprocal';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import { leastSquares } from './fits/leastSquares';
import { symmetricEigen3 } from './symmetricEigen';

export interface QuadraticFormFit {
  hessian: Mat3;
  /** Covariance of the six second-order coefficients (xx, yy, zz, xy, xz, yz of H), 6×6 row-major. */
  hessianCov: Float64Array;
  gradient: Vec3;
  e0: number;
  rms_meV: number;
  points: number;
}

/** Least-squares quadratic form through displacements `d` (n×3, Å⁻¹) and energies `e` (eV). */
export function fitQuadraticForm(d: Float64Array, e: Float64Array, sigma2Floor = 0): QuadraticFormFit | null {
  const n = e.length;
  const p = 10;
  let rmax = 0;
  for (let i = 0; i < n; i++) rmax = Math.max(rmax, Math.hypot(d[3 * i]!, d[3 * i + 1]!, d[3 * i + 2]!));
  if (!(rmax > 0)) return null;
  const a = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    const x = d[3 * i]! / rmax;
    const y = d[3 * i + 1]! / rmax;
    const z = d[3 * i + 2]! / rmax;
    a.set([1, x, y, z, (x * x) / 2, (y * y) / 2, (z * z) / 2, x * y, x * z, y * z], i * p);
  }
  const fit = leastSquares(a, e, n, p, sigma2Floor);
  if (!fit) return null;
  const s2 = rmax * rmax;
  const c = fit.coef;
  const hessian: Mat3 = [
    [c[4]! / s2, c[7]! / s2, c[8]! / s2],
    [c[7]! / s2, c[5]! / s2, c[9]! / s2],
    [c[8]! / s2, c[9]! / s2, c[6]! / s2],
  ];
  const hessianCov = new Float64Array(36);
  for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) hessianCov[i * 6 + j] = fit.cov[(4 + i) * p + 4 + j]! / (s2 * s2);
  return {
    hessian,
    hessianCov,
    gradient: [c[1]! / rmax, c[2]! / rmax, c[3]! / rmax],
    e0: c[0]!,
    rms_meV: Math.sqrt(fit.rss / n) * 1000,
    points: n,
  };
}

/** Principal signed masses (lightest first), axes and their standard errors from a Hessian fit. */
export function principalMasses(q: QuadraticFormFit, method: string): MassTensor {
  const eig = symmetricEigen3(q.hessian);
  const items = [0, 1, 2].map((i) => {
    const v = eig.vectors[i]!;
    const lambda = eig.values[i]!;
    // δλ = vᵀ δH v: gradient of λ with respect to (Hxx, Hyy, Hzz, Hxy, Hxz, Hyz).
    const g = [v[0] * v[0], v[1] * v[1], v[2] * v[2], 2 * v[0] * v[1], 2 * v[0] * v[2], 2 * v[1] * v[2]];
    let varL = 0;
    for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) varL += g[a]! * g[b]! * q.hessianCov[a * 6 + b]!;
    const mass = HBAR2_OVER_ME_EV_A2 / lambda;
    return { mass, axis: v, stderr: Math.abs(mass) * (Math.sqrt(Math.max(varL, 0)) / Math.abs(lambda)) };
  });
  items.sort((x, y) => Math.abs(x.mass) - Math.abs(y.mass));
  return {
    principal: items.map((x) => x.mass) as Vec3,
    axes: items.map((x) => x.axis) as Mat3,
    method,
    points: q.points,
    residual_meV: q.rms_meV,
    stderr: items.map((x) => x.stderr) as Vec3,
  };
}

export interface TensorOutcome {
  tensor: MassTensor | null;
  /** Energy span of the points used, meV. */
  window_meV: number;
  warnings: string[];
}

/** Fewest points: ten unknowns, and the 19 of a centred cubic stencil (centre, 6 axial, 12 diagonal). */
const TENSOR_MIN_POINTS = 19;
const TENSOR_MAX_POINTS = 81;

/**
 * Tensor at k index `center` of `band` from the surrounding k-points of a grid or point list, nearest
 * first (displacements taken to the nearest periodic image).
 */
export function tensorFromNeighbours(
  bs: BandStructure,
  spin: number,
  band: number,
  center: number,
  window_meV: number,
  energySigma: number,
): TensorOutcome {
  const warnings: string[] = [];
  if (!bs.lattice) return { tensor: null, window_meV: 0, warnings: ['No lattice: the mass tensor needs cartesian k.'] };
  const rec = reciprocalLattice(bs.lattice);
  const k0 = kpointAt(bs, center);
  const nb = bs.nBands;
  const en = bs.energies[spin]!;
  const cand: { r: number; d: Vec3; e: number }[] = [];
  for (let j = 0; j < bs.nk; j++) {
    const f = kpointAt(bs, j).map((x, c) => {
      const v = x - k0[c]!;
      return v - Math.round(v);
    }) as Vec3;
    const d: Vec3 = [
      f[0] * rec[0][0] + f[1] * rec[1][0] + f[2] * rec[2][0],
      f[0] * rec[0][1] + f[1] * rec[1][1] + f[2] * rec[2][1],
      f[0] * rec[0][2] + f[1] * rec[1][2] + f[2] * rec[2][2],
    ];
    cand.push({ r: Math.hypot(...d), d, e: en[j * nb + band]! });
  }
  cand.sort((a, b) => a.r - b.r);
  // Drop repeated points (periodic grids written with both end points, or a list with duplicates).
  const uniq: typeof cand = [];
  for (const c of cand) {
    if (uniq.some((u) => Math.hypot(u.d[0] - c.d[0], u.d[1] - c.d[1], u.d[2] - c.d[2]) < 1e-7)) continue;
    uniq.push(c);
    if (uniq.length >= TENSOR_MAX_POINTS * 2) break;
  }
  if (uniq.length < 10)
    return { tensor: null, window_meV: 0, warnings: [`Only ${uniq.length} distinct k-points: the mass tensor needs at least 10.`] };
  let n = Math.min(TENSOR_MIN_POINTS, uniq.length);
  while (n < uniq.length && uniq[n]!.r - uniq[n - 1]!.r < 1e-6 * uniq[n - 1]!.r) n++;
  for (;;) {
    const d = new Float64Array(n * 3);
    const e = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      d.set(uniq[i]!.d, 3 * i);
      e[i] = uniq[i]!.e;
    }
    const q = fitQuadraticForm(d, e, energySigma ** 2);
    if (q) {
      let span = 0;
      for (let i = 0; i < n; i++) span = Math.max(span, Math.abs(e[i]! - uniq[0]!.e));
      const spanMeV = span * 1000;
      if (spanMeV > window_meV) {
        warnings.push(
          `The ${n} k-points nearest the extremum span ${spanMeV.toFixed(0)} meV, more than the ${window_meV} meV window: a finer mesh or a tensor run (valleyscope tensor-kpoints) would fit the curvature closer to the extremum.`,
        );
      }
      const t = principalMasses(q, `quadratic form, ${n} nearest k-points`);
      if (q.rms_meV > Math.max(0.04 * Math.max(spanMeV, window_meV), 3000 * energySigma, 0.05)) {
        warnings.push(`Tensor fit residual ${q.rms_meV.toFixed(2)} meV: the band is not quadratic over these points.`);
      }
      return { tensor: t, window_meV: spanMeV, warnings };
    }
    if (n >= Math.min(uniq.length, TENSOR_MAX_POINTS)) break;
    n = Math.min(n + 6, uniq.length);
  }
  return { tensor: null, window_meV: 0, warnings: ['The k-points around the extremum do not span three dimensions: no mass tensor.'] };
}
