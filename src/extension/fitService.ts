/**
 * The band view's fits, answered by the core's effective-mass engine (fitOnPath, massWindowScan). Each fit is
 * kept per run, so the save that follows redoes nothing the view already asked for (cachedFitter).
 */
import { fitExtremumAt } from '../core/analysis/massEngine';
import { fitOnPath, type PathFit } from '../core/analysis/fitCurves';
import { massWindowScan, type WindowScanPoint } from '../core/analysis/windowScan';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { FIT_METHODS, methodId } from '../core/analysis/methods';
import type { ExtremumFitter } from '../core/annotations/chosenFits';
import { ValleyscopeError } from '../core/errors';
import type { BandStructure } from '../core/model';
import type { FitTarget, WindowScanSeries } from '../protocol';
import type { FitOutcome, FitService } from './fitTypes';
import type { LoadedRun } from './runLoader';

function checkedMethod(method: string): string {
  const id = methodId(method);
  if (id === null) throw new ValleyscopeError(`unknown fit method "${method}" (known: ${FIT_METHODS.join(', ')})`);
  return id;
}

/** Scan points grouped into one series per direction (and branch). */
export function scanSeries(points: WindowScanPoint[]): WindowScanSeries[] {
  const byName = new Map<string, WindowScanSeries>();
  for (const p of points) {
    for (const m of p.masses) {
      const name = m.branch !== undefined ? `${m.towards} (branch ${m.branch})` : m.towards;
      let s = byName.get(name);
      if (!s) {
        s = { towards: name, points: [] };
        byName.set(name, s);
      }
      // Several rays with the same name (a point visited twice): keep the first per window.
      if (s.points.some((q) => q.window_meV === p.window_meV)) continue;
      s.points.push({ window_meV: p.window_meV, mass: m.mass, stderr: m.stderr, points: m.points });
    }
  }
  return [...byName.values()];
}

/** A target the view names as an extremum is fitted exactly there (never moved to another); else it snaps. */
function exactAt(t: FitTarget): { maximum: boolean } | undefined {
  return typeof t.maximum === 'boolean' ? { maximum: t.maximum } : undefined;
}

/** The fit's identity: where, exactly-or-snapped, and every setting the engine reads. */
function fitKey(spin: number, kIndex: number, band0: number, s: AnalysisSettings, at: { maximum: boolean } | undefined): string {
  return JSON.stringify([spin, kIndex, band0, at?.maximum ?? null, s.window_meV, s.method, s.range_eV, s.degeneracy_meV]);
}

/** Fits answered so far, per run (dropped with the run's bands); a few hundred at most per run. */
const MAX_KEPT = 256;
const kept = new WeakMap<BandStructure, Map<string, PathFit>>();

function keptFit(run: LoadedRun, spin: number, kIndex: number, band0: number, s: AnalysisSettings, at?: { maximum: boolean }): PathFit {
  let fits = kept.get(run.bs);
  if (!fits) kept.set(run.bs, (fits = new Map<string, PathFit>()));
  const key = fitKey(spin, kIndex, band0, s, at);
  let f = fits.get(key);
  if (!f) {
    f = fitOnPath(run.bs, run.geometry, spin, kIndex, band0, s, at);
    if (fits.size >= MAX_KEPT) fits.delete(fits.keys().next().value!);
    fits.set(key, f);
  }
  return f;
}

export function makeFitService(settings: () => AnalysisSettings): FitService {
  const scan = (run: LoadedRun, t: FitTarget, method: string, windows?: number[]): WindowScanSeries[] => {
    const s = { ...settings(), method: checkedMethod(method) };
    return scanSeries(massWindowScan(run.bs, t.spin, t.kIndex, t.band0, s, windows, exactAt(t)));
  };
  return {
    fit(run, t, window_meV, method, withScan): FitOutcome {
      const s: AnalysisSettings = { ...settings(), window_meV, method: checkedMethod(method) };
      const f = keptFit(run, t.spin, t.kIndex, t.band0, s, exactAt(t));
      return { extremum: structuredClone(f.extremum), curves: f.curves, scan: withScan ? scan(run, t, method) : null };
    },
    scan,
    cachedFitter(run): ExtremumFitter {
      return (bs, spin, kIndex, band0, s, at) =>
        bs === run.bs ? structuredClone(keptFit(run, spin, kIndex, band0, s, at).extremum) : fitExtremumAt(bs, spin, kIndex, band0, s, at);
    },
  };
}
