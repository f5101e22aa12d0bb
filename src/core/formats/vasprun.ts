/**
 * vasprun.xml: VASP's full record of a run, read with a streaming XML parser (never a DOM), keeping only
 * what a band structure needs: the final structure, the k-points (and the line-mode generation ends), the
 * eigenvalues and occupations per spin of the last ionic step, the Fermi energy, NELECT, ISPIN, LSORBIT.
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
import type { BandStructure, InputWarning, KLabel, Mat3, SourceFile, Structure, Vec3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import type { FormatReader, ReadOptions } from './types';
import { createSha256, sha256Hex } from '../hash';
import { CancelledError, ReaderError } from '../errors';
import { SafeXmlStream, parseDecimal, scanNumbers } from './xmlSafety';
import { readKpoints } from './vasp/kpoints';
import { det3 } from '../lattice/linalg';
import { DoubleBuffer } from './doubleBuffer';

export const VASPRUN_FORMAT = 'vasprun-xml';

interface StructureDraft {
  name: string;
  basis: Vec3[];
  positions: number[];
}

interface EigenBlock {
  energies: DoubleBuffer;
  occupations: DoubleBuffer;
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
  occupations: Float64Array[] | null;
  fermiEnergy: number | null;
  electrons: number | null;
  spinorbit: boolean | null;
  /** Line-mode generation: points per segment and the segment ends (fractional), when written. */
  generation: { divisions: number; ends: Vec3[] } | null;
  /** False when the file ended early (only with allowPartial). */
  complete: boolean;
  /** Ionic steps whose eigenvalues were seen; the last complete one is kept. */
  steps: number;
}

/**
 * A vasprun.xml reader fed piece by piece: the benchmark and large-file paths can stream a file through it
 * without holding the file in memory.
 */
export class VasprunStream {
  private readonly xml: SafeXmlStream;
  private text = '';
  private collecting = false;
  private iName: string | null = null;
  private varrayName: string | null = null;
  private inGeneration = false;
  private generation: { divisions: number; ends: Vec3[] } | null = null;
  private readonly kpointList = new DoubleBuffer(3 * 256);
  private readonly weightList = new DoubleBuffer(256);
  private kpointsDone = false;
  private readonly params = new Map<string, string>();
  private readonly species: string[] = [];
  private inAtomsArray = false;
  private rcColumn = -1;
  private structures: StructureDraft[] = [];
  private draft: StructureDraft | null = null;
  private eig: EigenBlock | null = null;
  private lastEig: EigenBlock | null = null;
  private steps = 0;
  private efermi: number | null = null;
  private stepEfermi: number | null = null;
  private sawRoot = false;
  /** Scratch for one eigenvalue row. */
  private readonly row = new Float64Array(3);

  constructor(private readonly fileName: string) {
    this.xml = new SafeXmlStream(fileName, VASPRUN_FORMAT, {
      open: (name, attrs, path) => this.open(name, attrs, path),
      text: (t) => {
        if (this.collecting) this.text += t;
      },
      close: (name, path) => this.close(name, path),
    });
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
      if (bad.includes('***')) throw this.fail(`the energy of ${where} is written as "${bad}": VASP's number field overflowed, so the value is unknown`);
      throw this.fail(`the energy and occupation of ${where} should be numbers, found "${bad}"`);
    }
    if (e.columns < 0) {
      if (count < 1 || count > 3) throw this.fail(`an eigenvalue row holds ${count} numbers; expected the energy and the occupation`);
      e.columns = count;
      return;
    }
    throw this.fail(`the row for ${where} holds ${count} numbers where the rows before hold ${e.columns}`);
  }

  private collect(): void {
    this.collecting = true;
    this.text = '';
  }

  private numbers(what: string, expected: number): number[] {
    const out: number[] = [];
    const r = scanNumbers(this.text, out, 0, expected);
    if (r.bad !== null) {
      if (r.bad.includes('***')) throw this.fail(`${what} is written as "${r.bad}": VASP's number field overflowed, so the value is unknown`);
      throw this.fail(`${what} should be a number, found "${r.bad}"`);
    }
    if (r.count !== expected) throw this.fail(`${what} should hold ${expected} number${expected === 1 ? '' : 's'}, found ${r.count}`);
    return out;
  }

  private open(name: string, attrs: Record<string, string>, path: readonly string[]): void {
    const depth = path.length;
    const parent = depth >= 2 ? path[depth - 2]! : '';
    if (depth === 1) {
      if (name !== 'modeling') throw this.fail(`the root element is <${name}>; a vasprun.xml starts with <modeling>`);
      this.sawRoot = true;
      return;
    }
    switch (name) {
      case 'i':
        this.iName = attrs.name ?? null;
        if (this.iName !== null) this.collect();
        return;
      case 'v':
      case 'r':
      case 'c':
        this.collect();
        if (name === 'r' && this.eig && parent === 'set') this.eig.rowsInSet++;
        return;
      case 'varray':
        this.varrayName = attrs.name ?? null;
        return;
      case 'generation':
        if (parent === 'kpoints' && depth === 3 && /^listgenerated$/i.test(attrs.param ?? '')) {
          this.inGeneration = true;
          this.generation = { divisions: 0, ends: [] };
        }
        return;
      case 'structure':
        this.draft = { name: attrs.name ?? '', basis: [], positions: [] };
        return;
      case 'array':
        if (parent === 'atominfo' && attrs.name === 'atoms') this.inAtomsArray = true;
        return;
      case 'rc':
        if (this.inAtomsArray) this.rcColumn = 0;
        return;
      case 'eigenvalues':
        if (parent === 'calculation') {
          // NBANDS and ISPIN come before the eigenvalues: size the buffers exactly when they are known.
          const nbands = Number(this.params.get('NBANDS') ?? NaN);
          const ispin = Number(this.params.get('ISPIN') ?? 1);
          const nk = this.kpointList.length / 3;
          const guess = Number.isInteger(nbands) && nbands > 0 && (ispin === 1 || ispin === 2) && nk > 0 ? nk * nbands * ispin : Math.max(1024, nk * 16);
          this.eig = {
            energies: new DoubleBuffer(guess),
            occupations: new DoubleBuffer(guess),
            bandsPerSet: -1,
            sets: 0,
            spins: 0,
            kInSpin: 0,
            rowsInSet: 0,
            columns: -1,
            complete: false,
            line: this.xml.line,
          };
        }
        return;
      case 'set':
        if (this.eig && path.includes('eigenvalues')) {
          const c = attrs.comment ?? '';
          if (/^spin/.test(c)) {
            this.eig.spins++;
            this.eig.kInSpin = 0;
          } else if (/^kpoint/.test(c)) {
            this.eig.kInSpin++;
            this.eig.rowsInSet = 0;
          }
        }
        return;
      case 'calculation':
        this.stepEfermi = null;
        return;
      default:
        return;
    }
  }

  private close(name: string, path: readonly string[]): void {
    const depth = path.length;
    const parent = depth >= 2 ? path[depth - 2]! : '';
    switch (name) {
      case 'i': {
        this.collecting = false;
        const key = this.iName;
        this.iName = null;
        if (key === null) return;
        const value = this.text.trim();
        if (this.inGeneration && key === 'divisions') {
          const n = this.numbers('the number of points per line-mode segment', 1)[0]!;
          if (this.generation) this.generation.divisions = n;
          return;
        }
        if (key === 'efermi') {
          const v = parseDecimal(value);
          if (v === null) throw this.fail(`the Fermi energy (efermi) should be a number, found "${value}"`);
          this.stepEfermi = v;
          this.efermi = v;
          return;
        }
        if (path.includes('incar') || path.includes('parameters')) {
          // <parameters> holds the values VASP used; it comes after <incar> and wins.
          if (path.includes('parameters') || !this.params.has(key)) this.params.set(key, value);
        }
        return;
      }
      case 'c':
        this.collecting = false;
        if (this.inAtomsArray && this.rcColumn >= 0) {
          if (this.rcColumn === 0) this.species.push(this.text.trim());
          this.rcColumn++;
        }
        return;
      case 'rc':
        this.rcColumn = -1;
        return;
      case 'array':
        this.inAtomsArray = false;
        return;
      case 'v': {
        this.collecting = false;
        const vname = this.varrayName;
        if (this.inGeneration && parent === 'generation') {
          const v = this.numbers('a line-mode segment end', 3);
          this.generation?.ends.push([v[0]!, v[1]!, v[2]!]);
          return;
        }
        if (parent !== 'varray') return;
        if (path.includes('kpoints') && depth === 4 && !this.kpointsDone) {
          if (vname === 'kpointlist') {
            const v = this.numbers(`k-point ${this.kpointList.length / 3 + 1}`, 3);
            for (const x of v) this.kpointList.push(x);
          } else if (vname === 'weights') {
            this.weightList.push(this.numbers(`the weight of k-point ${this.weightList.length + 1}`, 1)[0]!);
          }
          return;
        }
        if (this.draft && path.includes('structure')) {
          if (vname === 'basis' && parent === 'varray' && path[depth - 3] === 'crystal') {
            if (this.draft.basis.length >= 3) throw this.fail('a structure lists more than three lattice vectors');
            const v = this.numbers('a lattice vector', 3);
            this.draft.basis.push([v[0]!, v[1]!, v[2]!]);
          } else if (vname === 'positions' && path[depth - 3] === 'structure') {
            this.draft.positions.push(...this.numbers(`the position of atom ${this.draft.positions.length / 3 + 1}`, 3));
          }
        }
        return;
      }
      case 'r': {
        this.collecting = false;
        const e = this.eig;
        if (!e || parent !== 'set' || !path.includes('eigenvalues')) return;
        const vals = this.row;
        const r = scanNumbers(this.text, vals, 0, 3);
        if (r.bad !== null || r.count !== e.columns) {
          this.rowError(r.count, r.bad);
        }
        e.energies.push(vals[0]!);
        if (e.columns >= 2) e.occupations.push(vals[1]!);
        return;
      }
      case 'set': {
        const e = this.eig;
        if (!e || !path.includes('eigenvalues')) return;
        if (e.rowsInSet > 0 && path[depth - 2] === 'set') {
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
        if (this.varrayName === 'weights' && path.includes('kpoints') && depth === 3) this.kpointsDone = true;
        this.varrayName = null;
        return;
      case 'generation':
        this.inGeneration = false;
        return;
      case 'structure': {
        const d = this.draft;
        this.draft = null;
        if (d && d.basis.length === 3) this.structures.push(d);
        return;
      }
      case 'eigenvalues':
        if (this.eig && parent === 'calculation') {
          this.eig.complete = true;
          this.lastEig = this.eig;
          this.eig = null;
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
    if (!this.sawRoot) throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: 1, column: 1 }, 'no <modeling> root element: this is not a vasprun.xml');
    const eig = this.lastEig;
    if (!eig) {
      const reason = outcome.complete
        ? 'the file holds no eigenvalues (no <eigenvalues> block inside a <calculation>)'
        : 'the file ends before the first eigenvalues were written (the run is still in its first step, or the file is truncated)';
      throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: outcome.endLine, column: 0 }, reason);
    }
    const nk = this.kpointList.length / 3;
    if (nk === 0) throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: eig.line, column: 0 }, 'the file lists no k-points (<kpoints> with a "kpointlist")');
    const nSpin = eig.spins;
    if (nSpin !== 1 && nSpin !== 2) {
      throw new ReaderError(VASPRUN_FORMAT, this.fileName, { line: eig.line, column: 0 }, `the eigenvalues come in ${nSpin} spin sets; 1 or 2 are expected`);
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
    const all = eig.energies.data;
    const energies: Float64Array[] = [];
    const occupations: Float64Array[] | null = eig.columns >= 2 ? [] : null;
    const per = nk * nBands;
    // Buffers sized exactly (NBANDS known) are handed over as views: no second copy of the eigenvalues.
    const exact = all.length === per * nSpin;
    const part = (a: Float64Array, s: number): Float64Array => (exact ? a.subarray(s * per, (s + 1) * per) : a.slice(s * per, (s + 1) * per));
    for (let s = 0; s < nSpin; s++) {
      energies.push(part(all, s));
      if (occupations) occupations.push(part(eig.occupations.data, s));
    }
    // Structure: the final one when written, else the last complete one.
    const pick = this.structures.find((s) => s.name === 'finalpos') ?? this.structures[this.structures.length - 1] ?? null;
    let structure: Structure | null = null;
    if (pick) {
      const lattice = pick.basis as Mat3;
      const nAtoms = pick.positions.length / 3;
      if (Math.abs(det3(lattice)) > 1e-8) {
        const species = this.species.length === nAtoms ? this.species.slice() : Array.from({ length: nAtoms }, (_, i) => this.species[i] ?? `X${i + 1}`);
        structure = { lattice, species, positions: Float64Array.from(pick.positions) };
      }
    }
    const num = (key: string): number | null => {
      const v = this.params.get(key);
      return v === undefined ? null : parseDecimal(v);
    };
    const logical = (key: string): boolean | null => {
      const v = this.params.get(key);
      if (v === undefined) return null;
      const t = v.trim().replace(/^\./, '').toUpperCase();
      return t.startsWith('T') ? true : t.startsWith('F') ? false : null;
    };
    const lsorbit = logical('LSORBIT');
    const noncollinear = logical('LNONCOLLINEAR');
    const spinorbit = lsorbit === null && noncollinear === null ? null : Boolean(lsorbit) || Boolean(noncollinear);
    const weights = this.weightList.length === nk ? this.weightList.toArray() : null;
    const gen = this.generation && this.generation.divisions >= 2 && this.generation.ends.length >= 2 ? this.generation : null;
    return {
      structure,
      species: this.species.slice(),
      kpoints: this.kpointList.toArray(),
      weights,
      nk,
      nBands,
      nSpin: nSpin as 1 | 2,
      energies,
      occupations,
      fermiEnergy: this.stepEfermi ?? this.efermi,
      electrons: num('NELECT'),
      spinorbit,
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
  const stream = new VasprunStream(file.path);
  // 64 KiB pieces: the decoded strings stay small, young objects that scavenges free at once (1 MiB pieces
  // land in the large-object space and pile up until a full collection).
  const CHUNK = 1 << 16;
  const src = file.stream;
  const size = src ? src.size : file.bytes.length;
  const hasher = src ? createSha256() : null;
  if (size === 0) return { ...stream.finish(false), sha256: '' };
  for (let start = 0; start < size; start += CHUNK) {
    if (options.isCancelled?.()) throw new CancelledError();
    const end = Math.min(size, start + CHUNK);
    const chunk = src ? src.read(start, end - start) : file.bytes.subarray(start, end);
    hasher?.update(chunk);
    stream.write(chunk, end >= size);
    options.onProgress?.(end / size);
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

function sameK(a: Vec3, b: ArrayLike<number>, off: number, tol = 2e-4): boolean {
  return Math.abs(a[0] - b[off]!) < tol && Math.abs(a[1] - b[off + 1]!) < tol && Math.abs(a[2] - b[off + 2]!) < tol;
}

/** Turn what the file says into a BandStructure, with warnings for what is missing. */
export function vasprunToBandStructure(data: VasprunData & { sha256: string }, main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
  const warnings: InputWarning[] = [];
  const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: data.sha256 }];
  const structure = data.structure ?? options.structure ?? null;
  const lattice = structure?.lattice ?? options.lattice ?? null;
  if (!data.structure) warnings.push({ code: 'no-structure', message: 'The file holds no complete structure: valley degeneracy cannot be determined.' });
  const spinorbit = options.spinorbit ?? data.spinorbit ?? false;
  if (data.spinorbit === null && options.spinorbit === undefined) {
    warnings.push({ code: 'spinorbit-unknown', message: 'The file does not say whether spin-orbit coupling was on (LSORBIT): read as a collinear run.' });
  }
  if (data.electrons === null) warnings.push({ code: 'no-electrons', message: 'The file gives no electron count (NELECT).' });

  // Hybrid-functional band runs: weighted self-consistent mesh first, then the zero-weight path.
  let { kpoints, weights, energies, occupations, nk } = data;
  const nBands = data.nBands;
  if (weights && nk > 1 && weights[0]! > 0) {
    let z = nk;
    while (z > 0 && weights[z - 1] === 0) z--;
    let allWeighted = z > 0 && z < nk;
    for (let i = 0; allWeighted && i < z; i++) if (!(weights[i]! > 0)) allWeighted = false;
    if (allWeighted && nk - z >= 2) {
      warnings.push({
        code: 'mesh-points-dropped',
        message: `The first ${z} k-points carry weights (the self-consistent mesh of a hybrid-functional run); the band path is the ${nk - z} zero-weight points after them.`,
      });
      kpoints = kpoints.slice(3 * z);
      weights = weights.slice(z);
      energies = energies.map((e) => e.slice(z * nBands));
      occupations = occupations ? occupations.map((e) => e.slice(z * nBands)) : null;
      nk -= z;
    }
  }

  let sampling: BandStructure['sampling'] = 'points';
  const labels = new Map<number, string>();
  if (data.generation) {
    sampling = 'path';
    // Labels: a KPOINTS file in line mode beside the run names the ends VASP lists here.
    const kfile = companions.find((c) => /KPOINTS/i.test(basename(c.path)));
    if (kfile) {
      try {
        const content = readKpoints(kfile);
        if (content.mode === 'line' && content.path.coordinates === 'reciprocal') {
          files.push({ role: 'kpath', path: kfile.path, sha256: sha256Hex(kfile.bytes) });
          for (const e of content.path.ends) {
            if (!e.label) continue;
            for (let i = 0; i < nk; i++) if (sameK(e.k, kpoints, 3 * i)) labels.set(i, e.label);
          }
        }
      } catch (e) {
        if (e instanceof ReaderError) warnings.push({ code: 'kpath-unreadable', message: `${e.message}; labels were not used`, file: kfile.path, line: e.line });
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
  const labelList: KLabel[] = [...labels.entries()].sort((a, b) => a[0] - b[0]).map(([index, label]) => ({ index, label }));
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
    labels: labelList,
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
