/**
 * The side panel: what the last fit measured at the selected extremum (directional masses, hole masses as
 * positive numbers, tensor, degeneracy, valley degeneracy, averaged masses), how it was measured (method,
 * window, points, standard error), the window and method controls for live refits, the window-scan plot, and
 * the cautions that belong beside these numbers. The parts are massTable.ts, provenanceTable.ts,
 * fitControls.ts, fitWarnings.ts and scanPlot.ts.
 */
import type { ExtremumReport, WindowScanSeries } from '../../src/protocol';
import { el } from '../shared/controls';
import { fixed, fracK, sig } from '../shared/format';
import { FitControls, type FitControlCallbacks } from './fitControls';
import { dedupedWarnings } from './fitWarnings';
import { isMaximumKind } from './markers';
import { MassTable } from './massTable';
import { kindName } from './pointText';
import { provenanceParts } from './provenanceTable';
import { drawScanPlot, SERIES_COLOURS } from './scanPlot';

const SVG_NS = 'http://www.w3.org/2000/svg';

export type FitPanelCallbacks = FitControlCallbacks;

export class FitPanel {
  readonly root = el('aside', 'vs-side');
  private readonly status = el(
    'p',
    'vs-hint',
    'Click near a band minimum or maximum, or focus the plot and use the arrow keys and Enter, to measure effective masses there.',
  );
  private readonly body = el('section', 'vs-fit-body');
  private readonly head = el('div', 'vs-fit-head');
  private readonly masses = new MassTable();
  private readonly tensor = el('div', 'vs-tensor');
  private readonly degeneracy = el('dl', 'vs-degeneracy');
  private readonly provenance = el('div', 'vs-provenance');
  private readonly controls: FitControls;
  private readonly warnings = el('ul', 'vs-fit-warnings');
  private readonly scanSvg = document.createElementNS(SVG_NS, 'svg');
  private readonly scanLegend = el('div', 'vs-scan-legend');
  private readonly cautions = el('ul');
  private scan: WindowScanSeries[] = [];
  private holeSign = false;

  constructor(cb: FitPanelCallbacks) {
    this.root.setAttribute('aria-label', 'Effective-mass fit at the selected extremum');
    this.status.setAttribute('role', 'status');
    this.root.append(el('h2', 'vs-side-title', 'Curvature fit'), this.status);
    this.body.hidden = true;
    this.controls = new FitControls(cb);
    const scanBox = el('figure', 'vs-scan');
    this.scanSvg.setAttribute('role', 'img');
    this.scanSvg.setAttribute('aria-label', 'Effective mass against fit window');
    scanBox.append(el('figcaption', undefined, 'Mass against fit window (window scan)'), this.scanSvg, this.scanLegend);
    this.body.append(
      this.head,
      this.masses.root,
      this.tensor,
      this.degeneracy,
      this.provenance,
      this.controls.root,
      scanBox,
      this.warnings,
    );
    const cautionBox = el('section', 'vs-cautions');
    cautionBox.append(el('h3', undefined, 'Cautions'), this.cautions);
    this.root.append(this.body, cautionBox);
  }

  setMethods(methods: string[], current: string): void {
    this.controls.setMethods(methods, current);
  }

  setWindow(window_meV: number): void {
    this.controls.setWindow(window_meV);
  }

  setCautions(list: string[]): void {
    this.cautions.replaceChildren(...list.map((c) => el('li', undefined, c)));
    (this.cautions.parentElement as HTMLElement).hidden = list.length === 0;
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
    const zero = relEnergy.zero ? `E − ${relEnergy.zero}` : 'E';
    this.head.replaceChildren(
      el('div', 'vs-fit-kind', kindName(x.kind)),
      el(
        'div',
        'vs-fit-where',
        `band ${x.band}${x.spin === 1 ? ' (spin ↓)' : ''} · k = ${fracK(x.k)}${x.label ? ` (${x.label})` : ''} · ${zero} = ${fixed(relEnergy.value, 3)} eV`,
      ),
    );
    this.masses.show(x.masses);
    this.showTensor(x);
    this.showDegeneracy(x);
    this.provenance.replaceChildren(
      el('h3', undefined, 'How these were measured'),
      ...provenanceParts(x.masses, method, window_meV, this.masses.withBranch),
    );
    this.warnings.replaceChildren(...dedupedWarnings(x.warnings, x.masses).map((w) => el('li', undefined, w)));
    this.setWindow(window_meV);
    this.redrawScan(window_meV);
  }

  /** The mass tensor's principal values and axes (with the hole mass at a maximum), or why there is none. */
  private showTensor(x: ExtremumReport): void {
    const t = x.tensor;
    if (!t) {
      this.tensor.replaceChildren(
        el('p', 'vs-muted', 'Mass tensor: not available (needs k-points off the path around this extremum, e.g. a small grid).'),
      );
      return;
    }
    const list = el('ul');
    list.append(
      ...t.principal.map((mm, i) => {
        const ax = t.axes[i]!;
        const hole = this.holeSign && mm < 0 ? ` — hole mass ${sig(-mm, 3)} mₑ` : '';
        return el('li', undefined, `${sig(mm, 3)} mₑ along (${fixed(ax[0], 2)}, ${fixed(ax[1], 2)}, ${fixed(ax[2], 2)})${hole}`);
      }),
    );
    const points = t.points ? ` · ${t.points} points` : '';
    const residual = t.residual_meV !== undefined ? ` · residual ${sig(t.residual_meV, 2)} meV` : '';
    this.tensor.replaceChildren(
      el('h3', undefined, 'Mass tensor (principal values, cartesian axes)'),
      list,
      el('p', 'vs-muted', `method ${t.method}${points}${residual}`),
    );
  }

  /** Degeneracy and averaged masses. */
  private showDegeneracy(x: ExtremumReport): void {
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
