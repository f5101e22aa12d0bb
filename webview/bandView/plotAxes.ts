/**
 * The plot's frame, energy axis, path ticks with their high-symmetry labels, and the axis titles (SVG).
 */
import { axisLeft } from 'd3-axis';
import { xAxisTitle } from './exportPlot';
import type { OverlayInput } from './plotOverlay';
import { MARGIN, type OverlaySvg } from './plotScales';
import { fittingLabels } from './tickLabels';

export function drawAxes(svg: OverlaySvg, o: Pick<OverlayInput, 'vm' | 'zx' | 'zy' | 'pw' | 'ph' | 'height' | 'reference'>): void {
  const { vm, zx, zy, pw, ph } = o;
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
    .attr('y', o.height - 6)
    .attr('text-anchor', 'middle')
    .text(xAxisTitle(vm.data.distanceUnits));
  const yt = svg
    .append('text')
    .attr('class', 'vs-axis-title vs-y-title')
    .attr('transform', `translate(14,${MARGIN.top + ph / 2}) rotate(-90)`)
    .attr('text-anchor', 'middle');
  const sub = o.reference.subscript;
  if (sub) {
    yt.append('tspan').text('E − E');
    yt.append('tspan').attr('baseline-shift', 'sub').attr('font-size', '9px').text(sub);
    yt.append('tspan').text(' (eV)');
  } else yt.text('E (eV)');
}
