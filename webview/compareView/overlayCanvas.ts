/**
 * Draws the overlaid runs on the overlay's canvas through the band view's renderer (bandRenderer.ts), one
 * run and spin channel at a time, each over the ones before it, in the run's colour and line pattern (so runs
 * differ by more than colour).
 */
import { BandRenderer, type Linear, type RenderedBands } from '../bandView/bandRenderer';
import type { Palette } from '../shared/theme';
import { E_HIGH, E_LOW, type ThinnedChannel } from './overlayData';

/** Line patterns per run (so runs differ by more than colour). */
export const DASHES: number[][] = [[], [7, 4], [2, 3], [10, 3, 2, 3], [4, 4], [1, 2]];

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
  private readonly renderer: BandRenderer;

  constructor(private readonly canvas: HTMLCanvasElement) {
    this.renderer = new BandRenderer(canvas);
  }

  /** Sizes the visible canvas to the plot area (placed at `left`, `top` in its container) and clears it. */
  resize(f: CanvasFrame, left: number, top: number): boolean {
    this.canvas.width = Math.max(1, Math.round(f.width * f.dpr));
    this.canvas.height = Math.max(1, Math.round(f.height * f.dpr));
    this.canvas.style.width = `${f.width}px`;
    this.canvas.style.height = `${f.height}px`;
    this.canvas.style.left = `${left}px`;
    this.canvas.style.top = `${top}px`;
    if (!this.canvas.getContext('2d')) return false;
    this.renderer.clear();
    return true;
  }

  /** Draws the runs in order (later runs on top); returns the polylines stroked per run. */
  draw(f: CanvasFrame, runs: readonly CanvasRun[], palette: Palette): number[] {
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
        this.renderer.draw({
          vm: bands,
          spins: [0],
          x,
          y,
          offset: run.align,
          width: f.width,
          height: f.height,
          dpr: f.dpr,
          palette: runPalette,
          dash: run.dash,
          keepCanvas: true,
        });
        strokes += ch.nBands * ch.pieces.length;
      }
      return strokes;
    });
  }
}
