/**
 * A mesh run opened in the band view: the host shows its interpolated bands along the standard path of the
 * lattice (core/analysis/meshRunPath.ts), analysed like a path run, with the caution that they are
 * interpolated and one line with what the mesh analysis found anywhere in the zone. Other runs pass through.
 * The mesh points lying on the path are not drawn as markers (that needs a protocol message: not done here).
 */
import type { BandStructure, Report } from '../core/model';
import { analyzeBandStructure, type AnalysisSettings } from '../core/analysis/analyze';
import { interpolatedPathRun } from '../core/analysis/meshRunPath';
import { meshResultLine } from '../core/report/meshRunText';
import { mayBeMeshRun } from '../core/analysis/meshRunAnalysis';
import { localRun } from '../core/analysis/localRun';

/**
 * Most irreducible points interpolated along the path here: the fit runs on the thread that calls this
 * (the extension host), and its cost grows faster than the square of the points (about 10 s at 455 points
 * on a loaded machine). Larger meshes open as their points, with a warning saying why.
 */
export const MAX_PATH_VIEW_POINTS = 500;

export function meshRunForView(
  run: { bs: BandStructure; report: Report },
  settings: AnalysisSettings,
): { bs: BandStructure; report: Report } {
  // Interpolated by the analysis (insulators), or a mesh run without a gap (metals keep their classification).
  if (!run.report.interpolation && !mayBeMeshRun(run.bs, localRun(run.bs) !== null)) return run;
  if (run.bs.nk > MAX_PATH_VIEW_POINTS) {
    if (run.report.interpolation) {
      run.report.warnings.push(
        `The interpolated bands are not drawn along a path for more than ${MAX_PATH_VIEW_POINTS} irreducible k-points (${run.bs.nk} here): the fit would hold the editor too long. The analysis of the mesh (extrema anywhere in the zone) is complete.`,
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
  report.cautions.unshift(made.caution);
  const found = meshResultLine(run.report);
  if (found) report.warnings.unshift(found);
  return { bs: made.path, report };
}
