/**
 * Finite-difference second derivatives at the sampled extremum (3- and 5-point stencils). Centred when the
 * line continues straight through the extremum, one-sided otherwise. Needs uniform spacing: the stencil is
 * refused (null, with the reason in `refusal`) when the steps differ.
 */
import { curvatureToMass } from '../../units';
import type { CurvatureFit, FitSettings, LineSamples } from './types';

/** Relative difference of steps still counted as uniform (k-points are written to about 7 digits). */
const UNIFORM_TOLERANCE = 2e-3;

// Standard finite-difference weights for f''(0) in units of 1/h² (common practice; Fornberg's tables).
const CENTRAL3 = { offsets: [-1, 0, 1], weights: [1, -2, 1], divisor: 1 };
const CENTRAL5 = { offsets: [-2, -1, 0, 1, 2], weights: [-1, 16, -30, 16, -1], divisor: 12 };
const FORWARD3 = { offsets: [0, 1, 2], weights: [1, -2, 1], divisor: 1 };
const FORWARD5 = { offsets: [0, 1, 2, 3, 4], weights: [35, -104, 114, -56, 11], divisor: 12 };

export interface FiniteDifferenceResult {
  fit: CurvatureFit | null;
  /** Why no stencil could be applied. */
  refusal?: string;
}

export function finiteDifferenceCurvature(s: LineSamples, settings: FitSettings, order: 3 | 5): FiniteDifferenceResult {
  const half = order === 3 ? 1 : 2;
  const method = order === 3 ? 'fd3' : 'fd5';
  const back = s.back;
  const central = !!back && back.t.length > half && s.t.length > half;
  const st = central ? (order === 3 ? CENTRAL3 : CENTRAL5) : order === 3 ? FORWARD3 : FORWARD5;
  const need = Math.max(...st.offsets);
  if (s.t.length <= need) return { fit: null, refusal: `${method} needs ${need + 1} points along the line, there are ${s.t.length}` };
  const tAt = (o: number): number => (o >= 0 ? s.t[o]! : -back!.t[-o]!);
  const eAt = (o: number): number => (o >= 0 ? s.e[o]! : back!.e[-o]!);
  const h = s.t[1]! - s.t[0]!;
  if (!(h > 0)) return { fit: null, refusal: `${method}: repeated k-points at the extremum` };
  const offs = st.offsets;
  for (let i = 1; i < offs.length; i++) {
    const step = tAt(offs[i]!) - tAt(offs[i - 1]!);
    if (Math.abs(step - h) > UNIFORM_TOLERANCE * h) {
      return { fit: null, refusal: `${method} needs uniform k spacing, but steps of ${h.toPrecision(4)} and ${step.toPrecision(4)} Å⁻¹ meet here` };
    }
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
  const curvature = d2 / (h * h);
  const curvatureStderr = (settings.energySigma * Math.sqrt(w2)) / (h * h);
  const mass = curvatureToMass(curvature);
  const warnings: string[] = [];
  if (!central) {
    warnings.push(
      order === 3
        ? 'One-sided 3-point difference (the line does not continue through the extremum): accurate to first order in the spacing only.'
        : 'One-sided 5-point difference (the line does not continue through the extremum).',
    );
  }
  if (settings.energySigma > 0 && curvatureStderr > 0.1 * Math.abs(curvature)) {
    warnings.push('The rounding of the energies in the file is large against the energy change over the stencil: this finite difference is noisy.');
  }
  return {
    fit: {
      method,
      curvature,
      curvatureStderr,
      mass,
      stderr: Math.abs(mass) * (curvatureStderr / Math.abs(curvature)),
      points: offs.length,
      window_meV: span * 1000,
      residual_meV: 0,
      warnings,
    },
  };
}
