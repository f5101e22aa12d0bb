/**
 * Local minima and maxima of every band along the connected pieces of a path, for snapping a click or an
 * arrow key to the nearest extremum. Pure; presentation only (the fit itself is done by the core, in the host).
 *
 * A point is a local minimum when it is no higher than both neighbours and strictly lower than at least one
 * (plateaus count once, at their first point); likewise for maxima. The ends of a piece count when they
 * carry a high-symmetry label (where bands are flat by symmetry) and are lower/higher than their neighbour.
 */

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
): ExtremaSet {
  const spin: number[] = [];
  const band0: number[] = [];
  const kIndex: number[] = [];
  const energy: number[] = [];
  const sign: number[] = [];
  const push = (s: number, b: number, k: number, e: number, sg: number): void => {
    spin.push(s);
    band0.push(b);
    kIndex.push(k);
    energy.push(e);
    sign.push(sg);
  };
  for (let s = 0; s < energies.length; s++) {
    const E = energies[s]!;
    for (const p of pieces) {
      const n = p.i1 - p.i0;
      if (n < 2) continue;
      for (let b = 0; b < nBands; b++) {
        const at = (i: number): number => E[i * nBands + b]!;
        // Ends of the piece.
        if (labelled(p.i0)) {
          const d = at(p.i0 + 1) - at(p.i0);
          if (d > 0) push(s, b, p.i0, at(p.i0), -1);
          else if (d < 0) push(s, b, p.i0, at(p.i0), 1);
        }
        // Interior, with plateaus: walk runs of equal values.
        let i = p.i0 + 1;
        while (i < p.i1 - 1) {
          const v = at(i);
          let j = i;
          while (j + 1 < p.i1 - 1 && at(j + 1) === v) j++;
          const left = at(i - 1);
          const right = at(j + 1);
          if (v <= left && v <= right && (v < left || v < right)) push(s, b, i, v, -1);
          else if (v >= left && v >= right && (v > left || v > right)) push(s, b, i, v, 1);
          i = j + 1;
        }
        if (labelled(p.i1 - 1)) {
          const d = at(p.i1 - 2) - at(p.i1 - 1);
          if (d > 0) push(s, b, p.i1 - 1, at(p.i1 - 1), -1);
          else if (d < 0) push(s, b, p.i1 - 1, at(p.i1 - 1), 1);
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
