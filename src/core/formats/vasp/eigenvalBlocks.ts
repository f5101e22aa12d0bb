/**
 * The EIGENVAL reader's state while reading k-point blocks, and its fast path: a common block (the k-point line and
 * its band lines) read in one pass over the bytes. Anything else is left to the general path in eigenvalScan.ts.
 */
import type { TextScanner } from '../textScanner';
import { DECIMAL as DECIMAL_SLOT, decimalAt as parseDecimalAt } from '../numbers';

/** Local bindings of the parser and its value slot: a hot loop then reads no module export per number. */
const decimalAt = parseDecimalAt;
const DECIMAL = DECIMAL_SLOT;

/** What the header says, checked against the bytes after it. */
export interface EigenvalHeader {
  ispin: 1 | 2;
  electrons: number;
  nkAnnounced: number;
  nBands: number;
  system: string;
  /** The most k-points the rest of the file can hold (never allocate for more). */
  maxK: number;
}

/**
 * The arrays being filled and the layout of the band lines (found on the first one). One class, so the hot
 * functions below always see objects of one shape.
 */
export class KBlocks {
  readonly kpoints: Float64Array;
  readonly weights: Float64Array;
  readonly energies: Float64Array[] = [];
  occupations: Float32Array[] | null = null;
  /** Columns of a band line (index included), -1 before the first line is read. */
  columns = -1;
  readonly values = new Float64Array(4);
  nk = 0;

  constructor(readonly h: EigenvalHeader) {
    this.kpoints = new Float64Array(h.maxK * 3);
    this.weights = new Float64Array(h.maxK);
    for (let s = 0; s < h.ispin; s++) this.energies.push(new Float64Array(h.maxK * h.nBands));
  }
}

/**
 * The common k-point block in one pass over the bytes: the blank line(s) before it, the k-point line (four numbers)
 * and its band lines ("  index  E [E_down] [occ [occ_down]]"), stored straight into the arrays. One function and
 * one loop (the k-point line is line 0, without an index), so the runtime optimises it once and the per-line
 * scanner methods stay cold. Returns false, leaving the scanner untouched, for anything else (the end of the
 * window, numbers the fast parser leaves, a wrong index, damage): readKBlock then reads the block and words any
 * error. The values are the same either way (both parse with numbers.ts's decimalAt).
 */
export function fastKBlock(sc: TextScanner, st: KBlocks, k: number): boolean {
  const buf = sc.bytes;
  const n = buf.length;
  let p = sc.pos;
  let blank = 0;
  for (;;) {
    const from = p;
    while (p < n && (buf[p] === 32 || buf[p] === 9 || buf[p] === 13)) p++;
    if (p >= n) return false;
    if (buf[p] !== 10) {
      p = from;
      break;
    }
    p++;
    blank++;
  }
  const { ispin, nBands } = st.h;
  const values = st.values;
  const base = k * nBands - 1;
  const energies = st.energies;
  const occupations = st.occupations;
  let kx = 0;
  let ky = 0;
  let kz = 0;
  let w = 0;
  for (let line = 0; line <= nBands; line++) {
    let count = 4;
    if (line > 0) {
      count = st.columns - 1;
      while (p < n && (buf[p] === 32 || buf[p] === 9)) p++;
      let idx = 0;
      let digits = 0;
      for (let d = p < n ? buf[p]! - 48 : -1; d >= 0 && d <= 9; d = p < n ? buf[p]! - 48 : -1) {
        idx = idx * 10 + d;
        p++;
        digits++;
      }
      if (digits === 0 || idx !== line || !(buf[p] === 32 || buf[p] === 9)) return false;
    }
    for (let j = 0; j < count; j++) {
      while (p < n && (buf[p] === 32 || buf[p] === 9)) p++;
      p = decimalAt(buf, p, n);
      if (p < 0) return false;
      const c = buf[p];
      if (!(c === 32 || c === 9 || c === 10 || c === 13)) return false;
      values[j] = DECIMAL[0]!;
    }
    while (p < n && (buf[p] === 32 || buf[p] === 9 || buf[p] === 13)) p++;
    if (p >= n || buf[p] !== 10) return false;
    p++;
    if (line === 0) {
      kx = values[0]!;
      ky = values[1]!;
      kz = values[2]!;
      w = values[3]!;
      continue;
    }
    for (let s = 0; s < ispin; s++) energies[s]![base + line] = values[s]!;
    if (occupations) for (let s = 0; s < ispin; s++) occupations[s]![base + line] = values[ispin + s]!;
  }
  st.kpoints[3 * k] = kx;
  st.kpoints[3 * k + 1] = ky;
  st.kpoints[3 * k + 2] = kz;
  st.weights[k] = w;
  sc.pos = p;
  sc.line += blank + 1 + nBands;
  sc.lineStart = p;
  return true;
}
