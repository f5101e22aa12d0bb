/** The band view's fits, answered by the core's effective-mass engine (fitExtremumAt, massWindowScan). */
import { engineContext, fitExtremumAt } from '../core/analysis/massEngine';
import { massWindowScan } from '../core/analysis/windowScan';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { FIT_METHODS } from '../core/analysis/methods';
import { ValleyscopeError } from '../core/errors';
import type { FitTarget, WindowScanSeries } from '../protocol';
import type { FitOutcome, FitService } from './fitTypes';
import type { LoadedRun } from './runLoader';
import { fitCurves } from './fitCurves';
import { nearestKIndex } from './bandData';
import type { WindowScanPoint } from '../core/analysis/windowScan';

function checkedMethod(method: string): string {
  if (!FIT_METHODS.includes(method)) throw new ValleyscopeError(`unknown fit method "${method}" (known: ${FIT_METHODS.join(', ')})`);
  return method;
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

export function makeFitService(settings: () => AnalysisSettings): FitService {
  const scan = (run: LoadedRun, t: FitTarget, method: string, windows?: number[]): WindowScanSeries[] => {
    const s = { ...settings(), method: checkedMethod(method) };
    return scanSeries(massWindowScan(run.bs, t.spin, t.kIndex, t.band0, s, windows));
  };
  return {
    fit(run, t, window_meV, method, withScan): FitOutcome {
      const s: AnalysisSettings = { ...settings(), window_meV, method: checkedMethod(method) };
      const extremum = fitExtremumAt(run.bs, t.spin, t.kIndex, t.band0, s);
      const net = engineContext(run.bs).network;
      const rays = net ? net.raysFrom(nearestKIndex(run.bs, extremum.k)) : [];
      return {
        extremum,
        curves: fitCurves(run.geometry, extremum, rays),
        scan: withScan ? scan(run, t, method) : null,
      };
    },
    scan,
  };
}
