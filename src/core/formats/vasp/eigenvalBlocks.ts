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
 * and its band lines (fastBandLine), stored straight into the arrays. One call per k-point, so the per-line scanner
 * methods stay cold and the runtime optimises this loop once. Returns false, leaving the scanner untouched, for
 * anything else (the end of the window, exponents the fast parser leaves, damage): readKBlock then reads the block
 * and words any error. The values are the same either way (both parse with numbers.ts's decimalAt).
 */
export function fastKBlock(sc: TextScanner, st: KBlocks, k: number): boolean {
  const buf = sc.bytes;
  const n = buf.length;
  const pos0 = sc.pos;
  const line0 = sc.line;
  const lineStart0 = sc.lineStart;
  let p = pos0;
  let lines = 0;
  for (;;) {
    const from = p;
    while (p < n && (buf[p] === 32 || buf[p] === 9 || buf[p] === 13)) p++;
    if (p >= n) return false;
    if (buf[p] !== 10) {
      p = from;
      break;
    }
    p++;
    lines++;
  }
  const values = st.values;
  p = numbersToEol(buf, p, n, values, 4);
  if (p < 0) return false;
  const kx = values[0]!;
  const ky = values[1]!;
  const kz = values[2]!;
  const w = values[3]!;
  sc.pos = p;
  sc.line += lines + 1;
  sc.lineStart = p;
  const { ispin, nBands } = st.h;
  const count = st.columns - 1;
  const base = k * nBands;
  const energies = st.energies;
  const occupations = st.occupations;
  for (let b = 0; b < nBands; b++) {
    if (!fastBandLine(sc, b + 1, values, count)) {
      sc.pos = pos0;
      sc.line = line0;
      sc.lineStart = lineStart0;
      return false;
    }
    for (let s = 0; s < ispin; s++) energies[s]![base + b] = values[s]!;
    if (occupations) for (let s = 0; s < ispin; s++) occupations[s]![base + b] = values[ispin + s]!;
  }
  st.kpoints[3 * k] = kx;
  st.kpoints[3 * k + 1] = ky;
  st.kpoints[3 * k + 2] = kz;
  st.weights[k] = w;
  return true;
}

/**
 * The common band line, "  index  E [E_down] [occ [occ_down]]", parsed in one pass over the bytes
 * (numbers.ts's fast parser). Returns false, leaving the scanner untouched, for anything else (exponents, long
 * mantissas, a wrong index, damage): the general path then reads the line and words any error.
 */
export function fastBandLine(sc: TextScanner, expectIndex: number, out: Float64Array, count: number): boolean {
  const buf = sc.bytes;
  const n = buf.length;
  let p = sc.pos;
  while (p < n && (buf[p] === 32 || buf[p] === 9)) p++;
  let idx = 0;
  let digits = 0;
  while (p < n) {
    const d = buf[p]! - 48;
    if (d < 0 || d > 9) break;
    idx = idx * 10 + d;
    p++;
    digits++;
  }
  if (digits === 0 || idx !== expectIndex) return false;
  const c = buf[p];
  if (!(c === 32 || c === 9)) return false;
  p = numbersToEol(buf, p, n, out, count);
  if (p < 0) return false;
  sc.pos = p;
  sc.line++;
  sc.lineStart = p;
  return true;
}

/**
 * `count` numbers from buf[p] (spaces or tabs before each), then only spaces up to a newline: the position after
 * the newline, the values in `out`; -1 for anything else (a number the fast parser leaves, a missing or extra field,
 * the end of the bytes before the newline).
 */
function numbersToEol(buf: Uint8Array, p: number, n: number, out: Float64Array, count: number): number {
  for (let j = 0; j < count; j++) {
    while (p < n && (buf[p] === 32 || buf[p] === 9)) p++;
    p = decimalAt(buf, p, n);
    if (p < 0) return -1;
    const c = buf[p];
    if (!(c === 32 || c === 9 || c === 10 || c === 13)) return -1;
    out[j] = DECIMAL[0]!;
  }
  while (p < n && (buf[p] === 32 || buf[p] === 9 || buf[p] === 13)) p++;
  if (p >= n || buf[p] !== 10) return -1;
  return p + 1;
}
