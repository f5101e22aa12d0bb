/**
 * The <eigenvalues> block of one ionic step in a vasprun.xml: rows `<r> energy occupation </r>` in sets per
 * k-point inside sets per spin. Rows go straight from the bytes into typed arrays (numbers.ts's parser);
 * anything unusual is left to the general XML path (vasprunStream.ts), which calls `closeRow`/`closeSet` and
 * words the error. The row reader also crosses from one k-point's `<set>` to the next, doing what the close
 * and open events would do.
 */
import type { ReaderError } from '../../errors';
import { DECIMAL as DECIMAL_SLOT, decimalAt as parseDecimalAt, scanDecimalBytes } from '../numbers';
import { DoubleBuffer, FloatBuffer } from '../doubleBuffer';
import type { RowReader, XmlByteScanner } from '../xmlByteScanner';

/** Local bindings of the parser and its value slot: a hot loop then reads no module export per number. */
const decimalAt = parseDecimalAt;
const DECIMAL = DECIMAL_SLOT;

/** Fewest bytes one eigenvalue row can take (`<r>1</r>`): bounds what a header's NBANDS may claim. */
const MIN_ROW_BYTES = 8;

/** The numbers of the last row read by simpleRow. */
const ROW = new Float64Array(3);

/** Newlines skipped by skipBlanks since the row reader started, and the offset of the last one. */
let newlineCount = 0;
let lastNewline = -1;

/** Skip blanks from buf[p], counting newlines (newlineCount, lastNewline); the position of the first other byte. */
function skipBlanks(buf: Uint8Array, p: number, end: number): number {
  while (p < end) {
    const c = buf[p]!;
    if (c === 32 || c === 9 || c === 13) p++;
    else if (c === 10) {
      newlineCount++;
      lastNewline = p;
      p++;
    } else break;
  }
  return p;
}

const SET_BYTES = new Uint8Array([115, 101, 116]); // "set"
const KPOINT_SET_OPEN = new TextEncoder().encode('<set comment="kpoint');

/** Whether `</name>` (name as bytes) is at buf[p], complete in the piece. */
function endTagAt(buf: Uint8Array, p: number, end: number, name: Uint8Array): boolean {
  const n = name.length;
  if (p + n + 2 >= end || buf[p] !== 60 || buf[p + 1] !== 47 || buf[p + n + 2] !== 62) return false;
  for (let i = 0; i < n; i++) if (buf[p + 2 + i] !== name[i]) return false;
  return true;
}

/** `<set comment="kpoint N">` at buf[p] (N digits and spaces only): the position after it, or -1. */
function kpointSetAt(buf: Uint8Array, p: number, end: number): number {
  const n = KPOINT_SET_OPEN.length;
  if (p + n >= end) return -1;
  for (let i = 0; i < n; i++) if (buf[p + i] !== KPOINT_SET_OPEN[i]) return -1;
  let q = p + n;
  let c = 0;
  while (q < end && (((c = buf[q]!) >= 48 && c <= 57) || c === 32)) q++;
  if (q + 1 >= end || c !== 34 || buf[q + 1] !== 62) return -1;
  return q + 2;
}

/**
 * One simple row at buf[p]: `<tag>`, `n` numbers of the fast form on one line, `</tag>`. Returns the position
 * after it with the numbers in ROW, or -1 for anything else or a row not complete in the piece (the general
 * path then reads it and words any error).
 */
function simpleRow(buf: Uint8Array, p: number, end: number, tag: number, n: number): number {
  if (p + 3 >= end || buf[p] !== 60 || buf[p + 1] !== tag || buf[p + 2] !== 62) return -1;
  let q = p + 3;
  let c = 0;
  for (let j = 0; j < n; j++) {
    const s = q;
    while (q < end && ((c = buf[q]!) === 32 || c === 9)) q++;
    if (q === s && j > 0) return -1;
    q = decimalAt(buf, q, end);
    if (q < 0 || q >= end || !((c = buf[q]!) === 32 || c === 9 || c === 60)) return -1;
    ROW[j] = DECIMAL[0]!;
  }
  while (q < end && ((c = buf[q]!) === 32 || c === 9)) q++;
  if (q + 3 >= end || c !== 60 || buf[q + 1] !== 47 || buf[q + 2] !== tag || buf[q + 3] !== 62) return -1;
  return q + 4;
}

/** Rows read by the last rowsOfSet call. */
let rowsRead = 0;

/**
 * Consecutive `<r>` rows of `cols` numbers (one k-point's set) into the buffers, as many as are complete and simple;
 * the position after the last one, their number in rowsRead. A function of its own, called once per set, so the
 * runtime optimises this loop as an ordinary call rather than while one long call is still in it.
 */
function rowsOfSet(buf: Uint8Array, pos: number, end: number, cols: number, energies: DoubleBuffer, occupations: FloatBuffer): number {
  let rows = 0;
  for (;;) {
    pos = skipBlanks(buf, pos, end);
    const next = simpleRow(buf, pos, end, 114 /* r */, cols);
    if (next < 0) break;
    energies.push(ROW[0]!);
    if (cols >= 2) occupations.push(ROW[1]!);
    rows++;
    pos = next;
  }
  rowsRead = rows;
  return pos;
}

/**
 * Rows of `cols` numbers in `<v>` elements (the k-point list, the weights) straight from the bytes into
 * `list`, as many as are complete in the piece; the rest is left to the general path.
 */
export function readVectorRows(sc: XmlByteScanner, buf: Uint8Array, pos: number, end: number, list: DoubleBuffer, cols: 1 | 3): number {
  let rows = 0;
  newlineCount = 0;
  for (;;) {
    pos = skipBlanks(buf, pos, end);
    const next = simpleRow(buf, pos, end, 118 /* v */, cols);
    if (next < 0) break;
    for (let j = 0; j < cols; j++) list.push(ROW[j]!);
    rows++;
    pos = next;
  }
  if (newlineCount > 0) sc.newlines(newlineCount, lastNewline);
  if (rows > 0) sc.markChild();
  return pos;
}

/** The counts a header gives for sizing the arrays (each null when not given). */
export interface EigenvalueHeader {
  nbands: number;
  ispin: number;
  nk: number;
  /** The file's size in bytes when known. */
  sizeHint: number | null;
}

/** The counts that size an eigenvalue block of `nk` k-points: NBANDS and ISPIN from the first of `tags` that gives each. */
export function eigenvalueHeader(tags: ReadonlyMap<string, string>[], nk: number, sizeHint: number | null): EigenvalueHeader {
  const tag = (key: string): string | undefined => tags.map((t) => t.get(key)).find((v) => v !== undefined);
  const nb = tag('NBANDS');
  const ispin = tag('ISPIN');
  return { nbands: nb === undefined ? NaN : Number(nb.trim()), ispin: ispin === undefined ? 1 : Number(ispin.trim()), nk, sizeHint };
}

export class EigenvalueBlock {
  readonly energies: DoubleBuffer;
  /** Occupations in single precision: VASP writes them with four decimals, and they only decide filling. */
  readonly occupations: FloatBuffer;
  /** Rows per (spin, k) set, to check every set has the same number of bands. */
  bandsPerSet = -1;
  sets = 0;
  spins = 0;
  kInSpin = 0;
  rowsInSet = 0;
  columns = -1;
  complete = false;
  /** The row reader for this block's sets (XmlByteScanner.setRows). */
  readonly rowReader: RowReader = (sc, buf, pos, end) => this.fastRows(sc, buf, pos, end);
  private readonly row = new Float64Array(3);

  /**
   * Size the arrays from NBANDS, ISPIN and the k-points, checked against the file size: a header that claims
   * more rows than the file can hold is refused through `fail`.
   */
  constructor(
    h: EigenvalueHeader,
    readonly line: number,
    private readonly fail: (reason: string) => ReaderError,
  ) {
    let guess = 1 << 16;
    if (Number.isInteger(h.nbands) && h.nbands > 0 && (h.ispin === 1 || h.ispin === 2) && h.nk > 0) {
      const rows = h.nk * h.nbands * h.ispin;
      if (h.sizeHint !== null && rows * MIN_ROW_BYTES > h.sizeHint) {
        throw fail(
          `the parameters say NBANDS = ${h.nbands}${h.ispin === 2 ? ' and ISPIN = 2' : ''} for ${h.nk} k-points: ${rows} eigenvalue rows, more than a file of ${h.sizeHint} bytes can hold (at least ${MIN_ROW_BYTES} bytes each)`,
        );
      }
      // Without the file size, the header is trusted only up to a modest start; the buffers grow with the data.
      guess = h.sizeHint !== null ? rows : Math.min(rows, 1 << 20);
    } else if (h.sizeHint !== null) guess = Math.min(guess, Math.floor(h.sizeHint / MIN_ROW_BYTES) + 1);
    this.energies = new DoubleBuffer(guess);
    this.occupations = new FloatBuffer(guess);
  }

  /** A `<set>` opens: a spin channel or a k-point, by its comment. */
  openSet(comment: string): void {
    if (comment.startsWith('spin')) {
      this.spins++;
      this.kInSpin = 0;
    } else if (comment.startsWith('kpoint')) {
      this.kInSpin++;
      this.rowsInSet = 0;
    }
  }

  /** A `<set>` opens in the scanner: counted by `openSet`, its rows read by this block's row reader. */
  enterSet(sc: XmlByteScanner, comment: string): void {
    this.openSet(comment);
    sc.setRows(this.rowReader);
  }

  /** A `<set>` closes in the scanner: row reading stops; a k-point's set is checked by `closeSet`. */
  leaveSet(sc: XmlByteScanner): void {
    sc.setRows(null);
    if (sc.ancestor(1) === 'set') this.closeSet();
  }

  /** A row the general path read (its text): the numbers, or the error in the reader's words. */
  closeRow(text: Uint8Array | null, length: number): void {
    const vals = this.row;
    const r = text === null ? { count: 0, bad: null } : scanDecimalBytes(text, 0, length, vals, 0, 3);
    if (r.bad !== null || r.count !== this.columns) this.rowError(r.count, r.bad);
    this.energies.push(vals[0]!);
    if (this.columns >= 2) this.occupations.push(vals[1]!);
  }

  /** A k-point's `<set>` closes: every k-point must list the same number of bands. */
  closeSet(): void {
    if (this.rowsInSet === 0) return;
    if (this.bandsPerSet < 0) this.bandsPerSet = this.rowsInSet;
    else if (this.rowsInSet !== this.bandsPerSet) {
      throw this.fail(`k-point ${this.kInSpin} lists ${this.rowsInSet} bands where the k-points before list ${this.bandsPerSet}`);
    }
    this.sets++;
    this.rowsInSet = 0;
  }

  /** A row that is not (energy, occupation) like the rows before it: fix the column count, or say what is wrong. */
  private rowError(count: number, bad: string | null): void {
    const where = `band ${this.rowsInSet} of k-point ${this.kInSpin}${this.spins > 1 ? ' (spin 2)' : ''}`;
    if (bad !== null) {
      if (bad.includes('***'))
        throw this.fail(`the energy of ${where} is written as "${bad}": VASP's number field overflowed, so the value is unknown`);
      throw this.fail(`the energy and occupation of ${where} should be numbers, found "${bad}"`);
    }
    if (this.columns < 0) {
      if (count < 1 || count > 3) throw this.fail(`an eigenvalue row holds ${count} numbers; expected the energy and the occupation`);
      this.columns = count;
      return;
    }
    throw this.fail(`the row for ${where} holds ${count} numbers where the rows before hold ${this.columns}`);
  }

  /**
   * Eigenvalue rows straight from the bytes: `<r>` numbers `</r>`, as many as are complete in the piece. Anything
   * else (the first row, damage, the end of the set) is left to the general path, which words errors.
   */
  private fastRows(sc: XmlByteScanner, buf: Uint8Array, pos: number, end: number): number {
    const cols = this.columns;
    if (cols < 1) return pos;
    const energies = this.energies;
    const occupations = this.occupations;
    newlineCount = 0;
    for (;;) {
      pos = rowsOfSet(buf, pos, end, cols, energies, occupations);
      const rows = rowsRead;
      if (rows > 0) {
        this.rowsInSet += rows;
        sc.markChild();
      }
      // The end of this k-point's set and the start of the next one, as VASP writes them, without the general
      // path; anything else (a band count that differs, the end of the spin) is left to it.
      if (!endTagAt(buf, pos, end, SET_BYTES) || this.rowsInSet === 0 || sc.ancestor(1) !== 'set') break;
      if (this.bandsPerSet >= 0 && this.rowsInSet !== this.bandsPerSet) break;
      this.closeSet();
      sc.leaveFast();
      pos = skipBlanks(buf, pos + SET_BYTES.length + 3, end);
      const next = kpointSetAt(buf, pos, end);
      if (next < 0 || !sc.canEnterFast()) break;
      sc.enterFast('set');
      this.kInSpin++;
      sc.setRows(this.rowReader);
      pos = next;
    }
    if (newlineCount > 0) sc.newlines(newlineCount, lastNewline);
    return pos;
  }

  /**
   * The energies and occupations per spin for `nk` listed k-points, after checking the block covers them.
   * Buffers sized exactly (NBANDS known) are handed over as views: no second copy of the eigenvalues.
   */
  perSpin(
    nk: number,
    fail: (reason: string) => ReaderError,
  ): { nSpin: 1 | 2; nBands: number; energies: Float64Array[]; occupations: Float32Array[] | null } {
    const nSpin = this.spins;
    if (nSpin !== 1 && nSpin !== 2) throw fail(`the eigenvalues come in ${nSpin} spin sets; 1 or 2 are expected`);
    const nBands = this.bandsPerSet;
    if (this.sets !== nk * nSpin || nBands <= 0) {
      throw fail(
        `the eigenvalues cover ${this.sets} (spin, k-point) sets, but ${nk} k-points${nSpin === 2 ? ' × 2 spins' : ''} are listed`,
      );
    }
    const per = nk * nBands;
    const energies: Float64Array[] = [];
    const occupations: Float32Array[] | null = this.columns >= 2 ? [] : null;
    const all = this.energies.data;
    const occ = this.occupations.data;
    for (let s = 0; s < nSpin; s++) {
      energies.push(all.length === per * nSpin ? all.subarray(s * per, (s + 1) * per) : all.slice(s * per, (s + 1) * per));
      if (occupations)
        occupations.push(occ.length === per * nSpin ? occ.subarray(s * per, (s + 1) * per) : occ.slice(s * per, (s + 1) * per));
    }
    return { nSpin, nBands, energies, occupations };
  }
}
