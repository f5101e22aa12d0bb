/**
 * Masses at an extremum on a mesh point P that the interpolation does not resolve (it finds a saddle there:
 * a valley much sharper across one direction than the mesh spacing, as germanium's L valleys on a 12³ mesh),
 * when P is fixed by inversion modulo G (2P a reciprocal lattice vector: time reversal makes the band even
 * about P and P stationary, for the band and for its interpolant alike). Along the line from P to Γ the mass
 * comes from the band's own mesh points on that line (evenLineFit.ts: `even-line`); across it, from the
 * interpolant's curvatures at P, each with its leave-one-out change. The line must be a principal axis of the
 * interpolant's Hessian at P (so it is by symmetry at L and X of cubic crystals); each mass is quoted only within
 * its own uncertainty and with the curvature of the kind sought.
 */
import type { Vec3 } from '../model';
import { MASS_UNCERTAINTY_LIMIT, type InterpolatedExtremum, type MeshInterpolation } from '../interpolation/meshInterpolation';
import { evenLineCurvature } from '../interpolation/evenLineFit';
import { nearestIrreducible, LEAVE_OUT_COUNT } from '../interpolation/extremumUncertainty';
import { massTensorOf } from '../interpolation/newtonExtremum';
import { curvatureToMass } from '../units';
import { averagedFromPrincipal } from './averagedMasses';
import { gammaLinePoints } from './meshRunGammaLine';
import { lineAxisProvenance, type AxisProvenance } from './meshRunLinePair';

/** Method id of a mass along the line from an even point to Γ, from the band's mesh points on that line. */
export const EVEN_LINE = 'even-line';

const dot = (a: readonly number[], b: readonly number[]): number => a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
const along = (h: readonly (readonly number[])[], a: readonly number[]): number =>
  dot(
    a,
    [0, 1, 2].map((r) => dot(h[r]!, a)),
  );

/** The extremum with masses and their provenance, or null when the line cannot be used (then keep x). */
export function massesAtEvenMeshPoint(
  run: MeshInterpolation,
  x: InterpolatedExtremum,
  starMethod: string,
): { extremum: InterpolatedExtremum; axes: AxisProvenance } | null {
  if (x.resolved || x.touching.length > 0) return null;
  // The shortest image of P: the line to Γ inside the first zone.
  let p: Vec3 = x.k;
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        const img: Vec3 = [x.k[0] + a, x.k[1] + b, x.k[2] + c];
        if (Math.hypot(...run.toCart(img)) < Math.hypot(...run.toCart(p)) - 1e-12) p = img;
      }
    }
  }
  if (!p.every((v) => Math.abs(2 * v - Math.round(2 * v)) < 1e-9)) return null;
  const line = gammaLinePoints(run, p);
  if (!line) return null;
  const energies = run.input.bands[x.band]!;
  const fit = evenLineCurvature(
    line.q,
    line.irreducible.map((i) => energies[i]!),
  );
  if (!fit) return null;
  const pc = run.toCart(p);
  const { hessian } = run.band(x.band).derivatives(pc);
  const tensor = massTensorOf(hessian);
  const dir = pc.map((v) => v / line.length);
  const cosines = tensor.axes.map((a) => Math.abs(dot(a, dir)));
  const axis = cosines.indexOf(Math.max(...cosines));
  if (cosines[axis]! < 0.999) return null;
  // Across the line: the interpolant's curvature along each other axis, refitted without each nearest point.
  const change = [0, 0, 0];
  for (const left of nearestIrreducible(run.mesh, pc, run.reciprocal, run.input.lattice, LEAVE_OUT_COUNT)) {
    const h = run.fit.fit(energies, left).derivatives(pc).hessian;
    tensor.axes.forEach((a, i) => (change[i] = Math.max(change[i]!, Math.abs(along(h, a) - along(hessian, a)))));
  }
  const curvatures = tensor.axes.map((a, i) => (i === axis ? fit.curvature : along(hessian, a)));
  const masses = curvatures.map((c) => curvatureToMass(c)) as Vec3;
  // δm/m = δc/c.
  const stderr = curvatures.map((c, i) => (Math.abs(masses[i]!) * (i === axis ? fit.uncertainty : change[i]!)) / Math.abs(c)) as Vec3;
  const sign = x.kind === 'min' ? 1 : -1;
  // Curving the wrong way along an axis, P is not the extremum the mesh suggests: keep the mesh entry.
  if (!masses.every((m) => sign * m > 0)) return null;
  const ok = stderr.map((u, i) => u <= MASS_UNCERTAINTY_LIMIT * Math.abs(masses[i]!));
  const determined = ok.every(Boolean);
  const percent = (i: number): string => ((100 * stderr[i]!) / Math.abs(masses[i]!)).toFixed(1);
  const lineNote = `The interpolation does not resolve this extremum (it finds a saddle); the point is stationary by symmetry (twice its k is a reciprocal lattice vector). The mass along the line to Γ comes from the band's ${fit.points} mesh points on that line (${EVEN_LINE}: polynomial of order ${fit.order} in q², ±${percent(axis)} %); across it, from the interpolant's curvature at this point (leave-one-out ±${[
    0, 1, 2,
  ]
    .filter((i) => i !== axis)
    .map(percent)
    .join(' %, ±')} %).`;
  const averaged = determined ? averagedFromPrincipal(masses, x.valleyDegeneracy, 'interpolated band') : null;
  const extremum: InterpolatedExtremum = {
    ...x,
    masses,
    axes: tensor.axes,
    // At a point fixed by symmetry the position is exact and the energy is the run's own value there.
    uncertainty: { ...x.uncertainty, energy_eV: 0, position_invA: 0, masses: stderr },
    determined,
    resolved: true,
    warnings: [lineNote],
    dosMass: averaged?.dosMass ?? null,
    conductivityMass: averaged?.conductivityMass ?? null,
  };
  if (determined) delete extremum.undeterminedReason;
  else {
    const bad = [...new Set([0, 1, 2].filter((i) => !ok[i]).map((i) => `${i === axis ? 'along' : 'across'} the line ±${percent(i)} %`))];
    extremum.undeterminedReason = `Masses not all quoted (limit ${100 * MASS_UNCERTAINTY_LIMIT} %): ${bad.join(', ')}: the mesh is too coarse for this valley.`;
  }
  return { extremum, axes: lineAxisProvenance(axis, EVEN_LINE, fit.points, starMethod, ok) };
}
