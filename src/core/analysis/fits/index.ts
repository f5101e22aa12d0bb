/** The curvature fits by method name (the names users choose with --method). */
import { finiteDifferenceCurvature } from './finiteDifference';
import { kaneCurvature } from './kaneFit';
import { parabolaCurvature } from './parabolaFit';
import { quarticCurvature } from './polynomialFit';
import type { CurvatureFit, FitSettings, LineSamples } from './types';

export type { CurvatureFit, FitSettings, LineSamples } from './types';

export interface MethodOutcome {
  fit: CurvatureFit | null;
  /** Set when the chosen method could not be applied and the parabola was used instead. */
  fallback?: string;
}

/** Fit with the named method; finite differences fall back to the parabola where they cannot apply. */
export function fitCurvature(method: string, s: LineSamples, settings: FitSettings): MethodOutcome {
  switch (method) {
    case 'fd3':
    case 'fd5': {
      const r = finiteDifferenceCurvature(s, settings, method === 'fd3' ? 3 : 5);
      if (r.fit) return { fit: r.fit };
      const fit = parabolaCurvature(s, settings);
      const why = `${r.refusal ?? `${method} could not be applied`}: the parabola fit was used instead.`;
      if (fit) fit.warnings.unshift(why);
      return { fit, fallback: why };
    }
    case 'poly4':
      return { fit: quarticCurvature(s, settings) };
    case 'kane':
      return { fit: kaneCurvature(s, settings) };
    case 'parabola':
      return { fit: parabolaCurvature(s, settings) };
    default:
      throw new Error(`unknown fit method "${method}"`);
  }
}
