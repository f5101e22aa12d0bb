/**
 * Refining a stationary point of an interpolated band by Newton steps on its analytic gradient and Hessian,
 * and its mass tensor: the inverse-mass tensor is (1/ħ²) ∂²ε/∂k∂k, so each principal curvature c (eV·Å²)
 * gives a principal mass ħ²/(m_e c) (units.ts).
 */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse } from '../lattice/linalg';
import { symmetricEigen3 } from '../analysis/symmetricEigen';
import { curvatureToMass } from '../units';
import type { BandDerivatives, SmoothBand } from './starInterpolant';

export type StationaryKind = 'min' | 'max';

export interface RefinedPoint {
  /** Cartesian k, Å⁻¹. */
  k: Vec3;
  energy: number;
  gradient: Vec3;
  hessian: Mat3;
  /** Principal signed masses, m_e, ascending by curvature, and their axes (cartesian unit rows). */
  masses: Vec3;
  axes: Mat3;
  iterations: number;
  converged: boolean;
  /** Why the point is not an extremum of the kind sought, or null. */
  rejected: 'saddle' | 'escaped' | 'flat' | null;
}

export interface NewtonOptions {
  /** Largest step, Å⁻¹ (half a mesh spacing is a good choice). */
  maxStep: number;
  /** How far from the start the point may go before it counts as escaped, Å⁻¹. */
  maxTravel: number;
  maxIterations?: number;
}

const norm = (v: Vec3): number => Math.hypot(v[0], v[1], v[2]);

export function massTensorOf(hessian: Mat3): { masses: Vec3; axes: Mat3; curvatures: Vec3 } {
  const { values, vectors } = symmetricEigen3(hessian);
  return { masses: values.map((c) => curvatureToMass(c)) as Vec3, axes: vectors, curvatures: values };
}

export function refineExtremum(band: SmoothBand, start: Vec3, kind: StationaryKind, opt: NewtonOptions): RefinedPoint {
  // Newton steps where the Hessian has the curvature of the kind sought; elsewhere a steepest-descent step
  // (ascent for a maximum) of at most maxStep; every step is halved until the energy moves the right way.
  let k: Vec3 = [start[0], start[1], start[2]];
  let d = band.derivatives(k);
  let iterations = 0;
  let converged = false;
  const maxIterations = opt.maxIterations ?? 100;
  let gradientStep = opt.maxStep;
  const sign = kind === 'min' ? 1 : -1;
  const scale = Math.max(1e-12, Math.abs(d.hessian[0][0]) + Math.abs(d.hessian[1][1]) + Math.abs(d.hessian[2][2]));
  while (iterations < maxIterations) {
    const g = norm(d.gradient);
    if (g <= 1e-12 * scale) {
      converged = true;
      break;
    }
    let step: Vec3;
    const curv = symmetricEigen3(d.hessian).values;
    const newton = curv.every((c) => sign * c > 0);
    if (newton) {
      const inv = mat3Inverse(d.hessian);
      step = [0, 1, 2].map((i) => -(inv[i]![0] * d.gradient[0] + inv[i]![1] * d.gradient[1] + inv[i]![2] * d.gradient[2])) as Vec3;
    } else {
      step = d.gradient.map((x) => (-sign * x * gradientStep) / g) as Vec3;
    }
    let len = norm(step);
    if (!Number.isFinite(len)) break;
    if (len > opt.maxStep) {
      step = step.map((x) => (x * opt.maxStep) / len) as Vec3;
      len = opt.maxStep;
    }
    // The first trial with the derivatives (its value is the energy, to the bit): near the extremum it is kept, and
    // the derivatives there are then at hand. The halvings need only the energy (a third of the work).
    let trial: BandDerivatives | null = band.derivatives([k[0] + step[0], k[1] + step[1], k[2] + step[2]]);
    let next = trial.value;
    for (let halving = 0; halving < 30 && sign * (next - d.value) > 1e-12 * Math.max(1, Math.abs(d.value)); halving++) {
      step = step.map((x) => x / 2) as Vec3;
      len /= 2;
      trial = null;
      next = band.value([k[0] + step[0], k[1] + step[1], k[2] + step[2]]);
    }
    // A descent step starts from four times the last one that was kept (at most maxStep): along a curved
    // valley the kept length changes slowly, and halving from maxStep every time costs many evaluations.
    gradientStep = newton ? opt.maxStep : Math.min(opt.maxStep, 4 * len);
    k = [k[0] + step[0], k[1] + step[1], k[2] + step[2]];
    d = trial ?? band.derivatives(k);
    iterations++;
    // Gone beyond maxTravel: rejected as escaped whatever comes next, so stop here.
    if (norm([k[0] - start[0], k[1] - start[1], k[2] - start[2]]) > opt.maxTravel) break;
    if (len < 1e-11) {
      converged = true;
      break;
    }
  }
  const { masses, axes, curvatures } = massTensorOf(d.hessian);
  const travel = norm([k[0] - start[0], k[1] - start[1], k[2] - start[2]]);
  const smallest = Math.min(...curvatures.map((c) => Math.abs(c)));
  let rejected: RefinedPoint['rejected'] = null;
  if (travel > opt.maxTravel || !converged) rejected = 'escaped';
  else if (smallest < 1e-6 * Math.max(...curvatures.map((c) => Math.abs(c)), 1e-300)) rejected = 'flat';
  else if (!curvatures.every((c) => sign * c > 0)) rejected = 'saddle';
  return { k, energy: d.value, gradient: d.gradient, hessian: d.hessian, masses, axes, iterations, converged, rejected };
}
