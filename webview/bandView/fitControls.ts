/**
 * The fit's controls in the side panel: the window (a logarithmic slider, like the scan plot's axis, with a
 * number field beside it; a change is sent once the slider rests) and the method menu, each method with its
 * description from the core.
 */
import { methodDescription } from '../../src/core/analysis/methods';
import { el, type VsSelect } from '../shared/controls';
import { sliderAtWindow, windowAtSlider, WINDOW_MAX_MEV, WINDOW_MIN_MEV, WINDOW_SLIDER_STEPS } from './windowSlider';

export interface FitControlCallbacks {
  onWindow(window_meV: number): void;
  onMethod(method: string): void;
}

/** Quiet time after the last slider move before the window is sent, ms. */
const WINDOW_SETTLE_MS = 150;

export class FitControls {
  readonly root = el('div', 'vs-fit-controls');
  private readonly range = el('input', 'vs-range');
  private readonly windowField = document.createElement('vscode-textfield') as unknown as HTMLElement & { value: string };
  private readonly methodSelect = document.createElement('vscode-single-select') as unknown as VsSelect;
  private readonly methodNote = el('p', 'vs-method-note vs-muted');
  private windowTimer: number | undefined;

  constructor(private readonly cb: FitControlCallbacks) {
    const wl = el('label', 'vs-control-label', 'Fit window (meV, logarithmic like the scan plot)');
    wl.htmlFor = 'vs-window-range';
    const range = this.range;
    range.type = 'range';
    range.id = 'vs-window-range';
    range.min = '0';
    range.max = String(WINDOW_SLIDER_STEPS);
    range.step = '1';
    range.setAttribute('aria-label', 'Fit window in meV, logarithmic scale');
    range.dataset.scale = 'log';
    const field = this.windowField;
    field.setAttribute('type', 'number');
    field.setAttribute('min', String(WINDOW_MIN_MEV));
    field.setAttribute('max', String(WINDOW_MAX_MEV));
    field.setAttribute('aria-label', 'Fit window in meV');
    field.className = 'vs-window-field';
    const ml = el('label', 'vs-control-label', 'Method');
    this.methodSelect.className = 'vs-method';
    this.methodSelect.setAttribute('aria-label', 'Fit method');
    this.root.append(wl, range, field, ml, this.methodSelect, this.methodNote);
    range.addEventListener('input', () => {
      const w = windowAtSlider(Number(range.value));
      field.value = String(w);
      range.setAttribute('aria-valuetext', `${w} meV`);
      this.queueWindow(w);
    });
    field.addEventListener('change', () => {
      const v = Number(field.value);
      if (Number.isFinite(v) && v >= WINDOW_MIN_MEV && v <= WINDOW_MAX_MEV) {
        range.value = String(sliderAtWindow(v));
        range.setAttribute('aria-valuetext', `${v} meV`);
        this.queueWindow(v);
      }
    });
    this.methodSelect.addEventListener('change', () => {
      this.describeMethod(this.methodSelect.value);
      this.cb.onMethod(this.methodSelect.value);
    });
  }

  setMethods(methods: string[], current: string): void {
    this.methodSelect.replaceChildren(
      ...methods.map((m) => {
        const o = document.createElement('vscode-option');
        o.setAttribute('value', m);
        o.textContent = m;
        const d = methodDescription(m);
        if (d) o.setAttribute('description', d);
        if (m === current) o.setAttribute('selected', '');
        return o;
      }),
    );
    this.methodSelect.value = current;
    this.describeMethod(current);
  }

  setWindow(window_meV: number): void {
    this.range.value = String(sliderAtWindow(window_meV));
    this.range.setAttribute('aria-valuetext', `${window_meV} meV`);
    this.windowField.value = String(window_meV);
  }

  private describeMethod(m: string): void {
    const d = methodDescription(m);
    this.methodNote.textContent = d ? `${m}: ${d}` : '';
  }

  private queueWindow(v: number): void {
    window.clearTimeout(this.windowTimer);
    this.windowTimer = window.setTimeout(() => this.cb.onWindow(v), WINDOW_SETTLE_MS);
  }
}
