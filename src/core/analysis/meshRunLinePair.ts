/**
 * An interpolated extremum on the line from Γ to a point P where its band touches a neighbour (found by
 * meshRunTouching.ts; Si's Δ valley next to X): the smooth interpolation rounds the band's kink at P off, so the
 * position, the energy and the mass along the line are taken instead from the pair's invariants fitted on the
 * mesh points of that line (linePairModel.ts); the masses across the line stay the interpolant's, evaluated at
 * the new point. Each principal mass says where it comes from and is quoted only within its own uncertainty.
 */
import type { Vec3 } from '../model';
import { MASS_UNCERTAINTY_LIMIT, type InterpolatedExtremum, type MeshInterpolation } from '../interpolation/meshInterpolation';
import { linePairExtremum } from '../interpolation/linePairModel';
import { positionOnGammaLine } from '../interpolation/linePosition';
import { cartesianToFractional } from '../lattice/reciprocal';
import { curvatureToMass } from '../units';
import { averagedFromPrincipal } from './averagedMasses';
import type { NearbyTouching } from './meshRunTouching';
import { gammaLinePoints } from './meshRunGammaLine';

/** Method id of a mass along the line from the pair model. */
export const PAIR_LINE = 'pair-line';

/** Where each principal mass of a refined extremum comes from, and whether it can be quoted. */
export interface AxisProvenance {
  methods: string[];
  determined: boolean[];
  /** Data points behind each axis's mass, where an axis used fewer than the whole run (a line's mesh points). */
  points?: (number | null)[];
}

/**
 * The provenance of principal masses of which the one along `axis` comes from a line fit (`lineMethod`, from
 * `linePoints` mesh points of the line) and the others from the star interpolation (`starMethod`).
 */
export function lineAxisProvenance(
  axis: number,
  lineMethod: string,
  linePoints: number,
  starMethod: string,
  determined: boolean[],
): AxisProvenance {
  return {
    methods: [0, 1, 2].map((i) => (i === axis ? lineMethod : starMethod)),
    determined,
    points: [0, 1, 2].map((i) => (i === axis ? linePoints : null)),
  };
}

const dot = (a: readonly number[], b: readonly number[]): number => a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;

/** The refined extremum and its axes' provenance, or null when the line cannot be used (then keep x). */
export function refineOnTouchingLine(
  run: MeshInterpolation,
  x: InterpolatedExtremum,
  t: NearbyTouching,
  starMethod: string,
): { extremum: InterpolatedExtremum; axes: AxisProvenance } | null {
  const { input } = run;
  // P fixed by inversion modulo G (s and d even about it), on a Γ-centred mesh (the line's points on the mesh).
  if (!t.k.every((v) => Math.abs(2 * v - Math.round(2 * v)) < 1e-9)) return null;
  let p: Vec3 = t.k;
  let pc = run.toCart(p);
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        const img: Vec3 = [t.k[0] + a, t.k[1] + b, t.k[2] + c];
        const ic = run.toCart(img);
        if (Math.hypot(...ic.map((v, i) => v - x.kCartesian[i]!)) < Math.hypot(...pc.map((v, i) => v - x.kCartesian[i]!))) {
          p = img;
          pc = ic;
        }
      }
    }
  }
  const len = Math.hypot(...pc);
  const lambda = dot(x.kCartesian, pc) / (len * len);
  const off = Math.hypot(...x.kCartesian.map((v, i) => v - lambda * pc[i]!));
  if (!(lambda > 0 && lambda < 1 && off < 1e-6 * len)) return null;
  // The line Γ→P's mesh points, from P towards Γ while the pair is closer to itself than to any other band.
  const line = gammaLinePoints(run, p);
  if (!line) return null;
  const [lo, hi] = x.band < t.band ? [x.band, t.band] : [t.band, x.band];
  const band = (b: number): Float64Array | null => input.bands[b] ?? null;
  const q: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  for (const [i, irr] of line.irreducible.entries()) {
    const e1 = band(lo)![irr]!;
    const e2 = band(hi)![irr]!;
    const below = band(lo - 1);
    const above = band(hi + 1);
    const outside = Math.min(below ? e1 - below[irr]! : Infinity, above ? above[irr]! - e2 : Infinity);
    if (!(e2 - e1 < outside)) break;
    q.push(line.q[i]!);
    lower.push(e1);
    upper.push(e2);
  }
  const r = linePairExtremum({ q, lower, upper, branch: x.band === lo ? -1 : 1, kind: x.kind });
  if (!r || Math.abs(r.q - (1 - lambda) * len) > 4 * run.halfSpacing) return null;
  const kCartesian = pc.map((v) => v * (1 - r.q / len)) as Vec3;
  const k = cartesianToFractional(kCartesian, input.lattice).map((v) => v + 0) as Vec3;
  // Principal axes stay the interpolant's (the line is one of them by symmetry); curvatures at the new point.
  const dir = pc.map((v) => v / len);
  const along = x.axes.map((a) => Math.abs(dot(a, dir)));
  const axis = along.indexOf(Math.max(...along));
  if (along[axis]! < 0.999) return null;
  const hessian = run.band(x.band).derivatives(kCartesian).hessian;
  const masses = x.axes.map((a, i) => {
    if (i === axis) return curvatureToMass(r.curvature);
    const ha = [0, 1, 2].map((row) => dot(hessian[row]!, a));
    return curvatureToMass(dot(a, ha));
  }) as Vec3;
  const lineMass = masses[axis]!;
  const stderr = x.uncertainty.masses.map((u, i) =>
    i === axis ? (Math.abs(lineMass) * r.uncertainty.curvature) / Math.abs(r.curvature) : u,
  ) as Vec3;
  const sign = x.kind === 'min' ? 1 : -1;
  const ok = masses.map((m, i) => sign * m > 0 && stderr[i]! <= MASS_UNCERTAINTY_LIMIT * Math.abs(m) && x.uncertainty.lost === 0);
  const determined = ok.every(Boolean);
  const worst = Math.max(...masses.map((m, i) => (i === axis ? 0 : stderr[i]! / Math.abs(m))));
  const lineNote = `Position, energy and the mass along the line to the touching point come from the pair's invariants on the ${q.length} mesh points of that line (${PAIR_LINE}: s ∓ √d, polynomials of order ${r.order} in q²; ±${(100 * stderr[axis]!) / Math.abs(lineMass) < 0.05 ? '<0.1' : ((100 * stderr[axis]!) / Math.abs(lineMass)).toFixed(1)} %).`;
  const reason = determined
    ? undefined
    : `${ok[axis] ? 'The mass along the line is quoted (pair-line). ' : ''}Leaving out one star of mesh points moves a mass across the line by ${(100 * worst).toFixed(0)} % (limit ${100 * MASS_UNCERTAINTY_LIMIT} %): the mesh is too coarse for this valley.`;
  const averaged = determined ? averagedFromPrincipal(masses, x.valleyDegeneracy, 'interpolated band') : null;
  const extremum: InterpolatedExtremum = {
    ...x,
    k,
    kCartesian,
    energy_eV: r.energy_eV,
    masses,
    position: input.specialPoints ? positionOnGammaLine(input.specialPoints, k) : null,
    uncertainty: { ...x.uncertainty, energy_eV: r.uncertainty.energy_eV, masses: stderr, position_invA: r.uncertainty.q },
    determined,
    warnings: [...x.warnings, lineNote],
    dosMass: averaged?.dosMass ?? null,
    conductivityMass: averaged?.conductivityMass ?? null,
  };
  if (reason) extremum.undeterminedReason = reason;
  else delete extremum.undeterminedReason;
  return { extremum, axes: lineAxisProvenance(axis, PAIR_LINE, q.length, starMethod, ok) };
}
