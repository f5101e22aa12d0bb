/**
 * A mesh run interpolated band by band: the mesh recognised and expanded (regularMesh.ts), a star basis a
 * multiple of the number of irreducible points (starBasis.ts), one smoothness-constrained fit shared by all
 * bands (smoothFit.ts), and for each band its extrema anywhere in the zone (meshExtrema.ts, newtonExtremum.ts)
 * with a leave-one-out uncertainty (extremumUncertainty.ts).
 *
 * Bands are interpolated by index: where two bands come within the interpolation's error of each other at an
 * extremum, the extremum is set aside as a crossing (or flagged degenerate at a symmetry point) rather than
 * given masses of one index through a degeneracy.
 */
import { mergeEquivalentPoints, type MergedPoints } from './equivalentPoints';
import type { MeshRefusal } from './meshRefusal';
import type { Mat3, Vec3 } from '../model';
import { cartesianToFractional, reciprocalLattice } from '../lattice/reciprocal';
import { valleyDegeneracy, type CrystalSymmetry } from '../lattice/symmetry';
import type { SpecialPointMap } from '../lattice/specialPoints';
import { recogniseMesh, type RegularMesh } from './regularMesh';
import { buildStarBasis } from './starBasis';
import { SmoothStarFit, toCartesian } from './smoothFit';
import type { StarInterpolant } from './starInterpolant';
import { isStrictMeshExtremum, meshLocalExtrema, meshPoint } from './meshExtrema';
import { refineExtremum, type StationaryKind } from './newtonExtremum';
import { extremumUncertainty, type ExtremumUncertainty } from './extremumUncertainty';
import { positionOnGammaLine } from './linePosition';
import { averagedFromPrincipal } from '../analysis/averagedMasses';

/** Default number of stars per irreducible data point (the published practice is 5–10). */
export const DEFAULT_STARS_PER_POINT = 8;
/** Relative mass uncertainty above which a mass is not quoted (determined: false). */
export const MASS_UNCERTAINTY_LIMIT = 0.1;
/** Most irreducible points interpolated (the star-value matrix holds about 8 N² numbers). */
export const MAX_INTERPOLATION_POINTS = 1500;

/**
 * Most k-points a run may list for the mesh to be recognised and its equivalent points merged (a run reduced by
 * fewer operations than the crystal has lists up to the whole mesh; MAX_INTERPOLATION_POINTS applies to the
 * points kept). Both cost O(points × operations); measured (fcc, 48 operations, CPU time on a shared machine):
 * the whole 24³ mesh (13 824 points, 413 kept) recognised and merged in about 55 ms; a hostile list of 16 384
 * points (all at Γ but the last, which lies on no mesh, so every division is tried over every image) about 0.9 s
 * and 38 MB of images (1 500 such points: 0.1 s).
 */
export const MAX_LISTED_POINTS = 16_384;

/** Why nk irreducible points are too many to interpolate, or null. */
export function tooManyPointsReason(nk: number): string | null {
  return nk > MAX_INTERPOLATION_POINTS
    ? `${nk} irreducible k-points are more than the ${MAX_INTERPOLATION_POINTS} the interpolation handles (its matrices grow as the square).`
    : null;
}

/** Why nk listed points are too many to recognise as a mesh (before any merging), or null. */
export function tooManyListedReason(nk: number): string | null {
  return nk > MAX_LISTED_POINTS
    ? `${nk} k-points are more than the ${MAX_LISTED_POINTS} a run may list for the interpolation (points equivalent by symmetry are merged only below that).`
    : null;
}
/** Opening words of the reason given at a degenerate (warped) extremum. */
export const WARPED_NOTE = 'Warped: see directional masses.';
/** Two bands closer than this (eV), or than three times the energy uncertainty, count as touching. */
export const TOUCHING_EV = 1e-3;

export interface MeshRunInput {
  /** Lattice rows of the cell the k-points refer to, Å (the crystal symmetry's cell). */
  lattice: Mat3;
  /** Irreducible k-points, fractional, nk × 3. */
  kpoints: Float64Array;
  weights: Float64Array | null;
  /** Energies per band at the irreducible points, eV: bands[b][i]. */
  bands: Float64Array[];
  sym: CrystalSymmetry;
  starsPerPoint?: number;
  /** Special points of the lattice, for "0.85 Γ→X" positions. */
  specialPoints?: SpecialPointMap | null;
}

export interface InterpolatedExtremum {
  /** 0-based band index. */
  band: number;
  kind: StationaryKind;
  /** Fractional k of the member of the star found. */
  k: Vec3;
  kCartesian: Vec3;
  energy_eV: number;
  /** Principal signed masses (m_e) and axes (cartesian unit rows), from the analytic Hessian. */
  masses: Vec3;
  axes: Mat3;
  valleyDegeneracy: number;
  position: string | null;
  uncertainty: ExtremumUncertainty;
  /** True when every principal mass's uncertainty is within MASS_UNCERTAINTY_LIMIT of it. */
  determined: boolean;
  undeterminedReason?: string;
  /** Bands (0-based) within the interpolation's error of this one at k: a degeneracy or crossing. */
  touching: number[];
  /**
   * True at a degenerate extremum at a symmetry point (touching not empty): warped bands, no single mass
   * tensor (`determined` false, the reason starting with WARPED_NOTE); the masses given are the interpolant's
   * curvature, not to be quoted.
   */
  warped?: boolean;
  warnings: string[];
  /** Density-of-states mass (with N_v) and conductivity mass, m_e: only for determined masses, else null. */
  dosMass: number | null;
  conductivityMass: number | null;
  /**
   * False for a strict extremum of the mesh data that the interpolant does not resolve (it finds a saddle
   * there): the entry then sits on the mesh point with the mesh energy and no masses.
   */
  resolved: boolean;
}

export interface RejectedStationaryPoint {
  band: number;
  kind: StationaryKind;
  k: Vec3;
  energy_eV: number;
  reason: 'saddle' | 'escaped' | 'flat' | 'crossing';
}

export class MeshInterpolation {
  readonly mesh: RegularMesh;
  readonly fit: SmoothStarFit;
  readonly reciprocal: Mat3;
  private readonly kCart: Float64Array;
  private readonly cache = new Map<number, StarInterpolant>();
  /** Half the shortest mesh spacing, Å⁻¹. */
  readonly halfSpacing: number;
  /** Set when the file listed points equivalent by symmetry and they were merged (equivalentPoints.ts). */
  merged: MergedPoints | null = null;

  private constructor(
    readonly input: MeshRunInput,
    mesh: RegularMesh,
  ) {
    this.mesh = mesh;
    this.reciprocal = reciprocalLattice(input.lattice);
    const nk = input.kpoints.length / 3;
    const stars = Math.max(2, Math.round((input.starsPerPoint ?? DEFAULT_STARS_PER_POINT) * nk));
    const basis = buildStarBasis(input.lattice, input.sym.pointGroup, stars);
    this.kCart = toCartesian(input.kpoints, this.reciprocal);
    this.fit = new SmoothStarFit(basis, this.kCart, { mesh, kFrac: input.kpoints });
    this.halfSpacing = 0.5 * Math.min(...this.reciprocal.map((b, i) => Math.hypot(...b) / mesh.divisions[i]!));
  }

  /** The interpolation of a mesh run, or the reason the k-points are not a mesh this can use. */
  static create(input: MeshRunInput): { run: MeshInterpolation; reason: null; kind?: undefined } | ({ run: null } & MeshRefusal) {
    const nk = input.kpoints.length / 3;
    const tooManyListed = tooManyListedReason(nk);
    if (tooManyListed) return { run: null, kind: 'too-many', reason: tooManyListed };
    for (const [i, b] of input.bands.entries()) {
      if (b.length !== nk) return { run: null, kind: 'energies', reason: `Band ${i + 1} has ${b.length} energies for ${nk} k-points.` };
      for (let k = 0; k < b.length; k++) {
        if (!Number.isFinite(b[k]))
          return { run: null, kind: 'energies', reason: `Band ${i + 1} has energies that are not finite numbers.` };
      }
    }
    const rec = recogniseMesh(input.kpoints, input.weights, input.sym.reciprocalPointGroup, {
      mergeEquivalent: true,
      listedFirst: nk > MAX_INTERPOLATION_POINTS,
    });
    if (!rec.mesh) return { run: null, kind: rec.kind, reason: rec.reason };
    if (rec.mesh.duplicateOf) {
      // Points equivalent by symmetry listed more than once (a run reduced by fewer operations): one per star.
      const m = mergeEquivalentPoints(input, rec.mesh.duplicateOf);
      if (!m.input) return { run: null, kind: m.kind, reason: m.reason };
      const made = MeshInterpolation.create(m.input);
      if (made.run) made.run.merged = m.merged;
      return made;
    }
    // The bound on the interpolation: on the irreducible points (after any merging, in the call above).
    const tooMany = tooManyPointsReason(nk);
    if (tooMany) return { run: null, kind: 'too-many', reason: tooMany };
    if (nk < 2) return { run: null, kind: 'too-few', reason: 'One k-point cannot be interpolated.' };
    return { run: new MeshInterpolation(input, rec.mesh), reason: null };
  }

  band(b: number): StarInterpolant {
    let hit = this.cache.get(b);
    if (!hit) {
      const e = this.input.bands[b];
      if (!e) throw new RangeError(`There is no band ${b + 1}.`);
      hit = this.fit.fit(e);
      this.cache.set(b, hit);
    }
    return hit;
  }

  /** Energy of band b at fractional k, eV. */
  energyAt(b: number, kFrac: Vec3): number {
    return this.band(b).value(this.toCart(kFrac));
  }

  toCart(kFrac: Vec3): Vec3 {
    const r = this.reciprocal;
    return [0, 1, 2].map((x) => kFrac[0] * r[0][x]! + kFrac[1] * r[1][x]! + kFrac[2] * r[2][x]!) as Vec3;
  }

  /** Extrema of band b anywhere in the zone (one per star of k), and the stationary points set aside. */
  extrema(b: number, kind: StationaryKind): { extrema: InterpolatedExtremum[]; rejected: RejectedStationaryPoint[] } {
    const { mesh, input } = this;
    const energies = input.bands[b]!;
    const interp = this.band(b);
    const out: InterpolatedExtremum[] = [];
    const rejected: RejectedStationaryPoint[] = [];
    const newton = { maxStep: this.halfSpacing, maxTravel: 3 * this.halfSpacing };
    for (const j of meshLocalExtrema(mesh, energies, kind)) {
      const start = this.toCart(meshPoint(mesh, j));
      const p = refineExtremum(interp, start, kind, newton);
      const kFrac = cartesianToFractional(p.k, input.lattice).map((x) => x + 0) as Vec3;
      if (p.rejected) {
        rejected.push({ band: b, kind, k: kFrac, energy_eV: p.energy, reason: p.rejected });
        // The data themselves have a strict extremum here: a true one lies within a mesh cell, but the
        // interpolant does not resolve it (its curvature has the wrong sign). Keep the mesh point, with the
        // data's energy (a bound: the true extremum is at most this high for a minimum) and no masses.
        const onMesh = meshPoint(mesh, j).map((x) => (x > 0.5 + 1e-12 ? x - 1 : x) + 0) as Vec3;
        if (isStrictMeshExtremum(mesh, energies, j, kind) && !out.some((e) => sameStar(input.sym, e.k, onMesh))) {
          const reason = `The mesh has a ${kind === 'min' ? 'minimum' : 'maximum'} here but the interpolation does not resolve it (it finds a ${p.rejected === 'saddle' ? 'saddle' : 'stationary point of another kind'}): the energy is the mesh value, a bound on the true extremum; no masses.`;
          out.push({
            band: b,
            kind,
            k: onMesh,
            kCartesian: this.toCart(onMesh),
            energy_eV: energies[mesh.irreducibleOf[j]!]!,
            masses: [NaN, NaN, NaN],
            axes: [
              [1, 0, 0],
              [0, 1, 0],
              [0, 0, 1],
            ],
            valleyDegeneracy: valleyDegeneracy(input.sym, onMesh, 1e-4),
            position: input.specialPoints ? positionOnGammaLine(input.specialPoints, onMesh) : null,
            uncertainty: {
              energy_eV: NaN,
              masses: [Infinity, Infinity, Infinity],
              position_invA: this.halfSpacing * 2,
              leftOutError_eV: NaN,
              leftOut: [],
              lost: 0,
            },
            determined: false,
            undeterminedReason: reason,
            touching: [],
            warnings: [reason],
            dosMass: null,
            conductivityMass: null,
            resolved: false,
          });
        }
        continue;
      }
      if (
        out.some((e) => sameStar(input.sym, e.k, kFrac)) ||
        rejected.some((e) => e.reason === 'crossing' && sameStar(input.sym, e.k, kFrac))
      )
        continue;
      const uncertainty = extremumUncertainty(
        this.fit,
        energies,
        interp,
        p,
        kind,
        this.kCart,
        mesh,
        this.reciprocal,
        input.lattice,
        newton,
      );
      // The whole degenerate set: outward from b while each next band is within the error of this one.
      const touching: number[] = [];
      const near = Math.max(TOUCHING_EV, 3 * uncertainty.energy_eV);
      for (const step of [-1, 1]) {
        for (let other = b + step; other >= 0 && other < input.bands.length; other += step) {
          if (!(Math.abs(this.band(other).value(p.k) - p.energy) < near)) break;
          touching.push(other);
        }
      }
      touching.sort((x, y) => x - y);
      const nv = valleyDegeneracy(input.sym, kFrac, 1e-4);
      const warnings: string[] = [];
      // A degeneracy at a point of the star of k fixed by symmetry (Γ, or a point whose star is small) is
      // an extremum of a degenerate set; elsewhere two bands meeting is a crossing: no extremum placed there.
      if (touching.length > 0 && !isSymmetryPoint(input.sym, kFrac)) {
        rejected.push({ band: b, kind, k: kFrac, energy_eV: p.energy, reason: 'crossing' });
        continue;
      }
      let determined = true;
      let undeterminedReason: string | undefined;
      if (touching.length > 0) {
        determined = false;
        undeterminedReason = `${WARPED_NOTE} ${touching.length > 1 ? 'Bands' : 'Band'} ${touching.map((t) => t + 1).join(' and ')} ${touching.length > 1 ? 'meet' : 'meets'} this band here: a degenerate extremum, whose bands are warped (the mass depends on the direction), has no single mass tensor; and interpolated by band index, the bands near the degeneracy are not accurate enough for a warped-band fit.`;
        warnings.push(undeterminedReason);
      } else {
        const worst = Math.max(...p.masses.map((m, i) => uncertainty.masses[i]! / Math.abs(m)));
        if (uncertainty.lost > 0) {
          determined = false;
          undeterminedReason = `Refitted without one star of the nearest mesh points, the interpolation loses this extremum (${uncertainty.lost} of ${uncertainty.leftOut.length} times): the mesh is too coarse for this valley.`;
        } else if (!(worst <= MASS_UNCERTAINTY_LIMIT)) {
          determined = false;
          undeterminedReason = `Leaving out one star of mesh points moves a principal mass by ${(100 * worst).toFixed(0)} % (limit ${100 * MASS_UNCERTAINTY_LIMIT} %): the mesh is too coarse for this valley.`;
        }
      }
      const averaged = determined ? averagedFromPrincipal(p.masses, nv, 'interpolated band') : null;
      out.push({
        band: b,
        kind,
        k: kFrac,
        kCartesian: p.k,
        energy_eV: p.energy,
        masses: p.masses,
        axes: p.axes,
        valleyDegeneracy: nv,
        position: input.specialPoints ? positionOnGammaLine(input.specialPoints, kFrac) : null,
        uncertainty,
        determined,
        ...(undeterminedReason ? { undeterminedReason } : {}),
        ...(touching.length > 0 ? { warped: true } : {}),
        touching,
        warnings,
        dosMass: averaged?.dosMass ?? null,
        conductivityMass: averaged?.conductivityMass ?? null,
        resolved: true,
      });
    }
    out.sort((x, y) => (kind === 'min' ? x.energy_eV - y.energy_eV : y.energy_eV - x.energy_eV));
    return { extrema: out, rejected };
  }
}

function sameStar(sym: CrystalSymmetry, a: Vec3, b: Vec3): boolean {
  // equivalentK with a loose tolerance: two Newton runs converge to the same point to ~1e-9.
  for (const r of sym.reciprocalPointGroup) {
    const q = [0, 1, 2].map((i) => r[i]![0] * a[0] + r[i]![1] * a[1] + r[i]![2] * a[2]);
    for (const s of [1, -1]) {
      if (
        q.every((x, i) => {
          const d = s * x - b[i]!;
          return Math.abs(d - Math.round(d)) < 1e-5;
        })
      )
        return true;
    }
  }
  return false;
}

/** A point left fixed (modulo G) by an operation other than the identity: a symmetry point or line or plane. */
function isSymmetryPoint(sym: CrystalSymmetry, k: Vec3): boolean {
  let fixed = 0;
  for (const r of sym.reciprocalPointGroup) {
    const q = [0, 1, 2].map((i) => r[i]![0] * k[0] + r[i]![1] * k[1] + r[i]![2] * k[2]);
    if (q.every((x, i) => Math.abs(x - k[i]! - Math.round(x - k[i]!)) < 1e-5)) fixed++;
  }
  // Degeneracies by symmetry need a little group with a representation of dimension > 1: at least order 3.
  return fixed >= 3;
}
