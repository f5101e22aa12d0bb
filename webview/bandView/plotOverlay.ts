/**
 * The SVG drawn over the band canvas: the gap band, high-symmetry lines and path breaks, the zero and Fermi
 * lines, the fit (window line and fitted curves), the extremum markers, the selection and the hover point.
 * The frame, axes and titles are plotAxes.ts.
 */
import type { Selection } from 'd3-selection';
import { line } from 'd3-shape';
import type { ExtremumReport, FitCurve } from '../../src/protocol';
import type { ReferenceChoice } from './energyReference';
import { edgeMarkerPath, isMaximumKind, secondaryMarkerPath } from './markers';
import { drawAxes } from './plotAxes';
import { MARGIN, type OverlaySvg, type Scale } from './plotScales';
import { energyName, markTitle } from './pointText';
import { drawMeshPoints } from './meshPointOverlay';
import type { ViewModel } from './viewModel';

/** The fit shown: the extremum as fitted, its curves and the window asked. */
export interface ShownFit {
  extremum: ExtremumReport;
  curves: FitCurve[];
  window_meV: number;
}

export interface OverlayInput {
  vm: ViewModel;
  zx: Scale;
  zy: Scale;
  /** Plot area inside the margins and the whole height, CSS px. */
  pw: number;
  ph: number;
  height: number;
  reference: ReferenceChoice;
  spins: readonly number[];
  fit: ShownFit | null;
  /** Screen points of the selected extremum and of the hovered band point, when shown. */
  selected: { x: number; y: number } | null;
  hover: { x: number; y: number } | null;
}

type Group = Selection<SVGGElement, unknown, null, undefined>;

/** A vertical line across the plot area at x. */
function vline(g: Group, cls: string, x: number, ph: number): void {
  g.append('line')
    .attr('class', cls)
    .attr('x1', x)
    .attr('x2', x)
    .attr('y1', MARGIN.top)
    .attr('y2', MARGIN.top + ph);
}

/** A horizontal line across the plot area at y. */
function hline(g: Group, cls: string, y: number, pw: number): void {
  g.append('line')
    .attr('class', cls)
    .attr('x1', MARGIN.left)
    .attr('x2', MARGIN.left + pw)
    .attr('y1', y)
    .attr('y2', y);
}

export function drawOverlay(svg: OverlaySvg, o: OverlayInput): void {
  const { vm, zy, pw, ph } = o;
  svg.selectAll('*').remove();
  svg
    .append('defs')
    .append('clipPath')
    .attr('id', 'vs-clip')
    .append('rect')
    .attr('x', MARGIN.left)
    .attr('y', MARGIN.top)
    .attr('width', pw)
    .attr('height', ph);
  const off = o.reference.offset;
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
  drawPathLines(plotG, o);
  if (o.reference.reference !== 'raw') hline(plotG, 'vs-zero', zy(0), pw);
  // A metal: the Fermi level, drawn and named (no gap band).
  if (r.metal && vm.data.fermiEnergy !== null) {
    const yf = zy(vm.data.fermiEnergy - off);
    hline(plotG, 'vs-fermi', yf, pw);
    plotG
      .append('text')
      .attr('class', 'vs-fermi-label')
      .attr('x', MARGIN.left + pw - 4)
      .attr('y', yf - 3)
      .attr('text-anchor', 'end')
      .text('E_F');
  }
  if (o.fit) drawFit(plotG, o, o.fit);
  const m = vm.meshPoints;
  if (m) drawMeshPoints(svg.append('g'), { m, zx: o.zx, zy, pw, ph, spins: o.spins, offset: off, energyName: energyName(o.reference) });
  drawMarks(svg.append('g').attr('class', 'vs-marks'), o);
  if (o.selected) plotG.append('circle').attr('class', 'vs-selection').attr('cx', o.selected.x).attr('cy', o.selected.y).attr('r', 10);
  if (o.hover) {
    vline(plotG, 'vs-hover-line', o.hover.x, ph);
    plotG.append('circle').attr('class', 'vs-hover-dot').attr('cx', o.hover.x).attr('cy', o.hover.y).attr('r', 3.5);
  }
  drawAxes(svg, o);
}

/** High-symmetry lines, and a double line at each break of the path. */
function drawPathLines(g: Group, o: OverlayInput): void {
  const data = o.vm.data;
  const jumps = new Set(data.segments.filter((s) => s.afterJump).map((s) => s.start));
  for (const t of data.ticks) {
    const x = o.zx(t.distance);
    if (x < MARGIN.left - 1 || x > MARGIN.left + o.pw + 1) continue;
    if (jumps.has(t.kIndex) || t.label.includes('|')) {
      vline(g, 'vs-break', x - 1.5, o.ph);
      vline(g, 'vs-break', x + 1.5, o.ph);
    } else vline(g, 'vs-sym-line', x, o.ph);
  }
}

/** The fit: the window the fit actually used (the engine widens it when too few points fall inside) and the curves. */
function drawFit(g: Group, o: OverlayInput, f: ShownFit): void {
  const off = o.reference.offset;
  const e0 = f.extremum.eV - off;
  const sign = isMaximumKind(f.extremum.kind) ? -1 : 1;
  const used = f.extremum.masses.length ? Math.max(...f.extremum.masses.map((m) => m.window_meV)) : f.window_meV;
  hline(g, 'vs-fit-window', o.zy(e0 + (sign * used) / 1000), o.pw);
  for (const c of f.curves) {
    const xs = c.distance;
    const d = line<number>()
      .x((_, i) => o.zx(xs[i]!))
      .y((e) => o.zy(e - off))(c.energy);
    g.append('path')
      .attr('class', 'vs-fit-curve')
      .attr('data-towards', c.towards)
      .attr('d', d ?? '');
  }
}

/** Markers of the report's extrema (not clipped, so a marker at the plot's edge shows whole). */
function drawMarks(markG: Group, o: OverlayInput): void {
  const { vm, pw, ph } = o;
  for (const m of vm.marks) {
    if (!o.spins.includes(m.spin)) continue;
    const x = o.zx(vm.distance[m.kIndex]!);
    const y = o.zy(m.eV - o.reference.offset);
    if (x < MARGIN.left - 1 || x > MARGIN.left + pw + 1 || y < MARGIN.top - 1 || y > MARGIN.top + ph + 1) continue;
    const primary = m.kind === 'vbm' || m.kind === 'cbm';
    const g = markG.append('g').attr('transform', `translate(${x},${y})`).attr('class', `vs-mark-group vs-mark-${m.kind}`);
    g.append('title').text(markTitle(vm, o.reference, m));
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
}
