/**
 * What the events of a pw.x data file say, gathered as they arrive (the XML is parsed by xmlSafety.ts): the
 * atomic structures of <input> and <output>, the symmetry operations pw.x used, the flags and counts of
 * <band_structure> and, per <ks_energies>, one k-point with its weight, eigenvalues and occupations. Each
 * element is handled where it opens or closes; the checks that need the whole file are in qeXmlScan.ts.
 */
import type { DeclaredMesh, Mat3, Vec3 } from '../../model';
import type { ReaderError } from '../../errors';
import { numberAttribute, type XmlEvents } from '../xmlSafety';
import { scanNumbers } from '../numbers';
import { DoubleBuffer } from '../doubleBuffer';
import type { AtomicStructureDraft } from './qeStructure';

/** A symmetry operation as pw.x lists it: QE's s(i,j) in crystal axes and the fractional translation. */
export interface QeSymmetryOperation {
  /** s(i,j) (row i, column j) as pw.x stores it, read from the Fortran (column-major) order of the file. */
  rotation: Mat3;
  translation: Vec3;
}

type Section = 'input' | 'output' | null;

const section = (path: readonly string[]): Section => (path[1] === 'output' ? 'output' : path[1] === 'input' ? 'input' : null);

export class QeXmlWalk implements XmlEvents {
  rootSeen = false;
  readonly structures: { input?: AtomicStructureDraft; output?: AtomicStructureDraft } = {};
  /** Text of the <band_structure> (and <magnetization>) children of <output>, by name. */
  readonly flags = new Map<string, string>();
  readonly symmetries: QeSymmetryOperation[] = [];
  readonly kCart = new DoubleBuffer(3 * 64);
  readonly weights = new DoubleBuffer(64);
  readonly eig = new DoubleBuffer(1024);
  readonly occ = new DoubleBuffer(1024);
  bandsPerK = -1;
  occPerK = -1;
  kSeen = false;
  /** <ks_energies> blocks read whole. */
  kComplete = 0;
  meshSampling = false;
  /** The mesh <monkhorst_pack> declares, when its attributes state one (checked against the points later). */
  declaredMesh: DeclaredMesh | null = null;
  functional: string | null = null;
  hybrid = false;

  private collected = '';
  private collecting = false;
  private draft: AtomicStructureDraft | null = null;
  private draftSection: Section = null;
  private atomName = '';
  private symInfo = '';
  private symRotation: Mat3 | null = null;
  private symTranslation: Vec3 = [0, 0, 0];
  private kWeight: number | null = null;
  private kHasEig = false;

  constructor(private readonly fail: (line: number, reason: string) => ReaderError) {}

  open(name: string, attrs: Record<string, string>, path: readonly string[], line: number): void {
    const depth = path.length;
    if (depth === 1) {
      if (!/(^|:)espresso$/.test(name)) {
        throw this.fail(
          1,
          `the root element is <${name}>; a pw.x data file starts with <qes:espresso> (files of versions before 6.2 are not read)`,
        );
      }
      this.rootSeen = true;
      return;
    }
    this.collecting = true;
    this.collected = '';
    const parent = path[depth - 2]!;
    if (name === 'atomic_structure') {
      this.draftSection = section(path);
      this.draft = { alat: numberAttribute(attrs, 'alat'), species: [], positions: [], kind: null, cell: [null, null, null], line };
    } else if (name === 'atom' && this.draft && (parent === 'atomic_positions' || parent === 'crystal_positions')) {
      this.atomName = (attrs.name ?? '').trim();
      this.draft.kind = parent === 'atomic_positions' ? 'cartesian' : 'crystal';
    } else if (name === 'symmetry' && parent === 'symmetries' && section(path) === 'output') {
      this.symInfo = '';
      this.symRotation = null;
      this.symTranslation = [0, 0, 0];
    } else if (name === 'info' && parent === 'symmetry') {
      this.symInfo = attrs.name ?? '';
    } else if (name === 'hybrid' && parent === 'dft') {
      this.hybrid = true;
    } else if (name === 'monkhorst_pack' && parent === 'starting_k_points' && section(path) === 'output') {
      this.meshSampling = true;
      this.declaredMesh = qeDeclaredMesh(attrs);
    } else if (name === 'ks_energies') {
      this.kSeen = true;
      this.kWeight = null;
      this.kHasEig = false;
    } else if (name === 'k_point' && parent === 'ks_energies') {
      this.kWeight = numberAttribute(attrs, 'weight');
    }
  }

  /** Character data (an arrow: the parser calls it without its object). */
  readonly text = (t: string): void => {
    if (this.collecting) this.collected += t;
  };

  close(name: string, path: readonly string[], line: number): void {
    this.collecting = false;
    const depth = path.length;
    if (depth < 2) return;
    const parent = path[depth - 2]!;
    const sec = section(path);
    const draft = this.draft;
    if (draft && name === 'atom' && (parent === 'atomic_positions' || parent === 'crystal_positions')) {
      draft.species.push(this.atomName);
      draft.positions.push(...this.numbers(`the position of atom ${draft.species.length}`, 3, line));
    } else if (draft && parent === 'cell' && /^a[123]$/.test(name)) {
      const v = this.numbers(`the lattice vector ${name}`, 3, line);
      draft.cell[Number(name[1]) - 1] = [v[0]!, v[1]!, v[2]!];
    } else if (name === 'functional' && parent === 'dft') {
      if (this.functional === null || sec === 'output') this.functional = this.collected.trim();
    } else if (name === 'atomic_structure') {
      if (draft && this.draftSection) this.structures[this.draftSection] = draft;
      this.draft = null;
    } else if (parent === 'symmetry' && sec === 'output') {
      this.symmetryPart(name, line);
    } else if (name === 'symmetry' && parent === 'symmetries' && sec === 'output') {
      if (this.symRotation && this.symInfo === 'crystal_symmetry')
        this.symmetries.push({ rotation: this.symRotation, translation: this.symTranslation });
    } else if (parent === 'band_structure' || parent === 'magnetization') {
      if (sec === 'output' && name !== 'ks_energies' && name !== 'starting_k_points') {
        if (parent === 'band_structure' || !this.flags.has(name)) this.flags.set(name, this.collected.trim());
      }
      if (name === 'ks_energies') this.endKpoint(line);
    } else if (parent === 'ks_energies') {
      this.kpointPart(name, line);
    }
  }

  /** The numbers of the text just closed: exactly `expected` of them, or the error in the reader's words. */
  private numbers(what: string, expected: number, line: number): number[] {
    const out: number[] = [];
    const r = scanNumbers(this.collected, out, 0, expected);
    if (r.bad !== null) {
      if (r.bad.includes('***'))
        throw this.fail(line, `${what} is written as "${r.bad}": the number field overflowed, so the value is unknown`);
      throw this.fail(line, `${what} should be a number, found "${r.bad}"`);
    }
    if (r.count !== expected) throw this.fail(line, `${what} should hold ${expected} numbers, found ${r.count}`);
    return out;
  }

  private symmetryPart(name: string, line: number): void {
    if (name === 'rotation') {
      const v = this.numbers('a symmetry rotation', 9, line);
      // Fortran order: the first three numbers are the first column s(1:3,1).
      this.symRotation = [
        [v[0]!, v[3]!, v[6]!],
        [v[1]!, v[4]!, v[7]!],
        [v[2]!, v[5]!, v[8]!],
      ];
    } else if (name === 'fractional_translation') {
      const v = this.numbers('a fractional translation', 3, line);
      this.symTranslation = [v[0]!, v[1]!, v[2]!];
    }
  }

  /** A child of <ks_energies>: the k-point with its weight, the eigenvalues or the occupations. */
  private kpointPart(name: string, line: number): void {
    if (name === 'k_point') {
      for (const x of this.numbers(`k-point ${this.kComplete + 1}`, 3, line)) this.kCart.push(x);
      this.weights.push(this.kWeight ?? 0);
      return;
    }
    if (name !== 'eigenvalues' && name !== 'occupations') return;
    const out: number[] = [];
    const r = scanNumbers(this.collected, out, 0, 1 << 20);
    const what = `the ${name} of k-point ${this.kComplete + 1}`;
    if (r.bad !== null) throw this.fail(line, `${what} should be numbers, found "${r.bad}"`);
    const before = name === 'eigenvalues' ? this.bandsPerK : this.occPerK;
    if (before >= 0 && r.count !== before) throw this.fail(line, `${what} are ${r.count} values where the k-points before have ${before}`);
    if (name === 'eigenvalues') {
      this.bandsPerK = r.count;
      this.kHasEig = true;
    } else this.occPerK = r.count;
    const buf = name === 'eigenvalues' ? this.eig : this.occ;
    for (const x of out) buf.push(x);
  }

  /** The end of a <ks_energies> block: exactly one k-point, one set of eigenvalues, at most one of occupations. */
  private endKpoint(line: number): void {
    const k = this.kComplete + 1;
    if (!this.kHasEig) throw this.fail(line, `k-point ${k} has no eigenvalues`);
    if (this.kCart.length !== 3 * k) throw this.fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <k_point>`);
    if (this.eig.length !== k * this.bandsPerK)
      throw this.fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <eigenvalues>`);
    if (this.occ.length !== 0 && this.occ.length !== k * this.occPerK)
      throw this.fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <occupations>`);
    this.kComplete++;
  }
}

/**
 * pw.x's <monkhorst_pack nk1 nk2 nk3 k1 k2 k3>: an nk1×nk2×nk3 mesh through Γ, offset by half a step along
 * each axis whose k is 1 (pw.x's documented K_POINTS automatic). Null unless the attributes are whole numbers
 * in range (hostile input: a declared mesh is only compared, never allocated).
 */
function qeDeclaredMesh(attrs: Record<string, string>): DeclaredMesh | null {
  const n = ['nk1', 'nk2', 'nk3'].map((a) => numberAttribute(attrs, a));
  const k = ['k1', 'k2', 'k3'].map((a) => numberAttribute(attrs, a) ?? 0);
  if (!n.every((x) => x !== null && Number.isInteger(x) && x >= 1 && x <= 1000)) return null;
  if (!k.every((x) => x === 0 || x === 1)) return null;
  return {
    divisions: n as [number, number, number],
    shift: k.map((x) => x / 2) as [number, number, number],
    source: 'the pw.x data file (<monkhorst_pack>)',
  };
}
