/**
 * The compare view (webview entry): a sortable table of every run in the workspace, band structures of the
 * ticked runs overlaid on one plot (aligned at each run's VBM; one shared path when the paths match,
 * otherwise side by side), and a trend plot of any numeric column against a structural descriptor or a value
 * the user types per run. Talks to the host only through the compare messages of src/protocol.ts; computes
 * no physics (every number comes from the core, in the host). Strict-CSP friendly: no eval, no inline
 * handlers or styles.
 */
import '@vscode-elements/elements/dist/vscode-button/index.js';
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-checkbox/index.js';
import { select } from 'd3-selection';
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { axisBottom, axisLeft } from 'd3-axis';
import { line } from 'd3-shape';
import {
  COMPARE_MAX_OVERLAY,
  CompareHostToViewType,
  CompareViewToHostType,
  decodeArray,
  isCompareHostToViewMessage,
  type CompareBandRun,
  type CompareColumn,
  type CompareHostToViewMessage,
  type CompareRow,
  type CompareTable,
  type CompareViewToHostMessage,
} from '../../src/protocol';
import { piecesFromSegments, type Piece } from '../bandView/localExtrema';
import { readPalette, type Palette } from '../shared/theme';
import { fixed, minus } from '../shared/format';
import { layoutOverlay, type OverlayLayout } from './overlayLayout';
import { nextSort, sortRows, type SortState } from './tableSort';
import { COMPARE_VIEW_CSS } from './styles';
import { vscodeApi, type VsCodeApi } from '../shared/vscodeApi';
import { watchTheme } from '../shared/themeWatch';
import { el, setOptions, vsButton, vsSelect, type VsButton, type VsSelect } from '../shared/controls';

type VsCheckbox = HTMLElement & { checked: boolean };

const SVG_NS = 'http://www.w3.org/2000/svg';
const MARGIN = { top: 22, right: 12, bottom: 40, left: 54 };
const TREND_MARGIN = { top: 14, right: 16, bottom: 44, left: 62 };
/** Energy window of the overlay, eV relative to each run's VBM. */
const E_LOW = -6;
const E_HIGH = 5;
/** Line patterns per run (so runs differ by more than colour). */
const DASHES: number[][] = [[], [7, 4], [2, 3], [10, 3, 2, 3], [4, 4], [1, 2]];
const USER_KEY = 'user';

function formatValue(v: number | null | undefined, decimals: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return fixed(v, decimals);
}

/** A decoded band run ready to draw. */
interface BandsOf {
  meta: CompareBandRun;
  distance: Float64Array;
  energies: Float64Array[];
  pieces: Piece[];
}

/** What the last overlay drew (tests read it). */
export interface OverlayStats {
  runs: string[];
  shared: boolean;
  /** Line segments stroked per run. */
  strokes: number[];
  colours: string[];
}

export class CompareViewApp {
  private table: CompareTable | null = null;
  private sort: SortState | null = null;
  private selected: string[] = [];
  private userValues = new Map<string, number>();
  /** Whether the columns outside the compact default set are shown ("More columns"). */
  private showMore = false;
  private readonly moreBox: VsCheckbox;
  private readonly trendLegend: HTMLElement;
  private bands = new Map<string, BandsOf>();
  private pendingRequest = 0;
  private nextRequestId = 1;
  private palette: Palette;
  private trendX = 'volumeStrain';
  private trendY = 'gap';
  private frame = 0;
  lastOverlay: OverlayStats | null = null;
  lastTrendPoints: { rowId: string; x: number; y: number }[] = [];
  /** The trend plot's series (one line each), for tests. */
  lastTrendSeries: { name: string; rowIds: string[] }[] = [];

  readonly root: HTMLElement;
  private readonly summary: HTMLElement;
  private readonly refSelect: VsSelect;
  private readonly annotationsBox: VsCheckbox;
  private readonly rescanBtn: VsButton;
  private readonly cautions: HTMLUListElement;
  private readonly events: HTMLElement;
  private readonly tableWrap: HTMLElement;
  private readonly tableEl: HTMLTableElement;
  private readonly overlayNote: HTMLElement;
  private readonly overlayPlot: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly overlaySvg: SVGSVGElement;
  private readonly overlayMessage: HTMLElement;
  private readonly legend: HTMLElement;
  private readonly trendY_: VsSelect;
  private readonly trendX_: VsSelect;
  private readonly trendPlot: HTMLElement;
  private readonly trendSvg: SVGSVGElement;
  private readonly trendMessage: HTMLElement;
  private readonly trendNote: HTMLElement;
  private readonly status: HTMLElement;

  constructor(private readonly api: VsCodeApi) {
    const sheet = new CSSStyleSheet();
    sheet.replaceSync(COMPARE_VIEW_CSS);
    document.adoptedStyleSheets = [...document.adoptedStyleSheets, sheet];
    this.palette = readPalette(document);
    this.restoreState();

    this.root = el('div', 'cv-root');
    const bar = el('header', 'cv-bar');
    const title = el('h1', 'cv-title', 'Run comparison');
    this.summary = el('span', 'cv-summary', 'Looking for runs …');
    const refLabel = el('label', undefined, 'Differences against');
    this.refSelect = vsSelect('Reference run: differences are taken against it');
    this.refSelect.classList.add('cv-reference');
    refLabel.append(this.refSelect);
    this.annotationsBox = document.createElement('vscode-checkbox') as unknown as VsCheckbox;
    this.annotationsBox.classList.add('cv-annotations-rows');
    this.annotationsBox.setAttribute('label', 'Annotations files as rows of their own');
    this.annotationsBox.title =
      'Off: an annotations file is a flag on its data run (saved / stale). On: it is also a row, with the numbers as saved.';
    this.rescanBtn = vsButton('Look for runs again', true);
    this.rescanBtn.classList.add('cv-rescan');
    bar.append(title, this.summary, refLabel, this.annotationsBox, this.rescanBtn);

    this.cautions = el('ul', 'cv-cautions');
    this.cautions.setAttribute('aria-label', 'Cautions');
    this.events = el('section', 'cv-events');
    this.events.setAttribute('aria-label', 'What changed against the reference');
    this.events.hidden = true;

    this.tableWrap = el('div', 'cv-table-wrap');
    this.tableEl = el('table', 'cv-table');
    this.tableEl.setAttribute('aria-label', 'Runs in the workspace');
    this.tableWrap.append(this.tableEl);
    this.moreBox = document.createElement('vscode-checkbox') as unknown as VsCheckbox;
    this.moreBox.classList.add('cv-more-columns');
    this.moreBox.setAttribute('label', 'More columns');
    this.moreBox.title =
      'Off: gap, edges, valley degeneracy, density-of-states and conductivity masses, conventional a. On: also every directional mass, every matched valley, strains and cell vectors.';
    this.moreBox.checked = this.showMore;
    this.moreBox.addEventListener('change', () => {
      this.showMore = this.moreBox.checked;
      this.saveState();
      this.renderTable();
      this.setStatus(this.showMore ? 'All columns shown.' : 'Compact columns shown.');
    });

    const plots = el('div', 'cv-plots');
    const ov = el('section', 'cv-section cv-overlay');
    ov.append(el('h2', undefined, 'Band structures, aligned at each run’s VBM'));
    this.overlayNote = el('p', 'cv-note', 'Tick runs in the table (up to 8) to draw their bands here.');
    this.overlayPlot = el('div', 'cv-overlay-plot');
    this.overlayPlot.setAttribute('role', 'img');
    this.overlayPlot.setAttribute('aria-label', 'Overlaid band structures (none ticked yet)');
    this.canvas = el('canvas', 'cv-overlay-canvas');
    this.canvas.setAttribute('aria-hidden', 'true');
    this.overlaySvg = document.createElementNS(SVG_NS, 'svg');
    this.overlaySvg.setAttribute('aria-hidden', 'true');
    this.overlayMessage = el('div', 'cv-message', 'No runs ticked.');
    this.overlayPlot.append(this.canvas, this.overlaySvg, this.overlayMessage);
    this.legend = el('div', 'cv-legend');
    this.legend.setAttribute('aria-label', 'Legend of the overlaid runs');
    ov.append(this.overlayNote, this.overlayPlot, this.legend);

    const tr = el('section', 'cv-section cv-trend');
    tr.append(el('h2', undefined, 'Trend across runs'));
    const controls = el('div', 'cv-controls');
    const yl = el('label', undefined, 'Quantity');
    this.trendY_ = vsSelect('Quantity on the vertical axis');
    this.trendY_.classList.add('cv-trend-y');
    yl.append(this.trendY_);
    const xl = el('label', undefined, 'against');
    this.trendX_ = vsSelect('Quantity on the horizontal axis');
    this.trendX_.classList.add('cv-trend-x');
    xl.append(this.trendX_);
    controls.append(yl, xl);
    this.trendNote = el('p', 'cv-note');
    this.trendPlot = el('div', 'cv-trend-plot');
    this.trendSvg = document.createElementNS(SVG_NS, 'svg');
    this.trendSvg.classList.add('cv-trend-svg');
    this.trendSvg.setAttribute('role', 'group');
    this.trendSvg.setAttribute('aria-label', 'Trend plot: one point per run; Tab moves between points, Enter opens the run');
    this.trendMessage = el('div', 'cv-message');
    this.trendMessage.hidden = true;
    this.trendPlot.append(this.trendSvg, this.trendMessage);
    this.trendLegend = el('div', 'cv-trend-legend');
    this.trendLegend.setAttribute('aria-label', 'Series of the trend plot: one line per material');
    tr.append(controls, this.trendNote, this.trendPlot, this.trendLegend);
    plots.append(ov, tr);

    this.status = el('div', 'cv-status');
    this.status.setAttribute('role', 'status');
    this.root.append(bar, this.cautions, this.events, this.moreBox, this.tableWrap, plots, this.status);
    (document.getElementById('app') ?? document.body).append(this.root);

    this.refSelect.addEventListener('change', () => {
      if (this.refSelect.value && this.table && this.refSelect.value !== this.table.reference)
        this.post({ type: CompareViewToHostType.SetReference, rowId: this.refSelect.value });
    });
    this.annotationsBox.addEventListener('change', () =>
      this.post({ type: CompareViewToHostType.SetAnnotationsAsRuns, value: this.annotationsBox.checked }),
    );
    this.rescanBtn.addEventListener('click', () => this.post({ type: CompareViewToHostType.Rescan }));
    this.trendY_.addEventListener('change', () => {
      this.trendY = this.trendY_.value;
      this.saveState();
      this.drawTrend();
    });
    this.trendX_.addEventListener('change', () => {
      this.trendX = this.trendX_.value;
      this.saveState();
      this.drawTrend();
    });
    window.addEventListener('message', (ev: MessageEvent) => this.onMessage(ev.data));
    new ResizeObserver(() => this.schedule()).observe(this.overlayPlot);
    new ResizeObserver(() => this.schedule()).observe(this.trendPlot);
    watchTheme(document, () => {
      this.palette = readPalette(document);
      this.schedule();
    });
    this.post({ type: CompareViewToHostType.Ready });
  }

  private post(m: CompareViewToHostMessage): void {
    this.api.postMessage(m);
  }

  // -------------------------------------------------------------------------------------------------
  // State kept across reloads of the view: typed values by run name, trend axes, sort.

  private restoreState(): void {
    const s = this.api.getState() as
      { user?: Record<string, number>; trendX?: string; trendY?: string; sort?: SortState | null; more?: boolean } | undefined;
    if (!s || typeof s !== 'object') return;
    this.pendingUserByName = s.user && typeof s.user === 'object' ? s.user : {};
    if (typeof s.trendX === 'string') this.trendX = s.trendX;
    if (typeof s.trendY === 'string') this.trendY = s.trendY;
    if (s.sort && typeof s.sort.key === 'string') this.sort = s.sort;
    if (s.more === true) this.showMore = true;
  }
  private pendingUserByName: Record<string, number> = {};

  private saveState(): void {
    const user: Record<string, number> = { ...this.pendingUserByName };
    for (const r of this.table?.rows ?? []) {
      const v = this.userValues.get(r.id);
      if (v !== undefined) user[r.name] = v;
      else delete user[r.name];
    }
    this.pendingUserByName = user;
    this.api.setState({ user, trendX: this.trendX, trendY: this.trendY, sort: this.sort, more: this.showMore });
  }

  // -------------------------------------------------------------------------------------------------
  // Messages

  private onMessage(raw: unknown): void {
    if (!isCompareHostToViewMessage(raw)) return;
    try {
      this.handle(raw);
    } catch (e) {
      const msg = e instanceof Error ? e.message : String(e);
      this.setStatus(`The compare view could not show this: ${msg}`);
      this.post({ type: CompareViewToHostType.ViewError, message: msg.slice(0, 3000) });
    }
  }

  private handle(m: CompareHostToViewMessage): void {
    switch (m.type) {
      case CompareHostToViewType.Progress:
        this.summary.textContent = m.message;
        this.setStatus(m.found ? `${m.done} of ${m.found} runs read` : m.message);
        break;
      case CompareHostToViewType.Table:
        this.setTable(m.table);
        break;
      case CompareHostToViewType.Bands:
        this.onBands(m.requestId, m.runs, m.missing);
        break;
      case CompareHostToViewType.Notice:
        this.setStatus(m.message);
        break;
    }
  }

  private setTable(t: CompareTable): void {
    const previousNames = new Map((this.table?.rows ?? []).map((r) => [r.id, r.name]));
    const selectedNames = new Set(this.selected.map((id) => previousNames.get(id)).filter((n): n is string => n !== undefined));
    const userByName = new Map<string, number>(Object.entries(this.pendingUserByName));
    for (const [id, v] of this.userValues) {
      const n = previousNames.get(id);
      if (n !== undefined) userByName.set(n, v);
    }
    this.table = t;
    this.bands.clear();
    this.userValues = new Map();
    for (const r of t.rows) {
      const v = userByName.get(r.name);
      if (v !== undefined) this.userValues.set(r.id, v);
    }
    this.selected = t.rows.filter((r) => selectedNames.has(r.name) && r.canOverlay).map((r) => r.id);
    const n = t.rows.length;
    const failed = t.rows.filter((r) => r.error !== null).length;
    const stale = t.rows.filter((r) => r.annotations === 'stale').length;
    this.summary.textContent =
      n === 0
        ? 'No runs found in the workspace.'
        : `${n} run${n === 1 ? '' : 's'}${failed ? `, ${failed} unreadable` : ''}${stale ? `, ${stale} with stale annotations` : ''}`;
    setOptions(
      this.refSelect,
      t.rows.filter((r) => r.error === null).map((r) => ({ value: r.id, label: r.name })),
      t.reference ?? '',
    );
    this.annotationsBox.checked = t.annotationsAsRuns;
    this.cautions.replaceChildren(...t.cautions.map((c) => el('li', undefined, c)));
    this.renderEvents();
    if (
      this.sort &&
      this.sort.key !== USER_KEY &&
      !['name', 'type', 'vbm', 'cbm', 'annotations'].includes(this.sort.key) &&
      !t.columns.some((c) => c.key === this.sort!.key)
    )
      this.sort = null;
    this.renderTable();
    this.setTrendOptions();
    this.requestBands();
    this.schedule();
    this.setStatus(
      n
        ? 'Tick runs to overlay their bands; click a column header to sort; click a run’s name to open its band view.'
        : 'No eigenvalue or annotations files were found in this workspace.',
    );
  }

  private renderEvents(): void {
    const t = this.table!;
    if (t.events.length === 0) {
      this.events.hidden = true;
      this.events.replaceChildren();
      return;
    }
    const names = new Map(t.rows.map((r) => [r.id, r.name]));
    const ul = el('ul');
    for (const e of t.events) {
      const li = el('li', `cv-event cv-event-${e.kind}`, `${names.get(e.rowId) ?? e.rowId}: ${e.message}`);
      ul.append(li);
    }
    this.events.replaceChildren(el('h2', undefined, `What changed against ${names.get(t.reference ?? '') ?? 'the reference'}`), ul);
    this.events.hidden = false;
  }

  // -------------------------------------------------------------------------------------------------
  // Table

  /** Row names in the order shown (tests read it). */
  visibleRowNames(): string[] {
    return Array.from(this.tableEl.querySelectorAll('tbody tr'), (tr) => (tr as HTMLElement).dataset.name ?? '');
  }

  private columnTitle(key: string): string {
    const c = this.table?.columns.find((x) => x.key === key);
    return c ? `${c.label}${c.unit ? ` (${c.unit})` : ''}` : key === USER_KEY ? 'Your value' : key;
  }

  private headerCell(key: string, label: string, unit: string, title: string): HTMLTableCellElement {
    const th = el('th');
    th.scope = 'col';
    th.dataset.key = key;
    const b = el('button', 'cv-sort');
    b.type = 'button';
    b.title = `${title} Click to sort.`;
    const top = el('span', 'cv-sort-mark', label);
    b.append(top);
    if (unit) b.append(el('span', 'cv-unit', unit));
    b.addEventListener('click', () => {
      this.sort = nextSort(this.sort, key);
      this.saveState();
      this.renderTable();
      this.setStatus(`Sorted by ${this.columnTitle(key)}, ${this.sort.direction}.`);
      (this.tableEl.querySelector(`th[data-key="${CSS.escape(key)}"] button`) as HTMLElement | null)?.focus();
    });
    if (this.sort?.key === key) th.setAttribute('aria-sort', this.sort.direction);
    th.append(b);
    return th;
  }

  private renderTable(): void {
    const t = this.table;
    if (!t) return;
    const thead = el('thead');
    const hr = el('tr');
    const sel = el('th', undefined, 'Overlay');
    sel.scope = 'col';
    hr.append(
      sel,
      this.headerCell('name', 'Run', '', 'Path of the run’s file in the workspace.'),
      this.headerCell(
        'annotations',
        'Annotations',
        '',
        'Saved annotations beside the run: current, stale (its data changed since), or none.',
      ),
      this.headerCell('type', 'Gap type', '', 'Direct or indirect gap, or metal.'),
      this.headerCell('vbm', 'VBM at', '', 'Where the valence band maximum is (label or fractional k).'),
      this.headerCell('cbm', 'CBM at', '', 'Where the conduction band minimum is, and in which matched valley.'),
    );
    const shown = t.columns.filter((c) => this.showMore || !c.more);
    const hidden = t.columns.length - shown.length;
    this.moreBox.setAttribute('label', this.showMore ? 'More columns' : `More columns (${hidden} more)`);
    this.moreBox.hidden = t.columns.every((c) => !c.more);
    for (const c of shown) hr.append(this.headerCell(c.key, c.label, c.unit, c.title));
    hr.append(
      this.headerCell(
        USER_KEY,
        'Your value',
        'typed',
        'A number you type per run (e.g. a setting of the calculation), usable as the trend plot’s horizontal axis.',
      ),
    );
    thead.append(hr);
    const tbody = el('tbody');
    for (const r of sortRows(t.rows, this.sort, this.userValues)) tbody.append(this.rowElement(r, shown));
    this.tableEl.replaceChildren(thead, tbody);
  }

  private rowElement(r: CompareRow, columns: CompareColumn[]): HTMLTableRowElement {
    const tr = el('tr');
    tr.dataset.id = r.id;
    tr.dataset.name = r.name;
    if (r.isReference) tr.classList.add('cv-reference');
    if (r.error) tr.classList.add('cv-failed');
    if (this.selected.includes(r.id)) tr.classList.add('cv-selected');
    // Overlay tick.
    const tdSel = el('td');
    const box = el('input', 'cv-select');
    box.type = 'checkbox';
    box.checked = this.selected.includes(r.id);
    box.disabled = !r.canOverlay;
    box.setAttribute('aria-label', r.canOverlay ? `Overlay the bands of ${r.name}` : `${r.name} has no data file to draw`);
    box.addEventListener('change', () => this.toggleSelected(r.id, box.checked));
    tdSel.append(box);
    // Name: opens the band view (or the file when there is no data file).
    const tdName = el('td', 'cv-run');
    const open = el('button', 'cv-open', r.name);
    open.type = 'button';
    open.title = r.canOverlay ? 'Open the band view of this run' : 'Open this file';
    open.addEventListener('click', () => this.openRun(r, r.canOverlay ? 'bandView' : 'file'));
    const file = el('button', 'cv-file', 'file');
    file.type = 'button';
    file.title = `Open ${r.name} in an editor`;
    file.setAttribute('aria-label', `Open the file ${r.name}`);
    file.addEventListener('click', () => this.openRun(r, 'file'));
    tdName.append(open, file);
    if (r.isReference) tdName.append(el('span', 'cv-tag', 'reference'));
    if (r.origin === 'annotations') tdName.append(el('span', 'cv-tag', 'saved numbers'));
    if (r.error) tdName.title = r.error;
    // Annotations state.
    const tdAnn = el('td');
    if (r.annotations === 'stale') {
      const s = el('span', 'cv-stale', 'stale');
      s.title = r.staleReasons.join('\n') || 'The annotations no longer match their data files.';
      tdAnn.append(s);
    } else if (r.annotations === 'current') tdAnn.append(el('span', 'cv-current', 'saved'));
    else tdAnn.append(el('span', 'cv-current', '—'));
    const kind = r.error
      ? 'unreadable'
      : r.metal
        ? r.semimetal
          ? 'semimetal'
          : 'metal'
        : r.direct === null
          ? '—'
          : r.direct
            ? 'direct'
            : 'indirect';
    const tdType = el('td', undefined, `${kind}${!r.error && r.spinors ? ' · spinors' : ''}`);
    if (r.error) tdType.title = r.error;
    else if (r.spinors) tdType.title = 'Noncollinear (spin-orbit) run: one electron per band.';
    const tdVbm = el('td', undefined, r.vbm ?? '—');
    const tdCbm = el('td', undefined, r.cbm ? `${r.cbm}${r.cbmValley ? ` [${r.cbmValley}]` : ''}` : '—');
    const ref = this.table?.rows.find((x) => x.isReference);
    const sameMaterial = !ref || !ref.series || !r.series || ref.series === r.series;
    if (!sameMaterial)
      tdCbm.title = `Another material (${r.series}) than the reference (${ref!.series}): its valleys are not matched with the reference's.`;
    if (ref && sameMaterial && !r.isReference && ref.cbmValley && r.cbmValley && ref.cbmValley !== r.cbmValley) {
      tdCbm.classList.add('cv-moved');
      tdCbm.title = `The CBM is in valley ${r.cbmValley} here, in valley ${ref.cbmValley} in the reference: compare masses valley by valley.`;
    }
    tr.append(tdSel, tdName, tdAnn, tdType, tdVbm, tdCbm);
    for (const c of columns) {
      const td = el('td', 'cv-num', formatValue(r.values[c.key], c.decimals));
      td.dataset.key = c.key;
      tr.append(td);
    }
    // Typed value.
    const tdUser = el('td');
    const input = el('input', 'cv-user');
    input.type = 'text';
    input.inputMode = 'decimal';
    input.setAttribute('aria-label', `Your value for ${r.name}`);
    const v = this.userValues.get(r.id);
    input.value = v === undefined ? '' : String(v);
    input.addEventListener('change', () => {
      const text = input.value.trim().replace('−', '-').replace(',', '.');
      const x = Number(text);
      if (text === '') this.userValues.delete(r.id);
      else if (Number.isFinite(x)) this.userValues.set(r.id, x);
      else {
        this.setStatus(`"${input.value}" is not a number: type a value such as 0.5 or -1e-2.`);
        return;
      }
      this.saveState();
      this.drawTrend();
    });
    tdUser.append(input);
    tr.append(tdUser);
    tr.addEventListener('dblclick', (ev) => {
      if ((ev.target as HTMLElement).closest('input,button')) return;
      this.openRun(r, r.canOverlay ? 'bandView' : 'file');
    });
    return tr;
  }

  private openRun(r: CompareRow, target: 'bandView' | 'file'): void {
    this.post({ type: CompareViewToHostType.OpenRun, rowId: r.id, target });
    this.setStatus(`Opening ${r.name} ${target === 'bandView' ? 'in a band view' : 'in an editor'} …`);
  }

  /** Tick or untick a run for the overlay (tests call it through the checkboxes). */
  toggleSelected(id: string, on: boolean): void {
    const row = this.table?.rows.find((r) => r.id === id);
    if (!row || !row.canOverlay) return;
    if (on && !this.selected.includes(id)) {
      if (this.selected.length >= COMPARE_MAX_OVERLAY) {
        this.setStatus(`At most ${COMPARE_MAX_OVERLAY} runs can be overlaid: untick one first.`);
        this.renderTable();
        return;
      }
      this.selected.push(id);
    } else if (!on) this.selected = this.selected.filter((x) => x !== id);
    for (const tr of Array.from(this.tableEl.querySelectorAll('tbody tr'))) {
      const e = tr as HTMLElement;
      e.classList.toggle('cv-selected', this.selected.includes(e.dataset.id ?? ''));
    }
    this.requestBands();
    this.schedule();
  }

  // -------------------------------------------------------------------------------------------------
  // Overlay

  private requestBands(): void {
    const need = this.selected.filter((id) => !this.bands.has(id));
    if (need.length === 0) return;
    const requestId = this.nextRequestId++;
    this.pendingRequest = requestId;
    this.overlayNote.textContent = `Reading the bands of ${need.length} run${need.length === 1 ? '' : 's'} …`;
    this.post({ type: CompareViewToHostType.RequestBands, requestId, rowIds: need });
  }

  private onBands(requestId: number, runs: CompareBandRun[], missing: { rowId: string; reason: string }[]): void {
    for (const r of runs) {
      const distance = Float64Array.from(decodeArray(r.distance));
      const energies = r.energies.map((e) => Float64Array.from(decodeArray(e)));
      if (distance.length !== r.nk) throw new Error(`band data of ${r.title}: ${distance.length} distances for ${r.nk} k-points`);
      for (const e of energies)
        if (e.length !== r.nk * r.nBands) throw new Error(`band data of ${r.title}: ${e.length} energies for ${r.nk} × ${r.nBands}`);
      this.bands.set(r.rowId, { meta: r, distance, energies, pieces: piecesFromSegments(r.segments, r.nk) });
    }
    if (missing.length) {
      const names = new Map((this.table?.rows ?? []).map((x) => [x.id, x.name]));
      this.setStatus(missing.map((m) => `${names.get(m.rowId) ?? m.rowId}: not drawn (${m.reason})`).join('; '));
      this.selected = this.selected.filter((id) => !missing.some((m) => m.rowId === id));
    }
    if (requestId === this.pendingRequest) this.pendingRequest = 0;
    this.schedule();
  }

  private colourOf(i: number): string {
    const p = this.palette;
    const list = [p.filled, p.empty, p.fit, p.filled2, p.empty2, cssVar('--vscode-charts-red', '#f14c4c')];
    return list[i % list.length]!;
  }

  private schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.drawOverlay();
      this.drawTrend();
    });
  }

  /** Redraws the overlay now. */
  drawOverlay(): void {
    const runs = this.selected.map((id) => this.bands.get(id)).filter((b): b is BandsOf => b !== undefined);
    const rect = this.overlayPlot.getBoundingClientRect();
    const width = Math.max(100, Math.floor(rect.width));
    const height = Math.max(100, Math.floor(rect.height));
    const pw = width - MARGIN.left - MARGIN.right;
    const ph = height - MARGIN.top - MARGIN.bottom;
    const dpr = window.devicePixelRatio || 1;
    this.canvas.width = Math.max(1, Math.round(pw * dpr));
    this.canvas.height = Math.max(1, Math.round(ph * dpr));
    this.canvas.style.width = `${pw}px`;
    this.canvas.style.height = `${ph}px`;
    this.canvas.style.left = `${MARGIN.left}px`;
    this.canvas.style.top = `${MARGIN.top}px`;
    const ctx = this.canvas.getContext('2d');
    const svg = select(this.overlaySvg);
    svg.selectAll('*').remove();
    this.legend.replaceChildren();
    if (!ctx) return;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, this.canvas.width, this.canvas.height);
    if (runs.length === 0) {
      this.lastOverlay = { runs: [], shared: true, strokes: [], colours: [] };
      this.overlayMessage.hidden = false;
      this.overlayMessage.textContent = this.selected.length
        ? 'Reading the bands …'
        : 'No runs ticked: tick runs in the table to overlay their bands.';
      this.overlayPlot.setAttribute('aria-label', 'Overlaid band structures (none ticked yet)');
      if (!this.selected.length)
        this.overlayNote.textContent = `Tick runs in the table (up to ${COMPARE_MAX_OVERLAY}) to draw their bands here.`;
      return;
    }
    this.overlayMessage.hidden = true;
    const layout: OverlayLayout = layoutOverlay(
      runs.map((r) => ({ nk: r.meta.nk, distance: r.distance, segments: r.meta.segments, ticks: r.meta.ticks })),
    );
    const x = scaleLinear().domain([0, layout.total]).range([0, pw]);
    const y = scaleLinear().domain([E_LOW, E_HIGH]).range([ph, 0]);
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.lineJoin = 'round';
    const strokes: number[] = [];
    const colours: string[] = [];
    runs.forEach((r, i) => {
      const colour = this.colourOf(i);
      colours.push(colour);
      ctx.strokeStyle = colour;
      ctx.lineWidth = this.palette.highContrast ? 2 : 1.4;
      ctx.setLineDash(DASHES[i % DASHES.length]!);
      const ax = layout.x[i]!;
      const align = r.meta.align_eV ?? 0;
      const nb = r.meta.nBands;
      // At most ~2 points per CSS pixel of the run's stretch (large runs; the overlay is for the eye).
      const spanPx = Math.max(1, x(layout.spans[i]![1]) - x(layout.spans[i]![0]));
      const stride = Math.max(1, Math.floor(r.meta.nk / (2 * spanPx)));
      let n = 0;
      for (const e of r.energies) {
        for (let b = 0; b < nb; b++) {
          // Skip bands entirely outside the window.
          let lo = Infinity;
          let hi = -Infinity;
          for (let k = 0; k < r.meta.nk; k += stride) {
            const v = e[k * nb + b]! - align;
            if (v < lo) lo = v;
            if (v > hi) hi = v;
          }
          if (hi < E_LOW - 0.5 || lo > E_HIGH + 0.5) continue;
          for (const p of r.pieces) {
            ctx.beginPath();
            let first = true;
            for (let k = p.i0; k < p.i1; k += stride) {
              const px = x(ax[k]!);
              const py = y(e[k * nb + b]! - align);
              if (first) ctx.moveTo(px, py);
              else ctx.lineTo(px, py);
              first = false;
            }
            const last = p.i1 - 1;
            if ((last - p.i0) % stride !== 0) ctx.lineTo(x(ax[last]!), y(e[last * nb + b]! - align));
            ctx.stroke();
            n++;
          }
        }
      }
      strokes.push(n);
    });
    ctx.setLineDash([]);
    this.lastOverlay = { runs: runs.map((r) => r.meta.rowId), shared: layout.shared, strokes, colours };
    // Axes, ticks, separators.
    const X = (v: number): number => MARGIN.left + x(v);
    const Y = (v: number): number => MARGIN.top + y(v);
    const g = svg.append('g');
    for (const t of layout.ticks)
      g.append('line')
        .attr('class', 'cv-sym-line')
        .attr('x1', X(t.x))
        .attr('x2', X(t.x))
        .attr('y1', MARGIN.top)
        .attr('y2', MARGIN.top + ph);
    for (const s of layout.separators)
      g.append('line')
        .attr('class', 'cv-separator')
        .attr('x1', X(s))
        .attr('x2', X(s))
        .attr('y1', MARGIN.top)
        .attr('y2', MARGIN.top + ph);
    g.append('line')
      .attr('class', 'cv-zero')
      .attr('x1', MARGIN.left)
      .attr('x2', MARGIN.left + pw)
      .attr('y1', Y(0))
      .attr('y2', Y(0));
    svg.append('rect').attr('class', 'cv-frame').attr('x', MARGIN.left).attr('y', MARGIN.top).attr('width', pw).attr('height', ph);
    svg
      .append('g')
      .attr('class', 'cv-axis cv-axis-y')
      .attr('transform', `translate(${MARGIN.left},${MARGIN.top})`)
      .call(
        axisLeft(y)
          .ticks(Math.max(3, Math.round(ph / 40)))
          .tickFormat((d) => minus(String(d))),
      );
    const xg = svg.append('g').attr('class', 'cv-axis cv-axis-x');
    for (const t of layout.ticks) {
      xg.append('line')
        .attr('x1', X(t.x))
        .attr('x2', X(t.x))
        .attr('y1', MARGIN.top + ph)
        .attr('y2', MARGIN.top + ph + 4);
      xg.append('text')
        .attr('x', X(t.x))
        .attr('y', MARGIN.top + ph + 15)
        .attr('text-anchor', 'middle')
        .text(t.label);
    }
    if (!layout.shared) {
      layout.spans.forEach(([a, b], i) => {
        svg
          .append('text')
          .attr('class', 'cv-span-title')
          .attr('x', X((a + b) / 2))
          .attr('y', MARGIN.top - 6)
          .attr('text-anchor', 'middle')
          .text(`${i + 1}`);
      });
    }
    const yt = svg
      .append('text')
      .attr('class', 'cv-axis-title')
      .attr('transform', `translate(14,${MARGIN.top + ph / 2}) rotate(-90)`)
      .attr('text-anchor', 'middle');
    yt.append('tspan').text('E − E');
    yt.append('tspan').attr('baseline-shift', 'sub').attr('font-size', '9px').text('VBM');
    yt.append('tspan').text(' (eV)');
    svg
      .append('text')
      .attr('class', 'cv-axis-title')
      .attr('x', MARGIN.left + pw / 2)
      .attr('y', height - 6)
      .attr('text-anchor', 'middle')
      .text(
        layout.shared ? 'k-path (segments of each run stretched onto the first run’s)' : 'k-path of each run (paths differ: side by side)',
      );
    // Legend and note.
    const names = new Map((this.table?.rows ?? []).map((r) => [r.id, r.name]));
    runs.forEach((r, i) => {
      const item = el('span', 'cv-legend-item');
      const sw = document.createElementNS(SVG_NS, 'svg');
      const ln = document.createElementNS(SVG_NS, 'line');
      ln.setAttribute('x1', '0');
      ln.setAttribute('x2', '28');
      ln.setAttribute('y1', '4');
      ln.setAttribute('y2', '4');
      ln.setAttribute('stroke', colours[i]!);
      ln.setAttribute('stroke-width', '2');
      const dash = DASHES[i % DASHES.length]!;
      if (dash.length) ln.setAttribute('stroke-dasharray', dash.join(' '));
      sw.append(ln);
      const zero =
        r.meta.alignedAt === 'vbm'
          ? ''
          : r.meta.alignedAt === 'fermi'
            ? ' (no gap: aligned at its Fermi level)'
            : ' (no gap or Fermi level: not aligned)';
      item.append(sw, document.createTextNode(`${layout.shared ? '' : `${i + 1}: `}${names.get(r.meta.rowId) ?? r.meta.title}${zero}`));
      this.legend.append(item);
    });
    this.overlayNote.textContent = layout.shared
      ? `${runs.length} run${runs.length === 1 ? '' : 's'} on one path (same labelled segments), each shifted so its VBM is at 0.`
      : `${runs.length} runs with different paths, side by side, each shifted so its VBM is at 0.`;
    this.overlayPlot.setAttribute(
      'aria-label',
      `Band structures of ${runs.map((r) => names.get(r.meta.rowId) ?? r.meta.title).join(', ')}, aligned at the VBM, ${layout.shared ? 'on one shared path' : 'side by side'}.`,
    );
  }

  // -------------------------------------------------------------------------------------------------
  // Trend

  private setTrendOptions(): void {
    const t = this.table!;
    const numeric = t.columns.filter((c) => c.group !== 'structure');
    if (!numeric.some((c) => c.key === this.trendY)) this.trendY = numeric[0]?.key ?? 'gap';
    const xs = [
      ...t.descriptorKeys.map((k) => ({ value: k, label: this.columnTitle(k) })),
      { value: USER_KEY, label: 'Your value (typed in the table)' },
    ];
    if (!xs.some((o) => o.value === this.trendX)) this.trendX = xs[0]!.value;
    setOptions(
      this.trendY_,
      numeric.map((c) => ({ value: c.key, label: this.columnTitle(c.key) })),
      this.trendY,
    );
    setOptions(this.trendX_, xs, this.trendX);
  }

  /** Sets the trend axes (tests and keyboard users through the selects). */
  setTrend(xKey: string, yKey: string): void {
    this.trendX = xKey;
    this.trendY = yKey;
    if (this.table) this.setTrendOptions();
    this.drawTrend();
  }

  private valueOf(r: CompareRow, key: string): number | null {
    const v = key === USER_KEY ? this.userValues.get(r.id) : r.values[key];
    return typeof v === 'number' && Number.isFinite(v) ? v : null;
  }

  drawTrend(): void {
    const t = this.table;
    const svg = select(this.trendSvg);
    svg.selectAll('*').remove();
    if (!t) return;
    const rect = this.trendPlot.getBoundingClientRect();
    const width = Math.max(100, Math.floor(rect.width));
    const height = Math.max(100, Math.floor(rect.height));
    const pw = width - TREND_MARGIN.left - TREND_MARGIN.right;
    const ph = height - TREND_MARGIN.top - TREND_MARGIN.bottom;
    const pts = t.rows
      .filter((r) => r.error === null)
      .map((r) => ({ r, x: this.valueOf(r, this.trendX), y: this.valueOf(r, this.trendY) }))
      .filter((p): p is { r: CompareRow; x: number; y: number } => p.x !== null && p.y !== null)
      .sort((a, b) => a.x - b.x);
    this.lastTrendPoints = pts.map((p) => ({ rowId: p.r.id, x: p.x, y: p.y }));
    const without = t.rows.length - pts.length;
    this.trendNote.textContent = `${pts.length} run${pts.length === 1 ? '' : 's'} plotted${without ? `; ${without} without a value for both axes left out` : ''}. Click a point (or Tab to it and press Enter) to open that run.`;
    if (pts.length === 0) {
      this.trendMessage.hidden = false;
      this.trendMessage.textContent =
        this.trendX === USER_KEY
          ? 'Type values in the table’s “Your value” column to plot against them.'
          : 'No run has a value for both quantities.';
      return;
    }
    this.trendMessage.hidden = true;
    const pad = (lo: number, hi: number): [number, number] =>
      hi > lo
        ? [lo - 0.06 * (hi - lo), hi + 0.06 * (hi - lo)]
        : [lo - Math.max(1e-3, Math.abs(lo) * 0.05), hi + Math.max(1e-3, Math.abs(hi) * 0.05)];
    const xs = pts.map((p) => p.x);
    const ys = pts.map((p) => p.y);
    const x: ScaleLinear<number, number> = scaleLinear()
      .domain(pad(Math.min(...xs), Math.max(...xs)))
      .range([TREND_MARGIN.left, TREND_MARGIN.left + pw]);
    const y: ScaleLinear<number, number> = scaleLinear()
      .domain(pad(Math.min(...ys), Math.max(...ys)))
      .range([TREND_MARGIN.top + ph, TREND_MARGIN.top]);
    svg
      .append('rect')
      .attr('class', 'cv-frame')
      .attr('x', TREND_MARGIN.left)
      .attr('y', TREND_MARGIN.top)
      .attr('width', pw)
      .attr('height', ph);
    svg
      .append('g')
      .attr('class', 'cv-axis')
      .attr('transform', `translate(0,${TREND_MARGIN.top + ph})`)
      .call(
        axisBottom(x)
          .ticks(Math.max(2, Math.round(pw / 70)))
          .tickFormat((d) => minus(String(d))),
      );
    svg
      .append('g')
      .attr('class', 'cv-axis')
      .attr('transform', `translate(${TREND_MARGIN.left},0)`)
      .call(
        axisLeft(y)
          .ticks(Math.max(2, Math.round(ph / 40)))
          .tickFormat((d) => minus(String(d))),
      );
    svg
      .append('text')
      .attr('class', 'cv-axis-title')
      .attr('x', TREND_MARGIN.left + pw / 2)
      .attr('y', height - 6)
      .attr('text-anchor', 'middle')
      .text(this.columnTitle(this.trendX));
    svg
      .append('text')
      .attr('class', 'cv-axis-title')
      .attr('transform', `translate(14,${TREND_MARGIN.top + ph / 2}) rotate(-90)`)
      .attr('text-anchor', 'middle')
      .text(this.columnTitle(this.trendY));
    // Lines join only runs of one material; a run without a structure joins nothing.
    const seriesNames = [...new Set(pts.map((p) => p.r.series ?? null).filter((n): n is string => n !== null))];
    const colourOf = (name: string | null): string =>
      name === null
        ? 'var(--vscode-descriptionForeground)'
        : TREND_SERIES_COLOURS[seriesNames.indexOf(name) % TREND_SERIES_COLOURS.length]!;
    this.lastTrendSeries = seriesNames.map((name) => ({ name, rowIds: pts.filter((p) => p.r.series === name).map((p) => p.r.id) }));
    for (const sr of this.lastTrendSeries) {
      const sp = pts.filter((p) => p.r.series === sr.name);
      if (sp.length < 2) continue;
      svg
        .append('path')
        .attr('class', 'cv-trend-line')
        .attr('data-series', sr.name)
        .style('stroke', colourOf(sr.name))
        .attr(
          'd',
          line<{ x: number; y: number }>()
            .x((p) => x(p.x))
            .y((p) => y(p.y))(sp) ?? '',
        );
    }
    const alone = pts.filter((p) => !p.r.series).length;
    const legendItems = this.lastTrendSeries.map((sr) => {
      const types = [
        ...new Set(
          pts
            .filter((p) => p.r.series === sr.name)
            .map((p) => p.r.latticeType)
            .filter((x): x is string => !!x),
        ),
      ];
      const item = el(
        'span',
        'cv-series-item',
        `${sr.name}${types.length ? ` (${types.join(', ')})` : ''}: ${sr.rowIds.length} run${sr.rowIds.length === 1 ? '' : 's'}`,
      );
      item.style.setProperty('--cv-swatch', colourOf(sr.name));
      item.dataset.series = sr.name;
      return item;
    });
    if (alone)
      legendItems.push(
        el('span', 'cv-series-item cv-series-alone', `${alone} run${alone === 1 ? '' : 's'} without a structure: not joined`),
      );
    this.trendLegend.replaceChildren(...legendItems);
    const yCol = t.columns.find((c) => c.key === this.trendY);
    const xCol = t.columns.find((c) => c.key === this.trendX);
    for (const p of pts) {
      const c = svg
        .append('circle')
        .attr('data-series', p.r.series ?? '')
        .attr(
          'class',
          `cv-point${p.r.isReference ? ' cv-point-ref' : ''}${p.r.annotations === 'stale' && p.r.origin === 'annotations' ? ' cv-point-stale' : ''}`,
        )
        .attr('cx', x(p.x))
        .attr('cy', y(p.y))
        .attr('r', 5.5)
        .attr('tabindex', 0)
        .attr('role', 'button')
        .attr('data-row', p.r.id)
        .attr(
          'aria-label',
          `${p.r.name}: ${this.columnTitle(this.trendX)} ${formatValue(p.x, xCol?.decimals ?? 4)}, ${this.columnTitle(this.trendY)} ${formatValue(p.y, yCol?.decimals ?? 4)}. Press Enter to open it.`,
        );
      c.append('title').text(
        `${p.r.name}${p.r.series ? ` (${p.r.series})` : ''}\n${this.columnTitle(this.trendX)}: ${formatValue(p.x, xCol?.decimals ?? 4)}\n${this.columnTitle(this.trendY)}: ${formatValue(p.y, yCol?.decimals ?? 4)}`,
      );
      if (!p.r.isReference && !(p.r.annotations === 'stale' && p.r.origin === 'annotations')) c.style('fill', colourOf(p.r.series ?? null));
      const node = c.node()!;
      const open = (): void => this.openRun(p.r, p.r.canOverlay ? 'bandView' : 'file');
      node.addEventListener('click', open);
      node.addEventListener('keydown', (ev) => {
        if (ev.key === 'Enter' || ev.key === ' ') {
          ev.preventDefault();
          open();
        }
      });
    }
  }

  private setStatus(text: string): void {
    this.status.textContent = text;
  }
}

/** Line colours of the trend plot's series (material and lattice type), in order of first appearance. */
const TREND_SERIES_COLOURS = [
  'var(--vscode-charts-blue, #3794ff)',
  'var(--vscode-charts-purple, #b180d7)',
  'var(--vscode-charts-green, #89d185)',
  'var(--vscode-charts-yellow, #cca700)',
  'var(--vscode-charts-red, #f14c4c)',
];

function cssVar(name: string, fallback: string): string {
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || fallback;
}

// Start, exposing the instance for tests (read-only use).
const app = new CompareViewApp(vscodeApi());
(window as unknown as { valleyscopeCompareView: CompareViewApp }).valleyscopeCompareView = app;
