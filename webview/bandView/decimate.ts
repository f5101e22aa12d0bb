/**
 * Per-pixel-column min/max decimation of bands along a path, so the band view draws only what the pixels can
 * show. Pure: no DOM. Energies use the core's layout, value of band b at k-point i = values[i * nBands + b].
 *
 * For one connected piece of the path (indices i0..i1-1, x nondecreasing), `columnEnvelope` fills, for every
 * pixel column c and band b, the lowest and highest energy of the points that fall in that column and the
 * energy of the last point in it (to join one column to the next). A `MinMaxPyramid` of bucket minima and
 * maxima (bucket sizes 8, 16, 32, ...) lets a zoomed-out redraw read one bucket per column instead of every
 * point; when zoomed in past the pyramid's resolution the raw points are read, so full detail returns on zoom.
 */

/** Band energies as the host sends them: 64-bit, or 32-bit for very large runs (kept as sent, to save memory). */
export type EnergyArray = Float64Array | Float32Array;

/** One level of the pyramid: buckets of `size` consecutive points, k-major [bucket * nBands + band]. */
export interface PyramidLevel {
  size: number;
  buckets: number;
  min: Float32Array;
  max: Float32Array;
  /** The widest x extent of any bucket in this level (path-distance units). */
  maxExtent: number;
}

export interface MinMaxPyramid {
  i0: number;
  i1: number;
  nBands: number;
  levels: PyramidLevel[];
}

/** Output buffers of `columnEnvelope`, column-major [column * nBands + band]. */
export interface Envelope {
  width: number;
  nBands: number;
  min: Float32Array;
  max: Float32Array;
  /** Energy of the last point in the column. */
  last: Float32Array;
  /** 1 when at least one point falls in the column. */
  filled: Uint8Array;
}

export interface ColumnMapping {
  /** x of the left edge of column 0. */
  x0: number;
  /** Columns per unit of x. */
  scale: number;
  width: number;
}

export function createEnvelope(width: number, nBands: number): Envelope {
  return {
    width,
    nBands,
    min: new Float32Array(width * nBands),
    max: new Float32Array(width * nBands),
    last: new Float32Array(width * nBands),
    filled: new Uint8Array(width),
  };
}

/**
 * A pyramid level is used when its widest bucket spans at most this many columns. Each bucket goes to the
 * column of its midpoint, so no point is drawn more than one column away from its own.
 */
export const MAX_BUCKET_COLUMNS = 2;

/** Points below this count per piece are never summarised: reading them is as fast as reading buckets. */
export const PYRAMID_MIN_POINTS = 64;

/**
 * Builds bucket minima/maxima for the points i0..i1-1 (a connected piece of the path), bucket sizes
 * firstSize, 2·firstSize, ... while a level has at least two buckets.
 */
export function buildPyramid(x: Float64Array, values: EnergyArray, nBands: number, i0: number, i1: number, firstSize = 8): MinMaxPyramid {
  const levels: PyramidLevel[] = [];
  const n = i1 - i0;
  if (n < PYRAMID_MIN_POINTS || firstSize < 2) return { i0, i1, nBands, levels };
  // First level straight from the points.
  let size = firstSize;
  let buckets = Math.ceil(n / size);
  let min = new Float32Array(buckets * nBands);
  let max = new Float32Array(buckets * nBands);
  let maxExtent = 0;
  for (let j = 0; j < buckets; j++) {
    const s = i0 + j * size;
    const e = Math.min(i1, s + size);
    const o = j * nBands;
    let base = s * nBands;
    for (let b = 0; b < nBands; b++) {
      const v = values[base + b]!;
      min[o + b] = v;
      max[o + b] = v;
    }
    for (let i = s + 1; i < e; i++) {
      base = i * nBands;
      for (let b = 0; b < nBands; b++) {
        const v = values[base + b]!;
        if (v < min[o + b]!) min[o + b] = v;
        else if (v > max[o + b]!) max[o + b] = v;
      }
    }
    const ext = x[e - 1]! - x[s]!;
    if (ext > maxExtent) maxExtent = ext;
  }
  levels.push({ size, buckets, min, max, maxExtent });
  // Coarser levels from the previous one, two buckets at a time.
  while (buckets > 2) {
    const prev = levels[levels.length - 1]!;
    size *= 2;
    buckets = Math.ceil(n / size);
    min = new Float32Array(buckets * nBands);
    max = new Float32Array(buckets * nBands);
    maxExtent = 0;
    for (let j = 0; j < buckets; j++) {
      const a = 2 * j;
      const c = Math.min(prev.buckets - 1, a + 1);
      const o = j * nBands;
      const oa = a * nBands;
      const oc = c * nBands;
      for (let b = 0; b < nBands; b++) {
        const lo1 = prev.min[oa + b]!;
        const lo2 = prev.min[oc + b]!;
        const hi1 = prev.max[oa + b]!;
        const hi2 = prev.max[oc + b]!;
        min[o + b] = lo1 < lo2 ? lo1 : lo2;
        max[o + b] = hi1 > hi2 ? hi1 : hi2;
      }
      const s = i0 + j * size;
      const e = Math.min(i1, s + size);
      const ext = x[e - 1]! - x[s]!;
      if (ext > maxExtent) maxExtent = ext;
    }
    levels.push({ size, buckets, min, max, maxExtent });
  }
  return { i0, i1, nBands, levels };
}

/** First index in [lo, hi) with x[i] >= v (x nondecreasing). */
export function lowerBound(x: Float64Array, v: number, lo: number, hi: number): number {
  while (lo < hi) {
    const m = (lo + hi) >>> 1;
    if (x[m]! < v) lo = m + 1;
    else hi = m;
  }
  return lo;
}

/** Clears an envelope before the pieces of a redraw are added to it. */
export function clearEnvelope(env: Envelope): void {
  env.filled.fill(0);
}

/**
 * Adds the piece i0..i1-1 to the envelope. Returns how many values were read (points × bands or
 * buckets × bands), for the benchmark's record. Uses the coarsest pyramid level whose buckets are no
 * wider than MAX_BUCKET_COLUMNS columns, or the raw points when none is.
 */
export function columnEnvelope(
  x: Float64Array,
  values: EnergyArray,
  nBands: number,
  i0: number,
  i1: number,
  map: ColumnMapping,
  env: Envelope,
  pyramid: MinMaxPyramid | null = null,
): number {
  const { x0, scale, width } = map;
  if (i1 <= i0 || width <= 0) return 0;
  // Visible index range.
  const xLo = x0;
  const xHi = x0 + width / scale;
  const a = lowerBound(x, xLo, i0, i1);
  const z = lowerBound(x, xHi, a, i1); // points with x < xHi
  if (z <= a) return 0;
  let level: PyramidLevel | null = null;
  if (pyramid && pyramid.i0 === i0 && pyramid.i1 === i1) {
    for (const l of pyramid.levels) if (l.maxExtent * scale <= MAX_BUCKET_COLUMNS) level = l;
  }
  const min = env.min;
  const max = env.max;
  const last = env.last;
  const filled = env.filled;
  if (!level) {
    let read = 0;
    for (let i = a; i < z; i++) {
      let c = Math.floor((x[i]! - x0) * scale);
      if (c < 0) c = 0;
      else if (c >= width) c = width - 1;
      const base = i * nBands;
      const o = c * nBands;
      if (!filled[c]) {
        filled[c] = 1;
        for (let b = 0; b < nBands; b++) {
          const v = values[base + b]!;
          min[o + b] = v;
          max[o + b] = v;
          last[o + b] = v;
        }
      } else {
        for (let b = 0; b < nBands; b++) {
          const v = values[base + b]!;
          if (v < min[o + b]!) min[o + b] = v;
          if (v > max[o + b]!) max[o + b] = v;
          last[o + b] = v;
        }
      }
      read += nBands;
    }
    return read;
  }
  // Whole buckets that overlap the visible range; each goes to the column of its midpoint (a point of the
  // bucket lies at most MAX_BUCKET_COLUMNS / 2 = 1 column from it).
  const size = level.size;
  const lmin = level.min;
  const lmax = level.max;
  const j0 = Math.floor((a - i0) / size);
  const j1 = Math.ceil((z - i0) / size);
  let read = 0;
  for (let j = j0; j < j1; j++) {
    const s = i0 + j * size;
    const e = Math.min(i1, s + size) - 1;
    let c = Math.floor(((x[s]! + x[e]!) / 2 - x0) * scale);
    if (c < 0) c = 0;
    else if (c >= width) c = width - 1;
    const o = c * nBands;
    const ob = j * nBands;
    const lb = e * nBands;
    if (!filled[c]) {
      filled[c] = 1;
      for (let b = 0; b < nBands; b++) {
        min[o + b] = lmin[ob + b]!;
        max[o + b] = lmax[ob + b]!;
        last[o + b] = values[lb + b]!;
      }
    } else {
      for (let b = 0; b < nBands; b++) {
        const lo = lmin[ob + b]!;
        const hi = lmax[ob + b]!;
        if (lo < min[o + b]!) min[o + b] = lo;
        if (hi > max[o + b]!) max[o + b] = hi;
        last[o + b] = values[lb + b]!;
      }
    }
    read += nBands;
  }
  return read;
}
