/** The curvature fits by method name (the names users choose with --method). */
import { finiteDifferenceCurvature } from './finiteDifference';
import { kaneCurvature } from './kaneFit';
import { parabolaCurvature } from './parabolaFit';
import { quarticCurvature } from './polynomialFit';
import type { CurvatureFit, FitSettings, LineSamples } from './types';
import { CENTRAL_2, CENTRAL_4, methodId } from '../methods';

export type { CurvatureFit, FitSettings, LineSamples } from './types';

export interface MethodOutcome {
  fit: CurvatureFit | null;
  /** Set when the chosen method could not be applied and the parabola was used instead. */
  fallback?: string;
}

/** Fit with the named method (earlier names accepted: fd3, fd5); finite differences fall back to the parabola where they cannot apply. */
export function fitCurvature(method: string, s: LineSamples, settings: FitSettings): MethodOutcome {
  const id = methodId(method);
  switch (id) {
    case CENTRAL_2:
    case CENTRAL_4: {
      const r = finiteDifferenceCurvature(s, settings, id === CENTRAL_2 ? 3 : 5);
      if (r.fit) return { fit: r.fit };
      const fit = parabolaCurvature(s, settings);
      const why = `${r.refusal ?? `${id} could not be applied`}: the parabola fit was used instead.`;
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
