/**
 * How far a finite-difference mass lies from the least-squares parabola on the same samples and window
 * setting. A finite difference passes through its points: it has no residual, and its standard error is
 * only the rounding of the energies, often ±1e-6 mₑ, while methods may disagree by several per cent on the
 * same edge. The spread is that disagreement, reported beside the stderr and named as what it is.
 */
import type { MethodSpread } from '../../model';
import { CENTRAL_2, CENTRAL_4, PARABOLA } from '../methods';
import { parabolaCurvature } from './parabolaFit';
import type { CurvatureFit, FitSettings, LineSamples } from './types';

/** Method ids of the finite differences (centred, and the one-sided stencils they fall back to). */
const FINITE_DIFFERENCES = new Set([CENTRAL_2, CENTRAL_4, 'forward-1', 'forward-3']);

export function isFiniteDifference(method: string): boolean {
  return FINITE_DIFFERENCES.has(method);
}

/** The spread against the parabola, or null when `fit` is not a finite difference or no parabola fits there. */
export function spreadAgainstParabola(fit: CurvatureFit, s: LineSamples, settings: FitSettings): MethodSpread | null {
  if (!isFiniteDifference(fit.method) || !Number.isFinite(fit.mass)) return null;
  const p = parabolaCurvature(s, settings);
  if (!p || !Number.isFinite(p.mass)) return null;
  return { against: PARABOLA, mass: p.mass, window_meV: settings.window_meV, spread: Math.abs(fit.mass - p.mass) };
}
