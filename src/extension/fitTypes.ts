/** What the band view asks of the fit engine, as the panel sees it (implemented in fitService.ts). */
import type { ExtremumReport } from '../core/model';
import type { ExtremumFitter } from '../core/annotations/chosenFits';
import type { FitCurve, FitTarget, WindowScanSeries } from '../protocol';
import type { LoadedRun } from './runLoader';

export interface FitOutcome {
  extremum: ExtremumReport;
  curves: FitCurve[];
  scan: WindowScanSeries[] | null;
}

export interface FitService {
  fit(run: LoadedRun, target: FitTarget, window_meV: number, method: string, withScan: boolean): FitOutcome;
  scan(run: LoadedRun, target: FitTarget, method: string, windows_meV?: number[]): WindowScanSeries[];
  /** The fitter a save redoes the chosen fits with: the fits answered before are not fitted again. */
  cachedFitter(run: LoadedRun): ExtremumFitter;
}

/** Null when the target lies inside the run's arrays, otherwise the sentence why not. */
export function targetProblem(run: LoadedRun, t: FitTarget): string | null {
  if (t.spin >= run.bs.nSpin) return `spin channel ${t.spin} does not exist in this run`;
  if (t.kIndex >= run.bs.nk) return `k-point ${t.kIndex + 1} does not exist (the run has ${run.bs.nk})`;
  if (t.band0 >= run.bs.nBands) return `band ${t.band0 + 1} does not exist (the run has ${run.bs.nBands})`;
  return null;
}
