/**
 * Band runs of the overlay: decoded and checked, then thinned for drawing (at most about two points per CSS
 * pixel of the run's stretch; the last point of every piece kept) with the bands outside the energy window
 * left out. The overlay is for the eye; every number comes from the core, in the host. Pure (no DOM).
 */
import { decodeArray, type CompareBandRun } from '../../src/protocol';
import { piecesFromSegments, type Piece } from '../bandView/localExtrema';

/** Energy window of the overlay, eV relative to each run's VBM. */
export const E_LOW = -6;
export const E_HIGH = 5;
/** Bands reaching at most this far outside the window (eV) are still drawn. */
const WINDOW_MARGIN = 0.5;

/** A decoded band run ready to draw. */
export interface OverlayRun {
  meta: CompareBandRun;
  distance: Float64Array;
  energies: Float64Array[];
  pieces: Piece[];
}

/** Decodes a run sent by the host, refusing arrays whose sizes disagree with its counts. */
export function decodeBandRun(r: CompareBandRun): OverlayRun {
  const distance = Float64Array.from(decodeArray(r.distance));
  const energies = r.energies.map((e) => Float64Array.from(decodeArray(e)));
  if (distance.length !== r.nk) throw new Error(`band data of ${r.title}: ${distance.length} distances for ${r.nk} k-points`);
  for (const e of energies)
    if (e.length !== r.nk * r.nBands) throw new Error(`band data of ${r.title}: ${e.length} energies for ${r.nk} × ${r.nBands}`);
  return { meta: r, distance, energies, pieces: piecesFromSegments(r.segments, r.nk) };
}

/** One spin channel thinned for drawing: x in layout units, energies of the kept bands only. */
export interface ThinnedChannel {
  /** k-point x positions (layout units), piece after piece. */
  x: Float64Array;
  /** Energies [point × nBands + band] of the kept bands, raw (not yet aligned). */
  energies: Float64Array;
  nBands: number;
  /** Pieces over the thinned points. */
  pieces: Piece[];
}

/** Every stride-th k-point of each piece, and the piece's last one. */
export function thinnedIndices(pieces: readonly Piece[], stride: number): { indices: Int32Array; pieces: Piece[] } {
  const out: number[] = [];
  const thin: Piece[] = [];
  for (const p of pieces) {
    const i0 = out.length;
    for (let k = p.i0; k < p.i1; k += stride) out.push(k);
    const last = p.i1 - 1;
    if (p.i1 > p.i0 && (last - p.i0) % stride !== 0) out.push(last);
    thin.push({ i0, i1: out.length });
  }
  return { indices: Int32Array.from(out), pieces: thin };
}

/** Stride giving at most about two points per CSS pixel over `spanPx` pixels. */
export function strideFor(nk: number, spanPx: number): number {
  return Math.max(1, Math.floor(nk / (2 * Math.max(1, spanPx))));
}

/**
 * Bands of one channel that come near the window (sampled every stride-th k-point), 0-based; energies
 * relative to `align`.
 */
export function bandsNearWindow(e: Float64Array, nk: number, nBands: number, stride: number, align: number): number[] {
  const kept: number[] = [];
  for (let b = 0; b < nBands; b++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = 0; k < nk; k += stride) {
      const v = e[k * nBands + b]! - align;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (hi >= E_LOW - WINDOW_MARGIN && lo <= E_HIGH + WINDOW_MARGIN) kept.push(b);
  }
  return kept;
}

/** The channels of a run as drawn: thinned, with the bands near the window; x from the overlay layout. */
export function thinnedChannels(run: OverlayRun, x: Float64Array, stride: number): ThinnedChannel[] {
  const { nk, nBands } = run.meta;
  const align = run.meta.align_eV ?? 0;
  const { indices, pieces } = thinnedIndices(run.pieces, stride);
  const xs = Float64Array.from(indices, (k) => x[k]!);
  return run.energies.map((e) => {
    const bands = bandsNearWindow(e, nk, nBands, stride, align);
    const nb = bands.length;
    const energies = new Float64Array(indices.length * nb);
    indices.forEach((k, i) => bands.forEach((b, j) => (energies[i * nb + j] = e[k * nBands + b]!)));
    return { x: xs, energies, nBands: nb, pieces };
  });
}
