/**
 * Draws the bands on a canvas. Two modes, chosen per redraw:
 * - lines: every visible point joined by antialiased strokes (few points per pixel column: zoomed in, or
 *   small data), so full detail shows on zoom;
 * - envelope: per-pixel-column min/max of each band (decimate.ts), rasterised as vertical spans straight into
 *   an ImageData, so 500 bands × 20 000 k-points redraw within a frame.
 */
import { clearEnvelope, columnEnvelope, createEnvelope, lowerBound, type Envelope } from './decimate';
import type { ViewModel } from './viewModel';
import type { Palette } from '../shared/theme';
import { parseColour } from '../shared/theme';

export interface Linear {
  /** screen = a · value + b (CSS px). */
  a: number;
  b: number;
}

/** The fields of a band view model the renderer reads (the compare view draws its runs with these alone). */
export type RenderedBands = Pick<ViewModel, 'nBands' | 'distance' | 'energies' | 'pieces' | 'pyramids' | 'topValenceBand'>;

export interface DrawRequest {
  vm: RenderedBands;
  spins: number[];
  /** Path distance → CSS px within the plot area. */
  x: Linear;
  /** Energy relative to the reference → CSS px within the plot area. */
  y: Linear;
  /** Energy subtracted from raw energies. */
  offset: number;
  /** Plot area size in CSS px. */
  width: number;
  height: number;
  dpr: number;
  palette: Palette;
  /** Force a mode (benchmark and tests); otherwise chosen from the point density. */
  mode?: 'lines' | 'envelope';
  /** Line pattern for every spin channel (default: solid, dashed for a second spin). */
  dash?: number[];
  /** Draw over what the canvas holds instead of clearing it first (several runs on one plot); always as lines. */
  keepCanvas?: boolean;
}

export interface DrawStats {
  mode: 'lines' | 'envelope';
  /** Values read from the band arrays or the pyramid. */
  valuesRead: number;
  /** Visible points per device pixel column (over all pieces). */
  density: number;
  /** Envelope mode: milliseconds spent decimating and rasterising (for the benchmark's breakdown). */
  decimateMs?: number;
  rasterMs?: number;
}

/** Use lines while there are at most this many visible points per device column and segments in total. */
const LINES_MAX_DENSITY = 1.5;
const LINES_MAX_SEGMENTS = 20_000;

export class BandRenderer {
  private env: Envelope | null = null;
  private image: ImageData | null = null;
  private pixels: Uint32Array | null = null;
  private timing = { decimateMs: 0, rasterMs: 0 };
  private readonly colourCache = new Map<string, number>();

  constructor(private readonly canvas: HTMLCanvasElement) {}

  /** Resizes the backing store to the plot area at the device pixel ratio. */
  resize(width: number, height: number, dpr: number): void {
    const w = Math.max(1, Math.round(width * dpr));
    const h = Math.max(1, Math.round(height * dpr));
    if (this.canvas.width !== w || this.canvas.height !== h) {
      this.canvas.width = w;
      this.canvas.height = h;
    }
    this.canvas.style.width = `${width}px`;
    this.canvas.style.height = `${height}px`;
  }

  clear(): void {
    const ctx = this.canvas.getContext('2d');
    if (!ctx) return;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, this.canvas.width, this.canvas.height);
  }

  draw(req: DrawRequest): DrawStats {
    const ctx = this.canvas.getContext('2d');
    if (!ctx) throw new Error('band view: no 2D canvas context');
    const W = this.canvas.width;
    const H = this.canvas.height;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    if (!req.keepCanvas) ctx.clearRect(0, 0, W, H);
    const { vm } = req;
    // Visible points over all pieces.
    const xLo = (0 - req.x.b) / req.x.a;
    const xHi = (req.width - req.x.b) / req.x.a;
    let visible = 0;
    for (const p of vm.pieces) {
      const a = lowerBound(vm.distance, xLo, p.i0, p.i1);
      const z = lowerBound(vm.distance, xHi, a, p.i1);
      visible += Math.max(0, z - a);
    }
    const density = visible / Math.max(1, W);
    const segments = visible * vm.nBands * req.spins.length;
    const mode = req.keepCanvas
      ? 'lines'
      : (req.mode ?? (density <= LINES_MAX_DENSITY && segments <= LINES_MAX_SEGMENTS ? 'lines' : 'envelope'));
    this.timing = { decimateMs: 0, rasterMs: 0 };
    const valuesRead = mode === 'lines' ? this.drawLines(ctx, req, xLo, xHi) : this.drawEnvelope(ctx, req);
    return mode === 'lines' ? { mode, valuesRead, density } : { mode, valuesRead, density, ...this.timing };
  }

  /** A CSS colour as the Uint32 an ImageData holds (RGBA bytes, little-endian: ABGR). */
  private packedColour(css: string, ctx: CanvasRenderingContext2D): number {
    let v = this.colourCache.get(css);
    if (v === undefined) {
      const [r, g, b, a] = parseColour(css, ctx);
      v = ((a << 24) | (b << 16) | (g << 8) | r) >>> 0;
      this.colourCache.set(css, v);
    }
    return v;
  }

  private colourFor(req: DrawRequest, spinPos: number, spin: number, band: number): string {
    const top = req.vm.topValenceBand[spin] ?? -1;
    const filled = top >= 0 && band <= top;
    if (spinPos === 0 || req.spins.length === 1) return filled ? req.palette.filled : req.palette.empty;
    return filled ? req.palette.filled2 : req.palette.empty2;
  }

  private drawLines(ctx: CanvasRenderingContext2D, req: DrawRequest, xLo: number, xHi: number): number {
    const { vm, dpr } = req;
    const nb = vm.nBands;
    const d = vm.distance;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.lineWidth = req.palette.bandWidth;
    ctx.lineJoin = 'round';
    let read = 0;
    const ax = req.x.a;
    const bx = req.x.b;
    const ay = req.y.a;
    const by = req.y.b - req.y.a * req.offset;
    req.spins.forEach((spin, spinPos) => {
      const E = vm.energies[spin]!;
      // One path per colour, many sub-paths: few stroke calls.
      const groups = new Map<string, number[]>();
      for (let b = 0; b < nb; b++) {
        const c = this.colourFor(req, spinPos, spin, b);
        let g = groups.get(c);
        if (!g) groups.set(c, (g = []));
        g.push(b);
      }
      ctx.setLineDash(req.dash ?? (spinPos === 1 ? [4, 3] : []));
      for (const [colour, bands] of groups) {
        ctx.strokeStyle = colour;
        ctx.beginPath();
        for (const p of vm.pieces) {
          // One point beyond each edge so lines run to the border.
          const a = Math.max(p.i0, lowerBound(d, xLo, p.i0, p.i1) - 1);
          const z = Math.min(p.i1, lowerBound(d, xHi, a, p.i1) + 1);
          if (z - a < 1) continue;
          for (const b of bands) {
            ctx.moveTo(ax * d[a]! + bx, ay * E[a * nb + b]! + by);
            for (let i = a + 1; i < z; i++) ctx.lineTo(ax * d[i]! + bx, ay * E[i * nb + b]! + by);
            read += z - a;
          }
        }
        ctx.stroke();
      }
    });
    ctx.setLineDash([]);
    return read;
  }

  private drawEnvelope(ctx: CanvasRenderingContext2D, req: DrawRequest): number {
    const { vm, dpr } = req;
    const W = this.canvas.width;
    const H = this.canvas.height;
    const nb = vm.nBands;
    if (!this.env || this.env.width !== W || this.env.nBands !== nb) this.env = createEnvelope(W, nb);
    if (!this.image || this.image.width !== W || this.image.height !== H) {
      this.image = ctx.createImageData(W, H);
      this.pixels = new Uint32Array(this.image.data.buffer);
    }
    const px = this.pixels!;
    px.fill(0);
    const env = this.env;
    // Device-pixel mappings.
    const map = { x0: -req.x.b / req.x.a, scale: req.x.a * dpr, width: W };
    const ay = req.y.a * dpr;
    const by = (req.y.b - req.y.a * req.offset) * dpr;
    const thick = Math.max(1, Math.round(req.palette.bandWidth * dpr * 0.8));
    let read = 0;
    req.spins.forEach((spin, spinPos) => {
      const E = vm.energies[spin]!;
      const packed = new Uint32Array(nb);
      for (let b = 0; b < nb; b++) packed[b] = this.packedColour(this.colourFor(req, spinPos, spin, b), ctx);
      vm.pieces.forEach((p, pi) => {
        const t0 = performance.now();
        clearEnvelope(env);
        read += columnEnvelope(vm.distance, E, nb, p.i0, p.i1, map, env, vm.pyramids[spin]?.[pi] ?? null);
        const t1 = performance.now();
        this.timing.decimateMs += t1 - t0;
        const cLo = Math.max(0, Math.floor((vm.distance[p.i0]! - map.x0) * map.scale));
        const cHi = Math.min(W - 1, Math.floor((vm.distance[p.i1 - 1]! - map.x0) * map.scale));
        rasterEnvelope(px, W, H, env, cLo, cHi, packed, ay, by, thick);
        this.timing.rasterMs += performance.now() - t1;
      });
    });
    ctx.putImageData(this.image, 0, 0);
    return read;
  }
}

/**
 * Rasterises one piece's envelope into RGBA pixels (as Uint32), column by column so the envelope is read
 * contiguously: every band's vertical span from its lowest to its highest value in the column, joined to the
 * previous filled column's last value. Columns left empty between two filled ones (a pyramid bucket may span
 * up to two columns; sparse stretches of a path) are bridged by the straight join, so lines have no holes.
 * A top-level function with everything in parameters: the hot loop keeps its values in registers.
 */
function rasterEnvelope(
  px: Uint32Array,
  W: number,
  H: number,
  env: Envelope,
  cLo: number,
  cHi: number,
  packed: Uint32Array,
  ay: number,
  by: number,
  thick: number,
): void {
  const nb = env.nBands;
  const emin = env.min;
  const emax = env.max;
  const elast = env.last;
  const filled = env.filled;
  const hMax = H - 1;
  let pc = -1;
  for (let c = cLo; c <= cHi; c++) {
    if (!filled[c]) continue;
    const o = c * nb;
    const po = pc * nb;
    const cEnd = Math.min(W - 1, c + thick - 1);
    const gap0 = pc >= 0 && c - pc > 1 ? pc + 1 : c;
    for (let b = 0; b < nb; b++) {
      let lo = emin[o + b]!;
      let hi = emax[o + b]!;
      const colour = packed[b]!;
      if (pc >= 0) {
        const pl = elast[po + b]!;
        if (gap0 < c) bridge(px, W, hMax, pc, c, gap0, pl, Math.abs(pl - lo) < Math.abs(pl - hi) ? lo : hi, ay, by, thick, colour);
        if (pl < lo) lo = pl;
        else if (pl > hi) hi = pl;
      }
      fillSpan(px, W, hMax, c, cEnd, ay * hi + by, ay * lo + by, thick, colour);
    }
    pc = c;
  }
}

/** The straight join from (pc, from) to (c, to) through the empty columns gap0..c−1. */
function bridge(
  px: Uint32Array,
  W: number,
  hMax: number,
  pc: number,
  c: number,
  gap0: number,
  from: number,
  to: number,
  ay: number,
  by: number,
  thick: number,
  colour: number,
): void {
  const n = c - pc;
  for (let g = gap0; g < c; g++) {
    const ya = ay * (from + ((to - from) * (g - pc - 0.5)) / n) + by;
    const yb = ay * (from + ((to - from) * (g - pc + 0.5)) / n) + by;
    fillSpan(px, W, hMax, g, g, ya, yb, thick, colour);
  }
}

/**
 * Fills columns c0..c1 from screen row ya to yb (either order), `thick` rows deep below the lower end,
 * clipped to rows 0..hMax; nothing when the span lies wholly outside.
 */
function fillSpan(
  px: Uint32Array,
  W: number,
  hMax: number,
  c0: number,
  c1: number,
  ya: number,
  yb: number,
  thick: number,
  colour: number,
): void {
  const y1 = ya < yb ? ya : yb;
  const y2 = ya < yb ? yb : ya;
  if (y2 < 0 || y1 > hMax) return;
  const r0 = y1 < 0 ? 0 : y1 | 0;
  let r1 = (y2 | 0) + thick - 1;
  if (r1 > hMax) r1 = hMax;
  for (let cc = c0; cc <= c1; cc++) {
    for (let idx = r0 * W + cc, end = r1 * W + cc; idx <= end; idx += W) px[idx] = colour;
  }
}
