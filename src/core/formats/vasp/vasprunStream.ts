/**
 * vasprun.xml as a byte stream: VASP's full record of a run, scanned in pieces (never a DOM), keeping only
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
 * Eigenvalues inside <projected> are other blocks: only the <eigenvalues> directly inside <calculation> are read,
 * and VASP 6's KPOINTS_OPT set (<eigenvalues_kpoints_opt>) by vasprunKpointsOpt.ts.
 */
import type { ElectronicMethod, Structure } from '../../model';
import { basename } from '../../io/fileAccessor';
import { ReaderError } from '../../errors';
import { parseDecimal, scanDecimalBytes } from '../numbers';
import { XmlByteScanner } from '../xmlByteScanner';
import { vasprunTagFacts } from './vaspMethod';
import { chosenStructure, type StructureDraft } from './vasprunStructure';
import { EigenvalueBlock, eigenvalueHeader, type EigenvalueHeader } from './vasprunEigenvalues';
import { VasprunKpoints } from './vasprunKpoints';
import { isKpointsOptScope, KpointsOptReader, type KpointsOptOutcome, type VasprunKSet } from './vasprunKpointsOpt';

export const VASPRUN_FORMAT = 'vasprun-xml';

/** What a vasprun.xml says, before it becomes a BandStructure; the eigenvalue set is the self-consistent one. */
export interface VasprunData extends VasprunKSet {
  structure: Structure | null;
  species: string[];
  fermiEnergy: number | null;
  electrons: number | null;
  spinorbit: boolean | null;
  /** How the energies were computed, from the <incar> and <parameters> tags (see vasp/vaspMethod.ts). */
  method: ElectronicMethod;
  /** False when the file ended early (only with allowPartial). */
  complete: boolean;
  /** Ionic steps whose eigenvalues were seen; the last complete one is kept. */
  steps: number;
  /** VASP 6's KPOINTS_OPT eigenvalue set, when the file holds one (vasprunKpointsOpt.ts). */
  kpointsOpt: KpointsOptOutcome | null;
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
  private inAtomsArray = false;
  /** The self-consistent k-points: the first <kpoints> under <modeling> (vasprunKpoints.ts). */
  private readonly kpoints: VasprunKpoints;
  private inKpoints = false;
  private readonly incarTags = new Map<string, string>();
  private readonly paramTags = new Map<string, string>();
  private readonly species: string[] = [];
  private rcColumn = -1;
  private structures: StructureDraft[] = [];
  private draft: StructureDraft | null = null;
  private eig: EigenvalueBlock | null = null;
  private eigDepth = 0;
  private lastEig: EigenvalueBlock | null = null;
  private steps = 0;
  private efermi: number | null = null;
  private stepEfermi: number | null = null;
  private sawRoot = false;
  private readonly opt: KpointsOptReader;
  /** The counts that size an eigenvalue block of `nk` k-points (NBANDS, ISPIN: <parameters> before <incar>). */
  private readonly headerFor = (nk: number): EigenvalueHeader => eigenvalueHeader([this.paramTags, this.incarTags], nk, this.sizeHint);

  /** `sizeHint`: the file's size in bytes when known (header counts are checked against it). */
  constructor(
    private readonly fileName: string,
    private readonly sizeHint: number | null = null,
  ) {
    this.xml = new XmlByteScanner(fileName, VASPRUN_FORMAT, {
      open: (name, attrs, depth) => this.open(name, attrs, depth),
      close: (name, depth, text, length) => this.close(name, depth, text, length),
    });
    this.kpoints = new VasprunKpoints(this.xml, (text, length, what, expected) => this.numbers(text, length, what, expected));
    this.opt = new KpointsOptReader(this.xml, this.headerFor);
  }

  write(bytes: Uint8Array, last = false): void {
    this.xml.write(bytes, last);
  }

  private fail(reason: string): ReaderError {
    return this.xml.fail(reason);
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

  /** The k-point list and its weights (`<v>` rows of 3 and of 1 numbers) straight from the bytes. */
  private open(name: string, attrs: Record<string, string> | null, depth: number): boolean {
    const sc = this.xml;
    if (depth === 1) {
      if (name !== 'modeling') throw this.fail(`the root element is <${name}>; a vasprun.xml starts with <modeling>`);
      this.sawRoot = true;
      return false;
    }
    if (this.opt.active) return this.opt.open(name, attrs, depth);
    if (isKpointsOptScope(name, depth, attrs)) this.opt.enter(name, depth);
    if (this.inKpoints) return this.kpoints.open(name, attrs, sc.ancestor(1));
    switch (name) {
      case 'r':
        if (this.eig !== null && sc.ancestor(1) === 'set') {
          this.eig.rowsInSet++;
          return true;
        }
        return false;
      case 'kpoints':
        // The self-consistent k-points; a later <kpoints> of the same level is not read again.
        this.inKpoints = depth === 2 && !this.kpoints.weightsRead;
        return false;
      case 'v':
        if (sc.ancestor(1) !== 'varray') return false;
        if (this.draft !== null) return this.varrayName === 'basis' || this.varrayName === 'positions';
        return false;
      case 'i': {
        const key = attrs?.name ?? null;
        this.iName = key;
        if (key === null) return false;
        return this.inIncar || this.inParameters || key === 'efermi';
      }
      case 'c':
        return this.inAtomsArray && this.rcColumn === 0;
      case 'set':
        this.eig?.enterSet(sc, attrs?.comment ?? '');
        return false;
      case 'varray':
        this.varrayName = attrs?.name ?? null;
        return false;
      case 'incar':
        if (depth === 2) this.inIncar = true;
        return false;
      case 'parameters':
        if (depth === 2) this.inParameters = true;
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

  /** An <eigenvalues> block opens: arrays sized from NBANDS, ISPIN and the k-points, checked against the file. */
  private startEigenvalues(depth: number): void {
    this.eig = new EigenvalueBlock(this.headerFor(this.kpoints.nk), this.xml.line, (reason) => this.fail(reason));
    this.eigDepth = depth;
  }

  private close(name: string, depth: number, text: Uint8Array | null, length: number): void {
    if (this.opt.active) return this.opt.close(name, depth, text, length);
    const sc = this.xml;
    if (this.inKpoints) {
      if (name === 'kpoints' && depth === 2) this.inKpoints = false;
      else this.kpoints.close(name, text, length, sc.ancestor(1));
      return;
    }
    switch (name) {
      case 'r': {
        if (this.eig !== null && sc.ancestor(1) === 'set') this.eig.closeRow(text, length);
        return;
      }
      case 'v': {
        if (text === null) return;
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
      case 'set':
        this.eig?.leaveSet(sc);
        return;
      case 'varray':
        this.varrayName = null;
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
    const nk = this.kpoints.nk;
    const failAt = (line: number, reason: string): ReaderError =>
      new ReaderError(VASPRUN_FORMAT, this.fileName, { line, column: 0 }, reason);
    const fail = (reason: string): ReaderError => failAt(eig.line, reason);
    if (nk === 0) throw fail('the file lists no k-points (<kpoints> with a "kpointlist")');
    const { nSpin, nBands, energies, occupations } = eig.perSpin(nk, fail);
    const { spinorbit, electrons, method } = vasprunTagFacts(this.incarTags, this.paramTags, basename(this.fileName));
    const weights = this.kpoints.weightList.length === nk ? this.kpoints.weightList.toArray() : null;
    return {
      structure: chosenStructure(this.structures, this.species),
      species: this.species.slice(),
      kpoints: this.kpoints.kpointList.toArray(),
      weights,
      nk,
      nBands,
      nSpin,
      energies,
      occupations,
      fermiEnergy: this.stepEfermi ?? this.efermi,
      electrons,
      spinorbit,
      method,
      generation: this.kpoints.generation,
      declaredMesh: this.kpoints.declaredMesh(),
      complete: outcome.complete,
      steps: this.steps,
      kpointsOpt: this.opt.outcome({ nBands, nSpin }, failAt),
    };
  }
}
