/**
 * The XML data file pw.x writes (prefix.xml, prefix.save/data-file-schema.xml; root <qes:espresso>).
 * Hartree atomic units throughout; converted here once: lengths Bohr → Å, energies Hartree → eV, k-points
 * cartesian in 2π/alat → fractional reciprocal coordinates. Layout (the parts read):
 *
 *   <qes:espresso ...>
 *     <input> ... <atomic_structure> (the input geometry) ... </input>
 *     <output>
 *       <atomic_structure nat="2" alat="10.26">
 *         <atomic_positions> <atom name="Si" index="1"> x y z </atom> ... </atomic_positions>
 *         <cell> <a1> .. </a1> <a2> .. </a2> <a3> .. </a3> </cell>
 *       </atomic_structure>
 *       <symmetries> <nsym>48</nsym> ...
 *         <symmetry> <info name="crystal_symmetry" ...>crystal_symmetry</info>
 *           <rotation rank="2" dims="3 3" order="F"> 9 numbers </rotation>
 *           <fractional_translation> 3 numbers </fractional_translation> </symmetry> ...
 *       </symmetries>
 *       <band_structure>
 *         <lsda>false</lsda> <noncolin>false</noncolin> <spinorbit>false</spinorbit>
 *         <nbnd>8</nbnd> (or <nbnd_up>/<nbnd_dw> when lsda) <nelec>8.0</nelec>
 *         <fermi_energy>..</fermi_energy> or <highestOccupiedLevel>..</highestOccupiedLevel>
 *         <nks>10</nks>
 *         <ks_energies> <k_point weight="..."> kx ky kz </k_point> <npw>..</npw>
 *           <eigenvalues size="8"> .. </eigenvalues> <occupations size="8"> .. </occupations> </ks_energies> ...
 *       </band_structure>
 *     </output>
 *   </qes:espresso>
 *
 * With lsda the eigenvalues of one k-point hold the spin-up bands, then the spin-down bands.
 */
import type { Mat3, Structure, Vec3 } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import type { ReadOptions } from '../types';
import { ReaderError } from '../../errors';
import { parseXmlSafely, numberAttribute } from '../xmlSafety';
import { parseDecimal, scanNumbers } from '../numbers';
import { DoubleBuffer } from '../doubleBuffer';
import { BOHR_ANGSTROM, hartreeToEv } from '../../units';
import { qeStructure, type AtomicStructureDraft } from './qeStructure';

export const QE_XML_FORMAT = 'qe-xml';

/** A symmetry operation as pw.x lists it: QE's s(i,j) in crystal axes and the fractional translation. */
export interface QeSymmetryOperation {
  /** s(i,j) (row i, column j) as pw.x stores it, read from the Fortran (column-major) order of the file. */
  rotation: Mat3;
  translation: Vec3;
}

export interface QeXmlData {
  /** Lattice parameter alat, Å. */
  alat: number;
  /** Lattice rows, Å. */
  lattice: Mat3;
  structure: Structure;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  /** Fractional reciprocal coordinates. */
  kpoints: Float64Array;
  /** The same k-points as written: cartesian, units 2π/alat. */
  kpointsCartesian: Float64Array;
  weights: Float64Array;
  energies: Float64Array[];
  occupations: Float64Array[] | null;
  electrons: number | null;
  fermiEnergy: number | null;
  /** How the energy reference was given: 'fermi_energy', 'highestOccupiedLevel', 'two_fermi_energies', or null. */
  fermiSource: string | null;
  /** Spin up and down Fermi energies (eV) from <two_fermi_energies>. */
  twoFermi: [number, number] | null;
  lsda: boolean;
  noncolin: boolean;
  spinorbit: boolean;
  /** Crystal symmetry operations pw.x used (nsym of them), in its own convention. */
  symmetries: QeSymmetryOperation[];
  /** Number of k-points the file announces (<nks>). */
  announcedK: number;
  complete: boolean;
  /** True when pw.x generated the k-points as a Monkhorst-Pack mesh (then they sample a grid, not a path). */
  meshSampling: boolean;
  /** The exchange-correlation functional pw.x names in <dft><functional>, and whether a <hybrid> block follows. */
  functional: string | null;
  hybrid: boolean;
  /** <lowestUnoccupiedLevel> (eV) when pw.x wrote it (fixed occupations with empty bands). */
  lowestUnoccupied: number | null;
  /** <occupations_kind>: 'fixed', 'smearing', 'tetrahedra', ... as written. */
  occupationsKind: string | null;
}

/** Read a pw.x XML data file. */
export function readQeXml(file: InputFile, options: ReadOptions = {}): QeXmlData {
  const fail = (line: number, reason: string): ReaderError => new ReaderError(QE_XML_FORMAT, file.path, { line, column: 0 }, reason);
  let text = '';
  let collecting = false;
  let line = 0;
  const structures: { input?: AtomicStructureDraft; output?: AtomicStructureDraft } = {};
  let draft: AtomicStructureDraft | null = null;
  let draftSection: 'input' | 'output' | null = null;
  let atomName = '';
  const flags = new Map<string, string>();
  const symmetries: QeSymmetryOperation[] = [];
  let symInfo = '';
  let symRotation: Mat3 | null = null;
  let symTranslation: Vec3 = [0, 0, 0];
  const kCart = new DoubleBuffer(3 * 64);
  const weights = new DoubleBuffer(64);
  const eig = new DoubleBuffer(1024);
  const occ = new DoubleBuffer(1024);
  let kWeight: number | null = null;
  let kSeen = false;
  let bandsPerK = -1;
  let occPerK = -1;
  let kComplete = 0;
  let kHasEig = false;
  let kHasOcc = false;
  let rootSeen = false;
  let currentLine = 1;
  let meshSampling = false;
  let functional: string | null = null;
  let hybrid = false;

  const numbersOf = (what: string, expected: number, lineNo: number): number[] => {
    const out: number[] = [];
    const r = scanNumbers(text, out, 0, expected);
    if (r.bad !== null) {
      if (r.bad.includes('***'))
        throw fail(lineNo, `${what} is written as "${r.bad}": the number field overflowed, so the value is unknown`);
      throw fail(lineNo, `${what} should be a number, found "${r.bad}"`);
    }
    if (r.count !== expected) throw fail(lineNo, `${what} should hold ${expected} numbers, found ${r.count}`);
    return out;
  };
  const section = (path: readonly string[]): 'input' | 'output' | null =>
    path[1] === 'output' ? 'output' : path[1] === 'input' ? 'input' : null;

  const outcome = parseXmlSafely(
    file,
    QE_XML_FORMAT,
    {
      open(name, attrs, path, lineNo) {
        currentLine = lineNo;
        const depth = path.length;
        if (depth === 1) {
          if (!/(^|:)espresso$/.test(name)) {
            throw fail(
              1,
              `the root element is <${name}>; a pw.x data file starts with <qes:espresso> (files of versions before 6.2 are not read)`,
            );
          }
          rootSeen = true;
          return;
        }
        collecting = true;
        text = '';
        const parent = path[depth - 2]!;
        if (name === 'atomic_structure') {
          const sec = section(path);
          draftSection = sec;
          draft = {
            alat: numberAttribute(attrs, 'alat'),
            species: [],
            positions: [],
            kind: null,
            cell: [null, null, null],
            line: currentLine,
          };
        } else if (name === 'atom' && draft && (parent === 'atomic_positions' || parent === 'crystal_positions')) {
          atomName = (attrs.name ?? '').trim();
          draft.kind = parent === 'atomic_positions' ? 'cartesian' : 'crystal';
        } else if (name === 'symmetry' && parent === 'symmetries' && section(path) === 'output') {
          symInfo = '';
          symRotation = null;
          symTranslation = [0, 0, 0];
        } else if (name === 'info' && parent === 'symmetry') {
          symInfo = attrs.name ?? '';
        } else if (name === 'hybrid' && parent === 'dft') {
          hybrid = true;
        } else if (name === 'monkhorst_pack' && parent === 'starting_k_points' && section(path) === 'output') {
          meshSampling = true;
        } else if (name === 'ks_energies') {
          kSeen = true;
          kWeight = null;
          kHasEig = false;
          kHasOcc = false;
        } else if (name === 'k_point' && parent === 'ks_energies') {
          kWeight = numberAttribute(attrs, 'weight');
        }
      },
      text(t) {
        if (collecting) text += t;
      },
      close(name, path, lineNo) {
        currentLine = lineNo;
        collecting = false;
        const depth = path.length;
        if (depth < 2) return;
        const parent = path[depth - 2]!;
        const sec = section(path);
        line = currentLine;
        if (draft && name === 'atom' && (parent === 'atomic_positions' || parent === 'crystal_positions')) {
          draft.species.push(atomName);
          draft.positions.push(...numbersOf(`the position of atom ${draft.species.length}`, 3, line));
        } else if (draft && parent === 'cell' && /^a[123]$/.test(name)) {
          const v = numbersOf(`the lattice vector ${name}`, 3, line);
          draft.cell[Number(name[1]) - 1] = [v[0]!, v[1]!, v[2]!];
        } else if (name === 'functional' && parent === 'dft') {
          if (functional === null || sec === 'output') functional = text.trim();
        } else if (name === 'atomic_structure') {
          if (draft && draftSection) structures[draftSection] = draft;
          draft = null;
        } else if (parent === 'symmetry' && sec === 'output') {
          if (name === 'rotation') {
            const v = numbersOf('a symmetry rotation', 9, line);
            // Fortran order: the first three numbers are the first column s(1:3,1).
            symRotation = [
              [v[0]!, v[3]!, v[6]!],
              [v[1]!, v[4]!, v[7]!],
              [v[2]!, v[5]!, v[8]!],
            ];
          } else if (name === 'fractional_translation') {
            const v = numbersOf('a fractional translation', 3, line);
            symTranslation = [v[0]!, v[1]!, v[2]!];
          }
        } else if (name === 'symmetry' && parent === 'symmetries' && sec === 'output') {
          if (symRotation && symInfo === 'crystal_symmetry') symmetries.push({ rotation: symRotation, translation: symTranslation });
        } else if (parent === 'band_structure' || parent === 'magnetization') {
          if (sec === 'output' && name !== 'ks_energies' && name !== 'starting_k_points') {
            if (parent === 'band_structure' || !flags.has(name)) flags.set(name, text.trim());
          }
          if (name === 'ks_energies') {
            const k = kComplete + 1;
            if (!kHasEig) throw fail(line, `k-point ${k} has no eigenvalues`);
            if (kCart.length !== 3 * k) throw fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <k_point>`);
            if (eig.length !== k * bandsPerK)
              throw fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <eigenvalues>`);
            if (occ.length !== 0 && occ.length !== k * occPerK)
              throw fail(line, `the block of k-point ${k} (<ks_energies>) should hold exactly one <occupations>`);
            kComplete++;
          }
        } else if (parent === 'ks_energies') {
          if (name === 'k_point') {
            const v = numbersOf(`k-point ${kComplete + 1}`, 3, line);
            for (const x of v) kCart.push(x);
            weights.push(kWeight ?? 0);
          } else if (name === 'eigenvalues' || name === 'occupations') {
            const buf = name === 'eigenvalues' ? eig : occ;
            const out: number[] = [];
            const r = scanNumbers(text, out, 0, 1 << 20);
            const what = `the ${name} of k-point ${kComplete + 1}`;
            if (r.bad !== null) throw fail(line, `${what} should be numbers, found "${r.bad}"`);
            if (name === 'eigenvalues') {
              if (bandsPerK < 0) bandsPerK = r.count;
              else if (r.count !== bandsPerK) throw fail(line, `${what} are ${r.count} values where the k-points before have ${bandsPerK}`);
              kHasEig = true;
            } else {
              if (occPerK < 0) occPerK = r.count;
              else if (r.count !== occPerK) throw fail(line, `${what} are ${r.count} values where the k-points before have ${occPerK}`);
              kHasOcc = true;
            }
            for (const x of out) buf.push(x);
          }
        }
        void kHasOcc;
      },
    },
    options,
  );
  line = outcome.endLine;
  if (!rootSeen) throw fail(1, 'no <qes:espresso> root element: this is not a pw.x data file');
  const st = structures.output ?? structures.input;
  if (!st) throw fail(line, 'the file holds no <atomic_structure>: the cell is unknown');
  const { cellBohr, alatBohr, structure } = qeStructure(st, fail);
  const lattice = structure.lattice;

  const bool = (key: string): boolean => /^(true|\.?t)/i.test(flags.get(key) ?? '');
  const num = (key: string): number | null => {
    const v = flags.get(key);
    return v === undefined ? null : parseDecimal(v);
  };
  const lsda = bool('lsda');
  const noncolin = bool('noncolin');
  const spinorbit = bool('spinorbit');
  if (!kSeen || kComplete === 0) {
    throw fail(
      line,
      outcome.complete
        ? 'the file holds no eigenvalues (no <ks_energies> in <band_structure>)'
        : 'the file ends before the first eigenvalues (it is truncated, or pw.x is still writing it)',
    );
  }
  const announcedK = num('nks') ?? kComplete;
  if (outcome.complete && kComplete !== announcedK) {
    throw fail(line, `the file announces ${announcedK} k-points (<nks>) but holds eigenvalues for ${kComplete}`);
  }
  const nk = kComplete;
  const nSpin: 1 | 2 = lsda ? 2 : 1;
  let nBands = bandsPerK;
  if (lsda) {
    const up = num('nbnd_up');
    const dw = num('nbnd_dw');
    if (up !== null && dw !== null && up !== dw)
      throw fail(line, `spin-up and spin-down band counts differ (${up} and ${dw}); Valleyscope needs the same number in both channels`);
    if (bandsPerK % 2 !== 0)
      throw fail(line, `a spin-polarised (lsda) file must hold an even number of eigenvalues per k-point, found ${bandsPerK}`);
    nBands = bandsPerK / 2;
  } else {
    const nbnd = num('nbnd');
    if (nbnd !== null && nbnd !== bandsPerK) throw fail(line, `<nbnd> says ${nbnd} bands but each k-point holds ${bandsPerK} eigenvalues`);
  }
  const energies: Float64Array[] = [];
  const occupations: Float64Array[] | null = occPerK === bandsPerK && occ.length === eig.length ? [] : null;
  for (let s = 0; s < nSpin; s++) {
    const e = new Float64Array(nk * nBands);
    const o = occupations ? new Float64Array(nk * nBands) : null;
    for (let k = 0; k < nk; k++) {
      for (let b = 0; b < nBands; b++) {
        const src = k * bandsPerK + s * nBands + b;
        e[k * nBands + b] = hartreeToEv(eig.data[src]!);
        if (o) o[k * nBands + b] = occ.data[src]!;
      }
    }
    energies.push(e);
    if (o && occupations) occupations.push(o);
  }
  // Cartesian k in 2π/alat → fractional: k_i = k_cart · a_i / alat (a_i and alat both in Bohr).
  const kCartesian = kCart.data.slice(0, 3 * nk);
  const kpoints = new Float64Array(3 * nk);
  for (let k = 0; k < nk; k++) {
    for (let i = 0; i < 3; i++) {
      const a = cellBohr[i]!;
      kpoints[3 * k + i] = (kCartesian[3 * k]! * a[0] + kCartesian[3 * k + 1]! * a[1] + kCartesian[3 * k + 2]! * a[2]) / alatBohr;
    }
  }
  let fermiEnergy: number | null = null;
  let fermiSource: string | null = null;
  let twoFermi: [number, number] | null = null;
  const ef = num('fermi_energy');
  const homo = num('highestOccupiedLevel');
  const two = flags.get('two_fermi_energies');
  if (ef !== null) {
    fermiEnergy = hartreeToEv(ef);
    fermiSource = 'fermi_energy';
  } else if (homo !== null) {
    fermiEnergy = hartreeToEv(homo);
    fermiSource = 'highestOccupiedLevel';
  } else if (two !== undefined) {
    const out: number[] = [];
    const r = scanNumbers(two, out, 0, 2);
    if (r.bad === null && r.count === 2) {
      fermiEnergy = hartreeToEv(Math.max(out[0]!, out[1]!));
      fermiSource = 'two_fermi_energies';
      twoFermi = [hartreeToEv(out[0]!), hartreeToEv(out[1]!)];
    }
  }
  return {
    alat: alatBohr * BOHR_ANGSTROM,
    lattice,
    structure,
    nk,
    nBands,
    nSpin,
    kpoints,
    kpointsCartesian: kCartesian,
    weights: weights.data.slice(0, nk),
    energies,
    occupations,
    electrons: num('nelec'),
    fermiEnergy,
    fermiSource,
    twoFermi,
    lsda,
    noncolin,
    spinorbit,
    symmetries,
    announcedK,
    complete: outcome.complete,
    meshSampling,
    functional,
    hybrid,
    lowestUnoccupied: num('lowestUnoccupiedLevel') === null ? null : hartreeToEv(num('lowestUnoccupiedLevel')!),
    occupationsKind: flags.get('occupations_kind') ?? null,
  };
}
