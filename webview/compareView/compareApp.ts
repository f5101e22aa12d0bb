/**
 * The compare view's state and what changes it: the table from the host, sort, ticked runs, typed values,
 * trend axes, "More columns"; each change saved for reloads and redrawn through the table, overlay and trend
 * modules. Computes no physics: every number comes from the core, in the host.
 */
import {
  COMPARE_MAX_OVERLAY,
  CompareViewToHostType,
  type CompareBandRun,
  type CompareRow,
  type CompareTable,
  type CompareViewToHostMessage,
} from '../../src/protocol';
import { el, setOptions } from '../shared/controls';
import { readPalette, type Palette } from '../shared/theme';
import type { VsCodeApi } from '../shared/vscodeApi';
import type { ComparePage } from './pageSkeleton';
import { OverlayView, type OverlayStats } from './overlayView';
import { carryRows, readSavedState, userValuesByName, type SavedState } from './savedState';
import { keepSort, nextSort } from './tableSort';
import { columnTitle, tableSummary } from './tableText';
import { defaultTarget, markSelected, renderTable, visibleRowNames, type OpenTarget, type TableActions } from './tableView';
import { trendAxes } from './trendData';
import { drawTrend, type TrendDrawn } from './trendPlot';

export class CompareViewApp {
  private table: CompareTable | null = null;
  private state: SavedState;
  private selected: string[] = [];
  private userValues = new Map<string, number>();
  private palette: Palette;
  private frame = 0;
  private readonly overlay: OverlayView;
  private trend: TrendDrawn = { points: [], series: [] };
  private readonly actions: TableActions;

  constructor(
    private readonly page: ComparePage,
    private readonly api: VsCodeApi,
  ) {
    this.state = readSavedState(api.getState());
    this.palette = readPalette(document);
    this.overlay = new OverlayView(page.overlay, (m) => this.post(m));
    page.moreBox.checked = this.state.more;
    this.actions = {
      sortBy: (key) => this.sortBy(key),
      toggle: (id, on) => this.toggleSelected(id, on),
      open: (r, target) => this.openRun(r, target),
      typed: (r, v) => this.typed(r, v),
    };
  }

  /** What the last overlay drew (tests read it). */
  get lastOverlay(): OverlayStats | null {
    return this.overlay.last;
  }
  /** The trend plot's points (tests read them). */
  get lastTrendPoints(): TrendDrawn['points'] {
    return this.trend.points;
  }
  /** The trend plot's series (one line each), for tests. */
  get lastTrendSeries(): TrendDrawn['series'] {
    return this.trend.series;
  }

  post(m: CompareViewToHostMessage): void {
    this.api.postMessage(m);
  }

  setStatus(text: string): void {
    this.page.status.textContent = text;
  }

  /** The host's progress while it reads runs: the summary and the status line. */
  showProgress(summary: string, status: string): void {
    this.page.summary.textContent = summary;
    this.setStatus(status);
  }

  /** Row names in the order shown (tests read it). */
  visibleRowNames(): string[] {
    return visibleRowNames(this.page.table);
  }

  private saveState(): void {
    this.state.user = userValuesByName(this.state.user, this.table?.rows ?? [], this.userValues);
    this.api.setState(this.state);
  }

  setTable(t: CompareTable): void {
    const carried = carryRows(this.table?.rows ?? [], t.rows, this.selected, this.userValues, this.state.user);
    this.table = t;
    this.overlay.clear();
    this.selected = carried.selected;
    this.userValues = carried.userValues;
    const p = this.page;
    p.summary.textContent = tableSummary(t.rows);
    setOptions(
      p.refSelect,
      t.rows.filter((r) => r.error === null).map((r) => ({ value: r.id, label: r.name })),
      t.reference ?? '',
    );
    p.annotationsBox.checked = t.annotationsAsRuns;
    p.cautions.replaceChildren(...t.cautions.map((c) => el('li', undefined, c)));
    this.renderEvents(t);
    this.state.sort = keepSort(
      this.state.sort,
      t.columns.map((c) => c.key),
    );
    this.renderTable();
    this.setTrendOptions();
    this.overlay.request(this.selected);
    this.schedule();
    this.setStatus(
      t.rows.length
        ? 'Tick runs to overlay their bands; click a column header to sort; click a run’s name to open its band view.'
        : 'No eigenvalue or annotations files were found in this workspace.',
    );
  }

  private renderEvents(t: CompareTable): void {
    const events = this.page.events;
    if (t.events.length === 0) {
      events.hidden = true;
      events.replaceChildren();
      return;
    }
    const names = new Map(t.rows.map((r) => [r.id, r.name]));
    const ul = el('ul');
    for (const e of t.events) ul.append(el('li', `cv-event cv-event-${e.kind}`, `${names.get(e.rowId) ?? e.rowId}: ${e.message}`));
    events.replaceChildren(el('h2', undefined, `What changed against ${names.get(t.reference ?? '') ?? 'the reference'}`), ul);
    events.hidden = false;
  }

  private renderTable(): void {
    if (!this.table) return;
    const input = {
      table: this.table,
      sort: this.state.sort,
      showMore: this.state.more,
      selected: this.selected,
      userValues: this.userValues,
    };
    renderTable(this.page.table, this.page.moreBox, input, this.actions);
  }

  /** "More columns" ticked or not. */
  setShowMore(on: boolean): void {
    this.state.more = on;
    this.saveState();
    this.renderTable();
    this.setStatus(on ? 'All columns shown.' : 'Compact columns shown.');
  }

  private sortBy(key: string): void {
    const sort = nextSort(this.state.sort, key);
    this.state.sort = sort;
    this.saveState();
    this.renderTable();
    this.setStatus(`Sorted by ${columnTitle(this.table?.columns ?? [], key)}, ${sort.direction}.`);
    this.page.table.querySelector<HTMLElement>(`th[data-key="${CSS.escape(key)}"] button`)?.focus();
  }

  private typed(r: CompareRow, v: number | null | { invalid: string }): void {
    if (v === null) this.userValues.delete(r.id);
    else if (typeof v === 'number') this.userValues.set(r.id, v);
    else {
      this.setStatus(`"${v.invalid}" is not a number: type a value such as 0.5 or -1e-2.`);
      return;
    }
    this.saveState();
    this.drawTrend();
  }

  /** A reference chosen in the header: the host recomputes the differences. */
  chooseReference(rowId: string): void {
    if (rowId && this.table && rowId !== this.table.reference) this.post({ type: CompareViewToHostType.SetReference, rowId });
  }

  openRun(r: CompareRow, target: OpenTarget): void {
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
    markSelected(this.page.table, this.selected);
    this.overlay.request(this.selected);
    this.schedule();
  }

  /** Band data from the host; rows it could not send are unticked with the reason in the status line. */
  onBands(runs: readonly CompareBandRun[], missing: readonly { rowId: string; reason: string }[]): void {
    this.overlay.receive(runs);
    if (missing.length) {
      const names = this.rowNames();
      this.setStatus(missing.map((m) => `${names.get(m.rowId) ?? m.rowId}: not drawn (${m.reason})`).join('; '));
      this.selected = this.selected.filter((id) => !missing.some((m) => m.rowId === id));
    }
    this.schedule();
  }

  private rowNames(): Map<string, string> {
    return new Map((this.table?.rows ?? []).map((r) => [r.id, r.name]));
  }

  private setTrendOptions(): void {
    const axes = trendAxes(this.table!, this.state.trendX, this.state.trendY);
    this.state.trendX = axes.x;
    this.state.trendY = axes.y;
    setOptions(this.page.trendY, axes.yOptions, axes.y);
    setOptions(this.page.trendX, axes.xOptions, axes.x);
  }

  /** Sets the trend axes (tests and keyboard users through the selects). */
  setTrend(xKey: string, yKey: string): void {
    this.state.trendX = xKey;
    this.state.trendY = yKey;
    if (this.table) this.setTrendOptions();
    this.drawTrend();
  }

  /** A trend axis chosen in its select. */
  chooseTrendAxis(axis: 'x' | 'y', key: string): void {
    if (axis === 'x') this.state.trendX = key;
    else this.state.trendY = key;
    this.saveState();
    this.drawTrend();
  }

  /** A new theme: colours read again, plots redrawn. */
  themeChanged(): void {
    this.palette = readPalette(document);
    this.schedule();
  }

  /** Redraws both plots at the next frame (once however often it is asked). */
  schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.drawOverlay();
      this.drawTrend();
    });
  }

  /** Redraws the overlay now. */
  drawOverlay(): void {
    this.overlay.draw(this.selected, this.rowNames(), this.palette);
  }

  /** Redraws the trend plot now. */
  drawTrend(): void {
    const t = this.table;
    const input = t && {
      table: t,
      xKey: this.state.trendX,
      yKey: this.state.trendY,
      userValues: this.userValues,
      open: (r: CompareRow) => this.openRun(r, defaultTarget(r)),
    };
    this.trend = drawTrend(this.page.trend, input);
  }
}
