/**
 * The side panel: what the last fit measured at the selected extremum (directional masses, hole masses as
 * positive numbers, tensor, degeneracy, valley degeneracy, averaged masses), how it was measured (method,
 * window, points, standard error), the window control for live refits, the window-scan plot, and the
 * cautions that belong beside these numbers.
 */
import type { ExtremumReport, MassFit, WindowScanSeries } from '../../src/protocol';
import { drawScanPlot, SERIES_COLOURS } from './scanPlot';
import { fixed, fracK, sig } from './format';
import { isMaximumKind } from './markers';

const SVG_NS = 'http://www.w3.org/2000/svg';

function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls?: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

export const WINDOW_MIN_MEV = 1;
export const WINDOW_MAX_MEV = 300;

export interface FitPanelCallbacks {
  onWindow(window_meV: number): void;
  onMethod(method: string): void;
}

export function kindName(kind: string): string {
  switch (kind) {
    case 'vbm':
      return 'Valence-band maximum (VBM)';
    case 'cbm':
      return 'Conduction-band minimum (CBM)';
    case 'valley':
      return 'Secondary conduction minimum';
    case 'peak':
      return 'Secondary valence maximum';
    default:
      return 'Extremum';
  }
}

export class FitPanel {
  readonly root: HTMLElement;
  private readonly status: HTMLElement;
  private readonly body: HTMLElement;
  private readonly head: HTMLElement;
  private readonly massTable: HTMLTableSectionElement;
  private readonly tensor: HTMLElement;
  private readonly degeneracy: HTMLElement;
  private readonly provenance: HTMLElement;
  private readonly warnings: HTMLUListElement;
  private readonly range: HTMLInputElement;
  private readonly windowField: HTMLElement & { value: string };
  private readonly methodSelect: HTMLElement & { value: string };
  private readonly scanSvg: SVGSVGElement;
  private readonly scanLegend: HTMLElement;
  private readonly cautions: HTMLUListElement;
  private windowTimer: number | undefined;
  private scan: WindowScanSeries[] = [];
  private holeSign = false;

  constructor(private readonly cb: FitPanelCallbacks) {
    this.root = el('aside', 'vs-side');
    this.root.setAttribute('aria-label', 'Effective-mass fit at the selected extremum');
    this.root.append(el('h2', 'vs-side-title', 'Curvature fit'));
    this.status = el('p', 'vs-hint', 'Click near a band minimum or maximum, or focus the plot and use the arrow keys and Enter, to measure effective masses there.');
    this.status.setAttribute('role', 'status');
    this.root.append(this.status);

    this.body = el('section', 'vs-fit-body');
    this.body.hidden = true;
    this.head = el('div', 'vs-fit-head');
    this.body.append(this.head);

    const table = el('table', 'vs-masses');
    const cap = el('caption', undefined, 'Directional masses (mₑ)');
    table.append(cap);
    const thead = el('thead');
    const hr = el('tr');
    for (const h of ['towards', 'm* (signed)', 'hole mass', '± stderr', 'points']) hr.append(el('th', undefined, h));
    thead.append(hr);
    table.append(thead);
    this.massTable = el('tbody');
    table.append(this.massTable);
    this.body.append(table);

    this.tensor = el('div', 'vs-tensor');
    this.degeneracy = el('dl', 'vs-degeneracy');
    this.provenance = el('div', 'vs-provenance');
    this.body.append(this.tensor, this.degeneracy, this.provenance);

    // Window and method controls.
    const controls = el('div', 'vs-fit-controls');
    const wl = el('label', 'vs-control-label', 'Fit window (meV)');
    wl.htmlFor = 'vs-window-range';
    this.range = el('input', 'vs-range');
    this.range.type = 'range';
    this.range.id = 'vs-window-range';
    this.range.min = String(WINDOW_MIN_MEV);
    this.range.max = String(WINDOW_MAX_MEV);
    this.range.step = '1';
    this.range.setAttribute('aria-label', 'Fit window in meV');
    this.windowField = document.createElement('vscode-textfield') as unknown as HTMLElement & { value: string };
    this.windowField.setAttribute('type', 'number');
    this.windowField.setAttribute('min', String(WINDOW_MIN_MEV));
    this.windowField.setAttribute('max', String(WINDOW_MAX_MEV));
    this.windowField.setAttribute('aria-label', 'Fit window in meV');
    this.windowField.className = 'vs-window-field';
    const ml = el('label', 'vs-control-label', 'Method');
    this.methodSelect = document.createElement('vscode-single-select') as unknown as HTMLElement & { value: string };
    this.methodSelect.className = 'vs-method';
    this.methodSelect.setAttribute('aria-label', 'Fit method');
    controls.append(wl, this.range, this.windowField, ml, this.methodSelect);
    this.body.append(controls);
    this.range.addEventListener('input', () => {
      this.windowField.value = this.range.value;
      this.queueWindow(Number(this.range.value));
    });
    this.windowField.addEventListener('change', () => {
      const v = Number(this.windowField.value);
      if (Number.isFinite(v) && v >= WINDOW_MIN_MEV && v <= WINDOW_MAX_MEV) {
        this.range.value = String(v);
        this.queueWindow(v);
      }
    });
    this.methodSelect.addEventListener('change', () => this.cb.onMethod(this.methodSelect.value));

    const scanBox = el('figure', 'vs-scan');
    const scanCap = el('figcaption', undefined, 'Mass against fit window (window scan)');
    this.scanSvg = document.createElementNS(SVG_NS, 'svg');
    this.scanSvg.setAttribute('role', 'img');
    this.scanSvg.setAttribute('aria-label', 'Effective mass against fit window');
    this.scanLegend = el('div', 'vs-scan-legend');
    scanBox.append(scanCap, this.scanSvg, this.scanLegend);
    this.body.append(scanBox);

    this.warnings = el('ul', 'vs-fit-warnings');
    this.body.append(this.warnings);
    this.root.append(this.body);

    const cautionBox = el('section', 'vs-cautions');
    cautionBox.append(el('h3', undefined, 'Cautions'));
    this.cautions = el('ul');
    cautionBox.append(this.cautions);
    this.root.append(cautionBox);
  }

  setMethods(methods: string[], current: string): void {
    this.methodSelect.replaceChildren(
      ...methods.map((m) => {
        const o = document.createElement('vscode-option');
        o.setAttribute('value', m);
        o.textContent = m;
        if (m === current) o.setAttribute('selected', '');
        return o;
      }),
    );
    this.methodSelect.value = current;
  }

  setWindow(window_meV: number): void {
    this.range.value = String(window_meV);
    this.windowField.value = String(window_meV);
  }

  setCautions(list: string[]): void {
    this.cautions.replaceChildren(...list.map((c) => el('li', undefined, c)));
    (this.cautions.parentElement as HTMLElement).hidden = list.length === 0;
  }

  private queueWindow(v: number): void {
    window.clearTimeout(this.windowTimer);
    this.windowTimer = window.setTimeout(() => this.cb.onWindow(v), 150);
  }

  showPending(what: string): void {
    this.status.textContent = `Fitting ${what} …`;
    this.root.setAttribute('aria-busy', 'true');
  }

  showFailed(message: string): void {
    this.root.removeAttribute('aria-busy');
    this.status.textContent = `The fit did not run: ${message}`;
  }

  showHint(text: string): void {
    this.status.textContent = text;
  }

  /** Shows a fit result. `relEnergy` is the extremum's energy relative to the plot's zero, with its name ('' for raw energies). */
  showResult(x: ExtremumReport, relEnergy: { value: number; zero: string }, window_meV: number, method: string): void {
    this.root.removeAttribute('aria-busy');
    this.body.hidden = false;
    this.holeSign = isMaximumKind(x.kind);
    this.status.textContent = `Fitted: ${kindName(x.kind)}, band ${x.band}.`;
    this.head.replaceChildren(
      el('div', 'vs-fit-kind', kindName(x.kind)),
      el(
        'div',
        'vs-fit-where',
        `band ${x.band}${x.spin === 1 ? ' (spin ↓)' : ''} · k = ${fracK(x.k)}${x.label ? ` (${x.label})` : ''} · ${relEnergy.zero ? `E − ${relEnergy.zero}` : 'E'} = ${fixed(relEnergy.value, 3)} eV`,
      ),
    );
    this.massTable.replaceChildren(...x.masses.map((f) => this.massRow(f)));
    if (x.masses.length === 0) {
      const tr = el('tr');
      const td = el('td', 'vs-muted', 'No direction could be fitted here (see the notes below).');
      td.colSpan = 5;
      tr.append(td);
      this.massTable.append(tr);
    }
    // Tensor.
    if (x.tensor) {
      const t = x.tensor;
      const rows = t.principal.map((mm, i) => {
        const ax = t.axes[i]!;
        return el('li', undefined, `${sig(mm, 3)} mₑ along (${fixed(ax[0], 2)}, ${fixed(ax[1], 2)}, ${fixed(ax[2], 2)})${this.holeSign && mm < 0 ? ` — hole mass ${sig(-mm, 3)} mₑ` : ''}`);
      });
      const list = el('ul');
      list.append(...rows);
      this.tensor.replaceChildren(
        el('h3', undefined, 'Mass tensor (principal values, cartesian axes)'),
        list,
        el('p', 'vs-muted', `method ${t.method}${t.points ? ` · ${t.points} points` : ''}${t.residual_meV !== undefined ? ` · residual ${sig(t.residual_meV, 2)} meV` : ''}`),
      );
    } else {
      this.tensor.replaceChildren(el('p', 'vs-muted', 'Mass tensor: not available (needs k-points off the path around this extremum, e.g. a small grid).'));
    }
    // Degeneracy and averaged masses.
    const dl = this.degeneracy;
    dl.replaceChildren();
    const add = (k: string, v: string): void => {
      dl.append(el('dt', undefined, k), el('dd', undefined, v));
    };
    add('Bands degenerate here', String(x.degenerateBands));
    add('Valley degeneracy Nᵥ', x.valleyDegeneracy === null ? 'unknown — needs the crystal structure' : String(x.valleyDegeneracy));
    if (x.dosMass !== null) add('Density-of-states mass', `${sig(x.dosMass, 3)} mₑ`);
    if (x.conductivityMass !== null) add('Conductivity mass', `${sig(x.conductivityMass, 3)} mₑ`);
    // Provenance.
    const methods = [...new Set(x.masses.map((f) => f.method))];
    const windows = [...new Set(x.masses.map((f) => f.window_meV))];
    this.provenance.replaceChildren(
      el('h3', undefined, 'How these were measured'),
      el(
        'p',
        undefined,
        `method ${methods.join(', ') || method} · window ${windows.map((w) => sig(w, 3)).join(', ') || sig(window_meV, 3)} meV · ` +
          x.masses.map((f) => `${f.towards}: ${f.points} points, stderr ${sig(f.stderr, 2)} mₑ${f.residual_meV !== undefined ? `, residual ${sig(f.residual_meV, 2)} meV` : ''}`).join('; '),
      ),
    );
    const warns = [...x.warnings, ...x.masses.flatMap((f) => (f.warnings ?? []).map((w) => `${f.towards}: ${w}`))];
    this.warnings.replaceChildren(...warns.map((w) => el('li', undefined, w)));
    this.setWindow(window_meV);
    this.redrawScan(window_meV);
  }

  private massRow(f: MassFit): HTMLTableRowElement {
    const tr = el('tr');
    tr.dataset.towards = f.towards;
    if (f.determined === false) {
      // Not quotable: the word instead of the number; what the fit gave and why it is not quoted in the tooltip.
      tr.classList.add('vs-undetermined');
      tr.dataset.determined = 'false';
      tr.append(
        el('td', undefined, f.towards),
        el('td', 'vs-num', 'undetermined'),
        el('td', 'vs-num', '—'),
        el('td', 'vs-num', sig(f.stderr, 2)),
        el('td', 'vs-num', String(f.points)),
      );
      tr.title = `The fit gave ${sig(f.mass, 3)} ± ${sig(f.stderr, 2)} mₑ, not quoted: ${f.undeterminedReason ?? 'undetermined'}.`;
      return tr;
    }
    const hole = f.mass < 0 ? sig(-f.mass, 3) : '—';
    tr.append(
      el('td', undefined, f.towards),
      el('td', 'vs-num', sig(f.mass, 3)),
      el('td', 'vs-num', hole),
      el('td', 'vs-num', sig(f.stderr, 2)),
      el('td', 'vs-num', String(f.points)),
    );
    if (f.alpha_per_eV !== undefined) tr.title = `non-parabolicity α = ${sig(f.alpha_per_eV, 3)} eV⁻¹`;
    return tr;
  }

  setScan(series: WindowScanSeries[], currentWindow: number): void {
    this.scan = series;
    this.redrawScan(currentWindow);
  }

  private redrawScan(currentWindow: number): void {
    drawScanPlot(this.scanSvg, this.scan, currentWindow, this.holeSign);
    this.scanLegend.replaceChildren(
      ...this.scan.map((s, i) => {
        const span = el('span', 'vs-legend-item', s.towards);
        span.style.setProperty('--vs-swatch', SERIES_COLOURS[i % SERIES_COLOURS.length]!);
        return span;
      }),
    );
  }
}
