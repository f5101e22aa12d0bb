/**
 * Least-squares parabola E = E0 + c1 t + c2 t² in an energy window of the extremum, vertex free.
 * (physics.md step 6: windows of 10-100 meV are common practice; kT at 300 K ≈ 25.9 meV.)
 */
import { polynomialCurvature } from './polynomialFit';
import type { CurvatureFit, FitSettings, LineSamples } from './types';

/** Fewest points of a parabola fit: the extremum and three more (physics.md: ~3 points per side). */
export const PARABOLA_MIN_POINTS = 4;

export function parabolaCurvature(s: LineSamples, settings: FitSettings): CurvatureFit | null {
  return polynomialCurvature(s, settings, { degree: 2, method: 'parabola', minPoints: PARABOLA_MIN_POINTS });
}
