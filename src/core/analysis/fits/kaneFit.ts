/**
 * Kane non-parabolic dispersion ε(1 + αε) = ħ²k²/2m* (E. O. Kane, J. Phys. Chem. Solids 1, 249 (1957)),
 * with ε the energy from the band edge (towards the carriers: up for electrons, down for holes) and k the
 * distance from the vertex. Fitted by Levenberg-Marquardt on the energies with the edge energy, the vertex
 * position, ħ²/2m* and α free; starts from the free-vertex parabola.
 */
import { HBAR2_OVER_ME_EV_A2 } from '../../units';
import { leastSquares } from './leastSquares';
import { polynomialCurvature } from './polynomialFit';
import type { CurvatureFit, FitSettings, LineSamples } from './types';
import { chooseWindow } from './window';
import { quotability } from './quotable';

/** Fewest points: four unknowns and three more to judge the residual. */
export const KANE_MIN_POINTS = 7;

/** ε(k) solving ε(1+αε) = A k², written so that α → 0 is stable. NaN where no real root exists. */
export function kaneEnergy(a: number, alpha: number, k2: number): number {
  const disc = 1 + 4 * alpha * a * k2;
  if (disc < 0) return NaN;
  return (2 * a * k2) / (1 + Math.sqrt(disc));
}

export function kaneCurvature(s: LineSamples, settings: FitSettings): CurvatureFit | null {
  const win = chooseWindow(s, settings.window_meV, KANE_MIN_POINTS, 'Kane fit');
  const n = win.n;
  const p = 4;
  if (n < p + 1) return null;
  const start = polynomialCurvature(
    { t: s.t.subarray(0, n), e: s.e.subarray(0, n) },
    { ...settings, window_meV: Infinity },
    { degree: 2, method: 'kane', minPoints: 3 },
  );
  if (!start || !Number.isFinite(start.curvature) || start.curvature === 0) return null;
  const sign = start.curvature > 0 ? 1 : -1;
  // Parameters: E0 (eV), t0 (Å⁻¹), A = ħ²/2m* (eV Å²), α (1/eV).
  let x = [start.vertexE ?? s.e[0]!, start.vertexT ?? 0, Math.abs(start.curvature) / 2, 0];
  const t = s.t;
  const e = s.e;
  const residuals = (q: number[]): Float64Array | null => {
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const eps = kaneEnergy(q[2]!, q[3]!, (t[i]! - q[1]!) ** 2);
      if (!Number.isFinite(eps)) return null;
      r[i] = e[i]! - (q[0]! + sign * eps);
    }
    return r;
  };
  const ss = (r: Float64Array): number => r.reduce((acc, v) => acc + v * v, 0);
  const tmax = t[n - 1]!;
  const steps = [1e-6, 1e-6 * tmax, 1e-6 * x[2]!, 1e-4];
  const jacobian = (q: number[]): Float64Array | null => {
    const jac = new Float64Array(n * p);
    for (let j = 0; j < p; j++) {
      const hp = [...q];
      const hm = [...q];
      const h = Math.max(steps[j]!, 1e-9 * Math.abs(q[j]!));
      hp[j] = q[j]! + h;
      hm[j] = q[j]! - h;
      const rp = residuals(hp);
      const rm = residuals(hm);
      if (!rp || !rm) return null;
      // d(model)/dq = -d(residual)/dq
      for (let i = 0; i < n; i++) jac[i * p + j] = -(rp[i]! - rm[i]!) / (2 * h);
    }
    return jac;
  };
  let r = residuals(x);
  if (!r) return null;
  let cost = ss(r);
  let lambda = 1e-3;
  for (let iter = 0; iter < 200; iter++) {
    const jac = jacobian(x);
    if (!jac) break;
    // Damped step: minimise |J δ - r|² + λ Σ d_j δ_j² via extra rows.
    const diag = new Float64Array(p);
    for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) diag[j] = diag[j]! + jac[i * p + j]! ** 2;
    const aug = new Float64Array((n + p) * p);
    aug.set(jac);
    const rhs = new Float64Array(n + p);
    rhs.set(r);
    for (let j = 0; j < p; j++) aug[(n + j) * p + j] = Math.sqrt(lambda * Math.max(diag[j]!, 1e-30));
    const step = leastSquares(aug, rhs, n + p, p);
    if (!step) break;
    const trial = x.map((v, j) => v + step.coef[j]!);
    const rt = trial[2]! > 0 ? residuals(trial) : null;
    const ct = rt ? ss(rt) : Infinity;
    if (ct < cost) {
      const gain = cost - ct;
      x = trial;
      r = rt!;
      cost = ct;
      lambda = Math.max(lambda / 5, 1e-12);
      if (gain < 1e-14 * Math.max(cost, 1e-30) || gain < 1e-26) break;
    } else {
      lambda *= 10;
      if (lambda > 1e12) break;
    }
  }
  const jac = jacobian(x);
  if (!jac) return null;
  const cov = leastSquares(jac, r, n, p, settings.energySigma ** 2);
  if (!cov) return null;
  const a = x[2]!;
  const alpha = x[3]!;
  const mass = (sign * HBAR2_OVER_ME_EV_A2) / (2 * a);
  const varA = cov.cov[2 * p + 2]!;
  const stderr = Math.abs(mass) * (Math.sqrt(Math.max(varA, 0)) / a);
  const curvature = sign * 2 * a;
  const warnings = [...win.warnings];
  const rms = Math.sqrt(cost / n) * 1000;
  const alphaStderr = Math.sqrt(Math.max(cov.cov[3 * p + 3]!, 0));
  // Typical α of semiconductors is 0.1-1 /eV (common practice): an error above half of α, and above 0.05 /eV, says little.
  if (alphaStderr > Math.max(0.5 * Math.abs(alpha), 0.05)) {
    warnings.push(
      `α is poorly determined in a ${win.window_meV.toFixed(0)} meV window (±${alphaStderr.toPrecision(2)} /eV): ${win.window_meV < 100 ? 'use a wider window (100-200 meV) for the Kane fit' : 'the band does not follow the Kane form closely here'}.`,
    );
  }
  const h = t.length > 1 ? t[1]! : tmax;
  const tv = x[1]!;
  const outside =
    tv < -1.5 * h || tv > tmax ? `the fitted vertex lies ${tv.toFixed(4)} Å⁻¹ from the sampled point, outside the points used` : null;
  return {
    ...quotability(mass, stderr, n, p, outside),
    method: 'kane',
    curvature,
    curvatureStderr: 2 * Math.sqrt(Math.max(varA, 0)),
    mass,
    stderr,
    points: n,
    window_meV: win.window_meV,
    residual_meV: rms,
    alpha_per_eV: alpha,
    alphaStderr,
    vertexT: x[1]!,
    vertexE: x[0]!,
    warnings,
  };
}
