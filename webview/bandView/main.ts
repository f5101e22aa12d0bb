/**
 * The band view (webview entry). Bands on a canvas, axes/labels/markers/fit overlay in SVG, d3 scales and
 * zoom, a side panel for fits. Talks to the extension host only through the typed messages of
 * src/protocol.ts; computes no physics (fits come back from the host, which runs the core).
 * Strict-CSP friendly: no eval, no inline handlers or styles, no remote loads.
 */
import '@vscode-elements/elements/dist/vscode-button/index.js';
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-textfield/index.js';
import { select, type Selection } from 'd3-selection';
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { axisLeft } from 'd3-axis';
import { zoom as d3zoom, zoomIdentity, type ZoomBehavior, type ZoomTransform } from 'd3-zoom';
import { line } from 'd3-shape';
import {
  HostToViewType,
  ViewToHostType,
  isHostToViewMessage,
  type BandData,
  type EnergyReference,
  type EnvironmentData,
  type ExportFormat,
  type ExtremumReport,
  type FitCurve,
  type FitResultMessage,
  type FitTarget,
  type HostToViewMessage,
  type SaveEntry,
  type ViewToHostMessage,
  type WindowScanSeries,
} from '../../src/protocol';
import { BandRenderer, type DrawStats } from './bandRenderer';
import { availableReferences, chooseReference, REFERENCE_NAMES, type ReferenceChoice } from './energyReference';
import { buildExportSvg, pngSize, xAxisTitle } from './exportPlot';
import { FitPanel, kindName } from './fitPanel';
import { fixed, fracK, sig } from '../shared/format';
import { edgeMarkerPath, isMaximumKind, secondaryMarkerPath } from './markers';
import { snapToCandidate, SNAP_TOLERANCE_PX, type ScreenCandidate } from './snap';
import { ReviewNote } from './reviewNote';
import { nextCandidate, reachableCandidates, type ArrowKey, type Candidate } from './keyNavigation';
import { BAND_VIEW_CSS } from './styles';
import { fittingLabels } from './tickLabels';
import { fitsWithin, parseViewState, type BandViewState, type SpinName } from './viewState';
import { readPalette, type Palette } from '../shared/theme';
import { buildViewModel, energyAt, labelNear, nearestK, type ViewModel } from './viewModel';
import { vscodeApi, type VsCodeApi } from '../shared/vscodeApi';
import { watchTheme } from '../shared/themeWatch';
import { el, setOptions, vsButton, vsSelect, type VsButton, type VsSelect } from '../shared/controls';

const SVG_NS = 'http://www.w3.org/2000/svg';
const MARGIN = { top: 12, right: 14, bottom: 44, left: 58 };

type SpinChoice = SpinName;

interface FitState {
  target: FitTarget;
  extremum: ExtremumReport;
  curves: FitCurve[];
  window_meV: number;
  method: string;
}

export class BandViewApp {
  private vm: ViewModel | null = null;
  private env: EnvironmentData = { theme: 'dark', readOnly: false, readOnlyReason: null };
  private palette: Palette;
  private reference: EnergyReference = 'vbm';
  private spinChoice: SpinChoice = 'up';
  private refChoice: ReferenceChoice = chooseReference('raw', { vbm_eV: null, fermiEnergy: null });
  private transform: ZoomTransform = zoomIdentity;
  private baseX: ScaleLinear<number, number> = scaleLinear();
  private baseY: ScaleLinear<number, number> = scaleLinear();
  private zx: ScaleLinear<number, number> = scaleLinear();
  private zy: ScaleLinear<number, number> = scaleLinear();
  private width = 0;
  private height = 0;
  private frame = 0;
  private candidates: Candidate[] = [];
  private readonly review = new ReviewNote();
  private selected: Candidate | null = null;
  private hover: { spin: number; k: number; band0: number } | null = null;
  private fit: FitState | null = null;
  private scan: WindowScanSeries[] = [];
  private window_meV = 25;
  private method = 'parabola';
  private nextRequestId = 1;
  private latestFitRequest = 0;
  private pendingTargets = new Map<number, { target: FitTarget; window_meV: number; method: string; kind: 'fit' | 'scan' }>();
  /** Fits the user made, kept for saving. */
  private saved = new Map<string, SaveEntry>();
  /** A fit to show again once the first data has been drawn (after a window reload). */
  private restoreFit: SaveEntry | null = null;
  lastDraw: (DrawStats & { ms: number }) | null = null;

  // DOM.
  readonly root: HTMLElement;
  private readonly titleEl: HTMLElement;
  private readonly gapEl: HTMLElement;
  private readonly refSelect: VsSelect;
  private readonly spinSelect: VsSelect;
  private readonly spinLabel: HTMLElement;
  private readonly resetBtn: VsButton;
  private readonly svgBtn: VsButton;
  private readonly pngBtn: VsButton;
  private readonly saveBtn: VsButton;
  private readonly saveNote: HTMLElement;
  private readonly cautionLine: HTMLElement;
  private readonly banner: HTMLElement;
  private readonly plot: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly svg: Selection<SVGSVGElement, unknown, null, undefined>;
  private readonly message: HTMLElement;
  private readonly readout: HTMLElement;
  private readonly status: HTMLElement;
  private readonly panel: FitPanel;
  private readonly renderer: BandRenderer;
  private readonly zoomBehavior: ZoomBehavior<SVGSVGElement, unknown>;

  constructor(private readonly api: VsCodeApi) {
    const sheet = new CSSStyleSheet();
    sheet.replaceSync(BAND_VIEW_CSS);
    document.adoptedStyleSheets = [...document.adoptedStyleSheets, sheet];
    this.palette = readPalette(document);

    this.root = el('div', 'vs-root');
    const bar = el('header', 'vs-bar');
    this.titleEl = el('span', 'vs-title', 'Band view');
    this.gapEl = el('span', 'vs-gap');
    const refLabel = el('label', undefined, 'Energy zero');
    this.refSelect = vsSelect('Energy zero');
    this.refSelect.classList.add('vs-ref');
    refLabel.append(this.refSelect);
    this.spinLabel = el('label', undefined, 'Spin');
    this.spinSelect = vsSelect('Spin channel');
    this.spinSelect.classList.add('vs-spin');
    this.spinLabel.append(this.spinSelect);
    this.spinLabel.hidden = true;
    this.resetBtn = vsButton('Reset zoom', true);
    this.resetBtn.classList.add('vs-reset');
    this.svgBtn = vsButton('Export SVG', true);
    this.svgBtn.classList.add('vs-export-svg');
    this.pngBtn = vsButton('Export PNG', true);
    this.pngBtn.classList.add('vs-export-png');
    this.saveBtn = vsButton('Save annotations');
    this.saveBtn.classList.add('vs-save');
    this.saveNote = el('span', 'vs-note vs-save-note');
    bar.append(this.titleEl, this.gapEl, refLabel, this.spinLabel, this.resetBtn, this.svgBtn, this.pngBtn, this.saveBtn, this.saveNote);
    this.cautionLine = el('p', 'vs-caution-line');
    this.cautionLine.hidden = true;
    this.banner = el('p', 'vs-banner');
    this.banner.hidden = true;
    this.banner.setAttribute('role', 'alert');

    const main = el('div', 'vs-main');
    this.plot = el('div', 'vs-plot');
    this.plot.tabIndex = 0;
    this.plot.setAttribute('role', 'application');
    this.plot.setAttribute('aria-roledescription', 'band structure plot');
    this.plot.setAttribute('aria-label', 'Band structure plot (no data yet)');
    this.canvas = el('canvas', 'vs-bands');
    this.canvas.setAttribute('aria-hidden', 'true');
    const svgEl = document.createElementNS(SVG_NS, 'svg');
    svgEl.classList.add('vs-overlay');
    svgEl.setAttribute('aria-hidden', 'true');
    this.message = el('div', 'vs-message', 'Loading the band structure …');
    this.plot.append(this.canvas, svgEl, this.message);
    this.svg = select(svgEl);
    this.panel = new FitPanel({
      onWindow: (w) => {
        this.window_meV = w;
        this.saveViewState();
        if (this.selected) this.requestFit(this.selected, false);
        this.render();
      },
      onMethod: (m) => {
        this.method = m;
        this.saveViewState();
        if (this.selected) this.requestFit(this.selected, true);
      },
    });
    // The saved review (status and note) of the fitted extremum, under the panel's title.
    this.panel.root.firstElementChild?.after(this.review.root);
    main.append(this.plot, this.panel.root);
    this.readout = el('div', 'vs-readout');
    this.readout.id = 'vs-readout';
    this.readout.setAttribute('aria-live', 'polite');
    this.plot.setAttribute('aria-describedby', 'vs-readout');
    this.status = el('div', 'vs-status');
    this.status.setAttribute('role', 'status');
    this.root.append(bar, this.cautionLine, this.banner, main, this.readout, this.status);
    (document.getElementById('app') ?? document.body).append(this.root);

    this.renderer = new BandRenderer(this.canvas);
    this.zoomBehavior = d3zoom<SVGSVGElement, unknown>()
      .scaleExtent([1, 20000])
      .on('zoom', (ev: { transform: ZoomTransform }) => {
        this.transform = ev.transform;
        this.schedule();
      });
    this.svg.call(this.zoomBehavior).on('dblclick.zoom', null);

    this.wireEvents(svgEl);
    this.updateSaveState();
    window.addEventListener('message', (ev: MessageEvent) => this.onMessage(ev.data));
    new ResizeObserver(() => this.layout()).observe(this.plot);
    watchTheme(document, () => {
      this.palette = readPalette(document);
      this.schedule();
    });
    this.post({ type: ViewToHostType.Ready });
  }

  /** View choices and fits kept by VS Code across reloads of the window (vscode.setState; see viewState.ts). */
  private saveViewState(): void {
    const state: BandViewState = {
      reference: this.reference,
      spin: this.spinChoice,
      window_meV: this.window_meV,
      method: this.method,
      fits: [...this.saved.values()],
    };
    const run = document.getElementById('app')?.dataset.run;
    if (run) state.run = run;
    this.api.setState(state);
  }

  private restoredState(): BandViewState {
    return parseViewState(this.api.getState());
  }

  private post(m: ViewToHostMessage): void {
    this.api.postMessage(m);
  }

  // ---------------------------------------------------------------------------------------------------
  // Messages

  private onMessage(raw: unknown): void {
    if (!isHostToViewMessage(raw)) return;
    try {
      this.handle(raw);
    } catch (e) {
      const msg = e instanceof Error ? e.message : String(e);
      this.showMessage(`The band view could not show this data: ${msg}`);
      this.post({ type: ViewToHostType.ViewError, message: msg.slice(0, 3000) });
    }
  }

  private handle(m: HostToViewMessage): void {
    switch (m.type) {
      case HostToViewType.BandData:
        this.env = m.environment;
        this.setData(m.data);
        if (this.restoreFit) {
          const f = this.restoreFit;
          this.restoreFit = null;
          this.requestFit(f, true);
        }
        break;
      case HostToViewType.Environment:
        this.env = m.environment;
        this.palette = readPalette(document);
        this.updateSaveState();
        this.schedule();
        break;
      case HostToViewType.FitResult:
        this.onFitResult(m);
        break;
      case HostToViewType.WindowScanResult:
        this.pendingTargets.delete(m.requestId);
        if (this.selected && sameTarget(m.target, this.selected)) {
          this.scan = m.scan;
          this.panel.setScan(m.scan, this.window_meV);
        }
        break;
      case HostToViewType.RequestFailed: {
        const p = this.pendingTargets.get(m.requestId);
        this.pendingTargets.delete(m.requestId);
        if (p && p.kind === 'fit' && m.requestId !== this.latestFitRequest) break;
        this.panel.showFailed(m.message);
        this.setStatus(`The fit did not run: ${m.message}`);
        break;
      }
      case HostToViewType.SaveResult:
        // The host's sentence says itself whether and where it was saved ("Saved 3 entries to …", "Not saved: …").
        this.setStatus(m.message);
        break;
      case HostToViewType.ExportResult:
        this.setStatus(m.ok ? `Exported: ${m.message}` : `Not exported: ${m.message}`);
        break;
      case HostToViewType.ExportRequest:
        void this.exportPlot(m.format);
        break;
      case HostToViewType.SaveRequest:
        this.save();
        break;
      case HostToViewType.Loading:
        this.showMessage(`Reading ${m.title} …`);
        break;
      case HostToViewType.Reviews:
        this.review.setReviews(m);
        if (this.fit) this.showReview(this.fit.target, this.fit.extremum);
        break;
      case HostToViewType.LoadFailed:
        this.review.clear();
        this.vm = null;
        this.fit = null;
        this.selected = null;
        this.panel.showHint('No band structure is loaded.');
        this.showMessage(m.message);
        this.render();
        break;
    }
  }

  private setData(data: BandData): void {
    const hadData = this.vm !== null;
    const prev = this.vm;
    this.vm = buildViewModel(data);
    this.message.hidden = true;
    this.titleEl.textContent = data.title;
    // Energy reference and spin choices.
    const levels = { vbm_eV: data.vbm_eV, fermiEnergy: data.fermiEnergy };
    const restored = hadData ? {} : this.restoredState();
    if (!hadData) this.reference = restored.reference ?? data.defaults.energyReference;
    setOptions(
      this.refSelect,
      availableReferences(levels).map((r) => ({ value: r, label: REFERENCE_NAMES[r] })),
      chooseReference(this.reference, levels).reference,
    );
    this.spinLabel.hidden = data.nSpin === 1;
    if (data.nSpin === 1) this.spinChoice = 'up';
    else if (!hadData) this.spinChoice = restored.spin ?? 'both';
    setOptions(
      this.spinSelect,
      [
        { value: 'up', label: 'Spin ↑ (channel 1)' },
        { value: 'down', label: 'Spin ↓ (channel 2)' },
        { value: 'both', label: 'Both channels' },
      ],
      this.spinChoice,
    );
    if (!hadData) {
      this.window_meV = restored.window_meV ?? data.defaults.window_meV;
      const methods = data.defaults.methods.length ? data.defaults.methods : [data.defaults.method];
      this.method = restored.method && methods.includes(restored.method) ? restored.method : data.defaults.method;
      this.panel.setMethods(data.defaults.methods.length ? data.defaults.methods : [data.defaults.method], this.method);
      this.panel.setWindow(this.window_meV);
      // After a window reload: the fits made before, kept for saving, and the last one shown again.
      const fits = fitsWithin(restored.fits ?? [], data);
      for (const f of fits) this.saved.set(`${f.spin}:${f.kIndex}:${f.band0}`, f);
      const last = fits[fits.length - 1];
      if (last) this.restoreFit = last;
      // The page's state names the run from the start, so a reload can bring the view back.
      this.saveViewState();
    }
    this.panel.setCautions(data.report.cautions);
    // Gap summary with its caution beside it.
    const r = data.report;
    const spinors = r.spinors ? ' · spinors (one electron per band)' : '';
    if (r.metal) {
      const crossing = r.crossingBands?.length
        ? `, band${r.crossingBands.length > 1 ? 's' : ''} ${r.crossingBands.join(', ')} crossing`
        : '';
      this.gapEl.textContent = `${r.semimetal ? 'semimetal' : 'metal'} (no gap)${data.fermiEnergy !== null ? `, E_F ${fixed(data.fermiEnergy, 3)} eV` : ''}${crossing}${spinors}`;
    } else if (r.gap)
      this.gapEl.textContent = `gap ${fixed(r.gap.eV, 3)} eV, ${r.gap.direct ? 'direct' : 'indirect'}${r.gap.direct ? '' : ` (smallest direct ${fixed(r.gap.directGap.eV, 3)} eV)`}${spinors}`;
    else if (r.metal === false && r.gapReason) this.gapEl.textContent = `no gap: local run around one point${spinors}`;
    else this.gapEl.textContent = `gap unknown (no electron count or occupations)${spinors}`;
    this.gapEl.title = r.gapReason ?? r.classificationReason ?? '';
    const gapCaution = r.cautions.find((c) => /gap/i.test(c));
    this.cautionLine.hidden = !gapCaution;
    this.cautionLine.textContent = gapCaution ? `Caution: ${gapCaution}` : '';
    const banners: string[] = [];
    if (data.partial) banners.push('Partial data: the file is still being written or was cut short; everything shown is provisional.');
    banners.push(...r.warnings.filter((w) => !/^Partial data/.test(w)));
    const distinct = [...new Set(banners)];
    this.banner.hidden = distinct.length === 0;
    this.banner.textContent = distinct.join(' ');
    this.plot.setAttribute(
      'aria-label',
      `Band structure of ${data.title}: ${data.nBands} bands at ${data.nk} k-points. Arrow keys move between band extrema, Enter fits the selected one, plus and minus zoom, 0 resets.`,
    );
    this.buildCandidates();
    // Keep the selection and zoom on a refresh of the same run (a growing file); reset otherwise.
    if (!prev || prev.nBands !== this.vm.nBands || prev.data.title !== data.title) {
      this.selected = null;
      this.fit = null;
      this.scan = [];
      this.resetZoom();
    }
    this.applyReference();
    this.layout();
  }

  private buildCandidates(): void {
    const vm = this.vm!;
    this.candidates = reachableCandidates(vm.marks, vm.extrema, vm.data.setAside, (s, k, b) => energyAt(vm, s, k, b));
  }

  private applyReference(): void {
    const vm = this.vm;
    if (!vm) return;
    this.refChoice = chooseReference(this.reference, { vbm_eV: vm.data.vbm_eV, fermiEnergy: vm.data.fermiEnergy });
    if (this.refChoice.fallbackNote) this.setStatus(this.refChoice.fallbackNote);
    this.setBaseScales();
  }

  private spins(): number[] {
    if (!this.vm || this.vm.nSpin === 1) return [0];
    return this.spinChoice === 'up' ? [0] : this.spinChoice === 'down' ? [1] : [0, 1];
  }

  // ---------------------------------------------------------------------------------------------------
  // Geometry

  private layout(): void {
    const r = this.plot.getBoundingClientRect();
    this.width = Math.max(50, Math.floor(r.width));
    this.height = Math.max(50, Math.floor(r.height));
    const pw = this.width - MARGIN.left - MARGIN.right;
    const ph = this.height - MARGIN.top - MARGIN.bottom;
    this.canvas.style.left = `${MARGIN.left}px`;
    this.canvas.style.top = `${MARGIN.top}px`;
    this.renderer.resize(pw, ph, window.devicePixelRatio || 1);
    this.zoomBehavior.extent([
      [MARGIN.left, MARGIN.top],
      [MARGIN.left + pw, MARGIN.top + ph],
    ]);
    this.zoomBehavior.translateExtent([
      [MARGIN.left, -Infinity],
      [MARGIN.left + pw, Infinity],
    ]);
    this.setBaseScales();
    this.render();
  }

  /** The initial view: the whole path; energies from a few eV below the VBM to a few eV above the CBM. */
  private setBaseScales(): void {
    const vm = this.vm;
    const pw = this.width - MARGIN.left - MARGIN.right;
    const ph = this.height - MARGIN.top - MARGIN.bottom;
    if (!vm || vm.nk === 0) return;
    const x0 = vm.distance[0]!;
    const x1 = vm.distance[vm.nk - 1]!;
    this.baseX = scaleLinear()
      .domain([x0, x1 > x0 ? x1 : x0 + 1])
      .range([MARGIN.left, MARGIN.left + pw]);
    const off = this.refChoice.offset;
    const lowData = vm.energyMin - off;
    const highData = vm.energyMax - off;
    let lo: number;
    let hi: number;
    const v = vm.data.vbm_eV;
    const c = vm.data.cbm_eV;
    if (v !== null) {
      lo = v - off - 6;
      hi = (c ?? v) - off + 5;
    } else if (vm.data.fermiEnergy !== null) {
      lo = vm.data.fermiEnergy - off - 6;
      hi = vm.data.fermiEnergy - off + 6;
    } else {
      lo = lowData;
      hi = highData;
    }
    lo = Math.max(lo, lowData - 0.3);
    hi = Math.min(hi, highData + 0.3);
    if (!(hi > lo)) {
      lo = lowData - 0.5;
      hi = highData + 0.5;
    }
    this.baseY = scaleLinear()
      .domain([lo, hi])
      .range([MARGIN.top + ph, MARGIN.top]);
  }

  private resetZoom(): void {
    this.transform = zoomIdentity;
    this.svg.call(this.zoomBehavior.transform, zoomIdentity);
  }

  /** The selected extremum (tests and the benchmark read it; the view does not depend on callers). */
  selection(): FitTarget | null {
    return this.selected ? { spin: this.selected.spin, kIndex: this.selected.kIndex, band0: this.selected.band0 } : null;
  }

  /** Sets the zoom transform (scale k, translation x, y) as a wheel or drag would. */
  setZoom(k: number, x: number, y: number): void {
    this.svg.call(this.zoomBehavior.transform, zoomIdentity.translate(x, y).scale(k));
  }

  /** Screen position (CSS px within the plot element) of a band point. */
  screenOf(spin: number, kIndex: number, band0: number): { x: number; y: number } | null {
    const vm = this.vm;
    if (!vm) return null;
    return { x: this.zx(vm.distance[kIndex]!), y: this.zy(energyAt(vm, spin, kIndex, band0) - this.refChoice.offset) };
  }

  // ---------------------------------------------------------------------------------------------------
  // Drawing

  private schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.render();
    });
  }

  /** Redraws everything now; returns the milliseconds spent on the canvas. */
  render(mode?: 'lines' | 'envelope'): number {
    const vm = this.vm;
    this.zx = this.transform.rescaleX(this.baseX);
    this.zy = this.transform.rescaleY(this.baseY);
    const pw = this.width - MARGIN.left - MARGIN.right;
    const ph = this.height - MARGIN.top - MARGIN.bottom;
    if (!vm || pw <= 0 || ph <= 0) {
      this.svg.selectAll('*').remove();
      this.renderer.resize(Math.max(1, pw), Math.max(1, ph), window.devicePixelRatio || 1);
      this.renderer.clear();
      this.lastDraw = null;
      return 0;
    }
    const t0 = performance.now();
    const xa = this.zx(1) - this.zx(0);
    const ya = this.zy(1) - this.zy(0);
    const stats = this.renderer.draw({
      vm,
      spins: this.spins(),
      x: { a: xa, b: this.zx(0) - MARGIN.left },
      y: { a: ya, b: this.zy(0) - MARGIN.top },
      offset: this.refChoice.offset,
      width: pw,
      height: ph,
      dpr: window.devicePixelRatio || 1,
      palette: this.palette,
      ...(mode ? { mode } : {}),
    });
    const ms = performance.now() - t0;
    this.lastDraw = { ...stats, ms };
    this.canvas.dataset.mode = stats.mode;
    this.drawOverlay(pw, ph);
    return ms;
  }

  private drawOverlay(pw: number, ph: number): void {
    const vm = this.vm!;
    const svg = this.svg;
    svg.selectAll('*').remove();
    const defs = svg.append('defs');
    defs
      .append('clipPath')
      .attr('id', 'vs-clip')
      .append('rect')
      .attr('x', MARGIN.left)
      .attr('y', MARGIN.top)
      .attr('width', pw)
      .attr('height', ph);
    const off = this.refChoice.offset;
    const zx = this.zx;
    const zy = this.zy;
    const plotG = svg.append('g').attr('clip-path', 'url(#vs-clip)');
    // Gap region.
    const r = vm.data.report;
    if (vm.data.vbm_eV !== null && vm.data.cbm_eV !== null && !r.metal) {
      const yTop = zy(vm.data.cbm_eV - off);
      const yBot = zy(vm.data.vbm_eV - off);
      plotG
        .append('rect')
        .attr('class', 'vs-gap-band')
        .attr('x', MARGIN.left)
        .attr('width', pw)
        .attr('y', yTop)
        .attr('height', Math.max(0, yBot - yTop));
    }
    // High-symmetry lines and path breaks.
    const jumps = new Set(vm.data.segments.filter((s) => s.afterJump).map((s) => s.start));
    for (const t of vm.data.ticks) {
      const x = zx(t.distance);
      if (x < MARGIN.left - 1 || x > MARGIN.left + pw + 1) continue;
      const isBreak = jumps.has(t.kIndex) || t.label.includes('|');
      if (isBreak) {
        plotG
          .append('line')
          .attr('class', 'vs-break')
          .attr('x1', x - 1.5)
          .attr('x2', x - 1.5)
          .attr('y1', MARGIN.top)
          .attr('y2', MARGIN.top + ph);
        plotG
          .append('line')
          .attr('class', 'vs-break')
          .attr('x1', x + 1.5)
          .attr('x2', x + 1.5)
          .attr('y1', MARGIN.top)
          .attr('y2', MARGIN.top + ph);
      } else {
        plotG
          .append('line')
          .attr('class', 'vs-sym-line')
          .attr('x1', x)
          .attr('x2', x)
          .attr('y1', MARGIN.top)
          .attr('y2', MARGIN.top + ph);
      }
    }
    if (this.refChoice.reference !== 'raw') {
      const y0 = zy(0);
      plotG
        .append('line')
        .attr('class', 'vs-zero')
        .attr('x1', MARGIN.left)
        .attr('x2', MARGIN.left + pw)
        .attr('y1', y0)
        .attr('y2', y0);
    }
    // A metal: the Fermi level, drawn and named (no gap band).
    if (r.metal && vm.data.fermiEnergy !== null) {
      const yf = zy(vm.data.fermiEnergy - off);
      plotG
        .append('line')
        .attr('class', 'vs-fermi')
        .attr('x1', MARGIN.left)
        .attr('x2', MARGIN.left + pw)
        .attr('y1', yf)
        .attr('y2', yf);
      plotG
        .append('text')
        .attr('class', 'vs-fermi-label')
        .attr('x', MARGIN.left + pw - 4)
        .attr('y', yf - 3)
        .attr('text-anchor', 'end')
        .text('E_F');
    }
    // Fit overlay: window lines and fitted curves.
    if (this.fit) {
      const f = this.fit;
      const e0 = f.extremum.eV - off;
      const sign = isMaximumKind(f.extremum.kind) ? -1 : 1;
      // The window the fit actually used (the engine widens it when too few points fall inside).
      const used = f.extremum.masses.length ? Math.max(...f.extremum.masses.map((m) => m.window_meV)) : f.window_meV;
      const yw = zy(e0 + (sign * used) / 1000);
      plotG
        .append('line')
        .attr('class', 'vs-fit-window')
        .attr('x1', MARGIN.left)
        .attr('x2', MARGIN.left + pw)
        .attr('y1', yw)
        .attr('y2', yw);
      for (const c of f.curves) {
        const xs = c.distance;
        const d = line<number>()
          .x((_, i) => zx(xs[i]!))
          .y((e) => zy(e - off))(c.energy);
        plotG
          .append('path')
          .attr('class', 'vs-fit-curve')
          .attr('data-towards', c.towards)
          .attr('d', d ?? '');
      }
    }
    // Markers: report extrema (not clipped, so a marker at the plot's edge shows whole).
    const spins = this.spins();
    const markG = svg.append('g').attr('class', 'vs-marks');
    for (const m of vm.marks) {
      if (!spins.includes(m.spin)) continue;
      const x = zx(vm.distance[m.kIndex]!);
      const y = zy(m.eV - off);
      if (x < MARGIN.left - 1 || x > MARGIN.left + pw + 1 || y < MARGIN.top - 1 || y > MARGIN.top + ph + 1) continue;
      const primary = m.kind === 'vbm' || m.kind === 'cbm';
      const g = markG.append('g').attr('transform', `translate(${x},${y})`).attr('class', `vs-mark-group vs-mark-${m.kind}`);
      // A tooltip on hover: what the marker is, where, and how to fit it.
      const where = labelNear(vm, m.kIndex);
      g.append('title').text(
        `${kindName(m.kind)}: band ${m.band0 + 1}${vm.nSpin === 2 ? (m.spin === 1 ? ', spin down' : ', spin up') : ''}, k-point ${m.kIndex + 1}${where ? ` (${where})` : ''}, ${this.refChoice.subscript ? `E − E_${this.refChoice.subscript}` : 'E'} = ${fixed(m.eV - off, 3)} eV. Click it to fit.`,
      );
      g.append('path')
        .attr('class', 'vs-mark')
        .attr('d', primary ? edgeMarkerPath(5) : secondaryMarkerPath(isMaximumKind(m.kind), 4));
      if (primary) {
        g.append('text')
          .attr('class', 'vs-mark-label')
          .attr('x', 12)
          .attr('y', m.kind === 'vbm' ? 14 : -8)
          .text(m.kind.toUpperCase());
      }
    }
    // Selection.
    if (this.selected && spins.includes(this.selected.spin)) {
      const p = this.screenOf(this.selected.spin, this.selected.kIndex, this.selected.band0)!;
      plotG.append('circle').attr('class', 'vs-selection').attr('cx', p.x).attr('cy', p.y).attr('r', 10);
    }
    // Hover.
    if (this.hover) {
      const p = this.screenOf(this.hover.spin, this.hover.k, this.hover.band0)!;
      plotG
        .append('line')
        .attr('class', 'vs-hover-line')
        .attr('x1', p.x)
        .attr('x2', p.x)
        .attr('y1', MARGIN.top)
        .attr('y2', MARGIN.top + ph);
      plotG.append('circle').attr('class', 'vs-hover-dot').attr('cx', p.x).attr('cy', p.y).attr('r', 3.5);
    }
    // Frame, axes, titles.
    svg.append('rect').attr('class', 'vs-frame').attr('x', MARGIN.left).attr('y', MARGIN.top).attr('width', pw).attr('height', ph);
    svg
      .append('g')
      .attr('class', 'vs-axis vs-axis-y')
      .attr('transform', `translate(${MARGIN.left},0)`)
      .call(
        axisLeft(zy)
          .ticks(Math.max(3, Math.round(ph / 45)))
          .tickFormat((d) => String(d).replace('-', '−')),
      );
    const xg = svg.append('g').attr('class', 'vs-axis vs-axis-x');
    const shown = vm.data.ticks
      .map((t) => ({ x: zx(t.distance), label: t.label }))
      .filter((t) => t.x >= MARGIN.left - 1 && t.x <= MARGIN.left + pw + 1);
    for (const t of shown)
      xg.append('line')
        .attr('x1', t.x)
        .attr('x2', t.x)
        .attr('y1', MARGIN.top + ph)
        .attr('y2', MARGIN.top + ph + 5);
    // On a narrow plot, labels that would print over each other are left out (the ticks stay).
    for (const i of fittingLabels(
      shown.map((t) => t.x),
      shown.map((t) => t.label),
    )) {
      xg.append('text')
        .attr('x', shown[i]!.x)
        .attr('y', MARGIN.top + ph + 17)
        .attr('text-anchor', 'middle')
        .text(shown[i]!.label);
    }
    svg
      .append('text')
      .attr('class', 'vs-axis-title vs-x-title')
      .attr('x', MARGIN.left + pw / 2)
      .attr('y', this.height - 6)
      .attr('text-anchor', 'middle')
      .text(xAxisTitle(vm.data.distanceUnits));
    const yt = svg
      .append('text')
      .attr('class', 'vs-axis-title vs-y-title')
      .attr('transform', `translate(14,${MARGIN.top + ph / 2}) rotate(-90)`)
      .attr('text-anchor', 'middle');
    if (this.refChoice.subscript) {
      yt.append('tspan').text('E − E');
      yt.append('tspan').attr('baseline-shift', 'sub').attr('font-size', '9px').text(this.refChoice.subscript);
      yt.append('tspan').text(' (eV)');
    } else yt.text('E (eV)');
  }

  // ---------------------------------------------------------------------------------------------------
  // Interaction

  private wireEvents(svgEl: SVGSVGElement): void {
    svgEl.addEventListener('mousemove', (ev) => this.onHover(ev));
    svgEl.addEventListener('mouseleave', () => {
      this.hover = null;
      this.schedule();
    });
    svgEl.addEventListener('click', (ev) => this.onClick(ev));
    this.plot.addEventListener('keydown', (ev) => this.onKey(ev));
    this.refSelect.addEventListener('change', () => {
      this.reference = this.refSelect.value as EnergyReference;
      this.saveViewState();
      this.applyReference();
      this.render();
    });
    this.spinSelect.addEventListener('change', () => {
      this.spinChoice = this.spinSelect.value as SpinChoice;
      this.saveViewState();
      this.render();
    });
    this.resetBtn.addEventListener('click', () => this.resetZoom());
    this.svgBtn.addEventListener('click', () => void this.exportPlot('svg'));
    this.pngBtn.addEventListener('click', () => void this.exportPlot('png'));
    this.saveBtn.addEventListener('click', () => this.save());
  }

  private localPoint(ev: MouseEvent): { x: number; y: number } {
    const r = this.plot.getBoundingClientRect();
    return { x: ev.clientX - r.left, y: ev.clientY - r.top };
  }

  private onHover(ev: MouseEvent): void {
    const vm = this.vm;
    if (!vm) return;
    const p = this.localPoint(ev);
    const k = nearestK(vm, this.zx.invert(p.x));
    if (k < 0) return;
    const e = this.zy.invert(p.y) + this.refChoice.offset;
    let best = { spin: 0, band0: 0, d: Infinity };
    for (const s of this.spins()) {
      for (let b = 0; b < vm.nBands; b++) {
        const d = Math.abs(energyAt(vm, s, k, b) - e);
        if (d < best.d) best = { spin: s, band0: b, d };
      }
    }
    this.hover = { spin: best.spin, k, band0: best.band0 };
    this.readout.textContent = this.describePoint(best.spin, k, best.band0);
    this.schedule();
  }

  private describePoint(spin: number, k: number, band0: number): string {
    const vm = this.vm!;
    const kf = vm.kpoints.subarray(3 * k, 3 * k + 3);
    const label = labelNear(vm, k);
    const cart = vm.cartesian
      ? ` · k = (${fixed(vm.cartesian[3 * k]!, 3)}, ${fixed(vm.cartesian[3 * k + 1]!, 3)}, ${fixed(vm.cartesian[3 * k + 2]!, 3)}) Å⁻¹`
      : '';
    const zero = this.refChoice.subscript ? `E − E_${this.refChoice.subscript}` : 'E';
    const spinText = vm.nSpin === 2 ? (spin === 0 ? ' (spin ↑)' : ' (spin ↓)') : '';
    return `k-point ${k + 1}${label ? ` ${label}` : ''} · k = ${fracK(kf)} (fractional)${cart} · band ${band0 + 1}${spinText} · ${zero} = ${fixed(energyAt(vm, spin, k, band0) - this.refChoice.offset, 4)} eV`;
  }

  private onClick(ev: MouseEvent): void {
    if (!this.vm) return;
    const p = this.localPoint(ev);
    const c = this.snap(p.x, p.y);
    if (!c) {
      this.setStatus(`No band minimum or maximum within ${SNAP_TOLERANCE_PX} px of the click: click closer to one (or zoom in).`);
      return;
    }
    this.select(c);
    this.requestFit(c, true);
  }

  private snap(x: number, y: number): Candidate | null {
    const spins = this.spins();
    const list = this.candidates;
    const zx = this.zx;
    const zy = this.zy;
    const off = this.refChoice.offset;
    const vm = this.vm!;
    const screen: ScreenCandidate[] = [];
    for (let i = 0; i < list.length; i++) {
      const c = list[i]!;
      if (!spins.includes(c.spin)) continue;
      const px = zx(vm.distance[c.kIndex]!);
      if (Math.abs(px - x) > SNAP_TOLERANCE_PX) continue;
      const py = zy(c.eV - off);
      if (Math.abs(py - y) > SNAP_TOLERANCE_PX) continue;
      screen.push({ px, py, id: i });
    }
    const hit = snapToCandidate(x, y, screen, SNAP_TOLERANCE_PX);
    return hit ? list[hit.id]! : null;
  }

  private select(c: Candidate): void {
    this.selected = c;
    const name = c.kind ? kindName(c.kind) : c.sign > 0 ? 'Local maximum' : 'Local minimum';
    this.setStatus(`Selected: ${name}, ${this.describePoint(c.spin, c.kIndex, c.band0)}. Enter fits it.`);
    this.schedule();
  }

  private onKey(ev: KeyboardEvent): void {
    const vm = this.vm;
    if (!vm) return;
    const key = ev.key;
    if (key === 'ArrowLeft' || key === 'ArrowRight' || key === 'ArrowUp' || key === 'ArrowDown') {
      ev.preventDefault();
      const next = this.neighbourCandidate(key);
      if (next) {
        this.select(next);
        this.ensureVisible(next);
      }
    } else if (key === 'Enter' || key === ' ') {
      ev.preventDefault();
      if (this.selected) this.requestFit(this.selected, true);
      else this.setStatus('Select an extremum first: the arrow keys move between them.');
    } else if (key === 'Escape') {
      this.selected = null;
      this.schedule();
    } else if (key === '+' || key === '=') {
      this.svg.call(this.zoomBehavior.scaleBy, 1.5);
    } else if (key === '-') {
      this.svg.call(this.zoomBehavior.scaleBy, 1 / 1.5);
    } else if (key === '0') {
      this.resetZoom();
    }
  }

  /** Arrow keys: band edges and the listed extrema first, then the other local extrema (keyNavigation.ts). */
  private neighbourCandidate(key: string): Candidate | null {
    const spins = this.spins();
    const list = this.candidates.filter((c) => spins.includes(c.spin));
    const vm = this.vm!;
    return nextCandidate(list, this.selected, key as ArrowKey, (k) => vm.distance[k]!);
  }

  private ensureVisible(c: Candidate): void {
    const p = this.screenOf(c.spin, c.kIndex, c.band0);
    if (!p) return;
    const pw = this.width - MARGIN.left - MARGIN.right;
    const ph = this.height - MARGIN.top - MARGIN.bottom;
    if (p.x < MARGIN.left || p.x > MARGIN.left + pw || p.y < MARGIN.top || p.y > MARGIN.top + ph) {
      this.svg.call(this.zoomBehavior.translateTo, this.baseX(this.vm!.distance[c.kIndex]!), this.baseY(c.eV - this.refChoice.offset));
    }
  }

  private requestFit(c: FitTarget & { kind?: string | null; sign?: number }, withScan: boolean): void {
    const requestId = this.nextRequestId++;
    // A candidate is an extremum by name (maximum or minimum): the host fits exactly it, never another.
    const maximum = typeof c.sign === 'number' && c.sign !== 0 ? c.sign > 0 : c.maximum;
    const target: FitTarget = { spin: c.spin, kIndex: c.kIndex, band0: c.band0, ...(typeof maximum === 'boolean' ? { maximum } : {}) };
    this.latestFitRequest = requestId;
    this.pendingTargets.set(requestId, { target, window_meV: this.window_meV, method: this.method, kind: 'fit' });
    this.panel.showPending(`band ${c.band0 + 1} at k-point ${c.kIndex + 1}`);
    this.post({ type: ViewToHostType.RequestFit, requestId, ...target, window_meV: this.window_meV, method: this.method, withScan });
  }

  private onFitResult(m: FitResultMessage): void {
    const p = this.pendingTargets.get(m.requestId);
    this.pendingTargets.delete(m.requestId);
    if (m.requestId !== this.latestFitRequest) return; // a newer refit is on its way
    const window_meV = p?.window_meV ?? this.window_meV;
    const method = p?.method ?? this.method;
    this.fit = { target: m.target, extremum: m.extremum, curves: m.curves, window_meV, method };
    if (m.scan) this.scan = m.scan;
    const rel = { value: m.extremum.eV - this.refChoice.offset, zero: this.refChoice.subscript ? `E_${this.refChoice.subscript}` : '' };
    this.panel.showResult(m.extremum, rel, window_meV, method);
    this.showReview(m.target, m.extremum);
    this.panel.setScan(this.scan, window_meV);
    const key = `${m.target.spin}:${m.target.kIndex}:${m.target.band0}`;
    this.saved.delete(key); // re-inserted last: the state's last fit is the one shown
    this.saved.set(key, { ...m.target, window_meV, method });
    this.saveViewState();
    this.setStatus(
      `Fit done: ${kindName(m.extremum.kind)} of band ${m.extremum.band}, ${m.extremum.masses.map((f) => `${f.towards} ${sig(f.mass, 3)} mₑ`).join(', ') || 'no direction fitted'}.`,
    );
    this.schedule();
  }

  /** The saved review of this extremum (its band or any band of its degenerate group, at its k-point). */
  private showReview(t: FitTarget, x: ExtremumReport): void {
    const first = x.band - 1;
    const bands = [
      t.band0,
      ...Array.from({ length: Math.max(1, x.degenerateBands ?? 1) }, (_, i) => first + (x.kind === 'vbm' || x.kind === 'peak' ? -i : i)),
    ];
    this.review.show(t.spin, t.kIndex, bands);
  }

  private updateSaveState(): void {
    this.saveBtn.disabled = this.env.readOnly;
    if (this.env.readOnly) {
      const why = this.env.readOnlyReason ?? 'This workspace is read-only, so annotations cannot be saved.';
      this.saveBtn.title = why;
      this.saveNote.textContent = why;
    } else {
      this.saveBtn.title = 'Write the fits you made to the annotations file beside the run';
      this.saveNote.textContent = '';
    }
  }

  private save(): void {
    if (this.env.readOnly) {
      this.setStatus(this.env.readOnlyReason ?? 'This workspace is read-only, so annotations cannot be saved.');
      return;
    }
    this.post({ type: ViewToHostType.Save, entries: [...this.saved.values()] });
    this.setStatus('Saving …');
  }

  private exportInput(): Parameters<typeof buildExportSvg>[0] {
    const vm = this.vm!;
    const xd = this.zx.domain() as [number, number];
    const yd = this.zy.domain() as [number, number];
    return {
      vm,
      spins: this.spins(),
      reference: this.refChoice,
      xDomain: [Math.min(xd[0], xd[1]), Math.max(xd[0], xd[1])],
      yDomain: [Math.min(yd[0], yd[1]), Math.max(yd[0], yd[1])],
      marks: vm.marks,
      curves: this.fit?.curves ?? [],
    };
  }

  async exportPlot(format: ExportFormat): Promise<void> {
    if (!this.vm) {
      this.setStatus('Nothing to export yet.');
      return;
    }
    const { svg, width, height } = buildExportSvg(this.exportInput());
    if (format === 'svg') {
      this.post({ type: ViewToHostType.Export, format: 'svg', data: svg, width, height });
      return;
    }
    try {
      const size = pngSize();
      const bytes = await rasterise(svg, size.width, size.height);
      this.post({ type: ViewToHostType.Export, format: 'png', data: bytes, width: size.width, height: size.height });
    } catch (e) {
      this.setStatus(`The PNG could not be made: ${e instanceof Error ? e.message : String(e)}`);
    }
  }

  private showMessage(text: string): void {
    this.message.hidden = false;
    this.message.textContent = text;
  }

  private setStatus(text: string): void {
    this.status.textContent = text;
  }
}

function sameTarget(a: FitTarget, b: FitTarget): boolean {
  return a.spin === b.spin && a.kIndex === b.kIndex && a.band0 === b.band0;
}

/** SVG text → PNG bytes through an image and a canvas (no network; a data: URL). */
async function rasterise(svg: string, width: number, height: number): Promise<Uint8Array> {
  const img = new Image(width, height);
  const url = `data:image/svg+xml;base64,${btoa(unescape(encodeURIComponent(svg)))}`;
  await new Promise<void>((resolve, reject) => {
    img.addEventListener('load', () => resolve());
    img.addEventListener('error', () => reject(new Error('the SVG did not load as an image')));
    img.src = url;
  });
  const canvas = document.createElement('canvas');
  canvas.width = width;
  canvas.height = height;
  const ctx = canvas.getContext('2d');
  if (!ctx) throw new Error('no 2D canvas');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, width, height);
  ctx.drawImage(img, 0, 0, width, height);
  const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/png'));
  if (!blob) throw new Error('the canvas gave no PNG');
  return new Uint8Array(await blob.arrayBuffer());
}

// Start, exposing the instance for tests and the benchmark (read-only use).
const app = new BandViewApp(vscodeApi());
(window as unknown as { valleyscopeBandView: BandViewApp }).valleyscopeBandView = app;
