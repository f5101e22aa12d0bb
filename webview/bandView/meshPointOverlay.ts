/**
 * A mesh run's data points on its interpolated bands, drawn over the lines (SVG): one open diamond per point and
 * band within the plot, each titled with its data, and a legend telling the markers (data) from the lines
 * (interpolated). Very many markers are drawn as one path per band (one title each), so a redraw stays fast.
 */
import type { Selection } from 'd3-selection';
import { meshPointMarkerPath } from './markers';
import { INTERPOLATED_LINE_NAME, MESH_POINT_NAME, meshPointTitle, type MeshPointsView } from './meshPoints';
import { MARGIN, type Scale } from './plotScales';

type Group = Selection<SVGGElement, unknown, null, undefined>;

/** Above this many markers in view, one path per band instead of one element per marker. */
export const MAX_MARKER_ELEMENTS = 1500;

export interface MeshPointDrawing {
  m: MeshPointsView;
  zx: Scale;
  zy: Scale;
  pw: number;
  ph: number;
  spins: readonly number[];
  offset: number;
  energyName: string;
}

export function drawMeshPoints(g: Group, o: MeshPointDrawing): void {
  const { m, zx, zy } = o;
  const shape = meshPointMarkerPath();
  const inView = (x: number, y: number): boolean =>
    x >= MARGIN.left - 1 && x <= MARGIN.left + o.pw + 1 && y >= MARGIN.top - 1 && y <= MARGIN.top + o.ph + 1;
  const shown: { spin: number; band0: number; i: number; x: number; y: number }[] = [];
  for (const spin of o.spins) {
    const e = m.energies[spin];
    if (!e) continue;
    for (let i = 0; i < m.count; i++) {
      const x = zx(m.distance[i]!);
      for (let b = 0; b < m.nBands; b++) {
        const y = zy(e[i * m.nBands + b]! - o.offset);
        if (inView(x, y)) shown.push({ spin, band0: b, i, x, y });
      }
    }
  }
  const layer = g.append('g').attr('class', 'vs-mesh-points').attr('data-count', shown.length);
  if (shown.length <= MAX_MARKER_ELEMENTS) {
    for (const p of shown) {
      const one = layer
        .append('path')
        .attr('class', 'vs-mesh-point')
        .attr('data-spin', p.spin)
        .attr('data-band', p.band0 + 1)
        .attr('d', shape)
        .attr('transform', `translate(${p.x.toFixed(2)},${p.y.toFixed(2)})`);
      one.append('title').text(meshPointTitle(m, p.i, p.spin, p.band0, o.energyName, o.offset));
    }
  } else {
    const byBand = new Map<string, string[]>();
    for (const p of shown) {
      const key = `${p.spin}/${p.band0}`;
      const list = byBand.get(key) ?? [];
      list.push(`M${p.x.toFixed(2)},${(p.y - 3.5).toFixed(2)}l3.5,3.5l-3.5,3.5l-3.5,-3.5Z`);
      byBand.set(key, list);
    }
    for (const [key, parts] of byBand) {
      const [spin, band0] = key.split('/').map(Number) as [number, number];
      const path = layer
        .append('path')
        .attr('class', 'vs-mesh-point')
        .attr('data-spin', spin)
        .attr('data-band', band0 + 1);
      path
        .attr('d', parts.join(''))
        .append('title')
        .text(`${MESH_POINT_NAME}, band ${band0 + 1}: ${parts.length} points in view`);
    }
  }
  drawLegend(g);
}

/** Top left of the plot: a marker, "mesh point (data)"; a line, "interpolated". */
function drawLegend(g: Group): void {
  const x0 = MARGIN.left + 8;
  const y0 = MARGIN.top + 8;
  const legend = g.append('g').attr('class', 'vs-mesh-legend');
  legend.append('rect').attr('class', 'vs-mesh-legend-box').attr('x', x0).attr('y', y0).attr('width', 128).attr('height', 34).attr('rx', 3);
  legend
    .append('path')
    .attr('class', 'vs-mesh-point')
    .attr('d', meshPointMarkerPath())
    .attr('transform', `translate(${x0 + 11},${y0 + 10})`);
  legend
    .append('text')
    .attr('x', x0 + 22)
    .attr('y', y0 + 14)
    .text(MESH_POINT_NAME);
  legend
    .append('line')
    .attr('class', 'vs-mesh-legend-line')
    .attr('x1', x0 + 4)
    .attr('x2', x0 + 18)
    .attr('y1', y0 + 25)
    .attr('y2', y0 + 25);
  legend
    .append('text')
    .attr('x', x0 + 22)
    .attr('y', y0 + 29)
    .text(INTERPOLATED_LINE_NAME);
}

/**
 * The exported figure's mesh points (exportPlot.ts): one path of small open diamonds (half-size r, figure
 * units) for the points inside the box, with a title naming them; '' when none is inside.
 */
export function exportMeshPoints(
  m: MeshPointsView,
  spins: readonly number[],
  at: { x: (d: number) => number; y: (e: number) => number; offset: number },
  box: { left: number; top: number; right: number; bottom: number },
  style: { ink: string; r: number },
): string {
  const d: string[] = [];
  const f = (n: number): string => (Math.round(n * 100) / 100).toString();
  for (const spin of spins) {
    const e = m.energies[spin];
    for (let i = 0; e && i < m.count; i++) {
      const px = at.x(m.distance[i]!);
      for (let b = 0; b < m.nBands; b++) {
        const py = at.y(e[i * m.nBands + b]! - at.offset);
        if (px < box.left || px > box.right || py < box.top || py > box.bottom) continue;
        d.push(`M${f(px)},${f(py - style.r)}l${style.r},${style.r}l${-style.r},${style.r}l${-style.r},${-style.r}Z`);
      }
    }
  }
  if (d.length === 0) return '';
  const title = `${MESH_POINT_NAME}: the run's energies at the mesh points on the path; the lines are ${INTERPOLATED_LINE_NAME}`;
  return `<path class="mesh-points" d="${d.join('')}" stroke="${style.ink}" stroke-width="0.4" fill="#ffffff"><title>${title}</title></path>`;
}
