/**
 * Whether a band-index extremum is a crossing: two branches that run straight through a point, where
 * ordering the states by energy makes one band index turn back (a kink, "V" or "Λ") and the other turn the
 * other way. The signs of a crossing (common practice of band-structure reading; no curvature is involved):
 *   - along a line through the point, the band runs on near-linearly on both sides (beyond the first step,
 *     each step continues the last instead of steepening as a parabola would), with outward slopes of the
 *     same sign (so it looks like a minimum or a maximum);
 *   - another band within the fit window at the point has the swapped slopes: what leaves on one side in
 *     one band arrives on the other side in the other band, so each branch continues through the point.
 * A small avoided-crossing gap (smaller than the sampling resolves) looks the same and is treated the same.
 * At a time-reversal-invariant k the far side of the line mirrors the near side (E(k0 + q) = E(k0 − q)), so
 * one ray is enough.
 */
import type { Ray } from './pathRays';

export interface LineSlope {
  /** Outward slope dE/dt between the first and second points beyond the centre, eV·Å. */
  slope: number;
  /** Whether the band runs on along a straight line there (a kink at the centre), not a parabola. */
  linear: boolean;
  /** Outward slope of the step from the centre itself (it holds the kink when the crossing falls between samples). */
  firstSlope: number;
}

/** Points used on each side beyond the centre: three, so that a crossing between samples is still seen. */
export const CROSSING_POINTS = 3;

/**
 * Lowest ratio of the two slopes beyond the first step (step 1→2 over step 2→3) still called a line. A line
 * gives 1; a parabola with its vertex within half a step of the centre gives 3/5 at most (analytic:
 * E = c(t + δ)², |δ| ≤ h/2, uniform steps: (3h + 2δ)/(5h + 2δ) ≤ 2/3).
 */
const LINEAR_RATIO = 0.7;

/**
 * How the band runs away from the point along a ray, beyond the first step (which may hold the kink when
 * the crossing falls between samples): the slope from the first to the second point, and whether the next
 * step continues it (a line) or steepens as a parabola does. Null with fewer than four points.
 */
export function sideSlope(energy: (k: number) => number, ray: Ray, precision_eV: number): LineSlope | null {
  if (ray.indices.length < 4) return null;
  const [t1, t2, t3] = [ray.t[1]!, ray.t[2]!, ray.t[3]!];
  if (!(t1 > 0 && t2 > t1 && t3 > t2)) return null;
  const [e0, e1, e2, e3] = [0, 1, 2, 3].map((m) => energy(ray.indices[m]!)) as [number, number, number, number];
  const s12 = (e2 - e1) / (t2 - t1);
  const s23 = (e3 - e2) / (t3 - t2);
  // A slope lost in the rounding of the file is no slope.
  const resolved = Math.abs(e2 - e1) > 3 * precision_eV + 1e-9;
  const ratio = s12 / s23;
  return { slope: s12, linear: resolved && s23 !== 0 && ratio > LINEAR_RATIO && ratio < 1 / LINEAR_RATIO, firstSlope: (e1 - e0) / t1 };
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
  /** The bands are farther apart at the point than the window: the crossing falls between sampled points. */
  betweenSamples: boolean;
}

/** The crossing the candidate is part of, or null when it behaves like a true extremum. */
export function findCrossing(inp: CrossingInput): CrossingFinding | null {
  const k0 = inp.rays[0]?.indices[0];
  if (k0 === undefined) return null;
  const e0 = inp.energy(inp.band, k0);
  for (const partner of [inp.band - 1, inp.band + 1]) {
    if (partner < 0 || partner >= inp.nBands) continue;
    const gap = Math.abs(inp.energy(partner, k0) - e0);
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
      // The partner must be close at the point: within the window, or within what the slopes cover in one
      // step (a crossing between two samples leaves the bands that far apart at the nearest one).
      const reach = Math.max(inp.window_eV, (Math.abs(bNear.slope) + Math.abs(pNear.slope)) * (r.t[1] ?? 0));
      if (gap > reach) continue;
      // Slopes compared just beyond the point (a crossing at a sample) or one step further out (a crossing
      // between samples, where the first step holds the kink).
      const continues = (a: LineSlope, b: LineSlope): boolean => sameBranch(a.firstSlope, -b.firstSlope) || sameBranch(a.slope, -b.slope);
      if (continues(bNear, pFar) && continues(pNear, bFar)) {
        return { partner, towards: r.towards, gap_eV: gap, betweenSamples: gap > inp.window_eV };
      }
    }
  }
  return null;
}
