/**
 * vasprun.xml: VASP's full record of a run, scanned from the bytes in pieces (never a DOM), keeping only
 * what a band structure needs: the final structure, the k-points (and the line-mode generation ends), the
 * eigenvalues and occupations per spin of the last ionic step, the Fermi energy, NELECT, ISPIN, LSORBIT /
 * LNONCOLLINEAR (spinor run), and the tags that name the method (vasp/vaspMethod.ts).
 * Memory held is the eigenvalue arrays, not the file. Layout (as VASP writes it):
 *
 *   <modeling>
 *     <incar> <i name="ISPIN">2</i> <i type="logical" name="LSORBIT"> T </i> ... </incar>
 *     <kpoints>
 *       <generation param="listgenerated"> <i name="divisions" type="int">20</i> <v>0 0 0</v> ... </generation>
 *       <varray name="kpointlist"> <v> kx ky kz </v> ... </varray>
 *       <varray name="weights"> <v> w </v> ... </varray>
 *     </kpoints>
 *     <parameters> ... <i name="NELECT"> 8.0 </i> ... <i type="logical" name="LSORBIT"> F </i> ... </parameters>
 *     <atominfo> <array name="atoms"> <set> <rc><c>Si</c><c> 1</c></rc> ... </set> </array> </atominfo>
 *     <structure name="initialpos"> <crystal> <varray name="basis"> <v>..</v>×3 </varray> </crystal>
 *                                   <varray name="positions"> <v>..</v> </varray> </structure>
 *     <calculation> ... <eigenvalues> <array> ... <set> <set comment="spin 1"> <set comment="kpoint 1">
 *         <r> energy occupation </r> ... </set> ... </set> </set> </array> </eigenvalues>
 *       <dos> <i name="efermi"> 5.9 </i> ... </dos> </calculation>
 *     <structure name="finalpos"> ... </structure>
 *   </modeling>
 *
 * Eigenvalues inside <projected> (and VASP 6's <eigenvalues_kpoints_opt>) are other blocks: only the
 * <eigenvalues> directly inside <calculation> are read.
 */
import type { BandStructure, ElectronicMethod, InputWarning, KLabel, Mat3, OccupationArray, SourceFile, Structure, Vec3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import type { FormatReader, ReadOptions } from './types';
import { createSha256, sha256Hex } from '../hash';
import { CancelledError, ReaderError } from '../errors';
import { POW10, parseDecimal, scanDecimalBytes } from './numbers';
import { XmlByteScanner, type RowReader } from './xmlByteScanner';
import { vaspLogical } from './vasp/incar';
import { vaspMethod } from './vasp/vaspMethod';
import { readKpoints } from './vasp/kpoints';
import { labelsFromLineMode } from './vasp/kpointLabels';
import { dropMeshBeforePath } from './vasp/hybridMesh';
import { det3 } from '../lattice/linalg';
import { DoubleBuffer, FloatBuffer } from './doubleBuffer';

export const VASPRUN_FORMAT = 'vasprun-xml';

interface StructureDraft {
  name: string;
  basis: Vec3[];
  positions: number[];
}

interface EigenBlock {
  energies: DoubleBuffer;
  /** Occupations in single precision: VASP writes them with four decimals, and they only decide filling. */
  occupations: FloatBuffer;
  /** Rows per (spin, k) set, to check every set has the same number of bands. */
  bandsPerSet: number;
  sets: number;
  spins: number;
  kInSpin: number;
  rowsInSet: number;
  columns: number;
  complete: boolean;
  line: number;
}

/** What a vasprun.xml says, before it becomes a BandStructure. */
export interface VasprunData {
  structure: Structure | null;
  species: string[];
  kpoints: Float64Array;
  weights: Float64Array | null;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  energies: Float64Array[];
  occupations: OccupationArray[] | null;
  fermiEnergy: number | null;
  electrons: number | null;
  spinorbit: boolean | null;
  /** How the energies were computed, from the <incar> and <parameters> tags (see vasp/vaspMethod.ts). */
  method: ElectronicMethod;
  /** Line-mode generation: points per segment and the segment ends (fractional), when written. */
  generation: { divisions: number; ends: Vec3[] } | null;
  /** False when the file ended early (only with allowPartial). */
  complete: boolean;
  /** Ionic steps whose eigenvalues were seen; the last complete one is kept. */
  steps: number;
}

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
 * One simple row at buf[p]: `<tag>`, `n` plain decimals (sign, digits, point, digits: at most 15 digits) on
 * one line, `</tag>`. Returns the position after it with the numbers in ROW, or -1 for anything else or a row
 * not complete in the piece (the general path then reads it and words any error).
 */
function simpleRow(buf: Uint8Array, p: number, end: number, tag: number, n: number): number {
  if (p + 3 >= end || buf[p] !== 60 || buf[p + 1] !== tag || buf[p + 2] !== 62) return -1;
  let q = p + 3;
  let c = 0;
  for (let j = 0; j < n; j++) {
    const s = q;
    while (q < end && ((c = buf[q]!) === 32 || c === 9)) q++;
    if (q === s && j > 0) return -1;
    let neg = false;
    if (c === 45) {
      neg = true;
      q++;
    }
    let m = 0;
    let nd = 0;
    let frac = 0;
    let d = 0;
    while (q < end && (d = buf[q]! - 48) >= 0 && d <= 9) {
      m = m * 10 + d;
      q++;
      nd++;
    }
    if (q < end && buf[q] === 46) {
      q++;
      while (q < end && (d = buf[q]! - 48) >= 0 && d <= 9) {
        m = m * 10 + d;
        q++;
        frac++;
      }
    }
    c = q < end ? buf[q]! : 0;
    if (nd + frac === 0 || nd + frac > 15 || !(c === 32 || c === 9 || c === 60)) return -1;
    const v = frac === 0 ? m : m / POW10[frac]!;
    ROW[j] = neg ? -v : v;
  }
  while (q < end && ((c = buf[q]!) === 32 || c === 9)) q++;
  if (q + 3 >= end || c !== 60 || buf[q + 1] !== 47 || buf[q + 2] !== tag || buf[q + 3] !== 62) return -1;
  return q + 4;
}

/**
 * A vasprun.xml reader fed piece by piece: the benchmark and large-file paths stream a file through it
 * without holding the file in memory. The bytes are scanned directly (XmlByteScanner); the eigenvalue rows,
 * by far the bulk of the file, are read straight from the bytes into typed arrays.
 */
export class VasprunStream {
  private readonly xml: XmlByteScanner;
  private iName: string | null = null;
  private varrayName: string | null = null;
  private inIncar = false;
  private inParameters = false;
  private inGeneration = false;
  private inAtomsArray = false;
  private generation: { divisions: number; ends: Vec3[] } | null = null;
  private readonly kpointList = new DoubleBuffer(3 * 256);
  private readonly weightList = new DoubleBuffer(256);
  private kpointsDone = false;
  private readonly incarTags = new Map<string, string>();
  private readonly paramTags = new Map<string, string>();
  private readonly species: string[] = [];
  private rcColumn = -1;
  private structures: StructureDraft[] = [];
  private draft: StructureDraft | null = null;
  private eig: EigenBlock | null = null;
  private eigDepth = 0;
  private lastEig: EigenBlock | null = null;
  private steps = 0;
  private efermi: number | null = null;
  private stepEfermi: number | null = null;
  private sawRoot = false;
  /** Scratch for one row of numbers. */
  private readonly row = new Float64Array(3);
  private readonly rowReader: RowReader;
  private readonly kpointRowReader: RowReader;

  /** `sizeHint`: the file's size in bytes when known (header counts are checked against it). */
  constructor(
    private readonly fileName: string,
    private readonly sizeHint: number | null = null,
  ) {
    this.xml = new XmlByteScanner(fileName, VASPRUN_FORMAT, {
      open: (name, attrs, depth) => this.open(name, attrs, depth),
      close: (name, depth, text, length) => this.close(name, depth, text, length),
    });
    this.rowReader = (sc, buf, pos, end) => this.fastRows(sc, buf, pos, end);
    this.kpointRowReader = (sc, buf, pos, end) => this.fastKpointRows(sc, buf, pos, end);
  }

  write(bytes: Uint8Array, last = false): void {
    this.xml.write(bytes, last);
  }

  private fail(reason: string): ReaderError {
    return this.xml.fail(reason);
  }

  /** A row that is not (energy, occupation) like the rows before it: fix the column count, or say what is wrong. */
  private rowError(count: number, bad: string | null): void {
    const e = this.eig!;
    const where = `band ${e.rowsInSet} of k-point ${e.kInSpin}${e.spins > 1 ? ' (spin 2)' : ''}`;
    if (bad !== null) {
      if (bad.includes('***'))
        throw this.fail(`the energy of ${where} is written as "${bad}": VASP's number field overflowed, so the value is unknown`);
      throw this.fail(`the energy and occupation of ${where} should be numbers, found "${bad}"`);
    }
    if (e.columns < 0) {
      if (count < 1 || count > 3) throw this.fail(`an eigenvalue row holds ${count} numbers; expected the energy and the occupation`);
      e.columns = count;
      return;
    }
    throw this.fail(`the row for ${where} holds ${count} numbers where the rows before hold ${e.columns}`);
  }

  private textOf(text: Uint8Array | null, length: number): string {
    return text === null ? '' : this.xml.decode(text, 0, length);
  }

  private numbers(text: Uint8Array | null, length: number, what: string, expected: number): number[] {
    const out: number[] = [];
    const r = text === null ? { count: 0, bad: null } : scanDecimalBytes(text, 0, length, out, 0, expected);
    if (r.bad !== null) {
      if (r.bad.includes('***'))
        throw this.fail(`${what} is written as "${r.bad}": VASP's number field overflowed, so the value is unknown`);
      throw this.fail(`${what} should be a number, found "${r.bad}"`);
    }
    if (r.count !== expected) throw this.fail(`${what} should hold ${expected} number${expected === 1 ? '' : 's'}, found ${r.count}`);
    return out;
  }

  /**
   * Eigenvalue rows straight from the bytes: `<r>` numbers `</r>`, as many as are complete in the piece. Anything
   * else (the first row, exponents, damage, the end of the set) is left to the general path, which words errors.
   */
  private fastRows(sc: XmlByteScanner, buf: Uint8Array, pos: number, end: number): number {
    const e = this.eig;
    if (e === null) return pos;
    const cols = e.columns;
    if (cols < 1) return pos;
    const energies = e.energies;
    const occupations = e.occupations;
    newlineCount = 0;
    for (;;) {
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
      if (rows > 0) {
        e.rowsInSet += rows;
        sc.markChild();
      }
      // The end of this k-point's set and the start of the next one, as VASP writes them, without the general
      // path; anything else (a band count that differs, the end of the spin) is left to it.
      if (!endTagAt(buf, pos, end, SET_BYTES) || e.rowsInSet === 0 || sc.ancestor(1) !== 'set') break;
      if (e.bandsPerSet >= 0 && e.rowsInSet !== e.bandsPerSet) break;
      if (e.bandsPerSet < 0) e.bandsPerSet = e.rowsInSet;
      e.sets++;
      e.rowsInSet = 0;
      sc.leaveFast();
      pos = skipBlanks(buf, pos + SET_BYTES.length + 3, end);
      const next = kpointSetAt(buf, pos, end);
      if (next < 0 || !sc.canEnterFast()) break;
      sc.enterFast('set');
      e.kInSpin++;
      sc.setRows(this.rowReader);
      pos = next;
    }
    if (newlineCount > 0) sc.newlines(newlineCount, lastNewline);
    return pos;
  }

  /** The k-point list and its weights (`<v>` rows of 3 and of 1 numbers) straight from the bytes, likewise. */
  private fastKpointRows(sc: XmlByteScanner, buf: Uint8Array, pos: number, end: number): number {
    const weights = this.varrayName === 'weights';
    const list = weights ? this.weightList : this.kpointList;
    const cols = weights ? 1 : 3;
    let rows = 0;
    newlineCount = 0;
    for (;;) {
      pos = skipBlanks(buf, pos, end);
      const next = simpleRow(buf, pos, end, 118 /* v */, cols);
      if (next < 0) break;
      list.push(ROW[0]!);
      if (!weights) {
        list.push(ROW[1]!);
        list.push(ROW[2]!);
      }
      rows++;
      pos = next;
    }
    if (newlineCount > 0) sc.newlines(newlineCount, lastNewline);
    if (rows > 0) sc.markChild();
    return pos;
  }

  private open(name: string, attrs: Record<string, string> | null, depth: number): boolean {
    const sc = this.xml;
    if (depth === 1) {
      if (name !== 'modeling') throw this.fail(`the root element is <${name}>; a vasprun.xml starts with <modeling>`);
      this.sawRoot = true;
      return false;
    }
    switch (name) {
      case 'r':
        if (this.eig !== null && sc.ancestor(1) === 'set') {
          this.eig.rowsInSet++;
          return true;
        }
        return false;
      case 'v':
        if (this.inGeneration) return sc.ancestor(1) === 'generation';
        if (sc.ancestor(1) !== 'varray') return false;
        if (depth === 4 && !this.kpointsDone && sc.ancestor(2) === 'kpoints')
          return this.varrayName === 'kpointlist' || this.varrayName === 'weights';
        if (this.draft !== null) return this.varrayName === 'basis' || this.varrayName === 'positions';
        return false;
      case 'i': {
        const key = attrs?.name ?? null;
        this.iName = key;
        if (key === null) return false;
        return this.inIncar || this.inParameters || key === 'efermi' || (this.inGeneration && key === 'divisions');
      }
      case 'c':
        return this.inAtomsArray && this.rcColumn === 0;
      case 'set':
        if (this.eig !== null) {
          const c = attrs?.comment ?? '';
          if (c.startsWith('spin')) {
            this.eig.spins++;
            this.eig.kInSpin = 0;
          } else if (c.startsWith('kpoint')) {
            this.eig.kInSpin++;
            this.eig.rowsInSet = 0;
          }
          sc.setRows(this.rowReader);
        }
        return false;
      case 'varray':
        this.varrayName = attrs?.name ?? null;
        if (
          depth === 3 &&
          !this.kpointsDone &&
          sc.ancestor(1) === 'kpoints' &&
          (this.varrayName === 'kpointlist' || this.varrayName === 'weights')
        ) {
          sc.setRows(this.kpointRowReader);
        }
        return false;
      case 'incar':
        if (depth === 2) this.inIncar = true;
        return false;
      case 'parameters':
        if (depth === 2) this.inParameters = true;
        return false;
      case 'generation':
        if (depth === 3 && sc.ancestor(1) === 'kpoints' && /^listgenerated$/i.test(attrs?.param ?? '')) {
          this.inGeneration = true;
          this.generation = { divisions: 0, ends: [] };
        }
        return false;
      case 'structure':
        this.draft = { name: attrs?.name ?? '', basis: [], positions: [] };
        return false;
      case 'array':
        if (sc.ancestor(1) === 'atominfo' && attrs?.name === 'atoms') this.inAtomsArray = true;
        return false;
      case 'rc':
        if (this.inAtomsArray) this.rcColumn = 0;
        return false;
      case 'eigenvalues':
        if (depth === 3 && sc.ancestor(1) === 'calculation') this.startEigenvalues(depth);
        return false;
      case 'calculation':
        this.stepEfermi = null;
        return false;
      default:
        return false;
    }
  }

  /** An <eigenvalues> block opens: size the arrays from NBANDS, ISPIN and the k-points, checked against the file. */
  private startEigenvalues(depth: number): void {
    const nbText = this.paramTags.get('NBANDS') ?? this.incarTags.get('NBANDS');
    const nbands = nbText === undefined ? NaN : Number(nbText.trim());
    const ispinText = this.paramTags.get('ISPIN') ?? this.incarTags.get('ISPIN');
    const ispin = ispinText === undefined ? 1 : Number(ispinText.trim());
    const nk = this.kpointList.length / 3;
    let guess = 1 << 16;
    if (Number.isInteger(nbands) && nbands > 0 && (ispin === 1 || ispin === 2) && nk > 0) {
      const rows = nk * nbands * ispin;
      if (this.sizeHint !== null && rows * MIN_ROW_BYTES > this.sizeHint) {
        throw this.fail(
          `the parameters say NBANDS = ${nbands}${ispin === 2 ? ' and ISPIN = 2' : ''} for ${nk} k-points: ${rows} eigenvalue rows, more than a file of ${this.sizeHint} bytes can hold (at least ${MIN_ROW_BYTES} bytes each)`,
        );
      }
      // Without the file size, the header is trusted only up to a modest start; the buffers grow with the data.
      guess = this.sizeHint !== null ? rows : Math.min(rows, 1 << 20);
    } else if (this.sizeHint !== null) guess = Math.min(guess, Math.floor(this.sizeHint / MIN_ROW_BYTES) + 1);
    this.eig = {
      energies: new DoubleBuffer(guess),
      occupations: new FloatBuffer(guess),
      bandsPerSet: -1,
      sets: 0,
      spins: 0,
      kInSpin: 0,
      rowsInSet: 0,
      columns: -1,
      complete: false,
      line: this.xml.line,
    };
    this.eigDepth = depth;
  }

  private close(name: string, depth: number, text: Uint8Array | null, length: number): void {
    const sc = this.xml;
    switch (name) {
      case 'r': {
        const e = this.eig;
        if (e === null || sc.ancestor(1) !== 'set') return;
        const vals = this.row;
        const r = text === null ? { count: 0, bad: null } : scanDecimalBytes(text, 0, length, vals, 0, 3);
        if (r.bad !== null || r.count !== e.columns) this.rowError(r.count, r.bad);
        e.energies.push(vals[0]!);
        if (e.columns >= 2) e.occupations.push(vals[1]!);
        return;
      }
      case 'v': {
        if (text === null) return;
        if (this.inGeneration) {
          const v = this.numbers(text, length, 'a line-mode segment end', 3);
          this.generation?.ends.push([v[0]!, v[1]!, v[2]!]);
          return;
        }
        if (depth === 4 && !this.kpointsDone && sc.ancestor(2) === 'kpoints') {
          if (this.varrayName === 'kpointlist') {
            const v = this.numbers(text, length, `k-point ${this.kpointList.length / 3 + 1}`, 3);
            for (const x of v) this.kpointList.push(x);
          } else if (this.varrayName === 'weights') {
            this.weightList.push(this.numbers(text, length, `the weight of k-point ${this.weightList.length + 1}`, 1)[0]!);
          }
          return;
        }
        const d = this.draft;
        if (d === null) return;
        if (this.varrayName === 'basis' && sc.ancestor(2) === 'crystal') {
          if (d.basis.length >= 3) throw this.fail('a structure lists more than three lattice vectors');
          const v = this.numbers(text, length, 'a lattice vector', 3);
          d.basis.push([v[0]!, v[1]!, v[2]!]);
        } else if (this.varrayName === 'positions' && sc.ancestor(2) === 'structure') {
          d.positions.push(...this.numbers(text, length, `the position of atom ${d.positions.length / 3 + 1}`, 3));
        }
        return;
      }
      case 'i': {
        const key = this.iName;
        this.iName = null;
        if (key === null || text === null) return;
        const value = this.textOf(text, length).trim();
        if (this.inGeneration && key === 'divisions') {
          const n = this.numbers(text, length, 'the number of points per line-mode segment', 1)[0]!;
          if (this.generation) this.generation.divisions = n;
          return;
        }
        if (key === 'efermi') {
          const v = parseDecimal(value);
          if (v === null) throw this.fail(`the Fermi energy (efermi) should be a number, found "${value.slice(0, 30)}"`);
          this.stepEfermi = v;
          this.efermi = v;
          return;
        }
        // <parameters> holds the values VASP used; it comes after <incar> and wins.
        if (this.inParameters) this.paramTags.set(key.toUpperCase(), value);
        else if (this.inIncar) this.incarTags.set(key.toUpperCase(), value);
        return;
      }
      case 'c':
        if (this.inAtomsArray && this.rcColumn >= 0) {
          if (this.rcColumn === 0) this.species.push(this.textOf(text, length).trim());
          this.rcColumn++;
        }
        return;
      case 'rc':
        this.rcColumn = -1;
        return;
      case 'array':
        this.inAtomsArray = false;
        return;
      case 'set': {
        const e = this.eig;
        if (e === null) return;
        sc.setRows(null);
        if (e.rowsInSet > 0 && sc.ancestor(1) === 'set') {
          if (e.bandsPerSet < 0) e.bandsPerSet = e.rowsInSet;
          else if (e.rowsInSet !== e.bandsPerSet) {
            throw this.fail(`k-point ${e.kInSpin} lists ${e.rowsInSet} bands where the k-points before list ${e.bandsPerSet}`);
          }
          e.sets++;
          e.rowsInSet = 0;
        }
        return;
      }
      case 'varray':
        if (depth === 3 && sc.ancestor(1) === 'kpoints') {
          sc.setRows(null);
          if (this.varrayName === 'weights') this.kpointsDone = true;
        }
        this.varrayName = null;
        return;
      case 'generation':
        this.inGeneration = false;
        return;
      case 'incar':
        if (depth === 2) this.inIncar = false;
        return;
      case 'parameters':
        if (depth === 2) this.inParameters = false;
        return;
      case 'structure': {
        const d = this.draft;
        this.draft = null;
        if (d && d.basis.length === 3) this.structures.push(d);
        return;
      }
      case 'eigenvalues':
        if (this.eig !== null && depth === this.eigDepth) {
          this.eig.complete = true;
          this.lastEig = this.eig;
          this.eig = null;
          sc.setRows(null);
          this.steps++;
        }
        return;
      default:
        return;
    }
  }

  /** End of the input: what the file says. */
  finish(allowPartial: boolean): VasprunData {
    const outcome = this.xml.finish(allowPartial);
    if (!this.sawRoot)
      throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: 1, column: 1 }, 'no <modeling> root element: this is not a vasprun.xml');
    const eig = this.lastEig;
    if (!eig) {
      const reason = outcome.complete
        ? 'the file holds no eigenvalues (no <eigenvalues> block inside a <calculation>)'
        : 'the file ends before the first eigenvalues were written (the run is still in its first step, or the file is truncated)';
      throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: outcome.endLine, column: 0 }, reason);
    }
    const nk = this.kpointList.length / 3;
    if (nk === 0)
      throw new ReaderError(
        VASPRUN_FORMAT,
        this.fileName,
        { line: eig.line, column: 0 },
        'the file lists no k-points (<kpoints> with a "kpointlist")',
      );
    const nSpin = eig.spins;
    if (nSpin !== 1 && nSpin !== 2) {
      throw new ReaderError(
        VASPRUN_FORMAT,
        this.fileName,
        { line: eig.line, column: 0 },
        `the eigenvalues come in ${nSpin} spin sets; 1 or 2 are expected`,
      );
    }
    const nBands = eig.bandsPerSet;
    if (eig.sets !== nk * nSpin || nBands <= 0) {
      throw new ReaderError(
        VASPRUN_FORMAT,
        this.fileName,
        { line: eig.line, column: 0 },
        `the eigenvalues cover ${eig.sets} (spin, k-point) sets, but ${nk} k-points${nSpin === 2 ? ' × 2 spins' : ''} are listed`,
      );
    }
    const per = nk * nBands;
    // Buffers sized exactly (NBANDS known) are handed over as views: no second copy of the eigenvalues.
    const energies: Float64Array[] = [];
    const occupations: Float32Array[] | null = eig.columns >= 2 ? [] : null;
    const all = eig.energies.data;
    const occ = eig.occupations.data;
    for (let s = 0; s < nSpin; s++) {
      energies.push(all.length === per * nSpin ? all.subarray(s * per, (s + 1) * per) : all.slice(s * per, (s + 1) * per));
      if (occupations)
        occupations.push(occ.length === per * nSpin ? occ.subarray(s * per, (s + 1) * per) : occ.slice(s * per, (s + 1) * per));
    }
    // Structure: the final one when written, else the last complete one.
    const pick = this.structures.find((s) => s.name === 'finalpos') ?? this.structures[this.structures.length - 1] ?? null;
    let structure: Structure | null = null;
    if (pick) {
      const lattice = pick.basis as Mat3;
      const nAtoms = pick.positions.length / 3;
      if (Math.abs(det3(lattice)) > 1e-8) {
        const species =
          this.species.length === nAtoms ? this.species.slice() : Array.from({ length: nAtoms }, (_, i) => this.species[i] ?? `X${i + 1}`);
        structure = { lattice, species, positions: Float64Array.from(pick.positions) };
      }
    }
    const tag = (key: string): string | undefined => this.paramTags.get(key) ?? this.incarTags.get(key);
    const num = (key: string): number | null => {
      const v = tag(key);
      return v === undefined ? null : parseDecimal(v);
    };
    const lsorbit = vaspLogical(tag('LSORBIT'));
    const noncollinear = vaspLogical(tag('LNONCOLLINEAR'));
    const spinorbit = lsorbit === null && noncollinear === null ? null : Boolean(lsorbit) || Boolean(noncollinear);
    // Method: the values VASP used (<parameters>) over what the user wrote (<incar>); a GW ALGO the user
    // wrote is kept even if the parameter list spells it otherwise.
    const merged = new Map([...this.incarTags, ...this.paramTags]);
    const userAlgo = this.incarTags.get('ALGO');
    if (userAlgo !== undefined) merged.set('ALGO', userAlgo);
    const name = basename(this.fileName);
    const where = this.paramTags.size > 0 ? `${name} (its parameter list)` : `${name} (its <incar> block)`;
    const method = vaspMethod(merged.size > 0 ? merged : null, merged.size > 0 ? where : name, tag('SYSTEM') ?? null);
    const weights = this.weightList.length === nk ? this.weightList.toArray() : null;
    const gen = this.generation && this.generation.divisions >= 2 && this.generation.ends.length >= 2 ? this.generation : null;
    return {
      structure,
      species: this.species.slice(),
      kpoints: this.kpointList.toArray(),
      weights,
      nk,
      nBands,
      nSpin: nSpin,
      energies,
      occupations,
      fermiEnergy: this.stepEfermi ?? this.efermi,
      electrons: num('NELECT'),
      spinorbit,
      method,
      generation: gen,
      complete: outcome.complete,
      steps: this.steps,
    };
  }
}

/**
 * Read a vasprun.xml in chunks: from `file.bytes`, or through `file.stream` (a ranged source) when given, so
 * the file is never held whole. Returns what it says and the SHA-256 of its bytes.
 */
export function readVasprun(file: InputFile, options: ReadOptions = {}): VasprunData & { sha256: string } {
  const src = file.stream;
  const size = src ? src.size : file.bytes.length;
  const stream = new VasprunStream(file.path, size);
  // 1 MiB pieces through one reused buffer: nothing but the typed arrays of the result grows with the file.
  const CHUNK = 1 << 20;
  const hasher = src ? createSha256() : null;
  if (size === 0) return { ...stream.finish(false), sha256: '' };
  const buffer = src?.readInto ? new Uint8Array(Math.min(CHUNK, size)) : null;
  for (let start = 0; start < size;) {
    if (options.isCancelled?.()) throw new CancelledError();
    let chunk: Uint8Array;
    if (!src) chunk = file.bytes.subarray(start, Math.min(size, start + CHUNK));
    else if (buffer) chunk = buffer.subarray(0, src.readInto!(start, buffer, 0, Math.min(CHUNK, size - start)));
    else chunk = src.read(start, Math.min(CHUNK, size - start));
    if (chunk.length === 0) break;
    start += chunk.length;
    hasher?.update(chunk);
    stream.write(chunk, start >= size);
    options.onProgress?.(start / size);
  }
  const data = stream.finish(options.allowPartial ?? false);
  return { ...data, sha256: hasher ? hasher.hex() : sha256Hex(file.bytes) };
}

/** Recognise a vasprun.xml: an XML file whose root is <modeling> with a VASP <generator>. */
export function detectVasprun(head: Uint8Array, name: string): number {
  const text = new TextDecoder('latin1').decode(head.subarray(0, 4096));
  const root = /<modeling>/.test(text);
  if (!root) return 0;
  if (/<i name="program" type="string">\s*vasp/i.test(text) || /<generator>/.test(text)) return /vasprun/i.test(name) ? 1 : 0.97;
  return 0.5;
}

/** Turn what the file says into a BandStructure, with warnings for what is missing. */
export function vasprunToBandStructure(
  data: VasprunData & { sha256: string },
  main: InputFile,
  companions: InputFile[],
  options: ReadOptions,
): BandStructure {
  const warnings: InputWarning[] = [];
  const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: data.sha256 }];
  const structure = data.structure ?? options.structure ?? null;
  const lattice = structure?.lattice ?? options.lattice ?? null;
  if (!data.structure)
    warnings.push({ code: 'no-structure', message: 'The file holds no complete structure: valley degeneracy cannot be determined.' });
  const spinorbit = options.spinorbit ?? data.spinorbit ?? false;
  if (data.spinorbit === null && options.spinorbit === undefined) {
    warnings.push({
      code: 'spinorbit-unknown',
      message: 'The file does not say whether spin-orbit coupling was on (LSORBIT): read as a collinear run.',
    });
  }
  if (data.electrons === null) warnings.push({ code: 'no-electrons', message: 'The file gives no electron count (NELECT).' });

  // Hybrid-functional band runs: weighted self-consistent mesh first, then the zero-weight path.
  const nBands = data.nBands;
  const dropped = dropMeshBeforePath(data, nBands);
  if (dropped.warning) warnings.push(dropped.warning);
  const { kpoints, weights, energies, occupations, nk } = dropped.arrays;

  let sampling: BandStructure['sampling'] = 'points';
  let labels: KLabel[] = [];
  if (data.generation) {
    sampling = 'path';
    // Labels: a KPOINTS file in line mode beside the run names the ends VASP lists here.
    const kfile = companions.find((c) => /KPOINTS/i.test(basename(c.path)));
    if (kfile) {
      try {
        const content = readKpoints(kfile);
        if (content.mode === 'line' && content.path.coordinates === 'reciprocal') {
          files.push({ role: 'kpath', path: kfile.path, sha256: sha256Hex(kfile.bytes) });
          // The positions vasprun.xml lists are fractional, as the path's ends are here.
          const placed = labelsFromLineMode(content.path, kpoints, nk, null);
          labels = placed.labels;
          if (placed.warning) warnings.push({ code: 'kpath-mismatch', message: placed.warning, file: kfile.path });
        }
      } catch (e) {
        if (e instanceof ReaderError)
          warnings.push({ code: 'kpath-unreadable', message: `${e.message}; labels were not used`, file: kfile.path, line: e.line });
        else throw e;
      }
    }
  }
  if (!data.complete) {
    warnings.push({
      code: 'partial',
      message: `The file ends before the run finished (a running or interrupted job): the eigenvalues are those of the last completed step (${data.steps} written so far); results are provisional.`,
    });
  }
  return {
    source: { format: VASPRUN_FORMAT, file: main.path, files },
    lattice,
    structure,
    nk,
    nBands,
    nSpin: data.nSpin,
    kpoints,
    weights,
    energies,
    occupations,
    fermiEnergy: data.fermiEnergy,
    electrons: data.electrons,
    spinorbit,
    method: data.method,
    labels,
    sampling,
    grid: null,
    writtenDistance: null,
    partial: !data.complete,
    warnings,
  };
}

export const vasprunReader: FormatReader = {
  id: VASPRUN_FORMAT,
  label: 'VASP vasprun.xml',
  streaming: true,
  detect: detectVasprun,
  companions(mainName: string, siblings: string[]): string[] {
    const prefix = /^(.*?)vasprun(.*)\.xml$/i.exec(mainName);
    const candidates = prefix ? [`${prefix[1]}KPOINTS${prefix[2]}`, 'KPOINTS'] : ['KPOINTS'];
    const hit = candidates.find((c) => siblings.includes(c));
    return hit ? [hit] : [];
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    return vasprunToBandStructure(readVasprun(main, options), main, companions, options);
  },
};
