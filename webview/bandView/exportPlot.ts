/**
 * The plot as a standalone SVG at publication size (one journal column, 85 mm wide), in print colours on
 * white, with axis titles in proper units. The PNG export rasterises this SVG at 600 dpi (rasterise.ts).
 * Pure string building (no DOM), so it is testable anywhere.
 */
import { scaleLinear } from 'd3-scale';
import type { ExtremumMark, FitCurve } from '../../src/protocol';
import { clearEnvelope, columnEnvelope, createEnvelope, lowerBound } from './decimate';
import type { ReferenceChoice } from './energyReference';
import { edgeMarkerPath, isMaximumKind, secondaryMarkerPath } from './markers';
import type { ViewModel } from './viewModel';
import { exportMeshPoints } from './meshPointOverlay';

/** Figure size: 85 mm × 64 mm (a single journal column); user units are points (1/72 in). */
export const EXPORT_WIDTH_MM = 85;
export const EXPORT_HEIGHT_MM = 64;
export const EXPORT_UNITS_W = Math.round((EXPORT_WIDTH_MM / 25.4) * 72); // 241 pt
export const EXPORT_UNITS_H = Math.round((EXPORT_HEIGHT_MM / 25.4) * 72); // 181 pt
/** PNG resolution. */
export const EXPORT_DPI = 600;

/** Print colours (our own choice; legible in greyscale: filled bands darker than empty ones). */
const PRINT = {
  ink: '#111111',
  grid: '#b8b8b8',
  filled: '#1d4f91',
  empty: '#c0562b',
  filled2: '#6b3fa0',
  empty2: '#8a7a00',
  fit: '#1b7f3b',
};

export interface ExportInput {
  vm: ViewModel;
  spins: number[];
  reference: ReferenceChoice;
  /** Visible path-distance range. */
  xDomain: [number, number];
  /** Visible energy range relative to the reference. */
  yDomain: [number, number];
  marks: ExtremumMark[];
  curves: FitCurve[];
}

export function xAxisTitle(units: ViewModel['data']['distanceUnits']): string {
  if (units === 'inverse-angstrom') return 'k (Å⁻¹)';
  if (units === 'fractional') return 'k (fractional reciprocal units)';
  return 'k (path distance as written in the file)';
}

function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const f = (n: number): string => (Math.round(n * 100) / 100).toString();

export function buildExportSvg(input: ExportInput): { svg: string; width: number; height: number } {
  const { vm, reference } = input;
  const W = EXPORT_UNITS_W;
  const H = EXPORT_UNITS_H;
  const m = { left: 40, right: 8, top: 8, bottom: 30 };
  const pw = W - m.left - m.right;
  const ph = H - m.top - m.bottom;
  const x = scaleLinear()
    .domain(input.xDomain)
    .range([m.left, m.left + pw]);
  const y = scaleLinear()
    .domain(input.yDomain)
    .range([m.top + ph, m.top]);
  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${EXPORT_WIDTH_MM}mm" height="${EXPORT_HEIGHT_MM}mm" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif" font-size="8">`,
  );
  parts.push(`<title>${esc(vm.data.title)}: band structure</title>`);
  parts.push(`<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`);
  parts.push(`<defs><clipPath id="vs-plot-clip"><rect x="${m.left}" y="${m.top}" width="${pw}" height="${ph}"/></clipPath></defs>`);
  // High-symmetry verticals and the zero line.
  const grid: string[] = [];
  for (const t of vm.data.ticks) {
    if (t.distance < input.xDomain[0] || t.distance > input.xDomain[1]) continue;
    grid.push(`M${f(x(t.distance))},${m.top}V${m.top + ph}`);
  }
  if (reference.reference !== 'raw' && 0 > input.yDomain[0] && 0 < input.yDomain[1]) grid.push(`M${m.left},${f(y(0))}H${m.left + pw}`);
  parts.push(`<path d="${grid.join('')}" stroke="${PRINT.grid}" stroke-width="0.5" fill="none" stroke-dasharray="2 1.5"/>`);
  // Bands.
  parts.push(`<g clip-path="url(#vs-plot-clip)" fill="none" stroke-width="0.8" stroke-linejoin="round">`);
  const cols = Math.round(pw * 2);
  const env = createEnvelope(cols, vm.nBands);
  const map = { x0: input.xDomain[0], scale: cols / (input.xDomain[1] - input.xDomain[0]), width: cols };
  input.spins.forEach((spin, pos) => {
    const E = vm.energies[spin]!;
    const top = vm.topValenceBand[spin] ?? -1;
    const colourOf = (b: number): string => {
      const filled = top >= 0 && b <= top;
      if (pos === 0) return filled ? PRINT.filled : PRINT.empty;
      return filled ? PRINT.filled2 : PRINT.empty2;
    };
    const dash = pos === 1 ? ' stroke-dasharray="2.5 1.5"' : '';
    const byColour = new Map<string, string[]>();
    vm.pieces.forEach((p) => {
      const a = Math.max(p.i0, lowerBound(vm.distance, input.xDomain[0], p.i0, p.i1) - 1);
      const z = Math.min(p.i1, lowerBound(vm.distance, input.xDomain[1], a, p.i1) + 1);
      if (z - a < 2) return;
      const dense = z - a > 2 * cols;
      if (dense) {
        clearEnvelope(env);
        columnEnvelope(vm.distance, E, vm.nBands, p.i0, p.i1, map, env);
      }
      for (let b = 0; b < vm.nBands; b++) {
        const d: string[] = [];
        if (!dense) {
          for (let i = a; i < z; i++)
            d.push(`${i === a ? 'M' : 'L'}${f(x(vm.distance[i]!))},${f(y(E[i * vm.nBands + b]! - reference.offset))}`);
        } else {
          let prev = NaN;
          for (let c = 0; c < cols; c++) {
            if (!env.filled[c]) continue;
            const o = c * vm.nBands + b;
            const lo = env.min[o]! - reference.offset;
            const hi = env.max[o]! - reference.offset;
            const xc = f(m.left + (c + 0.5) * (pw / cols));
            const first = Number.isNaN(prev) || Math.abs(prev - lo) < Math.abs(prev - hi) ? lo : hi;
            const second = first === lo ? hi : lo;
            d.push(`${d.length === 0 ? 'M' : 'L'}${xc},${f(y(first))}`);
            if (second !== first) d.push(`L${xc},${f(y(second))}`);
            prev = env.last[o]! - reference.offset;
          }
        }
        const c = colourOf(b);
        let list = byColour.get(c);
        if (!list) byColour.set(c, (list = []));
        list.push(d.join(''));
      }
    });
    for (const [c, ds] of byColour) parts.push(`<path d="${ds.join('')}" stroke="${c}"${dash}/>`);
  });
  // Fitted curves.
  for (const curve of input.curves) {
    const d = curve.distance.map((xx, i) => `${i === 0 ? 'M' : 'L'}${f(x(xx))},${f(y(curve.energy[i]! - reference.offset))}`).join('');
    parts.push(`<path d="${d}" stroke="${PRINT.fit}" stroke-width="1.6" stroke-opacity="0.85"/>`);
  }
  // Markers.
  const box = { left: m.left, top: m.top, right: m.left + pw, bottom: m.top + ph };
  for (const mk of input.marks) {
    if (!input.spins.includes(mk.spin)) continue;
    const px = x(vm.distance[mk.kIndex]!);
    const py = y(mk.eV - reference.offset);
    if (px < m.left || px > m.left + pw || py < m.top || py > m.top + ph) continue;
    const shape = mk.kind === 'vbm' || mk.kind === 'cbm' ? edgeMarkerPath(2.2, 1.8, 1.2) : secondaryMarkerPath(isMaximumKind(mk.kind), 2);
    parts.push(`<path transform="translate(${f(px)},${f(py)})" d="${shape}" stroke="${PRINT.ink}" stroke-width="0.5" fill="none"/>`);
  }
  // A mesh run's data points on its interpolated lines.
  if (vm.meshPoints)
    parts.push(exportMeshPoints(vm.meshPoints, input.spins, { x, y, offset: reference.offset }, box, { ink: PRINT.ink, r: 1.6 }));
  parts.push(`</g>`);
  // Frame and axes.
  parts.push(`<rect x="${m.left}" y="${m.top}" width="${pw}" height="${ph}" fill="none" stroke="${PRINT.ink}" stroke-width="0.7"/>`);
  const yTicks = y.ticks(6);
  const tickPath = yTicks.map((t) => `M${m.left - 3},${f(y(t))}H${m.left}`).join('');
  parts.push(`<path d="${tickPath}" stroke="${PRINT.ink}" stroke-width="0.6"/>`);
  for (const t of yTicks) {
    parts.push(
      `<text x="${m.left - 5}" y="${f(y(t))}" text-anchor="end" dominant-baseline="middle" fill="${PRINT.ink}">${esc(y.tickFormat(6)(t).replace('-', '−'))}</text>`,
    );
  }
  for (const t of vm.data.ticks) {
    if (t.distance < input.xDomain[0] || t.distance > input.xDomain[1]) continue;
    parts.push(`<text x="${f(x(t.distance))}" y="${m.top + ph + 10}" text-anchor="middle" fill="${PRINT.ink}">${esc(t.label)}</text>`);
  }
  parts.push(
    `<text x="${m.left + pw / 2}" y="${H - 4}" text-anchor="middle" fill="${PRINT.ink}">${esc(xAxisTitle(vm.data.distanceUnits))}</text>`,
  );
  const ty = m.top + ph / 2;
  const yTitle = reference.subscript ? `E − E<tspan baseline-shift="sub" font-size="6">${esc(reference.subscript)}</tspan> (eV)` : 'E (eV)';
  parts.push(`<text transform="translate(10,${f(ty)}) rotate(-90)" text-anchor="middle" fill="${PRINT.ink}">${yTitle}</text>`);
  parts.push(`</svg>`);
  return { svg: parts.join('\n'), width: W, height: H };
}

/** PNG pixel size for the export at EXPORT_DPI. */
export function pngSize(): { width: number; height: number } {
  return { width: Math.round((EXPORT_WIDTH_MM / 25.4) * EXPORT_DPI), height: Math.round((EXPORT_HEIGHT_MM / 25.4) * EXPORT_DPI) };
}
