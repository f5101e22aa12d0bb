/**
 * The window-scan plot: effective mass against fit window, one line per direction, error bars of one
 * standard error, the current window marked. Small SVG with d3 scales; colours from theme variables.
 */
import { select } from 'd3-selection';
import { scaleLinear, scaleLog } from 'd3-scale';
import { axisBottom, axisLeft } from 'd3-axis';
import { line } from 'd3-shape';
import type { WindowScanSeries } from '../../src/protocol';

export const SERIES_COLOURS = [
  'var(--vscode-charts-green)',
  'var(--vscode-charts-blue)',
  'var(--vscode-charts-purple)',
  'var(--vscode-charts-orange)',
  'var(--vscode-charts-red)',
  'var(--vscode-charts-yellow)',
];

export function drawScanPlot(svgEl: SVGSVGElement, series: WindowScanSeries[], currentWindow: number, holeSign: boolean): void {
  const W = 284;
  const H = 150;
  const m = { left: 46, right: 8, top: 8, bottom: 34 };
  const svg = select(svgEl).attr('viewBox', `0 0 ${W} ${H}`).attr('width', W).attr('height', H);
  svg.selectAll('*').remove();
  const pts = series.flatMap((s) => s.points.filter((p) => Number.isFinite(p.mass)));
  if (pts.length === 0) {
    svg
      .append('text')
      .attr('x', W / 2)
      .attr('y', H / 2)
      .attr('text-anchor', 'middle')
      .attr('class', 'vs-muted')
      .text('No window scan yet');
    return;
  }
  const val = (mass: number): number => (holeSign ? -mass : mass);
  const wins = pts.map((p) => p.window_meV);
  const wMin = Math.min(...wins, currentWindow);
  const wMax = Math.max(...wins, currentWindow);
  // Logarithmic like the window slider (windowSlider.ts), whenever the windows allow it.
  const useLog = wMin > 0 && wMax > wMin;
  const x = (useLog ? scaleLog() : scaleLinear()).domain([wMin, wMax]).range([m.left, W - m.right]);
  svg.attr('data-x-scale', useLog ? 'log' : 'linear');
  const lo = Math.min(...pts.map((p) => val(p.mass) - (Number.isFinite(p.stderr) ? p.stderr : 0)));
  const hi = Math.max(...pts.map((p) => val(p.mass) + (Number.isFinite(p.stderr) ? p.stderr : 0)));
  const pad = (hi - lo) * 0.1 || Math.abs(hi) * 0.1 || 0.1;
  const y = scaleLinear()
    .domain([lo - pad, hi + pad])
    .nice()
    .range([H - m.bottom, m.top]);
  svg
    .append('g')
    .attr('class', 'vs-axis')
    .attr('transform', `translate(0,${H - m.bottom})`)
    .call(
      axisBottom(x)
        .tickValues(niceWindowTicks(wMin, wMax))
        .tickFormat((d) => String(d)),
    );
  svg.append('g').attr('class', 'vs-axis').attr('transform', `translate(${m.left},0)`).call(axisLeft(y).ticks(4));
  svg
    .append('text')
    .attr('class', 'vs-axis-title')
    .attr('x', (m.left + W - m.right) / 2)
    .attr('y', H - 2)
    .attr('text-anchor', 'middle')
    .text('fit window (meV)');
  svg
    .append('text')
    .attr('class', 'vs-axis-title')
    .attr('transform', `translate(10,${(m.top + H - m.bottom) / 2}) rotate(-90)`)
    .attr('text-anchor', 'middle')
    .text(holeSign ? 'hole mass (mₑ)' : 'm* (mₑ)');
  svg
    .append('line')
    .attr('class', 'vs-scan-current')
    .attr('x1', x(currentWindow))
    .attr('x2', x(currentWindow))
    .attr('y1', m.top)
    .attr('y2', H - m.bottom);
  series.forEach((s, i) => {
    const colour = SERIES_COLOURS[i % SERIES_COLOURS.length]!;
    const ok = s.points.filter((p) => Number.isFinite(p.mass));
    const g = svg.append('g').attr('class', 'vs-scan-series').attr('data-towards', s.towards);
    g.append('path')
      .attr('fill', 'none')
      .style('stroke', colour)
      .attr('stroke-width', 1.5)
      .attr(
        'd',
        line<(typeof ok)[number]>()
          .x((p) => x(p.window_meV))
          .y((p) => y(val(p.mass)))(ok) ?? '',
      );
    g.selectAll('line.err')
      .data(ok.filter((p) => Number.isFinite(p.stderr) && p.stderr > 0))
      .join('line')
      .attr('class', 'err')
      .style('stroke', colour)
      .attr('x1', (p) => x(p.window_meV))
      .attr('x2', (p) => x(p.window_meV))
      .attr('y1', (p) => y(val(p.mass) - p.stderr))
      .attr('y2', (p) => y(val(p.mass) + p.stderr));
    g.selectAll('circle')
      .data(ok)
      .join('circle')
      .attr('r', 2)
      .style('fill', colour)
      .attr('cx', (p) => x(p.window_meV))
      .attr('cy', (p) => y(val(p.mass)));
  });
}

/** A few readable window ticks (meV) within [lo, hi]: 1-2-5 steps. */
export function niceWindowTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let d = 1e-1; d <= 1e4; d *= 10)
    for (const f of [1, 2, 5]) if (f * d >= lo - 1e-9 && f * d <= hi + 1e-9) out.push(Math.round(f * d * 1000) / 1000);
  if (out.length > 6) return out.filter((_, i) => i % 2 === 0);
  if (out.length < 2) return [lo, hi];
  return out;
}
