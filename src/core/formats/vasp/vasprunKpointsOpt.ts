/**
 * VASP 6's second eigenvalue set in vasprun.xml: after self-consistency, VASP ≥ 6.3 computes the eigenvalues on
 * the k-points of a KPOINTS_OPT file and writes them only here, inside the <calculation> (before or after the
 * ordinary <eigenvalues>, which hold the self-consistent mesh):
 *
 *   <eigenvalues_kpoints_opt comment="kpoints_opt">
 *     <kpoints> <generation param="listgenerated"> ... </generation>     (may be absent; line mode or a mesh)
 *               <varray name="kpointlist"> <v> kx ky kz </v> ... </varray> <varray name="weights"> ... </varray>
 *     </kpoints>
 *     <eigenvalues> <array> ... <set> <set comment="spin 1"> <set comment="kpoint 1"> <r> energy [occupation] </r>
 *   </eigenvalues_kpoints_opt>
 *   <projected_kpoints_opt> ... </projected_kpoints_opt>     (projections: ignored)
 *   <dos_kpoints_opt> <i name="efermi"> .. </i> ... </dos_kpoints_opt>   (ignored: the Fermi energy is the
 *                                                                         self-consistent run's, from a weighted mesh)
 *
 * VasprunStream hands every event inside a `*_kpoints_opt` element directly under <calculation> to this reader.
 * Both sets are kept (the self-consistent one is usually the smaller), each checked like the ordinary block.
 */
import type { DeclaredMesh, OccupationArray, Vec3 } from '../../model';
import type { ReaderError } from '../../errors';
import { scanDecimalBytes } from '../numbers';
import type { RowReader, XmlByteScanner } from '../xmlByteScanner';
import { DoubleBuffer } from '../doubleBuffer';
import { EigenvalueBlock, readVectorRows, type EigenvalueHeader } from './vasprunEigenvalues';
import { VasprunMeshGeneration } from './vasprunMeshGeneration';

/** The element that holds the KPOINTS_OPT eigenvalues. */
export const KPOINTS_OPT_BLOCK = 'eigenvalues_kpoints_opt';

/** One eigenvalue set of a vasprun.xml with its k-points: the self-consistent one (VasprunData) or the KPOINTS_OPT one. */
export interface VasprunKSet {
  kpoints: Float64Array;
  weights: Float64Array | null;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  energies: Float64Array[];
  /** Null when the rows carry the energy only (VASP often writes no occupation in the KPOINTS_OPT set). */
  occupations: OccupationArray[] | null;
  /** Line-mode generation: points per segment and the segment ends (fractional), when written. */
  generation: { divisions: number; ends: Vec3[] } | null;
  /** A Γ-centred or Monkhorst–Pack mesh the <generation> declares. */
  declaredMesh: DeclaredMesh | null;
}

/** The KPOINTS_OPT eigenvalue set, read and checked. */
export type KpointsOptSet = VasprunKSet;

/** What the file says of a KPOINTS_OPT set: read, or present but not usable (the file ends inside it). */
export type KpointsOptOutcome = { state: 'read'; set: KpointsOptSet } | { state: 'unusable'; reason: string };

/** Whether an element opened at depth 3 (directly under <calculation>) belongs to the KPOINTS_OPT run. */
export function isKpointsOptScope(name: string, depth: number): boolean {
  return depth === 3 && name.endsWith('_kpoints_opt');
}

export class KpointsOptReader {
  private scope: string | null = null;
  private scopeDepth = 0;
  private inKpoints = false;
  private varrayName: string | null = null;
  private iName: string | null = null;
  private line: { divisions: number; ends: Vec3[] } | null = null;
  private readonly mesh = new VasprunMeshGeneration();
  private readonly kpointList = new DoubleBuffer(3 * 64);
  private readonly weightList = new DoubleBuffer(64);
  private eig: EigenvalueBlock | null = null;
  private eigDepth = 0;
  private seen = false;
  private readonly vectorRows: RowReader;

  constructor(
    private readonly sc: XmlByteScanner,
    private readonly header: (nk: number) => EigenvalueHeader,
  ) {
    this.vectorRows = (s, buf, pos, end) =>
      readVectorRows(
        s,
        buf,
        pos,
        end,
        this.varrayName === 'weights' ? this.weightList : this.kpointList,
        this.varrayName === 'weights' ? 1 : 3,
      );
  }

  /** True while the events belong to a `*_kpoints_opt` element. */
  get active(): boolean {
    return this.scope !== null;
  }

  /** A `*_kpoints_opt` element opens directly under <calculation>: a new set replaces an earlier one. */
  enter(name: string, depth: number): void {
    this.scope = name;
    this.scopeDepth = depth;
    if (name !== KPOINTS_OPT_BLOCK) return;
    this.seen = true;
    this.kpointList.length = 0;
    this.weightList.length = 0;
    this.line = null;
    this.eig = null;
  }

  private fail(reason: string): ReaderError {
    return this.sc.fail(`in the KPOINTS_OPT set (<${KPOINTS_OPT_BLOCK}>): ${reason}`);
  }

  private numbers(text: Uint8Array, length: number, what: string, expected: number): number[] {
    const out: number[] = [];
    const r = scanDecimalBytes(text, 0, length, out, 0, expected);
    if (r.bad !== null) throw this.fail(`${what} should be a number, found "${r.bad}"`);
    if (r.count !== expected) throw this.fail(`${what} should hold ${expected} number${expected === 1 ? '' : 's'}, found ${r.count}`);
    return out;
  }

  /** An element opens inside the scope: true when its text is wanted. */
  open(name: string, attrs: Record<string, string> | null, depth: number): boolean {
    const sc = this.sc;
    if (this.scope !== KPOINTS_OPT_BLOCK) return false;
    const parent = sc.ancestor(1);
    switch (name) {
      case 'r':
        if (this.eig === null || parent !== 'set') return false;
        this.eig.rowsInSet++;
        return true;
      case 'set':
        this.eig?.enterSet(sc, attrs?.comment ?? '');
        return false;
      case 'v':
        if (this.line !== null && parent === 'generation') return true;
        if (this.mesh.active) return parent === 'generation' && this.mesh.openV(attrs?.name);
        return this.inKpoints && parent === 'varray' && (this.varrayName === 'kpointlist' || this.varrayName === 'weights');
      case 'varray':
        this.varrayName = attrs?.name ?? null;
        if (this.inKpoints && parent === 'kpoints' && (this.varrayName === 'kpointlist' || this.varrayName === 'weights'))
          sc.setRows(this.vectorRows);
        return false;
      case 'i':
        this.iName = attrs?.name ?? null;
        return this.line !== null && this.iName === 'divisions';
      case 'kpoints':
        this.inKpoints = parent === KPOINTS_OPT_BLOCK;
        return false;
      case 'generation':
        if (this.inKpoints && parent === 'kpoints') {
          if (/^listgenerated$/i.test(attrs?.param ?? '')) this.line = { divisions: 0, ends: [] };
          else this.mesh.start(attrs?.param);
        }
        return false;
      case 'eigenvalues':
        if (parent === KPOINTS_OPT_BLOCK) this.startEigenvalues(depth);
        return false;
      default:
        return false;
    }
  }

  private startEigenvalues(depth: number): void {
    const nk = this.kpointList.length / 3;
    if (nk === 0) throw this.fail('the eigenvalues come before any k-point is listed (no <varray name="kpointlist"> in its <kpoints>)');
    if (this.weightList.length !== 0 && this.weightList.length !== nk)
      throw this.fail(`${this.weightList.length} weights are listed for ${nk} k-points`);
    const sc = this.sc;
    this.eig = new EigenvalueBlock(this.header(nk), sc.line, (reason) => this.fail(reason));
    this.eigDepth = depth;
  }

  /** An element closes inside the scope (or the scope itself). */
  close(name: string, depth: number, text: Uint8Array | null, length: number): void {
    if (depth === this.scopeDepth) {
      this.scope = null;
      return;
    }
    if (this.scope !== KPOINTS_OPT_BLOCK) return;
    const sc = this.sc;
    switch (name) {
      case 'r':
        if (this.eig !== null && sc.ancestor(1) === 'set') this.eig.closeRow(text, length);
        return;
      case 'set':
        this.eig?.leaveSet(sc);
        return;
      case 'v':
        if (text !== null) this.closeV(text, length);
        return;
      case 'i':
        if (this.line !== null && this.iName === 'divisions' && text !== null)
          this.line.divisions = this.numbers(text, length, 'the number of points per line-mode segment', 1)[0]!;
        this.iName = null;
        return;
      case 'varray':
        if (this.inKpoints) sc.setRows(null);
        this.varrayName = null;
        return;
      case 'generation':
        this.mesh.end();
        if (this.line !== null && (this.line.divisions < 2 || this.line.ends.length < 2)) this.line = null;
        return;
      case 'kpoints':
        this.inKpoints = false;
        return;
      case 'eigenvalues':
        if (this.eig !== null && depth === this.eigDepth) {
          this.eig.complete = true;
          sc.setRows(null);
        }
        return;
      default:
        return;
    }
  }

  private closeV(text: Uint8Array, length: number): void {
    const parent = this.sc.ancestor(1);
    if (parent === 'generation') {
      if (this.mesh.active) return this.mesh.closeV(this.numbers(text, length, 'a k-mesh generation vector', 3));
      const v = this.numbers(text, length, 'a line-mode segment end', 3);
      this.line?.ends.push([v[0]!, v[1]!, v[2]!]);
      return;
    }
    if (!this.inKpoints || parent !== 'varray') return;
    if (this.varrayName === 'kpointlist') {
      const v = this.numbers(text, length, `k-point ${this.kpointList.length / 3 + 1}`, 3);
      for (const x of v) this.kpointList.push(x);
    } else if (this.varrayName === 'weights') {
      this.weightList.push(this.numbers(text, length, `the weight of k-point ${this.weightList.length + 1}`, 1)[0]!);
    }
  }

  /**
   * At the end of the file: null when there was no KPOINTS_OPT set, else the set checked against the
   * self-consistent one (`scf`: its band and spin counts), or why it cannot be used. `failAt` words an
   * error at a line of the file.
   */
  outcome(scf: { nBands: number; nSpin: number }, failAt: (line: number, reason: string) => ReaderError): KpointsOptOutcome | null {
    if (!this.seen) return null;
    const eig = this.eig;
    if (eig === null || !eig.complete) {
      return {
        state: 'unusable',
        reason:
          eig === null
            ? this.scope !== null
              ? 'the file ends inside it, before its eigenvalues'
              : 'the block holds no <eigenvalues>'
            : `the file ends inside its eigenvalues (begun at line ${eig.line})`,
      };
    }
    const fail = (reason: string): ReaderError => failAt(eig.line, `in the KPOINTS_OPT set (<${KPOINTS_OPT_BLOCK}>): ${reason}`);
    const nk = this.kpointList.length / 3;
    const { nSpin, nBands, energies, occupations } = eig.perSpin(nk, fail);
    const declared = this.header(nk).nbands;
    if (Number.isInteger(declared) && declared > 0 && nBands !== declared)
      throw fail(`every k-point lists ${nBands} bands, but the parameters say NBANDS = ${declared}`);
    if (nBands !== scf.nBands) throw fail(`${nBands} bands per k-point, but the self-consistent eigenvalues list ${scf.nBands}`);
    if (nSpin !== scf.nSpin)
      throw fail(`${nSpin} spin set${nSpin === 1 ? '' : 's'}, but the self-consistent eigenvalues have ${scf.nSpin}`);
    return {
      state: 'read',
      set: {
        kpoints: this.kpointList.toArray(),
        weights: this.weightList.length === nk ? this.weightList.toArray() : null,
        nk,
        nBands,
        nSpin,
        energies,
        occupations,
        generation: this.line,
        declaredMesh: this.mesh.declared(),
      },
    };
  }
}
