/**
 * The overlay section: asks the host for the band data of ticked runs it does not hold yet, keeps what
 * arrives, and draws the ticked runs aligned at each run's VBM (canvas through the band renderer, frame and
 * legend in SVG), on one shared path when the paths match, otherwise side by side.
 */
import { COMPARE_MAX_OVERLAY, CompareViewToHostType, type CompareBandRun, type CompareViewToHostMessage } from '../../src/protocol';
import type { Palette } from '../shared/theme';
import { select } from 'd3-selection';
import { scaleLinear } from 'd3-scale';
import { decodeBandRun, strideFor, thinnedChannels, type OverlayRun } from './overlayData';
import { layoutOverlay } from './overlayLayout';
import { DASHES, OverlayCanvas } from './overlayCanvas';
import { drawOverlayFrame, legendItem, MARGIN, overlayNoteText } from './overlayFrame';

/** The elements of the overlay section. */
export interface OverlayElements {
  note: HTMLElement;
  plot: HTMLElement;
  canvas: HTMLCanvasElement;
  svg: SVGSVGElement;
  message: HTMLElement;
  legend: HTMLElement;
}

/** What the last overlay drew (tests read it). */
export interface OverlayStats {
  runs: string[];
  shared: boolean;
  /** Band polylines stroked per run. */
  strokes: number[];
  colours: string[];
}

function cssVar(name: string, fallback: string): string {
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || fallback;
}

/** The colour of the i-th overlaid run. */
export function runColour(p: Palette, i: number): string {
  const list = [p.filled, p.empty, p.fit, p.filled2, p.empty2, cssVar('--vscode-charts-red', '#f14c4c')];
  return list[i % list.length]!;
}

export class OverlayView {
  private readonly bands = new Map<string, OverlayRun>();
  private readonly canvas: OverlayCanvas;
  private nextRequestId = 1;
  last: OverlayStats | null = null;

  constructor(
    private readonly e: OverlayElements,
    private readonly post: (m: CompareViewToHostMessage) => void,
  ) {
    this.canvas = new OverlayCanvas(e.canvas);
  }

  /** Forgets every run's bands (a new table: row ids mean other runs now). */
  clear(): void {
    this.bands.clear();
  }

  /** Asks the host for the ticked runs not held yet. */
  request(selected: readonly string[]): void {
    const need = selected.filter((id) => !this.bands.has(id));
    if (need.length === 0) return;
    const requestId = this.nextRequestId++;
    this.e.note.textContent = `Reading the bands of ${need.length} run${need.length === 1 ? '' : 's'} …`;
    this.post({ type: CompareViewToHostType.RequestBands, requestId, rowIds: need });
  }

  /** Keeps the runs the host sent (throws on inconsistent sizes). */
  receive(runs: readonly CompareBandRun[]): void {
    for (const r of runs) this.bands.set(r.rowId, decodeBandRun(r));
  }

  /** Draws the ticked runs held so far; `names` gives each row's name for the legend. */
  draw(selected: readonly string[], names: ReadonlyMap<string, string>, palette: Palette): void {
    const e = this.e;
    const runs = selected.map((id) => this.bands.get(id)).filter((b): b is OverlayRun => b !== undefined);
    const rect = e.plot.getBoundingClientRect();
    const width = Math.max(100, Math.floor(rect.width));
    const height = Math.max(100, Math.floor(rect.height));
    const frame = {
      width: width - MARGIN.left - MARGIN.right,
      height: height - MARGIN.top - MARGIN.bottom,
      dpr: window.devicePixelRatio || 1,
      total: 1,
    };
    const drawable = this.canvas.resize(frame, MARGIN.left, MARGIN.top);
    select(e.svg).selectAll('*').remove();
    e.legend.replaceChildren();
    if (!drawable) return;
    if (runs.length === 0) {
      this.last = { runs: [], shared: true, strokes: [], colours: [] };
      e.message.hidden = false;
      e.message.textContent = selected.length ? 'Reading the bands …' : 'No runs ticked: tick runs in the table to overlay their bands.';
      e.plot.setAttribute('aria-label', 'Overlaid band structures (none ticked yet)');
      if (!selected.length) e.note.textContent = `Tick runs in the table (up to ${COMPARE_MAX_OVERLAY}) to draw their bands here.`;
      return;
    }
    e.message.hidden = true;
    const layout = layoutOverlay(
      runs.map((r) => ({ nk: r.meta.nk, distance: r.distance, segments: r.meta.segments, ticks: r.meta.ticks })),
    );
    frame.total = layout.total;
    const x = scaleLinear().domain([0, layout.total]).range([0, frame.width]);
    const colours = runs.map((_, i) => runColour(palette, i));
    const drawn = runs.map((r, i) => {
      const [a, b] = layout.spans[i]!;
      const stride = strideFor(r.meta.nk, x(b) - x(a));
      return {
        channels: thinnedChannels(r, layout.x[i]!, stride),
        colour: colours[i]!,
        dash: DASHES[i % DASHES.length]!,
        align: r.meta.align_eV ?? 0,
      };
    });
    const strokes = this.canvas.draw(frame, drawn, palette);
    this.last = { runs: runs.map((r) => r.meta.rowId), shared: layout.shared, strokes, colours };
    drawOverlayFrame(e.svg, layout, frame.width, frame.height, height);
    const nameOf = (r: OverlayRun): string => names.get(r.meta.rowId) ?? r.meta.title;
    runs.forEach((r, i) => e.legend.append(legendItem(r.meta, nameOf(r), colours[i]!, drawn[i]!.dash, layout.shared ? null : i + 1)));
    e.note.textContent = overlayNoteText(runs.length, layout.shared);
    e.plot.setAttribute(
      'aria-label',
      `Band structures of ${runs.map(nameOf).join(', ')}, aligned at the VBM, ${layout.shared ? 'on one shared path' : 'side by side'}.`,
    );
  }
}
