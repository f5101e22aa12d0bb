/**
 * The side panel: what the last fit measured at the selected extremum (directional masses, hole masses as
 * positive numbers, tensor, degeneracy, valley degeneracy, averaged masses), how it was measured (method,
 * window, points, standard error), the window control for live refits, the window-scan plot, and the
 * cautions that belong beside these numbers.
 */
import type { ExtremumReport, MassFit, WindowScanSeries } from '../../src/protocol';
import { drawScanPlot, SERIES_COLOURS } from './scanPlot';
import { fixed, fracK, sig } from '../shared/format';
import { isMaximumKind } from './markers';
import { methodDescription } from '../../src/core/analysis/methods';
import { sliderAtWindow, windowAtSlider, WINDOW_MAX_MEV, WINDOW_MIN_MEV, WINDOW_SLIDER_STEPS } from './windowSlider';

const SVG_NS = 'http://www.w3.org/2000/svg';

function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls?: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

export { WINDOW_MAX_MEV, WINDOW_MIN_MEV } from './windowSlider';

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
  private readonly massTableEl: HTMLTableElement;
  private readonly massHead: HTMLTableSectionElement;
  private readonly massTable: HTMLTableSectionElement;
  /** Whether the table shown has a branch column (a degenerate edge). */
  private withBranch = false;
  private readonly tensor: HTMLElement;
  private readonly degeneracy: HTMLElement;
  private readonly provenance: HTMLElement;
  private readonly warnings: HTMLUListElement;
  private readonly range: HTMLInputElement;
  private readonly windowField: HTMLElement & { value: string };
  private readonly methodSelect: HTMLElement & { value: string };
  private readonly methodNote: HTMLElement;
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
    this.status = el(
      'p',
      'vs-hint',
      'Click near a band minimum or maximum, or focus the plot and use the arrow keys and Enter, to measure effective masses there.',
    );
    this.status.setAttribute('role', 'status');
    this.root.append(this.status);

    this.body = el('section', 'vs-fit-body');
    this.body.hidden = true;
    this.head = el('div', 'vs-fit-head');
    this.body.append(this.head);

    this.massTableEl = el('table', 'vs-masses');
    const cap = el('caption', undefined, 'Directional masses (mₑ)');
    this.massTableEl.append(cap);
    this.massHead = el('thead');
    this.massTableEl.append(this.massHead);
    this.massTable = el('tbody');
    this.massTableEl.append(this.massTable);
    const massWrap = el('div', 'vs-masses-scroll');
    massWrap.append(this.massTableEl);
    this.body.append(massWrap);

    this.tensor = el('div', 'vs-tensor');
    this.degeneracy = el('dl', 'vs-degeneracy');
    this.provenance = el('div', 'vs-provenance');
    this.body.append(this.tensor, this.degeneracy, this.provenance);

    // Window and method controls.
    const controls = el('div', 'vs-fit-controls');
    const wl = el('label', 'vs-control-label', 'Fit window (meV, logarithmic like the scan plot)');
    wl.htmlFor = 'vs-window-range';
    this.range = el('input', 'vs-range');
    this.range.type = 'range';
    this.range.id = 'vs-window-range';
    this.range.min = '0';
    this.range.max = String(WINDOW_SLIDER_STEPS);
    this.range.step = '1';
    this.range.setAttribute('aria-label', 'Fit window in meV, logarithmic scale');
    this.range.dataset.scale = 'log';
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
    this.methodNote = el('p', 'vs-method-note vs-muted');
    controls.append(wl, this.range, this.windowField, ml, this.methodSelect, this.methodNote);
    this.body.append(controls);
    this.range.addEventListener('input', () => {
      const w = windowAtSlider(Number(this.range.value));
      this.windowField.value = String(w);
      this.range.setAttribute('aria-valuetext', `${w} meV`);
      this.queueWindow(w);
    });
    this.windowField.addEventListener('change', () => {
      const v = Number(this.windowField.value);
      if (Number.isFinite(v) && v >= WINDOW_MIN_MEV && v <= WINDOW_MAX_MEV) {
        this.range.value = String(sliderAtWindow(v));
        this.range.setAttribute('aria-valuetext', `${v} meV`);
        this.queueWindow(v);
      }
    });
    this.methodSelect.addEventListener('change', () => {
      this.describeMethod(this.methodSelect.value);
      this.cb.onMethod(this.methodSelect.value);
    });

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
        const d = methodDescription(m);
        if (d) o.setAttribute('description', d);
        if (m === current) o.setAttribute('selected', '');
        return o;
      }),
    );
    this.methodSelect.value = current;
    this.describeMethod(current);
  }

  private describeMethod(m: string): void {
    const d = methodDescription(m);
    this.methodNote.textContent = d ? `${m}: ${d}` : '';
  }

  setWindow(window_meV: number): void {
    this.range.value = String(sliderAtWindow(window_meV));
    this.range.setAttribute('aria-valuetext', `${window_meV} meV`);
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
    this.withBranch = x.masses.some((f) => f.branch !== undefined);
    const heads = ['towards', ...(this.withBranch ? ['branch'] : []), 'm* (signed)', 'hole mass', '±', 'pts'];
    const hr = el('tr');
    for (const h of heads) {
      const th = el('th', undefined, h);
      th.dataset.col = h;
      if (h === 'pts') th.title = 'Points used by the fit';
      if (h === 'branch') th.title = 'At a degenerate edge each branch is followed by smooth continuation; branch 1 lies nearest the gap.';
      if (h === '±')
        th.title =
          'One standard error of the fit; for finite differences (no residual) the spread against the parabola at the same window, marked "spread".';
      hr.append(th);
    }
    this.massHead.replaceChildren(hr);
    this.massTableEl.classList.toggle('vs-with-branch', this.withBranch);
    this.massTable.replaceChildren(...x.masses.map((f) => this.massRow(f)));
    if (x.masses.length === 0) {
      const tr = el('tr');
      const td = el('td', 'vs-muted', 'No direction could be fitted here (see the notes below).');
      td.colSpan = heads.length;
      tr.append(td);
      this.massTable.append(tr);
    }
    // Tensor.
    if (x.tensor) {
      const t = x.tensor;
      const rows = t.principal.map((mm, i) => {
        const ax = t.axes[i]!;
        return el(
          'li',
          undefined,
          `${sig(mm, 3)} mₑ along (${fixed(ax[0], 2)}, ${fixed(ax[1], 2)}, ${fixed(ax[2], 2)})${this.holeSign && mm < 0 ? ` — hole mass ${sig(-mm, 3)} mₑ` : ''}`,
        );
      });
      const list = el('ul');
      list.append(...rows);
      this.tensor.replaceChildren(
        el('h3', undefined, 'Mass tensor (principal values, cartesian axes)'),
        list,
        el(
          'p',
          'vs-muted',
          `method ${t.method}${t.points ? ` · ${t.points} points` : ''}${t.residual_meV !== undefined ? ` · residual ${sig(t.residual_meV, 2)} meV` : ''}`,
        ),
      );
    } else {
      this.tensor.replaceChildren(
        el('p', 'vs-muted', 'Mass tensor: not available (needs k-points off the path around this extremum, e.g. a small grid).'),
      );
    }
    // Degeneracy and averaged masses.
    const dl = this.degeneracy;
    dl.replaceChildren();
    const add = (k: string, v: string): void => {
      dl.append(el('dt', undefined, k), el('dd', undefined, v));
    };
    add('Bands degenerate here', String(x.degenerateBands));
    add('Valley degeneracy Nᵥ', x.valleyDegeneracy === null ? 'unknown — needs the crystal structure' : String(x.valleyDegeneracy));
    // A DOS mass from path directions only is an estimate: its error and the word "path-limited" go with it.
    if (x.dosMass !== null)
      add(
        'Density-of-states mass',
        x.dosMassPathLimited ? `${sig(x.dosMass, 3)} ± ${sig(x.dosMassPathLimited.error, 2)} mₑ (path-limited)` : `${sig(x.dosMass, 3)} mₑ`,
      );
    if (x.conductivityMass !== null) add('Conductivity mass', `${sig(x.conductivityMass, 3)} mₑ`);
    this.provenance.replaceChildren(
      el('h3', undefined, 'How these were measured'),
      ...provenanceParts(x.masses, method, window_meV, this.withBranch),
    );
    this.warnings.replaceChildren(...dedupedWarnings(x.warnings, x.masses).map((w) => el('li', undefined, w)));
    this.setWindow(window_meV);
    this.redrawScan(window_meV);
  }

  private massRow(f: MassFit): HTMLTableRowElement {
    const tr = el('tr');
    tr.dataset.towards = f.towards;
    if (f.branch !== undefined) tr.dataset.branch = String(f.branch);
    const lead = [
      el('td', undefined, f.towards),
      ...(this.withBranch ? [el('td', 'vs-num vs-branch', f.branch === undefined ? '—' : String(f.branch))] : []),
    ];
    if (f.determined === false) {
      // Not quotable: the word instead of the number; what the fit gave and why it is not quoted in the tooltip.
      tr.classList.add('vs-undetermined');
      tr.dataset.determined = 'false';
      tr.append(
        ...lead,
        el('td', 'vs-num', 'undetermined'),
        el('td', 'vs-num', '—'),
        uncertaintyCell(f),
        el('td', 'vs-num', String(f.points)),
      );
      tr.title = `The fit gave ${sig(f.mass, 3)} ± ${sig(f.stderr, 2)} mₑ, not quoted: ${f.undeterminedReason ?? 'undetermined'}.`;
      return tr;
    }
    const hole = f.mass < 0 ? sig(-f.mass, 3) : '—';
    tr.append(
      ...lead,
      el('td', 'vs-num', sig(f.mass, 3)),
      el('td', 'vs-num', hole),
      uncertaintyCell(f),
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

/** Direction with its branch, as provenance rows and warnings name it. */
function directionName(f: MassFit): string {
  return f.branch === undefined ? f.towards : `${f.towards} (branch ${f.branch})`;
}

/**
 * The uncertainty cell: the fit's standard error; for a finite difference (no residual, stderr from rounding
 * only) the spread against the parabola at the same window, marked "spread" so it is not read as a stderr.
 */
function uncertaintyCell(f: MassFit): HTMLTableCellElement {
  const td = el('td', 'vs-num');
  const sp = f.methodSpread;
  if (!sp) {
    td.textContent = sig(f.stderr, 2);
    return td;
  }
  td.classList.add('vs-spread');
  td.append(el('span', 'vs-spread-value', sig(sp.spread, 2)), ' ', el('span', 'vs-spread-tag', 'spread'));
  td.title =
    `Method spread: the ${sp.against} fit at the same window setting (${sig(sp.window_meV, 3)} meV) gives ${sig(sp.mass, 3)} mₑ; ` +
    `this is how far the two disagree. The ${f.method} stencil's own standard error (rounding of the energies only) is ${sig(f.stderr, 2)} mₑ.`;
  return td;
}

/** Provenance as a small table: one row per fitted direction (and branch); the Kane α column only for Kane fits. */
function provenanceParts(masses: MassFit[], method: string, window_meV: number, withBranch: boolean): HTMLElement[] {
  const usedMethods = [...new Set(masses.map((f) => f.method))];
  const list = usedMethods.length ? usedMethods : [method];
  const methodLines = list.map((m) => {
    const p = el('p', 'vs-method-line');
    p.append(el('strong', undefined, m), `: ${methodDescription(m) ?? 'no description'}`);
    return p;
  });
  if (masses.length === 0) return [...methodLines, el('p', 'vs-muted', `window ${sig(window_meV, 3)} meV asked; nothing fitted.`)];
  const withAlpha = masses.some((f) => f.alpha_per_eV !== undefined);
  const withSpread = masses.some((f) => f.methodSpread !== undefined);
  const heads = [
    withBranch ? 'direction (branch)' : 'direction',
    'method',
    'window (meV)',
    'points',
    'stderr (mₑ)',
    'residual (meV)',
    ...(withSpread ? ['spread vs parabola (mₑ)'] : []),
    ...(withAlpha ? ['Kane α (eV⁻¹)'] : []),
  ];
  const table = el('table', 'vs-provenance-table');
  const thead = el('thead');
  const hr = el('tr');
  for (const h of heads) hr.append(el('th', undefined, h));
  thead.append(hr);
  const tbody = el('tbody');
  for (const f of masses) {
    const tr = el('tr');
    tr.dataset.towards = f.towards;
    const cells = [
      el('td', undefined, directionName(f)),
      el('td', undefined, f.method),
      el('td', 'vs-num', sig(f.window_meV, 3)),
      el('td', 'vs-num', String(f.points)),
      el('td', 'vs-num', sig(f.stderr, 2)),
      el('td', 'vs-num', f.residual_meV === undefined ? '—' : sig(f.residual_meV, 2)),
    ];
    if (withSpread) cells.push(el('td', 'vs-num', f.methodSpread ? sig(f.methodSpread.spread, 2) : '—'));
    if (withAlpha) {
      const td = el('td', 'vs-num vs-alpha', f.alpha_per_eV === undefined ? '—' : sig(f.alpha_per_eV, 3));
      cells.push(td);
    }
    tr.append(...cells);
    tbody.append(tr);
  }
  table.append(thead, tbody);
  const wrap = el('div', 'vs-provenance-scroll');
  wrap.append(table);
  const asked = el(
    'p',
    'vs-muted',
    `Window asked: ${String(window_meV)} meV; the window column gives what each fit used (it grows where too few points lie inside).`,
  );
  const parts: HTMLElement[] = [...methodLines, wrap, asked];
  if (withSpread)
    parts.push(
      el(
        'p',
        'vs-muted',
        'A finite difference passes through its points: it has no residual, and its stderr is the rounding of the energies only. The spread against the parabola fit at the same window is the uncertainty to quote.',
      ),
    );
  return parts;
}

/** Numbers inside a warning sentence (window sizes, point counts). */
const NUMBER = /\d+(?:\.\d+)?/g;

/** Sentences with the numbers taken out: warnings that differ only in their numbers share this. */
function skeleton(text: string): string {
  return text.replace(NUMBER, '#').replace(/\bpoints\b/g, 'point');
}

/** One sentence for a group of the same skeleton: a number that differs is shown as its range (47–83). */
function mergeNumbers(texts: readonly string[]): string {
  const first = texts[0]!;
  if (texts.length === 1) return first;
  const numbers = texts.map((t) => t.match(NUMBER) ?? []);
  let i = 0;
  return first
    .replace(NUMBER, (m) => {
      const at = i++;
      const vals = numbers.map((n) => n[at] ?? m);
      const nums = vals.map(Number);
      const lo = Math.min(...nums);
      const hi = Math.max(...nums);
      if (lo === hi) return m;
      return `${vals[nums.indexOf(lo)]}–${vals[nums.indexOf(hi)]}`;
    })
    .replace(/(\d–[\d.]+) point\b/g, '$1 points');
}

/** "X (branches 1, 2), K (branch 2)": the directions, each with its branches. */
function whereText(who: readonly MassFit[]): string {
  const byDir = new Map<string, number[]>();
  for (const f of who) {
    const list = byDir.get(f.towards) ?? [];
    if (!byDir.has(f.towards)) byDir.set(f.towards, list);
    if (f.branch !== undefined && !list.includes(f.branch)) list.push(f.branch);
  }
  return [...byDir].map(([dir, br]) => (br.length === 0 ? dir : `${dir} (branch${br.length > 1 ? 'es' : ''} ${br.join(', ')})`)).join(', ');
}

/**
 * Each warning once: sentences that differ only in their numbers (the window each direction grew to) are
 * listed once, with the range of those numbers and the directions (and branches) they apply to.
 */
export function dedupedWarnings(general: readonly string[], masses: readonly MassFit[]): string[] {
  const order: string[] = [];
  const groups = new Map<string, { texts: string[]; who: MassFit[] }>();
  const add = (text: string, who: MassFit | null): void => {
    const key = skeleton(text);
    let g = groups.get(key);
    if (!g) {
      g = { texts: [], who: [] };
      groups.set(key, g);
      order.push(key);
    }
    if (!g.texts.includes(text)) g.texts.push(text);
    if (who && !g.who.includes(who)) g.who.push(who);
  };
  for (const w of general) add(w, null);
  for (const f of masses) for (const w of f.warnings ?? []) add(w, f);
  return order.map((key) => {
    const g = groups.get(key)!;
    const text = mergeNumbers(g.texts);
    return g.who.length === 0 ? text : `${text} [towards ${whereText(g.who)}]`;
  });
}
