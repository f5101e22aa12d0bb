/**
 * Snapping a click (or a key press) to an extremum: pure geometry in screen pixels.
 */

export interface ScreenCandidate {
  /** Screen position, CSS pixels. */
  px: number;
  py: number;
  /** Caller's handle (index into its own list). */
  id: number;
}

/**
 * The candidate nearest to (x, y) among those within `tolerancePx` in both axes, or null.
 * Ties go to the earlier candidate (callers list report extrema first).
 */
export function snapToCandidate(x: number, y: number, candidates: Iterable<ScreenCandidate>, tolerancePx: number): ScreenCandidate | null {
  let best: ScreenCandidate | null = null;
  let bestD = Infinity;
  for (const c of candidates) {
    const dx = Math.abs(c.px - x);
    const dy = Math.abs(c.py - y);
    if (dx > tolerancePx || dy > tolerancePx) continue;
    const d = dx * dx + dy * dy;
    if (d < bestD) {
      best = c;
      bestD = d;
    }
  }
  return best;
}

/** Default snapping distance in CSS pixels ("within a few pixels in both axes"). */
export const SNAP_TOLERANCE_PX = 8;
