/**
 * The band file bands.x writes (filband): a namelist-like header, then per k-point its cartesian
 * coordinates in units of 2π/alat and the band energies in eV, ten to a line, rounded to 1 meV:
 *
 *    &plot nbnd=   8, nks=   100 /
 *              0.000000  0.000000  0.000000
 *      -5.821    6.235    6.235    6.235    8.780    8.780    8.780    9.568
 *              0.050000  0.000000  0.050000
 *   ...
 *
 * (Fortran formats '(10x,3f10.6)' for k and '(10f9.3)' for energies.) The file carries no cell: alat and the
 * lattice come from the pw.x XML data file beside it, or from the caller (--alat, --structure). One spin
 * channel per file (bands.x writes spin-polarised runs one channel at a time).
 */
import type { BandStructure, ElectronicMethod, InputWarning, Mat3, SourceFile, Structure, Vec3 } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { basename } from '../../io/fileAccessor';
import type { FormatReader, ReadOptions } from '../types';
import { sha256Hex } from '../../hash';
import { mainFileSha256 } from '../sourceHash';
import { CancelledError, ReaderError } from '../../errors';
import { checkAnnouncedCount } from '../announcedCount';
import { TextScanner, decodeText } from '../textScanner';
import { endsOnThisLine } from '../cutAtEnd';
import { detectQeXml, qeMethod, readQeXml, type QeXmlData } from './qeXml';
import { det3, norm } from '../../lattice/linalg';

import { pathBandStructure, type PathBandData } from '../pathBands';

export const BANDSX_FORMAT = 'qe-bands';

export interface BandsxData extends PathBandData {
  announcedK: number;
  /** Cartesian, units of 2π/alat, as written. */
  kCartesian: Float64Array;
}

/** Read the numbers of a bands.x file. */
export function readBandsx(file: InputFile, options: ReadOptions = {}): BandsxData {
  const sc = TextScanner.atContent(file.bytes, file.path, BANDSX_FORMAT, 'the band file is empty');
  const headerLine = sc.line;
  const header = sc.restOfLine();
  const m = /^\s*&plot\s+nbnd\s*=\s*([^,\s]+)\s*,\s*nks\s*=\s*([^/\s]+)\s*\/\s*$/i.exec(header);
  if (!m) throw sc.error('the first line should read "&plot nbnd=…, nks=… /" (the header bands.x writes)', headerLine, 1);
  const nBands = Number(m[1]);
  const nkAnnounced = Number(m[2]);
  if (!Number.isInteger(nBands) || nBands <= 0) throw sc.error(`nbnd should be a positive whole number, found "${m[1]}"`, headerLine, 1);
  if (!Number.isInteger(nkAnnounced) || nkAnnounced <= 0)
    throw sc.error(`nks should be a positive whole number, found "${m[2]}"`, headerLine, 1);
  // Before allocating: one k-point's energies (two bytes each at least) must fit in the file.
  checkAnnouncedCount(sc, nBands, 2, 'bands (nbnd)', headerLine);
  const remaining = file.bytes.length - sc.pos;
  // Each k-point needs at least 3 + nbnd numbers of two bytes: refuse counts the file cannot hold.
  const maxK = Math.min(nkAnnounced, Math.floor(remaining / (2 * (3 + nBands))) + 1);
  const kCartesian = new Float64Array(3 * maxK);
  const energies = new Float64Array(maxK * nBands);
  let nk = 0;
  const progressEvery = Math.max(1, Math.floor(nkAnnounced / 100));
  for (let k = 0; k < nkAnnounced; k++) {
    if (k % progressEvery === 0) {
      if (options.isCancelled?.()) throw new CancelledError();
      options.onProgress?.(sc.pos / Math.max(1, file.bytes.length));
    }
    sc.skipBlankLines();
    if (sc.atEnd() || k >= maxK) {
      if (options.allowPartial && k > 0) break;
      throw sc.error(`the file ends after ${k} of the ${nkAnnounced} k-points its header announces (it is truncated)`);
    }
    let complete = true;
    let x = 0;
    let y = 0;
    let z = 0;
    try {
      const kLine = sc.line;
      x = sc.number(`the first coordinate of k-point ${k + 1}`);
      y = sc.number(`the second coordinate of k-point ${k + 1}`);
      z = sc.number(`the third coordinate of k-point ${k + 1}`);
      if (!sc.atEol())
        throw sc.error(`the line of k-point ${k + 1} should hold three coordinates only, found also "${sc.peekToken()}"`, kLine);
      sc.nextLine();
      for (let b = 0; b < nBands; b++) {
        sc.skipWhitespace();
        if (sc.atEnd()) {
          if (options.allowPartial) {
            complete = false;
            break;
          }
          throw sc.error(`the file ends inside k-point ${k + 1} of ${nkAnnounced}, after ${b} of ${nBands} energies (it is truncated)`);
        }
        energies[k * nBands + b] = sc.number(`the energy of band ${b + 1} at k-point ${k + 1}`);
      }
      if (complete && !sc.atEol())
        throw sc.error(`k-point ${k + 1} has more than the ${nBands} energies the header announces: "${sc.peekToken()}"`);
      // A last line without its newline may have been cut inside a number: not trusted in a file still being written.
      if (complete && !sc.nextLine() && options.allowPartial && k < nkAnnounced - 1) complete = false;
    } catch (e) {
      // Cut inside this k-point (a running job, a copy cut short): keep the complete k-points before it.
      if (!(options.allowPartial && k > 0 && e instanceof ReaderError && endsOnThisLine(sc))) throw e;
      complete = false;
    }
    if (!complete) break;
    kCartesian[3 * k] = x;
    kCartesian[3 * k + 1] = y;
    kCartesian[3 * k + 2] = z;
    nk = k + 1;
  }
  if (nk === 0)
    throw sc.error(
      `the file ends inside the first k-point, before all ${nBands} of its energies (it is truncated, or still being written)`,
    );
  sc.skipBlankLines();
  if (!sc.atEnd() && nk === nkAnnounced) {
    throw sc.error(`unexpected data after the last of the ${nkAnnounced} k-points the header announces: "${sc.peekToken()}"`);
  }
  options.onProgress?.(1);
  return {
    nBands,
    nk,
    announcedK: nkAnnounced,
    kCartesian: nk === maxK ? kCartesian : kCartesian.slice(0, 3 * nk),
    energies: nk === maxK ? energies : energies.slice(0, nk * nBands),
    partial: nk < nkAnnounced,
  };
}

export function detectBandsx(head: Uint8Array, name: string): number {
  const text = decodeText(head, 0, Math.min(head.length, 512)).replace(/^\uFEFF/, '');
  if (!/^\s*&plot\s+nbnd\s*=\s*\d+\s*,\s*nks\s*=\s*\d+\s*\//i.test(text)) return 0;
  // matdyn.x writes phonon frequencies (cm⁻¹) under the same header, usually as *.freq.
  return /\.(gnu|rap)$|freq/i.test(name) ? 0.3 : 0.95;
}

/** Fractional k from cartesian 2π/alat: k_i = k_cart · a_i / alat. */
function toFractional(kCart: Float64Array, lattice: Mat3, alat: number): Float64Array {
  const n = kCart.length / 3;
  const out = new Float64Array(kCart.length);
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < 3; i++) {
      const a = lattice[i]!;
      out[3 * k + i] = (kCart[3 * k]! * a[0] + kCart[3 * k + 1]! * a[1] + kCart[3 * k + 2]! * a[2]) / alat;
    }
  }
  return out;
}

/** Indices of the path's corners: the ends and every point where the direction turns. */
function pathCorners(kCart: Float64Array): number[] {
  const n = kCart.length / 3;
  const corners = [0];
  let dir: Vec3 | null = null;
  for (let i = 1; i < n; i++) {
    const d: Vec3 = [kCart[3 * i]! - kCart[3 * i - 3]!, kCart[3 * i + 1]! - kCart[3 * i - 2]!, kCart[3 * i + 2]! - kCart[3 * i - 1]!];
    const l = norm(d);
    if (l < 1e-9) continue;
    const u: Vec3 = [d[0] / l, d[1] / l, d[2] / l];
    if (dir && u[0] * dir[0] + u[1] * dir[1] + u[2] * dir[2] < 1 - 1e-4) corners.push(i - 1);
    dir = u;
  }
  if (n > 1) corners.push(n - 1);
  return corners;
}

/**
 * alat is not stored in a POSCAR-like structure. pw.x's alat is the conventional cubic constant for the
 * cubic Bravais lattices and |a1| otherwise; try those and keep the one that puts the path's corners on
 * simple fractions (multiples of 1/8 or 1/6), or null when none does.
 */
export function inferAlat(kCart: Float64Array, lattice: Mat3): { alat: number; basis: string } | null {
  const a1 = norm(lattice[0]);
  const vol = Math.abs(det3(lattice));
  const candidates: { alat: number; basis: string }[] = [
    { alat: a1, basis: '|a1|' },
    { alat: a1 * Math.SQRT2, basis: 'the cubic constant of an fcc cell (|a1|·√2)' },
    { alat: (a1 * 2) / Math.sqrt(3), basis: 'the cubic constant of a bcc cell (|a1|·2/√3)' },
    { alat: Math.cbrt(4 * vol), basis: 'the cubic constant of an fcc cell (∛(4V))' },
    { alat: Math.cbrt(2 * vol), basis: 'the cubic constant of a bcc cell (∛(2V))' },
    { alat: norm(lattice[1]), basis: '|a2|' },
    { alat: norm(lattice[2]), basis: '|a3|' },
  ];
  const corners = pathCorners(kCart);
  let best: { alat: number; basis: string; score: number } | null = null;
  for (const c of candidates) {
    let score = 0;
    for (const i of corners) {
      for (let j = 0; j < 3; j++) {
        const a = lattice[j]!;
        const f = (kCart[3 * i]! * a[0] + kCart[3 * i + 1]! * a[1] + kCart[3 * i + 2]! * a[2]) / c.alat;
        const d8 = Math.abs(f * 8 - Math.round(f * 8)) / 8;
        const d6 = Math.abs(f * 6 - Math.round(f * 6)) / 6;
        score = Math.max(score, Math.min(d8, d6));
      }
    }
    // Written coordinates carry 6 decimals: scores this close are ties, and the earlier (likelier) candidate stays.
    if (!best || score < best.score - 1e-4) best = { ...c, score };
  }
  return best && best.score < 2e-3 ? { alat: best.alat, basis: best.basis } : null;
}

export const bandsxReader: FormatReader = {
  id: BANDSX_FORMAT,
  label: 'Quantum ESPRESSO bands.x output',
  detect: detectBandsx,
  companions(_mainName: string, siblings: string[]): string[] {
    const xml = siblings.filter((s) => /\.xml$/i.test(s) && !/vasprun/i.test(s));
    xml.sort((a, b) => Number(b === 'data-file-schema.xml') - Number(a === 'data-file-schema.xml') || a.localeCompare(b));
    return xml.slice(0, 4);
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    const data = readBandsx(main, options);
    const warnings: InputWarning[] = [];
    const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: mainFileSha256(main.bytes, options) }];
    let xml: QeXmlData | null = null;
    for (const c of companions) {
      if (!/\.xml$/i.test(c.path) || detectQeXml(c.bytes.subarray(0, 4096), basename(c.path)) === 0) continue;
      try {
        xml = readQeXml(c, {});
        files.push({ role: 'lattice', path: c.path, sha256: sha256Hex(c.bytes) });
        break;
      } catch (e) {
        if (e instanceof ReaderError)
          warnings.push({ code: 'xml-unreadable', message: `${e.message}; the data file was not used`, file: c.path, line: e.line });
        else throw e;
      }
    }

    let lattice: Mat3 | null = null;
    let structure: Structure | null = null;
    let alat: number | null = null;
    let kpoints: Float64Array;
    if (xml) {
      lattice = xml.lattice;
      structure = xml.structure;
      alat = xml.alat;
      if (options.alatAngstrom !== undefined && Math.abs(options.alatAngstrom - alat) > 1e-4 * alat) {
        warnings.push({
          code: 'alat-ignored',
          message: `alat ${options.alatAngstrom} Å was given, but the data file beside the bands says ${alat.toFixed(6)} Å: the data file's value was used.`,
        });
      }
    } else {
      structure = options.structure ?? null;
      lattice = structure?.lattice ?? options.lattice ?? null;
      alat = options.alatAngstrom ?? null;
      if (lattice && alat === null) {
        const guess = inferAlat(data.kCartesian, lattice);
        if (guess) {
          alat = guess.alat;
          warnings.push({
            code: 'alat-inferred',
            message: `alat was not given: ${alat.toFixed(6)} Å (${guess.basis}) puts the path's corners on simple fractions and was used. Give the lattice parameter pw.x used (celldm(1) or A) to be sure.`,
          });
        } else {
          warnings.push({
            code: 'no-alat',
            message:
              'alat is unknown (no pw.x data file beside the bands and none given) and could not be inferred from the cell: k-points stay in cartesian units of 2π/alat; masses cannot be given in m_e.',
          });
          lattice = null;
          structure = null;
        }
      }
    }
    if (lattice && alat !== null) {
      kpoints = toFractional(data.kCartesian, lattice, alat);
    } else if (alat !== null) {
      // alat without a cell: a cubic frame of side alat keeps cartesian distances (and so masses) right.
      lattice = [
        [alat, 0, 0],
        [0, alat, 0],
        [0, 0, alat],
      ];
      kpoints = data.kCartesian.slice();
      warnings.push({
        code: 'cell-unknown',
        message: `Only alat (${alat} Å) is known, not the cell: k-points are kept as cartesian coordinates in units of 2π/alat (a cubic frame of side alat), so path distances and masses are right but fractional coordinates, labels and valley degeneracy are not available.`,
      });
    } else {
      kpoints = data.kCartesian.slice();
      if (!warnings.some((w) => w.code === 'no-alat')) {
        warnings.push({
          code: 'no-alat',
          message:
            'No pw.x data file (prefix.xml or data-file-schema.xml) beside the bands and no --alat or --structure given: k-points stay in cartesian units of 2π/alat and masses cannot be given in m_e.',
        });
      }
    }
    if (lattice && !structure)
      warnings.push({ code: 'no-structure', message: 'No crystal structure: valley degeneracy cannot be determined.' });

    let electrons: number | null = null;
    let fermiEnergy: number | null = null;
    let spinorbit = options.spinorbit ?? false;
    let method: ElectronicMethod | undefined;
    if (xml) {
      method = qeMethod(xml.functional, xml.hybrid);
      if (xml.nBands < data.nBands) {
        warnings.push({
          code: 'xml-band-count',
          message: `The data file lists ${xml.nBands} bands, the band file ${data.nBands}: the data file may belong to another run.`,
        });
      }
      fermiEnergy = xml.fermiEnergy;
      if (options.spinorbit === undefined) spinorbit = xml.noncolin || xml.spinorbit;
      if (xml.lsda) {
        warnings.push({
          code: 'one-spin-channel',
          message:
            'The data file describes a spin-polarised run; bands.x writes one spin channel per file, so band edges are placed with the Fermi energy, not the electron count.',
        });
      } else electrons = xml.electrons;
    } else {
      warnings.push({
        code: 'no-electrons',
        message: 'bands.x output gives no electron count or Fermi energy; the pw.x data file beside it would.',
      });
    }
    if (data.partial) {
      warnings.push({
        code: 'partial',
        message: `The file holds ${data.nk} of the ${data.announcedK} k-points its header announces (truncated or still being written): results are provisional.`,
      });
    }
    if (/freq/i.test(basename(main.path))) {
      warnings.push({
        code: 'maybe-phonons',
        message:
          'The file name suggests phonon frequencies (matdyn.x writes them, in cm⁻¹, under the same header): the values were read as band energies in eV.',
      });
    }
    warnings.push({
      code: 'rounded-energies',
      message: 'bands.x rounds energies to 1 meV: curvature fits on this file carry that rounding in their errors.',
    });
    const source = { format: BANDSX_FORMAT, file: main.path, files };
    const fermi = xml?.fermiSource ? { fermiSource: xml.fermiSource } : {};
    const found = { lattice, structure, kpoints, fermiEnergy, electrons, spinorbit, ...(method ? { method } : {}), ...fermi };
    return pathBandStructure(source, data, { ...found, labels: [], writtenDistance: null, warnings });
  },
};
