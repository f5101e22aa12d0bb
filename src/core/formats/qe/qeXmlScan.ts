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
import type { DeclaredMesh, Mat3, Structure } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import type { ReadOptions } from '../types';
import { ReaderError } from '../../errors';
import { parseXmlSafely } from '../xmlSafety';
import { QeXmlWalk, type QeSymmetryOperation } from './qeXmlWalk';
import { parseDecimal, scanNumbers } from '../numbers';
import { BOHR_ANGSTROM, hartreeToEv } from '../../units';
import { qeStructure } from './qeStructure';

export const QE_XML_FORMAT = 'qe-xml';

export type { QeSymmetryOperation };

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
  declaredMesh: DeclaredMesh | null;
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
  const walk = new QeXmlWalk(fail);
  const outcome = parseXmlSafely(file, QE_XML_FORMAT, walk, options);
  const line = outcome.endLine;
  const { flags, structures, kComplete, bandsPerK, occPerK, eig, occ, kCart, weights } = walk;
  if (!walk.rootSeen) throw fail(1, 'no <qes:espresso> root element: this is not a pw.x data file');
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
  if (!walk.kSeen || kComplete === 0) {
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
    symmetries: walk.symmetries,
    announcedK,
    complete: outcome.complete,
    meshSampling: walk.meshSampling,
    declaredMesh: walk.declaredMesh,
    functional: walk.functional,
    hybrid: walk.hybrid,
    lowestUnoccupied: num('lowestUnoccupiedLevel') === null ? null : hartreeToEv(num('lowestUnoccupiedLevel')!),
    occupationsKind: flags.get('occupations_kind') ?? null,
  };
}
