/**
 * An uncertainty one can quote for an interpolated extremum, by leave-one-out: the fit is redone without
 * each of the nearest irreducible data points (a whole star of mesh points each), the extremum refined again
 * from the same place, and the largest change of its energy and of each principal mass taken as the
 * uncertainty. Leaving a star out makes the mesh locally coarser, so this errs on the cautious side. The
 * error of each reduced fit at the point it left out is kept too (the interpolation's own error there).
 *
 * An extremum found on a mesh point (Γ, X, L on a Γ-centred mesh) has the run's own energy there: the data, not
 * an interpolated value. Leaving that point out still says whether the extremum stays there (position, masses),
 * but its energy change is then measured on the full fit, which passes through the data, at the place the
 * reduced fit moved it to; the reduced fit's own miss at the left-out point is the interpolation's error
 * (`leftOutError_eV`), not an error of the extremum's energy.
 */
import type { Mat3, Vec3 } from '../model';
import { cartesianToFractional } from '../lattice/reciprocal';
import type { RegularMesh } from './regularMesh';
import type { SmoothStarFit } from './smoothFit';
import { meshIndexAt } from './meshExtrema';
import { refineExtremum, type NewtonOptions, type RefinedPoint, type StationaryKind } from './newtonExtremum';
import type { SmoothBand } from './starInterpolant';

/** Number of nearest irreducible points left out, one at a time. */
export const LEAVE_OUT_COUNT = 4;
/**
 * Most Newton steps of a refit from the extremum found: a refit that keeps the extremum reaches it in a few
 * (it starts next to it, and Newton converges quadratically there); one still searching after this many has
 * lost it.
 */
export const REFIT_MAX_ITERATIONS = 12;

export interface ExtremumUncertainty {
  /** Largest change of the extremum's energy, eV. */
  energy_eV: number;
  /** Largest change of each principal mass (in the order of the masses), m_e. */
  masses: Vec3;
  /** Largest change of the position, Å⁻¹. */
  position_invA: number;
  /** Largest error of a reduced fit at the point it left out, eV. */
  leftOutError_eV: number;
  /** Irreducible points (0-based) left out. */
  leftOut: number[];
  /** How many of the reduced fits lost the extremum (it moved away or changed kind). */
  lost: number;
}

export function extremumUncertainty(
  fit: SmoothStarFit,
  energies: ArrayLike<number>,
  /** The fit through all of `energies` (fit.fit(energies), which the caller has already). */
  full: SmoothBand,
  found: RefinedPoint,
  kind: StationaryKind,
  kCart: Float64Array,
  mesh: RegularMesh,
  reciprocal: Mat3,
  lattice: Mat3,
  newton: NewtonOptions,
  count: number = LEAVE_OUT_COUNT,
): ExtremumUncertainty {
  const nearest = nearestIrreducible(mesh, found.k, reciprocal, lattice, count);
  let dE = 0;
  let dPos = 0;
  let leftOutError = 0;
  let lost = 0;
  const dm: Vec3 = [0, 0, 0];
  const refitNewton = { ...newton, maxIterations: Math.min(newton.maxIterations ?? REFIT_MAX_ITERATIONS, REFIT_MAX_ITERATIONS) };
  const own = meshPointAt(mesh, found.k, lattice);
  // The reduced fits are used one after another and dropped: one buffer for their member coefficients.
  const buffer = scratchFor(fit);
  for (const p of nearest) {
    const reduced = fit.fit(energies, p, buffer);
    leftOutError = Math.max(leftOutError, Math.abs(reduced.value([kCart[3 * p]!, kCart[3 * p + 1]!, kCart[3 * p + 2]!]) - energies[p]!));
    const again = refineExtremum(reduced, found.k, kind, refitNewton);
    if (again.rejected) {
      lost++;
      continue;
    }
    const energy = p === own ? full.value(again.k) : again.energy;
    dE = Math.max(dE, Math.abs(energy - found.energy));
    dPos = Math.max(dPos, Math.hypot(again.k[0] - found.k[0], again.k[1] - found.k[1], again.k[2] - found.k[2]));
    for (let i = 0; i < 3; i++) dm[i] = Math.max(dm[i]!, Math.abs(again.masses[i]! - found.masses[i]!));
  }
  if (lost > 0) for (let i = 0; i < 3; i++) dm[i] = Infinity;
  return { energy_eV: dE, masses: dm, position_invA: dPos, leftOutError_eV: leftOutError, leftOut: nearest, lost };
}

const scratch = new WeakMap<SmoothStarFit, Float64Array>();

/** One buffer per fit for the member coefficients of its brief reduced interpolants. */
function scratchFor(fit: SmoothStarFit): Float64Array {
  let hit = scratch.get(fit);
  if (!hit) scratch.set(fit, (hit = new Float64Array(fit.basis.start[fit.basis.count]!)));
  return hit;
}

/** The irreducible point (0-based) whose mesh image is at cartesian k (to 1e-6 of a mesh step), or −1. */
function meshPointAt(mesh: RegularMesh, k: Vec3, lattice: Mat3): number {
  const j = meshIndexAt(mesh, cartesianToFractional(k, lattice), 1e-6);
  return j < 0 ? -1 : mesh.irreducibleOf[j]!;
}

/** The `count` distinct irreducible points whose mesh images lie nearest to cartesian k. */
export function nearestIrreducible(mesh: RegularMesh, k: Vec3, b: Mat3, lattice: Mat3, count: number): number[] {
  // Cartesian distance to mesh points, with the fractional difference wrapped into [−½, ½).
  const kf = cartesianToFractional(k, lattice);
  const spacing = Math.max(...b.map((r, i) => Math.hypot(...r) / mesh.divisions[i]!));
  // Distances equal to rounding (points of one shell) are ties, taken in mesh order: the choice must not
  // depend on the last bits of k.
  const grain = 1e-9 * spacing * spacing;
  // First the points within a few mesh spacings: along axis a only the indices with |Δf_a| ≤ reach·|a_a|/2π
  // can be (f = Δk·B⁻¹, B⁻¹ = Aᵀ/2π); then, if that finds too few, every point of the mesh.
  for (const reach of [3 * spacing, Infinity]) {
    const axes = [0, 1, 2].map((a) => {
      const limit = (reach * Math.hypot(...lattice[a]!)) / (2 * Math.PI);
      const keep: number[] = [];
      for (let j = 0; j < mesh.divisions[a]!; j++) if (Math.abs(wrappedOffset(mesh, a, j, kf)) <= limit * (1 + 1e-9) + 1e-12) keep.push(j);
      return keep;
    });
    const d2 = new Map<number, number>();
    const [, n2, n3] = mesh.divisions;
    for (const j1 of axes[0]!) {
      const f0 = wrappedOffset(mesh, 0, j1, kf);
      for (const j2 of axes[1]!) {
        const f1 = wrappedOffset(mesh, 1, j2, kf);
        for (const j3 of axes[2]!) {
          const f2 = wrappedOffset(mesh, 2, j3, kf);
          const x = f0 * b[0][0] + f1 * b[1][0] + f2 * b[2][0];
          const y = f0 * b[0][1] + f1 * b[1][1] + f2 * b[2][1];
          const z = f0 * b[0][2] + f1 * b[1][2] + f2 * b[2][2];
          const r2 = x * x + y * y + z * z;
          if (r2 <= reach * reach) d2.set((j1 * n2 + j2) * n3 + j3, r2);
        }
      }
    }
    const near = [...d2.keys()].sort((p, q) => Math.round(d2.get(p)! / grain) - Math.round(d2.get(q)! / grain) || p - q);
    const out: number[] = [];
    for (const j of near) {
      const irr = mesh.irreducibleOf[j]!;
      if (!out.includes(irr)) out.push(irr);
      if (out.length === count) return out;
    }
    if (reach === Infinity) return out;
  }
  return [];
}

/** Fractional offset along axis a of mesh index j from kf, wrapped into [−½, ½] (the point is (j + s)/n, as meshPoint gives it). */
function wrappedOffset(mesh: RegularMesh, a: number, j: number, kf: Vec3): number {
  const p = (j + mesh.shift[a]!) / mesh.divisions[a]! - kf[a]!;
  return p - Math.round(p);
}
