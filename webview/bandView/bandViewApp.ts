/**
 * The band view's state and the host's messages: the run shown, the energy zero and spin channels, the
 * selection (plotSelection.ts), drawing (canvas bands, SVG overlay) on the next frame, save and export. The
 * pieces are their own modules; main.ts wires the page's events to the methods here.
 */
import {
  HostToViewType,
  ViewToHostType,
  type BandData,
  type EnvironmentData,
  type ExportFormat,
  type FitTarget,
  type HostToViewMessage,
  type SaveEntry,
  type ViewToHostMessage,
} from '../../src/protocol';
import { readPalette, type Palette } from '../shared/theme';
import type { VsCodeApi } from '../shared/vscodeApi';
import { BandRenderer, type DrawStats } from './bandRenderer';
import { chooseReference, type ReferenceChoice } from './energyReference';
import { FitPanel } from './fitPanel';
import { FitRequests } from './fitRequests';
import { reachableCandidates } from './keyNavigation';
import { PlotSelection } from './plotSelection';
import { visibleSpins } from './navigation';
import { buildPage, plotLabel, type PlotElements } from './page';
import { drawOverlay } from './plotOverlay';
import { MARGIN, PlotScales } from './plotScales';
import { exportMessage } from './rasterise';
import { ReviewNote } from './reviewNote';
import { READ_ONLY_NOTE, Toolbar } from './toolbar';
import { runMethods, ViewChoices } from './viewChoices';
import { buildViewModel, energyAt, type ViewModel } from './viewModel';
import { meshPointsSentence } from './meshPoints';
import type { ReferenceName, SpinName } from './viewState';

export class BandViewApp {
  vm: ViewModel | null = null;
  lastDraw: (DrawStats & { ms: number }) | null = null;
  readonly toolbar = new Toolbar();
  private readonly review = new ReviewNote();
  private readonly panel: FitPanel;
  readonly page: PlotElements;
  readonly scales: PlotScales;
  /** The selected extremum and the hover point (main.ts sends it the pointer and the keys). */
  readonly nav: PlotSelection;
  private readonly renderer: BandRenderer;
  private readonly choices: ViewChoices;
  private readonly fits: FitRequests;
  private env: EnvironmentData = { theme: 'dark', readOnly: false, readOnlyReason: null };
  private palette: Palette;
  private refChoice: ReferenceChoice = chooseReference('raw', { vbm_eV: null, fermiEnergy: null });
  /** A fit to show again once the first data has been drawn (after a window reload). */
  private restoreFit: SaveEntry | null = null;
  private frame = 0;

  constructor(private readonly api: VsCodeApi) {
    this.palette = readPalette(document);
    this.choices = new ViewChoices(api);
    this.panel = new FitPanel({ onWindow: (w) => this.setWindow(w), onMethod: (m) => this.setMethod(m) });
    // The saved review (status and note) of the fitted extremum, under the panel's title.
    this.panel.root.firstElementChild?.after(this.review.root);
    this.page = buildPage(this.toolbar, this.panel.root);
    this.renderer = new BandRenderer(this.page.canvas);
    this.scales = new PlotScales(this.page.svg, () => this.schedule());
    const setStatus = (text: string): void => this.setStatus(text);
    this.fits = new FitRequests({ post: (m) => this.post(m), panel: this.panel, review: this.review, choices: this.choices, setStatus });
    this.nav = new PlotSelection({
      vm: () => this.vm,
      reference: () => this.refChoice,
      spins: () => this.spins(),
      scales: this.scales,
      screenOf: (s, k, b) => this.screenOf(s, k, b),
      fit: (c) => this.fits.request(c, true),
      setStatus,
      describe: (text) => (this.page.readout.textContent = text),
      schedule: () => this.schedule(),
    });
    this.toolbar.showSaveState(this.env);
  }

  /** The zoom transform (tests and the benchmark read it). */
  get transform(): PlotScales['transform'] {
    return this.scales.transform;
  }

  post(m: ViewToHostMessage): void {
    this.api.postMessage(m);
  }

  // Messages ---------------------------------------------------------------------------------------------

  /** A host message could not be shown: the sentence in the plot, and the error to the host. */
  showError(message: string): void {
    this.showMessage(`The band view could not show this data: ${message}`);
    this.post({ type: ViewToHostType.ViewError, message: message.slice(0, 3000) });
  }

  handle(m: HostToViewMessage): void {
    switch (m.type) {
      case HostToViewType.BandData:
        this.env = m.environment;
        this.setData(m.data);
        if (this.restoreFit) {
          const f = this.restoreFit;
          this.restoreFit = null;
          this.fits.request(f, true);
        }
        break;
      case HostToViewType.Environment:
        this.env = m.environment;
        this.themeChanged();
        this.toolbar.showSaveState(this.env);
        break;
      case HostToViewType.FitResult:
        if (this.fits.onResult(m, this.refChoice)) this.schedule();
        break;
      case HostToViewType.WindowScanResult:
        this.fits.onScan(m, this.nav.selected);
        break;
      case HostToViewType.RequestFailed:
        this.fits.onFailed(m);
        break;
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
        this.fits.showReview();
        break;
      case HostToViewType.LoadFailed:
        this.review.clear();
        this.vm = null;
        this.fits.clear(true);
        this.nav.selected = null;
        this.panel.showHint('No band structure is loaded.');
        this.showMessage(m.message);
        this.render();
        break;
    }
  }

  private setData(data: BandData): void {
    const prev = this.vm;
    this.vm = buildViewModel(data);
    this.page.message.hidden = true;
    const restore = this.choices.adopt(data, prev === null);
    if (prev === null) {
      this.panel.setMethods(runMethods(data), this.choices.method);
      this.panel.setWindow(this.choices.window_meV);
      this.restoreFit = restore;
    }
    this.toolbar.showRun(data, this.choices.reference, this.choices.spin);
    this.panel.setCautions(data.report.cautions);
    const vm = this.vm;
    this.page.plot.setAttribute(
      'aria-label',
      plotLabel(data.title, data.nBands, data.nk, vm.meshPoints && meshPointsSentence(vm.meshPoints)),
    );
    this.nav.candidates = reachableCandidates(vm.marks, vm.extrema, data.setAside, (s, k, b) => energyAt(vm, s, k, b));
    // Keep the selection and zoom on a refresh of the same run (a growing file); reset otherwise.
    if (!prev || prev.nBands !== vm.nBands || prev.data.title !== data.title) {
      this.nav.selected = null;
      this.fits.clear(false);
      this.resetZoom();
    }
    this.applyReference();
    this.layout();
  }

  // Choices ----------------------------------------------------------------------------------------------

  setReference(reference: ReferenceName): void {
    this.choices.reference = reference;
    this.choices.persist();
    this.applyReference();
    this.render();
  }

  setSpin(spin: SpinName): void {
    this.choices.spin = spin;
    this.choices.persist();
    this.render();
  }

  private setWindow(window_meV: number): void {
    this.choices.window_meV = window_meV;
    this.choices.persist();
    if (this.nav.selected) this.fits.request(this.nav.selected, false);
    this.render();
  }

  private setMethod(method: string): void {
    this.choices.method = method;
    this.choices.persist();
    if (this.nav.selected) this.fits.request(this.nav.selected, true);
  }

  private applyReference(): void {
    const vm = this.vm;
    if (!vm) return;
    this.refChoice = chooseReference(this.choices.reference, { vbm_eV: vm.data.vbm_eV, fermiEnergy: vm.data.fermiEnergy });
    if (this.refChoice.fallbackNote) this.setStatus(this.refChoice.fallbackNote);
    this.scales.setBase(vm, this.refChoice.offset);
  }

  private spins(): number[] {
    return visibleSpins(this.vm?.nSpin ?? null, this.choices.spin);
  }

  themeChanged(): void {
    this.palette = readPalette(document);
    this.schedule();
  }

  // Geometry ---------------------------------------------------------------------------------------------

  layout(): void {
    const r = this.page.plot.getBoundingClientRect();
    this.scales.resize(r.width, r.height);
    this.page.canvas.style.left = `${MARGIN.left}px`;
    this.page.canvas.style.top = `${MARGIN.top}px`;
    this.renderer.resize(this.scales.pw, this.scales.ph, window.devicePixelRatio || 1);
    this.scales.setBase(this.vm, this.refChoice.offset);
    this.render();
  }

  resetZoom(): void {
    this.scales.reset();
  }

  /** Sets the zoom transform (scale k, translation x, y) as a wheel or drag would. */
  setZoom(k: number, x: number, y: number): void {
    this.scales.setZoom(k, x, y);
  }

  /** The selected extremum (tests and the benchmark read it; the view does not depend on callers). */
  selection(): FitTarget | null {
    const c = this.nav.selected;
    return c ? { spin: c.spin, kIndex: c.kIndex, band0: c.band0 } : null;
  }

  /** Screen position (CSS px within the plot element) of a band point. */
  screenOf(spin: number, kIndex: number, band0: number): { x: number; y: number } | null {
    const vm = this.vm;
    if (!vm) return null;
    return { x: this.scales.zx(vm.distance[kIndex]!), y: this.scales.zy(energyAt(vm, spin, kIndex, band0) - this.refChoice.offset) };
  }

  // Drawing ----------------------------------------------------------------------------------------------

  schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.render();
    });
  }

  /** Redraws everything now; returns the milliseconds spent on the canvas. */
  render(mode?: 'lines' | 'envelope'): number {
    const { vm, scales: s } = this;
    s.rescale();
    const { pw, ph, zx, zy } = s;
    const dpr = window.devicePixelRatio || 1;
    if (!vm || pw <= 0 || ph <= 0) {
      this.page.svg.selectAll('*').remove();
      this.renderer.resize(Math.max(1, pw), Math.max(1, ph), dpr);
      this.renderer.clear();
      this.lastDraw = null;
      return 0;
    }
    const t0 = performance.now();
    const spins = this.spins();
    const offset = this.refChoice.offset;
    const x = { a: zx(1) - zx(0), b: zx(0) - MARGIN.left };
    const y = { a: zy(1) - zy(0), b: zy(0) - MARGIN.top };
    const stats = this.renderer.draw({
      vm,
      spins,
      x,
      y,
      offset,
      width: pw,
      height: ph,
      dpr,
      palette: this.palette,
      ...(mode ? { mode } : {}),
    });
    const ms = performance.now() - t0;
    this.lastDraw = { ...stats, ms };
    this.page.canvas.dataset.mode = stats.mode;
    const sel = this.nav.selected && spins.includes(this.nav.selected.spin) ? this.nav.selected : null;
    const hov = this.nav.hover;
    drawOverlay(this.page.svg, {
      vm,
      zx,
      zy,
      pw,
      ph,
      height: s.height,
      reference: this.refChoice,
      spins,
      fit: this.fits.shown,
      selected: sel && this.screenOf(sel.spin, sel.kIndex, sel.band0),
      hover: hov && this.screenOf(hov.spin, hov.k, hov.band0),
    });
    return ms;
  }

  // Save and export ----------------------------------------------------------------------------------------

  save(): void {
    if (this.env.readOnly) {
      this.setStatus(this.env.readOnlyReason ?? READ_ONLY_NOTE);
      return;
    }
    this.post({ type: ViewToHostType.Save, entries: this.choices.entries() });
    this.setStatus('Saving …');
  }

  async exportPlot(format: ExportFormat): Promise<void> {
    const vm = this.vm;
    if (!vm) {
      this.setStatus('Nothing to export yet.');
      return;
    }
    const [x0, x1] = this.scales.zx.domain() as [number, number];
    const [y0, y1] = this.scales.zy.domain() as [number, number];
    const curves = this.fits.shown?.curves ?? [];
    const xDomain: [number, number] = [Math.min(x0, x1), Math.max(x0, x1)];
    const yDomain: [number, number] = [Math.min(y0, y1), Math.max(y0, y1)];
    const input = { vm, spins: this.spins(), reference: this.refChoice, xDomain, yDomain, marks: vm.marks, curves };
    try {
      this.post(await exportMessage(input, format));
    } catch (e) {
      this.setStatus(`The ${format.toUpperCase()} could not be made: ${e instanceof Error ? e.message : String(e)}`);
    }
  }

  private showMessage(text: string): void {
    this.page.message.hidden = false;
    this.page.message.textContent = text;
  }

  private setStatus(text: string): void {
    this.page.status.textContent = text;
  }
}
