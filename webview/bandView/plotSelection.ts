/**
 * The selected extremum and the hovered band point, moved by the pointer and the keys: a click snaps to the
 * nearest extremum within reach and fits it, arrow keys walk between extrema (panning to keep the selection
 * in view), Enter fits, Escape clears, + − 0 zoom. The decisions are navigation.ts's (pure).
 */
import type { ReferenceChoice } from './energyReference';
import type { Candidate } from './keyNavigation';
import { keyCommand, nearestBandPoint, neighbourCandidate, snapCandidate } from './navigation';
import type { PlotScales } from './plotScales';
import { describePoint, selectedText } from './pointText';
import { SNAP_TOLERANCE_PX } from './snap';
import { nearestK, type ViewModel } from './viewModel';

/** What the selection needs from the view. */
export interface SelectionView {
  vm(): ViewModel | null;
  reference(): ReferenceChoice;
  spins(): number[];
  readonly scales: PlotScales;
  screenOf(spin: number, kIndex: number, band0: number): { x: number; y: number } | null;
  fit(c: Candidate): void;
  setStatus(text: string): void;
  /** Shows the read-out of the point under the pointer. */
  describe(text: string): void;
  schedule(): void;
}

export class PlotSelection {
  /** What a click or an arrow key can reach (keyNavigation.ts). */
  candidates: Candidate[] = [];
  selected: Candidate | null = null;
  hover: { spin: number; k: number; band0: number } | null = null;

  constructor(private readonly view: SelectionView) {}

  /** The pointer at (x, y) in the plot: the nearest band point is marked and described. */
  hoverAt(x: number, y: number): void {
    const vm = this.view.vm();
    if (!vm) return;
    const { zx, zy } = this.view.scales;
    const k = nearestK(vm, zx.invert(x));
    if (k < 0) return;
    const ref = this.view.reference();
    const p = nearestBandPoint(vm, this.view.spins(), k, zy.invert(y) + ref.offset);
    this.hover = { spin: p.spin, k, band0: p.band0 };
    this.view.describe(describePoint(vm, ref, p.spin, k, p.band0));
    this.view.schedule();
  }

  leave(): void {
    this.hover = null;
    this.view.schedule();
  }

  /** A click at (x, y): snaps to the nearest extremum within reach and fits it. */
  clickAt(x: number, y: number): void {
    const vm = this.view.vm();
    if (!vm) return;
    const scales = { zx: this.view.scales.zx, zy: this.view.scales.zy, offset: this.view.reference().offset };
    const c = snapCandidate(vm, this.candidates, this.view.spins(), scales, x, y, SNAP_TOLERANCE_PX);
    if (!c) {
      this.view.setStatus(`No band minimum or maximum within ${SNAP_TOLERANCE_PX} px of the click: click closer to one (or zoom in).`);
      return;
    }
    this.select(vm, c);
    this.view.fit(c);
  }

  private select(vm: ViewModel, c: Candidate): void {
    this.selected = c;
    this.view.setStatus(selectedText(vm, this.view.reference(), c));
    this.view.schedule();
  }

  /** A key on the plot; returns whether the view took it over (the caller then prevents the default). */
  key(key: string): boolean {
    const vm = this.view.vm();
    const cmd = vm ? keyCommand(key) : null;
    if (!vm || !cmd) return false;
    const scales = this.view.scales;
    switch (cmd.kind) {
      case 'move': {
        const next = neighbourCandidate(vm, this.candidates, this.view.spins(), this.selected, cmd.key);
        if (!next) return true;
        this.select(vm, next);
        const p = this.view.screenOf(next.spin, next.kIndex, next.band0);
        if (p && !scales.inside(p)) scales.centreOn(vm.distance[next.kIndex]!, next.eV - this.view.reference().offset);
        return true;
      }
      case 'fit':
        if (this.selected) this.view.fit(this.selected);
        else this.view.setStatus('Select an extremum first: the arrow keys move between them.');
        return true;
      case 'clear':
        this.selected = null;
        this.view.schedule();
        return false;
      case 'zoom':
        scales.scaleBy(cmd.factor);
        return false;
      case 'resetZoom':
        scales.reset();
        return false;
    }
  }
}
