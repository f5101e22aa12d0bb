/**
 * The trend plot (SVG through d3): one point per run, lines joining the runs of one material, a legend of
 * the series. A point opens its run on click, or on Enter / Space when focused.
 */
import { select } from 'd3-selection';
import { scaleLinear } from 'd3-scale';
import { axisBottom, axisLeft } from 'd3-axis';
import { line } from 'd3-shape';
import type { CompareRow, CompareTable } from '../../src/protocol';
import { el } from '../shared/controls';
import { columnTitle, formatValue } from './tableText';
import { appendAxisTitles, appendNumberAxis } from './svgAxes';
import {
  emptyTrendText,
  paddedDomain,
  seriesColour,
  seriesLegendText,
  trendNoteText,
  trendPoints,
  trendSeries,
  type TrendPoint,
  type TrendSeries,
} from './trendData';

const MARGIN = { top: 14, right: 16, bottom: 44, left: 62 };

/** The elements the plot draws into. */
export interface TrendElements {
  plot: HTMLElement;
  svg: SVGSVGElement;
  message: HTMLElement;
  note: HTMLElement;
  legend: HTMLElement;
}

export interface TrendInput {
  table: CompareTable;
  xKey: string;
  yKey: string;
  userValues: ReadonlyMap<string, number>;
  open(row: CompareRow): void;
}

/** What the last drawing showed (tests read it). */
export interface TrendDrawn {
  points: { rowId: string; x: number; y: number }[];
  series: TrendSeries[];
}

const stale = (r: CompareRow): boolean => r.annotations === 'stale' && r.origin === 'annotations';

/** Draws the plot; clears it when there is no table. */
export function drawTrend(e: TrendElements, input: TrendInput | null): TrendDrawn {
  const svg = select(e.svg);
  svg.selectAll('*').remove();
  if (!input) return { points: [], series: [] };
  const { table: t, xKey, yKey } = input;
  const rect = e.plot.getBoundingClientRect();
  const width = Math.max(100, Math.floor(rect.width));
  const height = Math.max(100, Math.floor(rect.height));
  const pw = width - MARGIN.left - MARGIN.right;
  const ph = height - MARGIN.top - MARGIN.bottom;
  const pts = trendPoints(t.rows, xKey, yKey, input.userValues);
  const points = pts.map((p) => ({ rowId: p.row.id, x: p.x, y: p.y }));
  e.note.textContent = trendNoteText(pts.length, t.rows.length);
  if (pts.length === 0) {
    e.message.hidden = false;
    e.message.textContent = emptyTrendText(xKey);
    return { points, series: [] };
  }
  e.message.hidden = true;
  const xs = pts.map((p) => p.x);
  const ys = pts.map((p) => p.y);
  const x = scaleLinear()
    .domain(paddedDomain(Math.min(...xs), Math.max(...xs)))
    .range([MARGIN.left, MARGIN.left + pw]);
  const y = scaleLinear()
    .domain(paddedDomain(Math.min(...ys), Math.max(...ys)))
    .range([MARGIN.top + ph, MARGIN.top]);
  const xTitle = columnTitle(t.columns, xKey);
  const yTitle = columnTitle(t.columns, yKey);
  svg.append('rect').attr('class', 'cv-frame').attr('x', MARGIN.left).attr('y', MARGIN.top).attr('width', pw).attr('height', ph);
  appendNumberAxis(svg, 'cv-axis', `translate(0,${MARGIN.top + ph})`, axisBottom(x), Math.max(2, Math.round(pw / 70)));
  appendNumberAxis(svg, 'cv-axis', `translate(${MARGIN.left},0)`, axisLeft(y), Math.max(2, Math.round(ph / 40)));
  appendAxisTitles(svg, MARGIN.left + pw / 2, height, MARGIN.top + ph / 2, xTitle).text(yTitle);
  // Lines join only runs of one material; a run without a structure joins nothing.
  const series = trendSeries(pts);
  for (const sr of series) {
    const sp = pts.filter((p) => p.row.series === sr.name);
    if (sp.length < 2) continue;
    svg
      .append('path')
      .attr('class', 'cv-trend-line')
      .attr('data-series', sr.name)
      .style('stroke', seriesColour(series, sr.name))
      .attr(
        'd',
        line<TrendPoint>()
          .x((p) => x(p.x))
          .y((p) => y(p.y))(sp) ?? '',
      );
  }
  e.legend.replaceChildren(...legendItems(pts, series));
  const xDecimals = t.columns.find((c) => c.key === xKey)?.decimals ?? 4;
  const yDecimals = t.columns.find((c) => c.key === yKey)?.decimals ?? 4;
  for (const p of pts) {
    const r = p.row;
    const xText = `${xTitle} ${formatValue(p.x, xDecimals)}`;
    const yText = `${yTitle} ${formatValue(p.y, yDecimals)}`;
    const c = svg
      .append('circle')
      .attr('data-series', r.series ?? '')
      .attr('class', `cv-point${r.isReference ? ' cv-point-ref' : ''}${stale(r) ? ' cv-point-stale' : ''}`)
      .attr('cx', x(p.x))
      .attr('cy', y(p.y))
      .attr('r', 5.5)
      .attr('tabindex', 0)
      .attr('role', 'button')
      .attr('data-row', r.id)
      .attr('aria-label', `${r.name}: ${xText}, ${yText}. Press Enter to open it.`);
    c.append('title').text(
      `${r.name}${r.series ? ` (${r.series})` : ''}\n${xTitle}: ${formatValue(p.x, xDecimals)}\n${yTitle}: ${formatValue(p.y, yDecimals)}`,
    );
    if (!r.isReference && !stale(r)) c.style('fill', seriesColour(series, r.series ?? null));
    const node = c.node()!;
    node.addEventListener('click', () => input.open(r));
    node.addEventListener('keydown', (ev) => {
      if (ev.key === 'Enter' || ev.key === ' ') {
        ev.preventDefault();
        input.open(r);
      }
    });
  }
  return { points, series };
}

function legendItems(pts: readonly TrendPoint[], series: readonly TrendSeries[]): HTMLElement[] {
  const items = series.map((sr) => {
    const item = el('span', 'cv-series-item', seriesLegendText(pts, sr));
    item.style.setProperty('--cv-swatch', seriesColour(series, sr.name));
    item.dataset.series = sr.name;
    return item;
  });
  const alone = pts.filter((p) => !p.row.series).length;
  if (alone)
    items.push(el('span', 'cv-series-item cv-series-alone', `${alone} run${alone === 1 ? '' : 's'} without a structure: not joined`));
  return items;
}
