/**
 * A mesh run opened in the band view: its interpolated bands along the standard path of the lattice
 * (core/analysis/meshRunPath.ts), analysed like a path run, with the caution that they are interpolated, one
 * line with what the mesh analysis found anywhere in the zone, and the run's own mesh points that lie on the
 * path (core/interpolation/meshPointsOnPath.ts), drawn as markers over the interpolated lines. Other runs pass
 * through. The interpolation costs seconds on large meshes: the host runs this on the analysis worker
 * (analysisJob.ts, analysisWorker.ts) and in-process only where there is no worker (the web host).
 */
import type { BandStructure, Report } from '../core/model';
import { analyzeBandStructure, type AnalysisSettings } from '../core/analysis/analyze';
import { interpolatedPathRun } from '../core/analysis/meshRunPath';
import { meshResultLine } from '../core/report/meshRunText';
import { mayBeMeshRun } from '../core/analysis/meshRunAnalysis';
import { localRun } from '../core/analysis/localRun';
import { pathGeometry } from '../core/lattice/kpath';
import { meshRunPointsOnPath, type MeshPointsWithEnergies } from '../core/interpolation/meshPointsOnPath';
import { MAX_INTERPOLATION_POINTS } from '../core/interpolation/meshInterpolation';

/**
 * Most irreducible points interpolated along the path on the thread the editor runs on (the web host, which has
 * no worker): the fit's cost grows faster than the square of the points (about 10 s at 455 points on a loaded
 * machine). Larger meshes open as their points, with a warning saying why.
 */
export const MAX_PATH_VIEW_POINTS = 500;
/**
 * The same on the analysis worker (the editor stays responsive; the load can be cancelled): as many as the
 * interpolation takes (MAX_INTERPOLATION_POINTS). Measured for 969 points (a 32³ cubic mesh, 4 bands): 1.8 s
 * CPU for the path, on a machine shared by other jobs.
 */
export const MAX_WORKER_VIEW_POINTS = MAX_INTERPOLATION_POINTS;

/** What the band view shows of a run: the band structure drawn, its report, and a mesh run's points on the path. */
export interface ViewRun {
  bs: BandStructure;
  report: Report;
  meshPoints?: MeshPointsWithEnergies;
}

/**
 * True for a run the view shows as interpolated bands: the k-points may be a mesh (the analysis interpolates
 * exactly these runs when they have a gap; a mesh run without one is drawn interpolated too). Cheap: no fit.
 */
export function isMeshRun(bs: BandStructure): boolean {
  return mayBeMeshRun(bs, localRun(bs) !== null);
}

/** `maxPoints`: MAX_PATH_VIEW_POINTS on the editor's own thread, MAX_WORKER_VIEW_POINTS on the worker. */
export function meshRunForView(run: ViewRun, settings: AnalysisSettings, maxPoints = MAX_PATH_VIEW_POINTS): ViewRun {
  if (!isMeshRun(run.bs)) return run;
  // The fit's cost is set by the irreducible points (a run listing the whole mesh is merged first).
  const points = run.report.interpolation?.irreduciblePoints ?? run.bs.nk;
  if (points > maxPoints) {
    if (run.report.interpolation) {
      run.report.warnings.push(
        `The interpolated bands are not drawn along a path for more than ${maxPoints} irreducible k-points (${points} here): the fit would take too long. The analysis of the mesh (extrema anywhere in the zone) is complete.`,
      );
    }
    return run;
  }
  const made = interpolatedPathRun(run.bs);
  if (!made.path) {
    if (run.report.interpolation) run.report.warnings.push(`The interpolated bands cannot be drawn along a path: ${made.reason}`);
    return run;
  }
  const report = analyzeBandStructure(made.path, settings);
  const geometry = pathGeometry(made.path);
  const on = meshRunPointsOnPath(run.bs, { ...geometry, kpoints: made.path.kpoints }, made.path.nBands);
  report.cautions.unshift(
    on.points
      ? `${made.caution} The markers are the run's own energies at the ${on.points.irreducible.length} mesh points on the path (data); the lines between them are interpolated.`
      : made.caution,
  );
  if (!on.points) report.warnings.push(`The mesh points are not drawn on the path: ${on.reason}`);
  const found = meshResultLine(run.report);
  if (found) report.warnings.unshift(found);
  return { bs: made.path, report, ...(on.points ? { meshPoints: on.points } : {}) };
}
