/**
 * Choosing the points of a fit: those within the energy window of the extremum, taken contiguously from the
 * extremum outwards; when too few fall inside, the window grows to the minimum number of points and the
 * fit says so.
 */
import type { LineSamples } from './types';

export interface WindowChoice {
  /** Number of leading samples used. */
  n: number;
  /** Window of the points used, meV. */
  window_meV: number;
  warnings: string[];
}

export function chooseWindow(s: LineSamples, window_meV: number, minPoints: number, what: string): WindowChoice {
  const e0 = s.e[0]!;
  const limit = window_meV / 1000;
  let n = 0;
  while (n < s.e.length && Math.abs(s.e[n]! - e0) <= limit + 1e-12) n++;
  const warnings: string[] = [];
  let used = window_meV;
  if (n < minPoints) {
    const have = Math.min(minPoints, s.e.length);
    if (have > n) {
      let span = 0;
      for (let i = 0; i < have; i++) span = Math.max(span, Math.abs(s.e[i]! - e0));
      used = span * 1000;
      warnings.push(
        `Only ${n} point${n === 1 ? '' : 's'} within ${fmtMeV(window_meV)} meV: the window grew to ${fmtMeV(used)} meV to include the ${have} points the ${what} needs (k-mesh coarse for this window).`,
      );
      n = have;
    }
    if (n < minPoints) warnings.push(`Only ${n} points along this direction; the ${what} needs ${minPoints}.`);
  }
  return { n, window_meV: used, warnings };
}

function fmtMeV(x: number): string {
  return x >= 10 ? x.toFixed(0) : x.toFixed(1);
}
