/**
 * A fit at a point of a band path with the curves to draw over the data: along each path direction a fit was
 * made, the fitted dispersion (parabola from the signed mass, or Kane's ε(1 + αε) = ħ²k²/2m* when α was
 * fitted), sampled in the path-distance coordinate. The fit carries the k index it landed on and the vertex of
 * each directional fit, so nothing is fitted twice and no k is looked up again.
 */
import type { BandStructure, ExtremumReport, MassFit } from '../model';
import type { PathGeometry } from '../lattice/kpath';
import type { Ray } from './pathRays';
import type { AnalysisSettings } from './analyze';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import { kaneEnergy } from './fits/kaneFit';
import { engineContext, fitExtremumAt, type FitDetail } from './massEngine';

/** Fitted curve samples to draw over the data, one per direction of the fit. */
export interface FitCurve {
  /** Same wording as MassFit.towards (with the branch when there is one). */
  towards: string;
  /** Path distances of the samples (same units as the path geometry's distance). */
  distance: number[];
  /** Energies of the samples, eV raw. */
  energy: number[];
}

export const CURVE_SAMPLES = 41;

/** Where the fitted dispersion has its vertex, relative to the extremum's sampled point along the ray. */
export interface Vertex {
  /** Distance of the vertex from the sampled point along the ray, Å⁻¹. */
  t: number;
  /** Energy of the vertex, eV. */
  e: number;
}

/** Energy of the fitted dispersion at distance t (Å⁻¹) from the vertex, eV. */
export function fittedEnergy(e0: number, m: MassFit, t: number): number {
  const a = HBAR2_OVER_ME_EV_A2 / (2 * Math.abs(m.mass));
  const sign = m.mass < 0 ? -1 : 1;
  const eps = m.alpha_per_eV !== undefined && m.alpha_per_eV !== 0 ? kaneEnergy(a, m.alpha_per_eV, t * t) : a * t * t;
  return e0 + sign * eps;
}

function sameDirection(m: MassFit, r: Ray): boolean {
  if (m.towards !== r.towards) return false;
  const zero = (v: readonly number[]): boolean => v[0] === 0 && v[1] === 0 && v[2] === 0;
  if (zero(m.direction) || zero(r.direction)) return true;
  return m.direction[0] * r.direction[0] + m.direction[1] * r.direction[1] + m.direction[2] * r.direction[2] > 0.999;
}

/**
 * Sampled curves for the masses of `x`, one per ray that matches a mass (an extremum visited twice by the
 * path gets a curve at each visit). `rays` are the path directions leaving the extremum's k-point.
 * Each curve runs until the fitted energy is 1.5 windows from the extremum, or the ray ends.
 */
export function fitCurves(geometry: PathGeometry, x: ExtremumReport, rays: Ray[], vertices: (Vertex | null)[] = []): FitCurve[] {
  const out: FitCurve[] = [];
  for (const [mi, m] of x.masses.entries()) {
    // Free-vertex fits put the vertex between sampled points; without one, the sampled point is the vertex.
    const v = vertices[mi] ?? { t: 0, e: x.eV };
    if (!Number.isFinite(m.mass) || m.mass === 0) continue;
    const limit = (1.5 * Math.max(m.window_meV, 1)) / 1000;
    for (const r of rays) {
      if (r.indices.length < 2 || !sameDirection(m, r)) continue;
      const i0 = r.indices[0]!;
      const i1 = r.indices[1]!;
      const d0 = geometry.distance[i0]!;
      const dir = geometry.distance[i1]! >= d0 ? 1 : -1;
      const tEnd = r.t[r.t.length - 1]!;
      // Distance at which the fitted curve leaves the drawing range.
      const a = HBAR2_OVER_ME_EV_A2 / (2 * Math.abs(m.mass));
      const tMax = Math.min(tEnd, Math.sqrt(limit / a) * 1.2);
      if (!(tMax > 0)) continue;
      // Path distances per Å⁻¹ along the ray (1 when the path is in Å⁻¹; differs for written units).
      const scale = r.t[1]! > 0 ? Math.abs(geometry.distance[i1]! - d0) / r.t[1]! : 1;
      const distance: number[] = [];
      const energy: number[] = [];
      for (let j = 0; j < CURVE_SAMPLES; j++) {
        const t = (tMax * j) / (CURVE_SAMPLES - 1);
        // Distance from the vertex; the curve starts at the sampled point (t = 0) and runs outwards.
        const e = fittedEnergy(v.e, m, Math.abs(t - v.t));
        if (!Number.isFinite(e) || Math.abs(e - x.eV) > limit * 1.5) break;
        distance.push(d0 + dir * t * scale);
        energy.push(e);
      }
      if (distance.length >= 2)
        out.push({ towards: m.branch !== undefined ? `${m.towards} (branch ${m.branch})` : m.towards, distance, energy });
    }
  }
  return out;
}

/** A fit at a point of the path, with where it landed and what to draw. */
export interface PathFit {
  extremum: ExtremumReport;
  /** 0-based index of the k-point fitted (the clicked one, or the extremum it snapped to). */
  kIndex: number;
  /** The vertex of each directional fit, in the order of `extremum.masses` (null: at the sampled point). */
  vertices: (Vertex | null)[];
  curves: FitCurve[];
}

/**
 * Fit the extremum of band `band0` at (or, without `at`, nearest) `kIndex` like the analysis does
 * (massEngine.fitExtremumAt), and sample its fitted curves along the path directions leaving the point.
 */
export function fitOnPath(
  bs: BandStructure,
  geometry: PathGeometry,
  spin: number,
  kIndex: number,
  band0: number,
  settings: AnalysisSettings,
  at?: { maximum: boolean },
): PathFit {
  const detail: FitDetail = { kIndex, fits: [] };
  const extremum = fitExtremumAt(bs, spin, kIndex, band0, settings, at, detail);
  // Free-vertex fits put the vertex between sampled points; the others at the sampled point.
  const vertices = detail.fits.map((f) => (f.vertexT !== undefined && f.vertexE !== undefined ? { t: f.vertexT, e: f.vertexE } : null));
  const net = engineContext(bs).network;
  const rays = net ? net.raysFrom(detail.kIndex) : [];
  return { extremum, kIndex: detail.kIndex, vertices, curves: fitCurves(geometry, extremum, rays, vertices) };
}
