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
 * The set's k-points may also come in a `<kpoints comment="kpoints_opt">` of their own, under <modeling> or
 * <calculation> before the block: read for the set, never taken for the self-consistent k-points.
 * VasprunStream hands every event inside a `*_kpoints_opt` element directly under <calculation> (or such a
 * <kpoints>) to this reader. Both sets are kept (the self-consistent one is usually the smaller), each checked
 * like the ordinary block. A set that does not fit the run (no k-points, another band or spin count, more sets
 * than k-points) is set aside with its reason and the self-consistent set read; malformed rows are errors.
 */
import type { DeclaredMesh, OccupationArray, Vec3 } from '../../model';
import { ReaderError } from '../../errors';
import { scanDecimalBytes } from '../numbers';
import type { XmlByteScanner } from '../xmlByteScanner';
import { EigenvalueBlock, type EigenvalueHeader } from './vasprunEigenvalues';
import { VasprunKpoints } from './vasprunKpoints';

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

/**
 * Whether an element belongs to the KPOINTS_OPT run: a `*_kpoints_opt` element directly under <calculation>, or a
 * `<kpoints comment="kpoints_opt">` of its own under <modeling> or <calculation> (its k-points, when they are not
 * inside the block; never the self-consistent k-points).
 */
export function isKpointsOptScope(name: string, depth: number, attrs?: Record<string, string> | null): boolean {
  if (depth === 3 && name.endsWith('_kpoints_opt')) return true;
  return name === 'kpoints' && (depth === 2 || depth === 3) && attrs?.comment === 'kpoints_opt';
}

export class KpointsOptReader {
  private scope: string | null = null;
  private scopeDepth = 0;
  /** True inside the set's <kpoints>: its events go to `k`. */
  private inKpoints = false;
  private readonly k: VasprunKpoints;
  private eig: EigenvalueBlock | null = null;
  private eigDepth = 0;
  private seen = false;
  /** The k-points were read from a `<kpoints comment="kpoints_opt">` outside the block (kept for it). */
  private kFromSeparate = false;
  /** Why the set cannot be used, found before its end (it is then skipped, and the self-consistent set read). */
  private problem: string | null = null;

  constructor(
    private readonly sc: XmlByteScanner,
    private readonly header: (nk: number) => EigenvalueHeader,
  ) {
    this.k = new VasprunKpoints(sc, (text, length, what, expected) => this.numbers(text, length, what, expected));
  }

  /** True while the events belong to a `*_kpoints_opt` element. */
  get active(): boolean {
    return this.scope !== null;
  }

  /** A KPOINTS_OPT element opens (isKpointsOptScope): a new set replaces an earlier one. */
  enter(name: string, depth: number): void {
    this.scope = name;
    this.scopeDepth = depth;
    if (name === 'kpoints') {
      this.k.reset();
      this.kFromSeparate = true;
      this.inKpoints = true;
      return;
    }
    if (name !== KPOINTS_OPT_BLOCK) return;
    this.seen = true;
    this.problem = null;
    if (!this.kFromSeparate) this.k.reset();
    this.eig = null;
  }

  private get reading(): boolean {
    return this.scope === KPOINTS_OPT_BLOCK || this.scope === 'kpoints';
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
    if (!this.reading) return false;
    const parent = sc.ancestor(1);
    if (this.inKpoints) return this.k.open(name, attrs, parent);
    switch (name) {
      case 'r':
        if (this.eig === null || parent !== 'set') return false;
        this.eig.rowsInSet++;
        return true;
      case 'set':
        this.eig?.enterSet(sc, attrs?.comment ?? '');
        return false;
      case 'kpoints':
        this.inKpoints = parent === KPOINTS_OPT_BLOCK;
        // The block's own k-points replace any read outside it.
        if (this.inKpoints && this.kFromSeparate) {
          this.k.reset();
          this.kFromSeparate = false;
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
    const nk = this.k.nk;
    // A set whose k-points are not known is skipped (its rows are not read); the self-consistent set is analysed.
    if (nk === 0) {
      this.problem = `its eigenvalues (line ${this.sc.line}) come before any of its k-points is listed (no <varray name="kpointlist">)`;
      return;
    }
    const weights = this.k.weightList.length;
    if (weights !== 0 && weights !== nk) {
      this.problem = `${weights} weights are listed for its ${nk} k-points`;
      return;
    }
    const sc = this.sc;
    this.eig = new EigenvalueBlock(this.header(nk), sc.line, (reason) => this.fail(reason));
    this.eigDepth = depth;
  }

  /** An element closes inside the scope (or the scope itself). */
  close(name: string, depth: number, text: Uint8Array | null, length: number): void {
    if (depth === this.scopeDepth) {
      if (this.scope === 'kpoints') {
        this.inKpoints = false;
        this.sc.setRows(null);
      }
      this.scope = null;
      return;
    }
    if (!this.reading) return;
    const sc = this.sc;
    if (this.inKpoints) {
      if (name === 'kpoints') this.inKpoints = false;
      else this.k.close(name, text, length, sc.ancestor(1));
      return;
    }
    switch (name) {
      case 'r':
        if (this.eig !== null && sc.ancestor(1) === 'set') this.eig.closeRow(text, length);
        return;
      case 'set':
        this.eig?.leaveSet(sc);
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

  /**
   * At the end of the file: null when there was no KPOINTS_OPT set, else the set checked against the
   * self-consistent one (`scf`: its band and spin counts), or why it cannot be used. `failAt` words an
   * error at a line of the file.
   */
  outcome(scf: { nBands: number; nSpin: number }, failAt: (line: number, reason: string) => ReaderError): KpointsOptOutcome | null {
    if (!this.seen) return null;
    if (this.problem !== null) return { state: 'unusable', reason: this.problem };
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
    // A set that does not fit the run is not analysed: said in a warning, and the self-consistent set read (the
    // file's main content is not refused for its second set).
    const nk = this.k.nk;
    let sets;
    try {
      sets = eig.perSpin(nk, (reason) => failAt(eig.line, reason));
    } catch (e) {
      if (e instanceof ReaderError) return { state: 'unusable', reason: `${e.reason} (line ${e.line})` };
      throw e;
    }
    const { nSpin, nBands, energies, occupations } = sets;
    const at = `(its eigenvalues begin at line ${eig.line})`;
    const declared = this.header(nk).nbands;
    if (Number.isInteger(declared) && declared > 0 && nBands !== declared)
      return { state: 'unusable', reason: `every k-point lists ${nBands} bands, but the parameters say NBANDS = ${declared} ${at}` };
    if (nBands !== scf.nBands)
      return { state: 'unusable', reason: `${nBands} bands per k-point, but the self-consistent eigenvalues list ${scf.nBands} ${at}` };
    if (nSpin !== scf.nSpin) {
      const what = `${nSpin} spin set${nSpin === 1 ? '' : 's'}`;
      return { state: 'unusable', reason: `${what}, but the self-consistent eigenvalues have ${scf.nSpin} ${at}` };
    }
    return {
      state: 'read',
      set: {
        kpoints: this.k.kpointList.toArray(),
        weights: this.k.weightList.length === nk ? this.k.weightList.toArray() : null,
        nk,
        nBands,
        nSpin,
        energies,
        occupations,
        generation: this.k.generation,
        declaredMesh: this.k.declaredMesh(),
      },
    };
  }
}
