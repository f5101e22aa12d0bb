/**
 * Moving about the plot without the DOM: which spin channels are shown, what a key press asks for, which
 * extremum a click snaps to, where an arrow key goes, which band point the pointer is over. Pure: screen
 * positions come from the scales passed in (d3 scales or any function of the same shape).
 */
import { nextCandidate, type ArrowKey, type Candidate } from './keyNavigation';
import { snapToCandidate, type ScreenCandidate } from './snap';
import { energyAt, type ViewModel } from './viewModel';
import type { SpinName } from './viewState';

type ToScreen = (value: number) => number;

/** The spin channels drawn: one for an unpolarised run, else those the spin menu names. */
export function visibleSpins(nSpin: number | null, choice: SpinName): number[] {
  if (nSpin === null || nSpin === 1) return [0];
  return choice === 'up' ? [0] : choice === 'down' ? [1] : [0, 1];
}

/** What a key pressed on the plot asks for (null: a key the plot leaves alone). */
export type KeyCommand =
  { kind: 'move'; key: ArrowKey } | { kind: 'fit' } | { kind: 'clear' } | { kind: 'zoom'; factor: number } | { kind: 'resetZoom' };

/** One zoom step of the + and − keys. */
export const KEY_ZOOM_FACTOR = 1.5;

export function keyCommand(key: string): KeyCommand | null {
  switch (key) {
    case 'ArrowLeft':
    case 'ArrowRight':
    case 'ArrowUp':
    case 'ArrowDown':
      return { kind: 'move', key };
    case 'Enter':
    case ' ':
      return { kind: 'fit' };
    case 'Escape':
      return { kind: 'clear' };
    case '+':
    case '=':
      return { kind: 'zoom', factor: KEY_ZOOM_FACTOR };
    case '-':
      return { kind: 'zoom', factor: 1 / KEY_ZOOM_FACTOR };
    case '0':
      return { kind: 'resetZoom' };
    default:
      return null;
  }
}

/**
 * The candidate a click at screen point (x, y) snaps to: the nearest one of a shown spin channel within
 * `tolerancePx` in both axes (earlier candidates win ties: the listed extrema come first), or null.
 */
export function snapCandidate(
  vm: ViewModel,
  list: readonly Candidate[],
  spins: readonly number[],
  scales: { zx: ToScreen; zy: ToScreen; offset: number },
  x: number,
  y: number,
  tolerancePx: number,
): Candidate | null {
  const screen: ScreenCandidate[] = [];
  for (let i = 0; i < list.length; i++) {
    const c = list[i]!;
    if (!spins.includes(c.spin)) continue;
    const px = scales.zx(vm.distance[c.kIndex]!);
    if (Math.abs(px - x) > tolerancePx) continue;
    const py = scales.zy(c.eV - scales.offset);
    if (Math.abs(py - y) > tolerancePx) continue;
    screen.push({ px, py, id: i });
  }
  const hit = snapToCandidate(x, y, screen, tolerancePx);
  return hit ? list[hit.id]! : null;
}

/** Where an arrow key goes among the candidates of the shown spin channels (keyNavigation.ts). */
export function neighbourCandidate(
  vm: ViewModel,
  list: readonly Candidate[],
  spins: readonly number[],
  selected: Candidate | null,
  key: ArrowKey,
): Candidate | null {
  const shown = list.filter((c) => spins.includes(c.spin));
  return nextCandidate(shown, selected, key, (k) => vm.distance[k]!);
}

/** The band point nearest in energy to `eV` at k-point k, among the shown spin channels. */
export function nearestBandPoint(vm: ViewModel, spins: readonly number[], k: number, eV: number): { spin: number; band0: number } {
  let best = { spin: 0, band0: 0, d: Infinity };
  for (const s of spins) {
    for (let b = 0; b < vm.nBands; b++) {
      const d = Math.abs(energyAt(vm, s, k, b) - eV);
      if (d < best.d) best = { spin: s, band0: b, d };
    }
  }
  return { spin: best.spin, band0: best.band0 };
}
