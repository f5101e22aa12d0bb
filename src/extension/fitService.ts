/** The band view's fits, answered by the core's effective-mass engine (fitExtremumAt, massWindowScan). */
import { engineContext, fitExtremumAt } from '../core/analysis/massEngine';
import { massWindowScan } from '../core/analysis/windowScan';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { FIT_METHODS, methodId } from '../core/analysis/methods';
import { ValleyscopeError } from '../core/errors';
import type { FitTarget, WindowScanSeries } from '../protocol';
import type { FitOutcome, FitService } from './fitTypes';
import type { LoadedRun } from './runLoader';
import { fitCurves, type Vertex } from './fitCurves';
import { directionalMasses } from '../core/analysis/directionalMasses';
import { degenerateGroup } from '../core/analysis/extrema';
import type { Ray } from '../core/analysis/pathRays';
import type { ExtremumReport } from '../core/model';
import { nearestKIndex } from './bandData';
import type { WindowScanPoint } from '../core/analysis/windowScan';

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

/**
 * The vertices of the directional fits (free-vertex fits put them between sampled points), from the core's
 * own directional fit repeated with the engine's inputs. Used only when it reproduces the engine's masses
 * exactly; otherwise the curves are drawn from the sampled point.
 */
function vertices(run: LoadedRun, x: ExtremumReport, kIndex: number, rays: Ray[], s: AnalysisSettings): (Vertex | null)[] {
  const band0 = x.band - 1;
  const group = degenerateGroup(run.bs, x.spin, kIndex, band0, s.degeneracy_meV / 1000);
  const dm = directionalMasses(run.bs, x.spin, group, band0, rays, {
    method: s.method,
    window_meV: s.window_meV,
    energySigma: engineContext(run.bs).energySigma,
  });
  const same =
    dm.masses.length === x.masses.length && dm.masses.every((m, i) => m.mass === x.masses[i]!.mass && m.towards === x.masses[i]!.towards);
  if (!same) return [];
  return dm.fits.map((f) => (f.vertexT !== undefined && f.vertexE !== undefined ? { t: f.vertexT, e: f.vertexE } : null));
}

/** A target the view names as an extremum is fitted exactly there (never moved to another); else it snaps. */
function exactAt(t: FitTarget): { maximum: boolean } | undefined {
  return typeof t.maximum === 'boolean' ? { maximum: t.maximum } : undefined;
}

export function makeFitService(settings: () => AnalysisSettings): FitService {
  const scan = (run: LoadedRun, t: FitTarget, method: string, windows?: number[]): WindowScanSeries[] => {
    const s = { ...settings(), method: checkedMethod(method) };
    return scanSeries(massWindowScan(run.bs, t.spin, t.kIndex, t.band0, s, windows, exactAt(t)));
  };
  return {
    fit(run, t, window_meV, method, withScan): FitOutcome {
      const s: AnalysisSettings = { ...settings(), window_meV, method: checkedMethod(method) };
      const extremum = fitExtremumAt(run.bs, t.spin, t.kIndex, t.band0, s, exactAt(t));
      const net = engineContext(run.bs).network;
      const kIndex = nearestKIndex(run.bs, extremum.k);
      const rays = net ? net.raysFrom(kIndex) : [];
      return {
        extremum,
        curves: fitCurves(run.geometry, extremum, rays, vertices(run, extremum, kIndex, rays, s)),
        scan: withScan ? scan(run, t, method) : null,
      };
    },
    scan,
  };
}
