/**
 * The overlay's frame (SVG through d3): symmetry lines, separators between side-by-side runs, the zero line,
 * axes with the path labels, axis titles; and the legend of the overlaid runs with their line patterns.
 */
import { select } from 'd3-selection';
import { scaleLinear } from 'd3-scale';
import { axisLeft } from 'd3-axis';
import type { CompareBandRun } from '../../src/protocol';
import { el } from '../shared/controls';
import { E_HIGH, E_LOW } from './overlayData';
import type { OverlayLayout } from './overlayLayout';
import { appendAxisTitles, appendNumberAxis } from './svgAxes';

const SVG_NS = 'http://www.w3.org/2000/svg';
/** Space around the plot area, CSS px. */
export const MARGIN = { top: 22, right: 12, bottom: 40, left: 54 };

/** Draws the frame of a plot area `pw` × `ph` inside an SVG `height` px high. */
export function drawOverlayFrame(svgEl: SVGSVGElement, layout: OverlayLayout, pw: number, ph: number, height: number): void {
  const svg = select(svgEl);
  const x = scaleLinear().domain([0, layout.total]).range([0, pw]);
  const y = scaleLinear().domain([E_LOW, E_HIGH]).range([ph, 0]);
  const X = (v: number): number => MARGIN.left + x(v);
  const Y = (v: number): number => MARGIN.top + y(v);
  const g = svg.append('g');
  const vertical = (cls: string, at: number): void => {
    g.append('line')
      .attr('class', cls)
      .attr('x1', X(at))
      .attr('x2', X(at))
      .attr('y1', MARGIN.top)
      .attr('y2', MARGIN.top + ph);
  };
  for (const t of layout.ticks) vertical('cv-sym-line', t.x);
  for (const s of layout.separators) vertical('cv-separator', s);
  g.append('line')
    .attr('class', 'cv-zero')
    .attr('x1', MARGIN.left)
    .attr('x2', MARGIN.left + pw)
    .attr('y1', Y(0))
    .attr('y2', Y(0));
  svg.append('rect').attr('class', 'cv-frame').attr('x', MARGIN.left).attr('y', MARGIN.top).attr('width', pw).attr('height', ph);
  appendNumberAxis(svg, 'cv-axis cv-axis-y', `translate(${MARGIN.left},${MARGIN.top})`, axisLeft(y), Math.max(3, Math.round(ph / 40)));
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
  const xTitle = layout.shared
    ? 'k-path (segments of each run stretched onto the first run’s)'
    : 'k-path of each run (paths differ: side by side)';
  const yt = appendAxisTitles(svg, MARGIN.left + pw / 2, height, MARGIN.top + ph / 2, xTitle);
  yt.append('tspan').text('E − E');
  yt.append('tspan').attr('baseline-shift', 'sub').attr('font-size', '9px').text('VBM');
  yt.append('tspan').text(' (eV)');
}

/** What a run's zero is when it is not its VBM. */
function alignmentNote(r: CompareBandRun): string {
  if (r.alignedAt === 'vbm') return '';
  return r.alignedAt === 'fermi' ? ' (no gap: aligned at its Fermi level)' : ' (no gap or Fermi level: not aligned)';
}

/** One legend item: a line in the run's colour and pattern, its number when side by side, its name. */
export function legendItem(r: CompareBandRun, name: string, colour: string, dash: number[], number: number | null): HTMLElement {
  const item = el('span', 'cv-legend-item');
  const sw = document.createElementNS(SVG_NS, 'svg');
  const ln = document.createElementNS(SVG_NS, 'line');
  ln.setAttribute('x1', '0');
  ln.setAttribute('x2', '28');
  ln.setAttribute('y1', '4');
  ln.setAttribute('y2', '4');
  ln.setAttribute('stroke', colour);
  ln.setAttribute('stroke-width', '2');
  if (dash.length) ln.setAttribute('stroke-dasharray', dash.join(' '));
  sw.append(ln);
  item.append(sw, document.createTextNode(`${number === null ? '' : `${number}: `}${name}${alignmentNote(r)}`));
  return item;
}

/** The sentence above the overlay. */
export function overlayNoteText(count: number, shared: boolean): string {
  return shared
    ? `${count} run${count === 1 ? '' : 's'} on one path (same labelled segments), each shifted so its VBM is at 0.`
    : `${count} runs with different paths, side by side, each shifted so its VBM is at 0.`;
}
