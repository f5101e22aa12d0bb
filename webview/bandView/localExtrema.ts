/**
 * Local minima and maxima of every band along the connected pieces of a path, for snapping a click or an
 * arrow key to the nearest extremum. Pure; presentation only (the fit itself is done by the core, in the host).
 *
 * What counts as a local extremum (tie tolerance, plateaus, where a plateau stands) is the core's rule,
 * src/core/analysis/pathLocalExtrema.ts, the same one the analysis scans candidates with. The band view adds
 * one choice of its own: an extremum at an end of a piece is offered only where the end carries a
 * high-symmetry label (where bands are flat by symmetry); the analysis judges ends by the band's slope instead
 * and lists those it rejects as set aside.
 */
import { pieceExtrema } from '../../src/core/analysis/pathLocalExtrema';

export interface Piece {
  /** First index and one past the last index of a connected run of k-points. */
  i0: number;
  i1: number;
}

export interface ExtremaSet {
  /** Parallel arrays, one entry per extremum. */
  spin: Uint8Array;
  band0: Int32Array;
  kIndex: Int32Array;
  energy: Float64Array;
  /** +1 for a maximum, −1 for a minimum. */
  sign: Int8Array;
  count: number;
}

export function findLocalExtrema(
  energies: (Float64Array | Float32Array)[],
  nBands: number,
  pieces: Piece[],
  labelled: (k: number) => boolean,
  timeReversalInvariant?: (k: number) => boolean,
): ExtremaSet {
  const spin: number[] = [];
  const band0: number[] = [];
  const kIndex: number[] = [];
  const energy: number[] = [];
  const sign: number[] = [];
  for (let s = 0; s < energies.length; s++) {
    const E = energies[s]!;
    for (const p of pieces) {
      for (let b = 0; b < nBands; b++) {
        const at = (i: number): number => E[i * nBands + b]!;
        for (const x of pieceExtrema(at, p.i0, p.i1, timeReversalInvariant)) {
          // An end of a piece is offered only at a labelled point.
          if ((x.k === p.i0 || x.k === p.i1 - 1) && !labelled(x.k)) continue;
          spin.push(s);
          band0.push(b);
          kIndex.push(x.k);
          energy.push(at(x.k));
          sign.push(x.sign);
        }
      }
    }
  }
  return {
    spin: Uint8Array.from(spin),
    band0: Int32Array.from(band0),
    kIndex: Int32Array.from(kIndex),
    energy: Float64Array.from(energy),
    sign: Int8Array.from(sign),
    count: spin.length,
  };
}

/**
 * Connected pieces of a path from its segments: a segment that starts after a jump begins a new piece;
 * consecutive connected segments (sharing or repeating their joining point) join one piece.
 */
export function piecesFromSegments(segments: { start: number; end: number; afterJump: boolean }[], nk: number): Piece[] {
  if (segments.length === 0) return nk > 0 ? [{ i0: 0, i1: nk }] : [];
  const out: Piece[] = [];
  let cur: Piece | null = null;
  for (const s of segments) {
    if (!cur || s.afterJump) {
      if (cur) out.push(cur);
      cur = { i0: s.start, i1: s.end + 1 };
    } else {
      cur.i1 = Math.max(cur.i1, s.end + 1);
    }
  }
  if (cur) out.push(cur);
  return out;
}
