/**
 * A band that meets the band of an interpolated extremum close to it: a degenerate zone face or point (or a
 * crossing) within TOUCHING_REACH_STEPS mesh steps. Interpolated by band index, the band has a kink there,
 * which the smooth star interpolation rounds off and rings around, so the extremum's position and masses carry
 * an error from it that a leave-one-out estimate need not show. Found on the mesh energies themselves.
 */
import type { Vec3 } from '../model';
import { TOUCHING_EV, type InterpolatedExtremum, type MeshInterpolation } from '../interpolation/meshInterpolation';
import { meshPointsNear } from '../interpolation/meshNeighbourhood';
import { meshPoint } from '../interpolation/meshExtrema';

/** How far from an extremum (in shortest mesh spacings) a touching band is looked for. */
export const TOUCHING_REACH_STEPS = 2;

export interface NearbyTouching {
  /** 0-based band of the interpolation that meets the extremum's band. */
  band: number;
  /** The mesh point where they come closest, fractional. */
  k: Vec3;
  /** Its distance from the extremum, Å⁻¹, and in shortest mesh spacings. */
  distance_invA: number;
  steps: number;
  /** The two bands' separation there, eV. */
  separation_eV: number;
}

/**
 * The neighbouring band (one index up or down) that comes within the interpolation's error of the extremum's
 * band at a mesh point near it (the closest approach), or null. Degenerate extrema (touching at k itself) and
 * extrema the interpolation does not resolve are left alone: they are flagged already.
 */
export function nearbyTouching(run: MeshInterpolation, x: InterpolatedExtremum): NearbyTouching | null {
  if (!x.resolved || x.touching.length > 0) return null;
  const own = run.input.bands[x.band]!;
  const error = x.uncertainty.leftOutError_eV;
  const near = Math.max(TOUCHING_EV, Number.isFinite(error) ? error : 0);
  const spacing = 2 * run.halfSpacing;
  const points = meshPointsNear(run.mesh, run.reciprocal, x.k, TOUCHING_REACH_STEPS * spacing);
  let best: NearbyTouching | null = null;
  for (const other of [x.band - 1, x.band + 1]) {
    const e = run.input.bands[other];
    if (!e) continue;
    for (const p of points) {
      const separation_eV = Math.abs(e[p.irreducible]! - own[p.irreducible]!);
      if (!(separation_eV < near) || (best && best.separation_eV <= separation_eV)) continue;
      const distance_invA = Math.hypot(...p.dk);
      best = { band: other, k: meshPoint(run.mesh, p.j), distance_invA, steps: distance_invA / spacing, separation_eV };
    }
  }
  return best;
}

/** The warning for a nearby touching; `bandNumber` and `label` say the band and the point as the user sees them. */
export function touchingWarning(t: NearbyTouching, bandNumber: number, label: string | null): string {
  const where = label ? ` at ${label}` : '';
  return `Band ${bandNumber} meets this band ${t.distance_invA.toFixed(3)} Å⁻¹ (${t.steps.toFixed(1)} mesh spacings) away${where} (${(1000 * t.separation_eV).toFixed(1)} meV apart on the mesh): interpolated by band index, this band has a kink there that the smooth interpolation rounds off, so the position and masses here carry an extra error; a finer mesh, or a band path through the extremum, resolves it.`;
}
