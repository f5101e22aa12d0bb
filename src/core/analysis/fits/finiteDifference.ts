/**
 * Finite-difference second derivatives at the sampled extremum, named by their order of accuracy:
 * 'central-2' (3 points, error O(h²)) and 'central-4' (5 points, error O(h⁴)). Centred when the line
 * continues straight through the extremum; at a time-reversal-invariant k (E(k0 + q) = E(k0 − q)) the far
 * side mirrors the near side, so the centred (symmetric) difference applies even where the path stops at
 * the point. Otherwise the one-sided stencils are used and named by their own order ('forward-1',
 * 'forward-3'). Needs uniform spacing: the stencil is refused (null, with the reason in `refusal`) when the
 * steps differ.
 *
 * A difference passes through all its points, so nothing in it tests the parabola it assumes: the same
 * stencil at twice the step is the check. The mass is quotable only when both agree within 30 % (and the
 * rounding error is below 30 %).
 */
import { curvatureToMass } from '../../units';
import { CENTRAL_2, CENTRAL_4 } from '../methods';
import { MAX_RELATIVE_STDERR } from './quotable';
import type { CurvatureFit, FitSettings, LineSamples } from './types';

/** Relative difference of steps still counted as uniform (k-points are written to about 7 digits). */
const UNIFORM_TOLERANCE = 2e-3;

interface Stencil {
  offsets: number[];
  weights: number[];
  divisor: number;
  method: string;
}

// Standard finite-difference weights for f''(0) in units of 1/h² (common practice; Fornberg's tables).
const CENTRAL3: Stencil = { offsets: [-1, 0, 1], weights: [1, -2, 1], divisor: 1, method: CENTRAL_2 };
const CENTRAL5: Stencil = { offsets: [-2, -1, 0, 1, 2], weights: [-1, 16, -30, 16, -1], divisor: 12, method: CENTRAL_4 };
const FORWARD3: Stencil = { offsets: [0, 1, 2], weights: [1, -2, 1], divisor: 1, method: 'forward-1' };
const FORWARD5: Stencil = { offsets: [0, 1, 2, 3, 4], weights: [35, -104, 114, -56, 11], divisor: 12, method: 'forward-3' };

export interface FiniteDifferenceResult {
  fit: CurvatureFit | null;
  /** Why no stencil could be applied. */
  refusal?: string;
}

/** 3 → central-2 (3-point), 5 → central-4 (5-point). */
export type StencilPoints = 3 | 5;

export function finiteDifferenceCurvature(s: LineSamples, settings: FitSettings, points: StencilPoints): FiniteDifferenceResult {
  const half = points === 3 ? 1 : 2;
  const asked = points === 3 ? CENTRAL_2 : CENTRAL_4;
  const back = s.back && s.back.t.length > half ? s.back : undefined;
  const mirrored = !back && !!s.even;
  const central = !!back || mirrored;
  const st = central ? (points === 3 ? CENTRAL3 : CENTRAL5) : points === 3 ? FORWARD3 : FORWARD5;
  const need = Math.max(...st.offsets);
  if (s.t.length <= need) return { fit: null, refusal: `${asked} needs ${need + 1} points along the line, there are ${s.t.length}` };
  const backT = back ? back.t : s.t;
  const backE = back ? back.e : s.e;
  const available = (o: number): boolean => (o >= 0 ? o < s.t.length : -o < backT.length);
  const tAt = (o: number): number => (o >= 0 ? s.t[o]! : -backT[-o]!);
  const eAt = (o: number): number => (o >= 0 ? s.e[o]! : backE[-o]!);
  const h = s.t[1]! - s.t[0]!;
  if (!(h > 0)) return { fit: null, refusal: `${asked}: repeated k-points at the extremum` };

  /** The stencil with its offsets scaled (1: step h, 2: step 2h); null when points are missing or uneven. */
  const apply = (scale: number): { d2: number; w2: number; span: number } | null => {
    const offs = st.offsets.map((o) => o * scale);
    if (!offs.every(available)) return null;
    const hs = h * scale;
    for (let i = 1; i < offs.length; i++) {
      const step = tAt(offs[i]!) - tAt(offs[i - 1]!);
      if (Math.abs(step - hs) > UNIFORM_TOLERANCE * hs) return null;
    }
    let d2 = 0;
    let w2 = 0;
    let span = 0;
    const e0 = s.e[0]!;
    for (let i = 0; i < offs.length; i++) {
      const w = st.weights[i]! / st.divisor;
      d2 += w * eAt(offs[i]!);
      w2 += w * w;
      span = Math.max(span, Math.abs(eAt(offs[i]!) - e0));
    }
    return { d2: d2 / (hs * hs), w2: w2 / hs ** 4, span };
  };
  const main = apply(1);
  if (!main) {
    let uneven = '';
    for (let i = 1; i < st.offsets.length; i++) {
      const step = tAt(st.offsets[i]!) - tAt(st.offsets[i - 1]!);
      if (Math.abs(step - h) > UNIFORM_TOLERANCE * h) uneven = ` (steps of ${h.toPrecision(4)} and ${step.toPrecision(4)} Å⁻¹ meet here)`;
    }
    return { fit: null, refusal: `${asked} needs uniform k spacing${uneven}` };
  }
  const curvature = main.d2;
  const curvatureStderr = settings.energySigma * Math.sqrt(main.w2);
  const mass = curvatureToMass(curvature);
  const stderr = Math.abs(mass) * (curvatureStderr / Math.abs(curvature));
  const warnings: string[] = [];
  if (!central) {
    warnings.push(
      points === 3
        ? 'One-sided 3-point difference (forward-1: the line does not continue through the extremum): accurate to first order in the spacing only.'
        : 'One-sided 5-point difference (forward-3: the line does not continue through the extremum).',
    );
  } else if (mirrored) {
    warnings.push('Symmetric difference: at this time-reversal-invariant k the far side of the line mirrors the near side.');
  }
  if (settings.energySigma > 0 && curvatureStderr > 0.1 * Math.abs(curvature)) {
    warnings.push(
      'The rounding of the energies in the file is large against the energy change over the stencil: this finite difference is noisy.',
    );
  }
  // The check: the same stencil at twice the step.
  const wide = apply(2);
  let determined = true;
  let undeterminedReason: string | undefined;
  if (!Number.isFinite(mass) || curvature === 0) {
    determined = false;
    undeterminedReason = 'the difference gives zero or no curvature';
  } else if (!(stderr <= MAX_RELATIVE_STDERR * Math.abs(mass))) {
    determined = false;
    undeterminedReason = `standard error ${((100 * stderr) / Math.abs(mass)).toFixed(0)} % of |m| from the rounding of the energies (above ${100 * MAX_RELATIVE_STDERR} %)`;
  } else if (!wide) {
    determined = false;
    undeterminedReason = `a ${st.offsets.length}-point difference passes through all its points, and the line has too few uniform points for the same stencil at twice the step, so nothing checks it`;
  } else {
    const change = Math.abs(wide.d2 - curvature) / Math.abs(curvature);
    if (change > MAX_RELATIVE_STDERR) {
      determined = false;
      undeterminedReason = `the curvature changes by ${(100 * change).toFixed(0)} % between steps h and 2h: the band is not parabolic over the stencil`;
    } else if (change > 0.05) {
      warnings.push(
        `The same stencil at twice the step gives a curvature ${(100 * change).toFixed(0)} % different: non-parabolic terms matter at this spacing.`,
      );
    }
  }
  const fit: CurvatureFit = {
    method: st.method,
    curvature,
    curvatureStderr,
    mass,
    stderr,
    points: st.offsets.length,
    window_meV: main.span * 1000,
    residual_meV: 0,
    warnings,
    determined,
  };
  if (undeterminedReason) fit.undeterminedReason = undeterminedReason;
  return { fit };
}
