/**
 * Whether a band-index extremum is a crossing: two branches that run straight through a point, where
 * ordering the states by energy makes one band index turn back (a kink, "V" or "Λ") and the other turn the
 * other way. The signs of a crossing (common practice of band-structure reading; no curvature is involved):
 *   - along a line through the point, the band leaves it near-linearly on both sides (the second step
 *     continues the first instead of steepening as a parabola would), with outward slopes of the same sign
 *     (so it looks like a minimum or a maximum);
 *   - another band within the fit window at the point has the swapped slopes: what leaves on one side in
 *     one band arrives on the other side in the other band, so each branch continues through the point.
 * A small avoided-crossing gap (smaller than the sampling resolves) looks the same and is treated the same.
 * At a time-reversal-invariant k the far side of the line mirrors the near side (E(k0 + q) = E(k0 − q)), so
 * one ray is enough.
 */
import type { Ray } from './pathRays';

export interface LineSlope {
  /** Outward slope dE/dt over the first step, eV·Å. */
  slope: number;
  /** Whether the band leaves the point along a straight line (a kink), not a parabola. */
  linear: boolean;
}

/** Points used on each side: the point, its neighbour, and the next one. */
export const CROSSING_POINTS = 2;

/**
 * Slope of the first step over slope of the second, above which a side leaves the point as a line. For a
 * straight line the ratio is 1; for a parabola with its vertex at the point, 1/3 (uniform steps), and at
 * most 1/2 with the vertex anywhere within half a step (analytic: E = c(t + δ)², |δ| ≤ h/2); a small
 * avoided-crossing gap lowers it below 1 only a little.
 */
const LINEAR_RATIO = 0.7;

/**
 * How the band leaves the point along a ray: the slope of the first step and whether the second step
 * continues it (a line) or steepens (a parabola). Null with fewer than three points.
 */
export function sideSlope(energy: (k: number) => number, ray: Ray, precision_eV: number): LineSlope | null {
  if (ray.indices.length < 3) return null;
  const [t1, t2] = [ray.t[1]!, ray.t[2]!];
  if (!(t1 > 0 && t2 > t1)) return null;
  const e0 = energy(ray.indices[0]!);
  const e1 = energy(ray.indices[1]!);
  const e2 = energy(ray.indices[2]!);
  const s1 = (e1 - e0) / t1;
  const s2 = (e2 - e1) / (t2 - t1);
  // A slope lost in the rounding of the file is no slope.
  const resolved = Math.abs(e1 - e0) > 3 * precision_eV + 1e-9;
  return { slope: s1, linear: resolved && s2 !== 0 && s1 / s2 > LINEAR_RATIO };
}

/** Relative mismatch of two first-step slopes still counted as one branch (the chords include curvature). */
const SLOPE_MATCH = 0.3;

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
