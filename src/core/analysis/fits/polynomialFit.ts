/**
 * Least-squares polynomial E(t) = Σ c_j t^j along a line, the vertex free (the linear term is fitted, so an
 * extremum between sampled points is located, not assumed at a sampled point). Degree 2 is the parabola
 * fit; degree 4 separates the curvature from cubic and quartic terms.
 */
import { curvatureToMass } from '../../units';
import { leastSquares } from './leastSquares';
import type { CurvatureFit, FitSettings, LineSamples } from './types';
import { chooseWindow } from './window';
import { quotability } from './quotable';

export interface PolynomialOptions {
  degree: 2 | 3 | 4;
  method: string;
  minPoints: number;
}

export function polynomialCurvature(s: LineSamples, settings: FitSettings, opt: PolynomialOptions): CurvatureFit | null {
  if (s.even) return evenPolynomialCurvature(s, settings, opt);
  const what = opt.degree === 2 ? 'parabola fit' : `degree-${opt.degree} polynomial fit`;
  const win = chooseWindow(s, settings.window_meV, opt.minPoints, what);
  const n = win.n;
  const p = opt.degree + 1;
  if (n < p) return null;
  const tmax = s.t[n - 1]!;
  if (!(tmax > 0)) return null;
  const a = new Float64Array(n * p);
  const y = new Float64Array(n);
  const e0 = s.e[0]!;
  for (let i = 0; i < n; i++) {
    const u = s.t[i]! / tmax;
    let pw = 1;
    for (let j = 0; j < p; j++) {
      a[i * p + j] = pw;
      pw *= u;
    }
    y[i] = s.e[i]! - e0;
  }
  const fit = leastSquares(a, y, n, p, settings.energySigma ** 2);
  if (!fit) return null;
  // Coefficients in u = t/tmax: E = c0 + c1 u + c2 u² + ...; in t the quadratic coefficient is c2/tmax².
  const c1 = fit.coef[1]! / tmax;
  const c2 = fit.coef[2]! / (tmax * tmax);
  const var2 = fit.cov[2 * p + 2]! / tmax ** 4;
  const warnings = [...win.warnings];
  // Curvature at the vertex: for the parabola it is 2 c2 everywhere; for higher degrees evaluate E'' at
  // the vertex t_v where E'(t_v) = 0, found by Newton from the parabolic estimate.
  let tv = c2 !== 0 ? -c1 / (2 * c2) : 0;
  const coefT = Array.from(fit.coef, (c, j) => c / tmax ** j);
  const d1 = (t: number): number => coefT.reduce((acc, c, j) => (j >= 1 ? acc + j * c * t ** (j - 1) : acc), 0);
  const d2 = (t: number): number => coefT.reduce((acc, c, j) => (j >= 2 ? acc + j * (j - 1) * c * t ** (j - 2) : acc), 0);
  if (opt.degree > 2) {
    for (let it = 0; it < 20; it++) {
      const g = d2(tv);
      if (g === 0) break;
      const step = d1(tv) / g;
      tv -= step;
      if (Math.abs(step) < 1e-12) break;
    }
    if (!Number.isFinite(tv) || Math.abs(tv) > tmax) tv = c2 !== 0 ? -c1 / (2 * c2) : 0;
  }
  const curvature = opt.degree === 2 ? 2 * c2 : d2(tv);
  // Error of the curvature: the quadratic coefficient's error dominates (first order, vertex near 0).
  const curvatureStderr = 2 * Math.sqrt(Math.max(var2, 0));
  let vertexE = e0;
  for (let j = 0; j < coefT.length; j++) vertexE += coefT[j]! * tv ** j;
  const h = s.t.length > 1 ? s.t[1]! : tmax;
  const outside =
    tv < -1.5 * h || tv > tmax ? `the fitted vertex lies ${tv.toFixed(4)} Å⁻¹ from the sampled point, outside the points used` : null;
  if (outside) {
    warnings.push(
      `The fitted vertex lies ${tv.toFixed(4)} Å⁻¹ from the sampled extremum, outside the points used: the band may not have its extremum here.`,
    );
  }
  return curvatureResult(opt.method, { curvature, curvatureStderr, rss: fit.rss, n, p, window_meV: win.window_meV }, settings, {
    vertexT: tv,
    vertexE,
    warnings,
    outside,
  });
}

/** The fit's report from its curvature and error: the mass, its error, the residual and when it can be quoted. */
function curvatureResult(
  method: string,
  f: { curvature: number; curvatureStderr: number; rss: number; n: number; p: number; window_meV: number },
  settings: FitSettings,
  v: { vertexT: number; vertexE: number; warnings: string[]; outside: string | null },
): CurvatureFit {
  const mass = curvatureToMass(f.curvature);
  const stderr = Math.abs(mass) * (f.curvatureStderr / Math.abs(f.curvature));
  const rms = Math.sqrt(f.rss / f.n) * 1000;
  const nonParabolic = residualWarning(rms, f.window_meV, settings.energySigma);
  if (nonParabolic) v.warnings.push(nonParabolic);
  return {
    method,
    curvature: f.curvature,
    curvatureStderr: f.curvatureStderr,
    mass,
    stderr,
    points: f.n,
    window_meV: f.window_meV,
    residual_meV: rms,
    vertexT: v.vertexT,
    vertexE: v.vertexE,
    warnings: v.warnings,
    ...quotability(mass, stderr, f.n, f.p, v.outside),
  };
}

/**
 * Where symmetry makes E even in t (a time-reversal-invariant k): E = c0 + c2 t² (+ c4 t⁴), the vertex
 * fixed at the sampled point. Two fewer unknowns than the free-vertex fit, so fewer points suffice and the
 * window need not grow as far on a coarse path (where a light band's third point can lie hundreds of meV up).
 */
function evenPolynomialCurvature(s: LineSamples, settings: FitSettings, opt: PolynomialOptions): CurvatureFit | null {
  const even = opt.degree === 2 ? 2 : 3; // unknowns: c0, c2 (, c4)
  const minPoints = Math.max(even + 1, opt.minPoints - (opt.degree + 1 - even));
  const what = `${opt.degree === 2 ? 'parabola' : 'quartic'} fit (vertex fixed by symmetry)`;
  const win = chooseWindow(s, settings.window_meV, minPoints, what);
  const n = win.n;
  if (n < even + 1 && !(n === even && n >= 2)) return null;
  const tmax = s.t[n - 1]!;
  if (!(tmax > 0)) return null;
  const a = new Float64Array(n * even);
  const y = new Float64Array(n);
  const e0 = s.e[0]!;
  for (let i = 0; i < n; i++) {
    const u2 = (s.t[i]! / tmax) ** 2;
    a[i * even] = 1;
    a[i * even + 1] = u2;
    if (even === 3) a[i * even + 2] = u2 * u2;
    y[i] = s.e[i]! - e0;
  }
  const fit = leastSquares(a, y, n, even, settings.energySigma ** 2);
  if (!fit) return null;
  const c2 = fit.coef[1]! / (tmax * tmax);
  const curvature = 2 * c2;
  const curvatureStderr = (2 * Math.sqrt(Math.max(fit.cov[1 * even + 1]!, 0))) / (tmax * tmax);
  return curvatureResult(opt.method, { curvature, curvatureStderr, rss: fit.rss, n, p: even, window_meV: win.window_meV }, settings, {
    vertexT: 0,
    vertexE: e0 + fit.coef[0]!,
    warnings: [...win.warnings],
    outside: null,
  });
}

/** A residual beyond what rounding and a parabola explain says the band is not parabolic in the window. */
function residualWarning(rms_meV: number, window_meV: number, energySigma: number): string | null {
  if (rms_meV <= Math.max(0.04 * window_meV, 3000 * energySigma, 0.05)) return null;
  return `Fit residual ${rms_meV.toFixed(2)} meV in a ${window_meV.toFixed(0)} meV window: the band is not parabolic there (try a smaller window, or the poly4 or kane method).`;
}

/** Fewest points of the quartic fit: five unknowns and two more to judge the residual. */
export const POLY4_MIN_POINTS = 7;

/** Quartic polynomial: the curvature at the vertex, separated from cubic and quartic terms. */
export function quarticCurvature(s: LineSamples, settings: FitSettings): CurvatureFit | null {
  return polynomialCurvature(s, settings, { degree: 4, method: 'poly4', minPoints: POLY4_MIN_POINTS });
}
