/**
 * The compare view's page: header bar (summary, reference, annotations rows, rescan), cautions, events,
 * "More columns", the table, the overlay and trend sections, the status line. Elements only; behaviour is
 * wired by the modules that own each part.
 */
import '@vscode-elements/elements/dist/vscode-button/index.js';
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-checkbox/index.js';
import { el, vsButton, vsSelect, type VsButton, type VsSelect } from '../shared/controls';
import type { OverlayElements } from './overlayView';
import type { TrendElements } from './trendPlot';

export type VsCheckbox = HTMLElement & { checked: boolean };

const SVG_NS = 'http://www.w3.org/2000/svg';

export interface ComparePage {
  root: HTMLElement;
  summary: HTMLElement;
  refSelect: VsSelect;
  annotationsBox: VsCheckbox;
  rescanBtn: VsButton;
  cautions: HTMLUListElement;
  events: HTMLElement;
  moreBox: VsCheckbox;
  table: HTMLTableElement;
  overlay: OverlayElements;
  trend: TrendElements;
  trendY: VsSelect;
  trendX: VsSelect;
  status: HTMLElement;
}

function checkbox(cls: string, label: string, title: string): VsCheckbox {
  const box = document.createElement('vscode-checkbox') as VsCheckbox;
  box.classList.add(cls);
  box.setAttribute('label', label);
  box.title = title;
  return box;
}

function labelled(text: string, control: HTMLElement): HTMLLabelElement {
  const label = el('label', undefined, text);
  label.append(control);
  return label;
}

function overlaySection(): { section: HTMLElement; overlay: OverlayElements } {
  const section = el('section', 'cv-section cv-overlay');
  section.append(el('h2', undefined, 'Band structures, aligned at each run’s VBM'));
  const note = el('p', 'cv-note', 'Tick runs in the table (up to 8) to draw their bands here.');
  const plot = el('div', 'cv-overlay-plot');
  plot.setAttribute('role', 'img');
  plot.setAttribute('aria-label', 'Overlaid band structures (none ticked yet)');
  const canvas = el('canvas', 'cv-overlay-canvas');
  canvas.setAttribute('aria-hidden', 'true');
  const svg = document.createElementNS(SVG_NS, 'svg');
  svg.setAttribute('aria-hidden', 'true');
  const message = el('div', 'cv-message', 'No runs ticked.');
  plot.append(canvas, svg, message);
  const legend = el('div', 'cv-legend');
  legend.setAttribute('aria-label', 'Legend of the overlaid runs');
  section.append(note, plot, legend);
  return { section, overlay: { note, plot, canvas, svg, message, legend } };
}

function trendSection(): { section: HTMLElement; trend: TrendElements; trendY: VsSelect; trendX: VsSelect } {
  const section = el('section', 'cv-section cv-trend');
  section.append(el('h2', undefined, 'Trend across runs'));
  const controls = el('div', 'cv-controls');
  const trendY = vsSelect('Quantity on the vertical axis');
  trendY.classList.add('cv-trend-y');
  const trendX = vsSelect('Quantity on the horizontal axis');
  trendX.classList.add('cv-trend-x');
  controls.append(labelled('Quantity', trendY), labelled('against', trendX));
  const note = el('p', 'cv-note');
  const plot = el('div', 'cv-trend-plot');
  const svg = document.createElementNS(SVG_NS, 'svg');
  svg.classList.add('cv-trend-svg');
  svg.setAttribute('role', 'group');
  svg.setAttribute('aria-label', 'Trend plot: one point per run; Tab moves between points, Enter opens the run');
  const message = el('div', 'cv-message');
  message.hidden = true;
  plot.append(svg, message);
  const legend = el('div', 'cv-trend-legend');
  legend.setAttribute('aria-label', 'Series of the trend plot: one line per material');
  section.append(controls, note, plot, legend);
  return { section, trend: { plot, svg, message, note, legend }, trendY, trendX };
}

/** Builds the page into #app (or the body). */
export function buildComparePage(): ComparePage {
  const root = el('div', 'cv-root');
  const bar = el('header', 'cv-bar');
  const summary = el('span', 'cv-summary', 'Looking for runs …');
  const refSelect = vsSelect('Reference run: differences are taken against it');
  refSelect.classList.add('cv-reference');
  const annotationsBox = checkbox(
    'cv-annotations-rows',
    'Annotations files as rows of their own',
    'Off: an annotations file is a flag on its data run (saved / stale). On: it is also a row, with the numbers as saved.',
  );
  const rescanBtn = vsButton('Look for runs again', true);
  rescanBtn.classList.add('cv-rescan');
  bar.append(el('h1', 'cv-title', 'Run comparison'), summary, labelled('Differences against', refSelect), annotationsBox, rescanBtn);
  const cautions = el('ul', 'cv-cautions');
  cautions.setAttribute('aria-label', 'Cautions');
  const events = el('section', 'cv-events');
  events.setAttribute('aria-label', 'What changed against the reference');
  events.hidden = true;
  const tableWrap = el('div', 'cv-table-wrap');
  const table = el('table', 'cv-table');
  table.setAttribute('aria-label', 'Runs in the workspace');
  tableWrap.append(table);
  const moreBox = checkbox(
    'cv-more-columns',
    'More columns',
    'Off: gap, edges, valley degeneracy, density-of-states and conductivity masses, conventional a. On: also every directional mass, every matched valley, strains and cell vectors.',
  );
  const plots = el('div', 'cv-plots');
  const ov = overlaySection();
  const tr = trendSection();
  plots.append(ov.section, tr.section);
  const status = el('div', 'cv-status');
  status.setAttribute('role', 'status');
  root.append(bar, cautions, events, moreBox, tableWrap, plots, status);
  (document.getElementById('app') ?? document.body).append(root);
  return { root, summary, refSelect, annotationsBox, rescanBtn, cautions, events, moreBox, table, status, overlay: ov.overlay, ...tr };
}
