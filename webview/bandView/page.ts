/**
 * The band view's page: the toolbar on top, the plot (band canvas under an SVG overlay, with a message for
 * loading and errors) beside the side panel, then the pointer read-out and the status line.
 */
import { select } from 'd3-selection';
import { el } from '../shared/controls';
import type { OverlaySvg } from './plotScales';
import type { Toolbar } from './toolbar';

const SVG_NS = 'http://www.w3.org/2000/svg';

export interface PlotElements {
  plot: HTMLElement;
  canvas: HTMLCanvasElement;
  svg: OverlaySvg;
  overlay: SVGSVGElement;
  message: HTMLElement;
  readout: HTMLElement;
  status: HTMLElement;
}

/** Builds the page inside #app (or the body) and returns the plot's elements. */
export function buildPage(toolbar: Toolbar, side: HTMLElement): PlotElements {
  const plot = el('div', 'vs-plot');
  plot.tabIndex = 0;
  plot.setAttribute('role', 'application');
  plot.setAttribute('aria-roledescription', 'band structure plot');
  plot.setAttribute('aria-label', 'Band structure plot (no data yet)');
  const canvas = el('canvas', 'vs-bands');
  canvas.setAttribute('aria-hidden', 'true');
  const svgEl = document.createElementNS(SVG_NS, 'svg');
  svgEl.classList.add('vs-overlay');
  svgEl.setAttribute('aria-hidden', 'true');
  const message = el('div', 'vs-message', 'Loading the band structure …');
  plot.append(canvas, svgEl, message);
  const main = el('div', 'vs-main');
  main.append(plot, side);
  const readout = el('div', 'vs-readout');
  readout.id = 'vs-readout';
  readout.setAttribute('aria-live', 'polite');
  plot.setAttribute('aria-describedby', 'vs-readout');
  const status = el('div', 'vs-status');
  status.setAttribute('role', 'status');
  const root = el('div', 'vs-root');
  root.append(toolbar.bar, toolbar.cautionLine, toolbar.banner, main, readout, status);
  (document.getElementById('app') ?? document.body).append(root);
  return { plot, canvas, svg: select(svgEl), overlay: svgEl, message, readout, status };
}

/** The plot's accessible name once a run is shown: what it is and the keys that work on it (and a note, e.g. on mesh points). */
export function plotLabel(title: string, nBands: number, nk: number, note?: string): string {
  return `Band structure of ${title}: ${nBands} bands at ${nk} k-points. Arrow keys move between band extrema, Enter fits the selected one, plus and minus zoom, 0 resets.${note ? ` ${note}` : ''}`;
}
