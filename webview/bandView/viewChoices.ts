/**
 * The choices the band view keeps for the run it shows (energy zero, spin channels, fit window and method)
 * and the fits made, kept for saving; all of it stored in VS Code's webview state so a reload of the window
 * brings it back (viewState.ts checks what comes back).
 */
import type { BandData, SaveEntry } from '../../src/protocol';
import type { VsCodeApi } from '../shared/vscodeApi';
import { fitsWithin, parseViewState, type BandViewState, type ReferenceName, type SpinName } from './viewState';

/** The key of a fitted point: one kept fit per spin, k-point and band. */
function pointKey(t: { spin: number; kIndex: number; band0: number }): string {
  return `${t.spin}:${t.kIndex}:${t.band0}`;
}

/** The fit methods a run offers (its list, or its default alone). */
export function runMethods(data: BandData): string[] {
  return data.defaults.methods.length ? data.defaults.methods : [data.defaults.method];
}

export class ViewChoices {
  reference: ReferenceName = 'vbm';
  spin: SpinName = 'up';
  window_meV = 25;
  method = 'parabola';
  /** Fits the user made, oldest first: the last is the one shown. */
  private readonly fits = new Map<string, SaveEntry>();

  constructor(private readonly api: VsCodeApi) {}

  /**
   * Choices for a run that has just arrived. The first run of the page takes them from the stored state
   * (else from the run's defaults) and gets back the fits stored for it; returns the fit to show again, if any.
   * A refresh keeps the choices (one spin channel forces "up").
   */
  adopt(data: BandData, first: boolean): SaveEntry | null {
    const restored: BandViewState = first ? parseViewState(this.api.getState()) : {};
    if (first) this.reference = restored.reference ?? data.defaults.energyReference;
    if (data.nSpin === 1) this.spin = 'up';
    else if (first) this.spin = restored.spin ?? 'both';
    if (!first) return null;
    this.window_meV = restored.window_meV ?? data.defaults.window_meV;
    this.method = restored.method && runMethods(data).includes(restored.method) ? restored.method : data.defaults.method;
    // After a window reload: the fits made before, kept for saving, and the last one shown again.
    const fits = fitsWithin(restored.fits ?? [], data);
    for (const f of fits) this.fits.set(pointKey(f), f);
    // The page's state names the run from the start, so a reload can bring the view back.
    this.persist();
    return fits[fits.length - 1] ?? null;
  }

  /** Keeps a fit for saving (a refit of the same point replaces it and becomes the last). */
  keepFit(entry: SaveEntry): void {
    const key = pointKey(entry);
    this.fits.delete(key);
    this.fits.set(key, entry);
    this.persist();
  }

  /** The fits to save. */
  entries(): SaveEntry[] {
    return [...this.fits.values()];
  }

  /** Stores the choices and fits in VS Code's webview state, with the run the page names (data-run). */
  persist(): void {
    const state: BandViewState = {
      reference: this.reference,
      spin: this.spin,
      window_meV: this.window_meV,
      method: this.method,
      fits: this.entries(),
    };
    const run = document.getElementById('app')?.dataset.run;
    if (run) state.run = run;
    this.api.setState(state);
  }
}
