/**
 * Whether a fitted mass can be quoted. A fit says nothing beyond its inputs when it has no more points than
 * unknowns (it interpolates: no residual tests the model), when its standard error is a large share of the
 * mass, or when its vertex lies outside the points it used (the extremum is not where the fit looked).
 */

/** Largest standard error, as a share of |m|, of a mass still quoted (30 %). */
export const MAX_RELATIVE_STDERR = 0.3;

export interface Quotability {
  determined: boolean;
  undeterminedReason?: string;
}

export function quotability(mass: number, stderr: number, points: number, unknowns: number, vertexOutside: string | null): Quotability {
  if (!Number.isFinite(mass) || mass === 0) return { determined: false, undeterminedReason: 'the fitted curvature is zero or not finite' };
  if (points <= unknowns) {
    return {
      determined: false,
      undeterminedReason: `${points} point${points === 1 ? '' : 's'} for ${unknowns} unknowns: the fit passes through every point and nothing tests it`,
    };
  }
  if (!(stderr <= MAX_RELATIVE_STDERR * Math.abs(mass))) {
    return {
      determined: false,
      undeterminedReason: `standard error ${Number.isFinite(stderr) ? `${((100 * stderr) / Math.abs(mass)).toFixed(0)} %` : 'unknown'} of |m| (above ${100 * MAX_RELATIVE_STDERR} %)`,
    };
  }
  if (vertexOutside) return { determined: false, undeterminedReason: vertexOutside };
  return { determined: true };
}
