/**
 * Whether a band-index extremum is a crossing: two branches that run straight through a point, where
 * ordering the states by energy makes one band index turn back (a kink, "V" or "Λ") and the other turn the
 * other way. The signs of a crossing (common practice of band-structure reading; no curvature is involved):
 *   - along a line through the point, the band is near-linear on both sides, with outward slopes of the
 *     same sign (so it looks like a minimum or a maximum);
 *   - another band within the fit window at the point has the swapped slopes: what leaves on one side in
 *     one band arrives on the other side in the other band, so each branch continues through the point.
 * A small avoided-crossing gap (smaller than the sampling resolves) looks the same and is treated the same.
 * At a time-reversal-invariant k the far side of the line mirrors the near side (E(k0 + q) = E(k0 − q)), so
 * one ray is enough.
 */
import type { Ray } from './pathRays';

export interface LineSlope {
  /** Outward slope dE/dt, eV·Å. */
  slope: number;
  /** Whether the points follow a straight line (rms residual small against the energy span). */
  linear: boolean;
}

/** Most points used on each side: enough to see a line, few enough to stay near the point. */
export const CROSSING_POINTS = 4;

/** Rms residual of a straight line through the side's points, as a share of their energy span, still called linear. */
const LINEAR_SHARE = 0.03;

/** Relative mismatch of two slopes still counted as the same branch. */
const SLOPE_MATCH = 0.15;

/**
 * Straight-line fit through the points 1..M of a ray (the centre point excluded, so a small gap at the
 * centre does not bend it). Null with fewer than two points.
 */
export function sideSlope(energy: (k: number) => number, ray: Ray, precision_eV: number): LineSlope | null {
  const m = Math.min(CROSSING_POINTS, ray.indices.length - 1);
  if (m < 2) return null;
  let st = 0;
  let se = 0;
  for (let i = 1; i <= m; i++) {
    st += ray.t[i]!;
    se += energy(ray.indices[i]!);
  }
  const tm = st / m;
  const em = se / m;
  let stt = 0;
  let ste = 0;
  for (let i = 1; i <= m; i++) {
    const dt = ray.t[i]! - tm;
    stt += dt * dt;
    ste += dt * (energy(ray.indices[i]!) - em);
  }
  if (!(stt > 0)) return null;
  const slope = ste / stt;
  let rss = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 1; i <= m; i++) {
    const y = energy(ray.indices[i]!);
    rss += (y - em - slope * (ray.t[i]! - tm)) ** 2;
    lo = Math.min(lo, y);
    hi = Math.max(hi, y);
  }
  const span = hi - lo;
  const rms = Math.sqrt(rss / m);
  // A slope lost in the rounding of the file is no slope.
  const resolved = span > 3 * precision_eV + 1e-9;
  return { slope, linear: resolved && rms <= LINEAR_SHARE * span + precision_eV };
}

function sameBranch(a: number, b: number): boolean {
  return Math.abs(a - b) <= SLOPE_MATCH * Math.max(Math.abs(a), Math.abs(b));
}

export interface CrossingInput {
  /** Energy of a band at a k index. */
  energy: (band: number, k: number) => number;
  nBands: number;
  /** 0-based band of the candidate. */
  band: number;
  /** The rays leaving the point (a few points each are enough). */
  rays: Ray[];
  /** The ray running the other way along the same line, or null. */
  opposite: (r: Ray) => Ray | null;
  /** True when k0 ≡ −k0: a ray's mirror image stands for the missing far side. */
  timeReversalInvariant: boolean;
  /** Bands farther than this from the candidate at the point are not partners (eV). */
  window_eV: number;
  precision_eV: number;
}

export interface CrossingFinding {
  /** 0-based band the candidate's branches continue into. */
  partner: number;
  /** Label or coordinates of the direction along which the crossing is seen. */
  towards: string;
  /** Energy difference of the two bands at the point, eV (0 for a true crossing, the gap for an avoided one). */
  gap_eV: number;
}

/** The crossing the candidate is part of, or null when it behaves like a true extremum. */
export function findCrossing(inp: CrossingInput): CrossingFinding | null {
  const k0 = inp.rays[0]?.indices[0];
  if (k0 === undefined) return null;
  const e0 = inp.energy(inp.band, k0);
  for (const partner of [inp.band - 1, inp.band + 1]) {
    if (partner < 0 || partner >= inp.nBands) continue;
    const gap = Math.abs(inp.energy(partner, k0) - e0);
    if (gap > inp.window_eV) continue;
    for (const r of inp.rays) {
      const far = inp.opposite(r) ?? (inp.timeReversalInvariant ? r : null);
      if (!far) continue;
      const own = (band: number, ray: Ray): LineSlope | null => sideSlope((k) => inp.energy(band, k), ray, inp.precision_eV);
      const bNear = own(inp.band, r);
      const bFar = own(inp.band, far);
      const pNear = own(partner, r);
      const pFar = own(partner, far);
      if (!bNear || !bFar || !pNear || !pFar) continue;
      if (!(bNear.linear && bFar.linear && pNear.linear && pFar.linear)) continue;
      // The candidate turns back: outward slopes of one sign on both sides.
      if (Math.sign(bNear.slope) !== Math.sign(bFar.slope) || bNear.slope === 0) continue;
      // Each branch continues through the point into the other band: dE/dt along the line is kept, i.e. an
      // outward slope on one side equals minus the other band's outward slope on the other side.
      if (sameBranch(bNear.slope, -pFar.slope) && sameBranch(pNear.slope, -bFar.slope)) {
        return { partner, towards: r.towards, gap_eV: gap };
      }
    }
  }
  return null;
}
