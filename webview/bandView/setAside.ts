/**
 * Candidates the analysis set aside (saddles, crossings, path ends, rounding): a click or an arrow key is
 * never snapped to them. Pure.
 */
import type { SetAsideMark } from '../../src/protocol';

/**
 * How far (k-points) a local extremum of the drawn arrays may lie from a set-aside candidate and still be
 * that candidate: the analysis stands a plateau of equal written values at its middle, the arrays at its
 * first point.
 */
export const SET_ASIDE_REACH = 2;

/** The set-aside candidate at (spin, kIndex, band0), or null. */
export function setAsideAt(
  marks: readonly SetAsideMark[] | undefined,
  spin: number,
  kIndex: number,
  band0: number,
  reach = SET_ASIDE_REACH,
): SetAsideMark | null {
  if (!marks) return null;
  for (const m of marks) if (m.spin === spin && m.band0 === band0 && Math.abs(m.kIndex - kIndex) <= reach) return m;
  return null;
}
