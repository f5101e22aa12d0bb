/**
 * Draws the overlaid runs on the overlay's canvas through the band view's renderer (bandRenderer.ts), one
 * run and spin channel at a time, each composited over the ones before it. The adapter gives the renderer
 * what it reads of a band view model, a palette in the run's colour, and the run's line pattern.
 *
 * Two things the renderer's interface does not offer, and how this adapter gets them:
 * - it clears its canvas on every draw: it draws on a scratch canvas copied onto the visible one;
 * - it chooses line patterns itself (solid, dashed for a second spin): the scratch canvas's context keeps the
 *   current run's pattern whatever the renderer asks for, so runs differ by more than colour.
 */
import { BandRenderer, type Linear } from '../bandView/bandRenderer';
import type { ViewModel } from '../bandView/viewModel';
import type { Palette } from '../shared/theme';
import { E_HIGH, E_LOW, type ThinnedChannel } from './overlayData';

/** Line patterns per run (so runs differ by more than colour). */
export const DASHES: number[][] = [[], [7, 4], [2, 3], [10, 3, 2, 3], [4, 4], [1, 2]];

/** The fields of a band view model the renderer reads. */
type RenderedBands = Pick<ViewModel, 'nBands' | 'distance' | 'energies' | 'pieces' | 'pyramids' | 'topValenceBand'>;

/** One run as the canvas draws it. */
export interface CanvasRun {
  channels: ThinnedChannel[];
  colour: string;
  dash: number[];
  /** Energy drawn at 0 (the run's VBM), raw eV. */
  align: number;
}

/** Plot-area geometry in CSS px, and the layout's total width in its own units. */
export interface CanvasFrame {
  width: number;
  height: number;
  dpr: number;
  total: number;
}

export class OverlayCanvas {
  private readonly scratch = document.createElement('canvas');
  private readonly renderer = new BandRenderer(this.scratch);
  private dash: number[] = [];

  constructor(private readonly canvas: HTMLCanvasElement) {
    const ctx = this.scratch.getContext('2d');
    if (ctx) {
      const setLineDash = ctx.setLineDash.bind(ctx);
      ctx.setLineDash = (): void => setLineDash(this.dash);
    }
  }

  /** Sizes the visible canvas to the plot area (placed at `left`, `top` in its container) and clears it. */
  resize(f: CanvasFrame, left: number, top: number): CanvasRenderingContext2D | null {
    this.canvas.width = Math.max(1, Math.round(f.width * f.dpr));
    this.canvas.height = Math.max(1, Math.round(f.height * f.dpr));
    this.canvas.style.width = `${f.width}px`;
    this.canvas.style.height = `${f.height}px`;
    this.canvas.style.left = `${left}px`;
    this.canvas.style.top = `${top}px`;
    const ctx = this.canvas.getContext('2d');
    if (!ctx) return null;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, this.canvas.width, this.canvas.height);
    return ctx;
  }

  /** Draws the runs in order (later runs on top); returns the polylines stroked per run. */
  draw(ctx: CanvasRenderingContext2D, f: CanvasFrame, runs: readonly CanvasRun[], palette: Palette): number[] {
    this.renderer.resize(f.width, f.height, f.dpr);
    const x: Linear = { a: f.width / f.total, b: 0 };
    const y: Linear = { a: -f.height / (E_HIGH - E_LOW), b: (f.height * E_HIGH) / (E_HIGH - E_LOW) };
    return runs.map((run) => {
      const runPalette: Palette = {
        ...palette,
        filled: run.colour,
        empty: run.colour,
        filled2: run.colour,
        empty2: run.colour,
        bandWidth: palette.highContrast ? 2 : 1.4,
      };
      this.dash = run.dash;
      let strokes = 0;
      for (const ch of run.channels) {
        if (ch.nBands === 0) continue;
        const bands: RenderedBands = {
          nBands: ch.nBands,
          distance: ch.x,
          energies: [ch.energies],
          pieces: ch.pieces,
          pyramids: [[]],
          topValenceBand: [-1],
        };
        // The renderer reads only the fields above of its view model (bandRenderer.ts).
        const vm = bands as ViewModel;
        this.renderer.draw({
          vm,
          spins: [0],
          x,
          y,
          offset: run.align,
          width: f.width,
          height: f.height,
          dpr: f.dpr,
          palette: runPalette,
          mode: 'lines',
        });
        ctx.drawImage(this.scratch, 0, 0);
        strokes += ch.nBands * ch.pieces.length;
      }
      return strokes;
    });
  }
}
