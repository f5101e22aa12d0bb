/**
 * Wannier90 interpolated bands: seedname_band.dat (path distance and energy in eV, one band after another,
 * bands separated by a blank line; Fortran format '(2E16.8)'), with its companions
 *
 *   seedname_band.kpt            number of points, then "kx ky kz weight" per point (fractional)
 *   seedname_band.labelinfo.dat  per labelled point: label, 1-based index, distance, kx ky kz (fractional)
 *   seedname.win                 the input: unit_cell_cart (optionally with a bohr/ang line), atoms_frac or
 *                                atoms_cart, spinors, fermi_energy
 *
 * The distance Wannier90 writes is the path length in Å⁻¹ with the 2π (its reciprocal lattice includes it).
 */
import type { BandStructure, InputWarning, KLabel, SourceFile } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import type { FormatReader, ReadOptions } from './types';
import { sha256Hex } from '../hash';
import { mainFileSha256 } from './sourceHash';
import { CancelledError, ReaderError } from '../errors';
import { TextScanner, decodeText } from './textScanner';
import { endsOnThisLine } from './cutAtEnd';
import { DoubleBuffer } from './doubleBuffer';

import { readBandKpt, readLabelInfo, readWin } from './wannier90Companions';

import { pathBandStructure, type PathBandData } from './pathBands';

export { readBandKpt, readLabelInfo, readWin };

export const WANNIER90_BAND_FORMAT = 'wannier90-band';

/** `partial`: the last band was cut short (dropped; only with allowPartial). */
export interface BandDatData extends PathBandData {
  distance: Float64Array;
}

/** Read seedname_band.dat: blocks of (distance, energy) lines, one block per band. */
export function readBandDat(file: InputFile, options: ReadOptions = {}): BandDatData {
  const sc = TextScanner.atContent(file.bytes, file.path, WANNIER90_BAND_FORMAT, 'the band file is empty');
  const x = new DoubleBuffer(1024);
  const e = new DoubleBuffer(4096);
  let nk = -1;
  let inBlock = 0;
  let band = 0;
  let lines = 0;
  /** The file ends on a line without its newline (or inside a line): its last value may be cut. */
  let cutLastLine = false;
  /** Where the energy of the previous data line ends, counted from its line's start (the layout is fixed-width). */
  let previousWidth = -1;
  while (!sc.atEnd()) {
    if ((++lines & 0xffff) === 0) {
      if (options.isCancelled?.()) throw new CancelledError();
      options.onProgress?.(sc.pos / file.bytes.length);
    }
    if (sc.lineIsBlank()) {
      // Spaces at the very end without a newline are the start of a line cut short, not the record that closes a band.
      if (!sc.nextLine()) {
        cutLastLine = true;
        break;
      }
      if (inBlock > 0) {
        if (nk < 0) nk = inBlock;
        else if (inBlock !== nk) {
          throw sc.error(`band ${band + 1} has ${inBlock} points where band 1 has ${nk}: the file is damaged or truncated`, sc.line, 0);
        }
        band++;
        inBlock = 0;
      }
      continue;
    }
    let d: number;
    let en: number;
    try {
      d = sc.number(`the path distance (band ${band + 1}, point ${inBlock + 1})`);
      en = sc.number(`the energy (band ${band + 1}, point ${inBlock + 1})`);
      const width = sc.pos - sc.lineStart;
      if (!sc.atEol()) sc.endLine(`the energy of band ${band + 1}, point ${inBlock + 1}`);
      // Without its newline, a last line as wide as the one before (Wannier90 writes every line in one fixed
      // format) ends on a whole number: the file is complete. A narrower one may have been cut inside a number.
      else if (!sc.nextLine()) cutLastLine = width !== previousWidth;
      previousWidth = width;
    } catch (err) {
      // Cut inside this line (a running job, a copy cut short): the bands before it are kept, this one dropped.
      if (!(options.allowPartial && band > 0 && err instanceof ReaderError && endsOnThisLine(sc))) throw err;
      cutLastLine = true;
      break;
    }
    if (band === 0) x.push(d);
    else if (inBlock < nk) {
      const ref = x.data[inBlock]!;
      if (Math.abs(ref - d) > 1e-4 * Math.max(1, Math.abs(ref))) {
        throw sc.error(
          `band ${band + 1}, point ${inBlock + 1}: distance ${d} differs from band 1's ${ref} at the same point`,
          sc.line - 1,
          1,
        );
      }
    } else {
      throw sc.error(`band ${band + 1} has more points than band 1 (${nk})`, sc.line - 1, 1);
    }
    e.push(en);
    inBlock++;
  }
  // Wannier90 ends every band, the last one too, with a blank record. A last band as long as the first is
  // accepted without it (other writers omit it); a lone band without it, or a shorter one, was cut short.
  let partial = false;
  if (inBlock > 0) {
    // A last line without its newline may have been cut inside a number: not trusted in a file still being written.
    if (band > 0 && inBlock === nk && !(cutLastLine && options.allowPartial)) band++;
    else if (options.allowPartial && band > 0) partial = true;
    else {
      throw sc.error(
        nk < 0 || inBlock === nk
          ? `the file ends inside band ${band + 1} (after ${inBlock} points, without the blank line that closes every band): it is truncated`
          : `the last band has ${inBlock} of ${nk} points: the file is truncated`,
        sc.line,
        0,
      );
    }
  }
  if (inBlock === 0 && cutLastLine && options.allowPartial && band > 0) partial = true;
  if (nk <= 0 || band === 0) throw sc.error('the file holds no complete band');
  options.onProgress?.(1);
  return { nk, nBands: band, distance: x.toArray(), energies: transposeBands(e.data, band, nk), partial };
}

/** Band-major (as written) to k-major [k * nBands + band]. */
function transposeBands(src: Float64Array, nBands: number, nk: number): Float64Array {
  const out = new Float64Array(nk * nBands);
  for (let b = 0; b < nBands; b++) for (let k = 0; k < nk; k++) out[k * nBands + b] = src[b * nk + k]!;
  return out;
}

export function detectBandDat(head: Uint8Array, name: string): number {
  // Name carries weight here: two columns of numbers say little by themselves.
  const text = decodeText(head, 0, Math.min(head.length, 2048)).replace(/^\uFEFF/, '');
  const lines = text
    .split(/\r?\n/)
    .slice(0, 8)
    .filter((l) => l.trim());
  if (lines.length < 2) return 0;
  const num = /^[+-]?(\d+\.?\d*|\.\d+)([eEdD][+-]?\d+)?$/;
  const twoCols = lines.every((l) => {
    const t = l.trim().split(/\s+/);
    return t.length === 2 && t.every((x) => num.test(x));
  });
  if (!twoCols) return 0;
  if (/_band\.dat$/i.test(name)) return 0.95;
  // E16.8 layout: 16-character fields in exponent form.
  return /^\s*-?\d\.\d{8}E[+-]\d\d\s+-?\d\.\d{8}E[+-]\d\d\s*$/.test(lines[0]!) ? 0.5 : 0.2;
}

function seedOf(mainName: string): string {
  return mainName.replace(/_band\.dat$/i, '').replace(/\.dat$/i, '');
}

export const wannier90BandReader: FormatReader = {
  id: WANNIER90_BAND_FORMAT,
  label: 'Wannier90 _band.dat',
  detect: detectBandDat,
  companions(mainName: string, siblings: string[]): string[] {
    const seed = seedOf(mainName);
    return [`${seed}_band.kpt`, `${seed}_band.labelinfo.dat`, `${seed}.win`].filter((n) => siblings.includes(n));
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    const data = readBandDat(main, options);
    const warnings: InputWarning[] = [];
    const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: mainFileSha256(main.bytes, options) }];
    const find = (suffix: string): InputFile | undefined => companions.find((c) => basename(c.path).toLowerCase().endsWith(suffix));
    const use = <T>(f: InputFile | undefined, role: string, fn: (f: InputFile) => T): T | null => {
      if (!f) return null;
      try {
        const r = fn(f);
        files.push({ role, path: f.path, sha256: sha256Hex(f.bytes) });
        return r;
      } catch (e) {
        if (e instanceof ReaderError) {
          warnings.push({ code: `${role}-unreadable`, message: `${e.message}; the file was not used`, file: f.path, line: e.line });
          return null;
        }
        throw e;
      }
    };
    const win = use(find('.win'), 'settings', readWin);
    if (win?.numWann != null && win.numWann !== data.nBands && !data.partial) {
      throw new ReaderError(
        WANNIER90_BAND_FORMAT,
        main.path,
        { line: 0, column: 0 },
        `the band file holds ${data.nBands} bands but seedname.win sets num_wann = ${win.numWann}: the file is truncated or belongs to another run`,
      );
    }
    let kpoints = use(find('_band.kpt'), 'kpath', readBandKpt);
    const labelInfo = use(find('_band.labelinfo.dat'), 'labels', readLabelInfo) ?? [];
    if (kpoints && kpoints.length !== 3 * data.nk) {
      warnings.push({
        code: 'kpt-mismatch',
        message: `The _band.kpt file lists ${kpoints.length / 3} k-points but the band file has ${data.nk}: it was not used.`,
      });
      kpoints = null;
    }
    const labels: KLabel[] = [];
    for (const l of labelInfo) if (l.index < data.nk) labels.push({ index: l.index, label: l.label });
    labels.sort((a, b) => a.index - b.index);
    let writtenDistance: Float64Array | null = null;
    if (!kpoints) {
      // Without the k-points, the path is known by its written distances (and the labelled ends).
      writtenDistance = data.distance;
      kpoints = new Float64Array(3 * data.nk);
      if (labelInfo.length >= 2) {
        // Interpolate fractional k linearly in distance between consecutive labelled points.
        const ends = [...labelInfo].sort((a, b) => a.index - b.index);
        for (let s = 0; s + 1 < ends.length; s++) {
          const a = ends[s]!;
          const b = ends[s + 1]!;
          const span = b.distance - a.distance;
          for (let i = a.index; i <= Math.min(b.index, data.nk - 1); i++) {
            const t = span > 0 ? (data.distance[i]! - a.distance) / span : 0;
            for (let j = 0; j < 3; j++) kpoints[3 * i + j] = a.k[j]! + t * (b.k[j]! - a.k[j]!);
          }
        }
        warnings.push({
          code: 'no-kpt',
          message: 'No _band.kpt beside the band file: k-points were placed between the labelled points by their written distances.',
        });
      } else {
        warnings.push({
          code: 'no-kpt',
          message: 'No _band.kpt and no _band.labelinfo.dat beside the band file: only the written path distances are known.',
        });
      }
    }
    const structure = win?.structure ?? options.structure ?? null;
    const lattice = win?.lattice ?? structure?.lattice ?? options.lattice ?? null;
    if (!lattice) {
      warnings.push({
        code: 'no-lattice',
        message: 'No seedname.win with unit_cell_cart beside the band file: the written path distances (Å⁻¹) are used.',
      });
      writtenDistance = data.distance;
    } else if (!structure) {
      warnings.push({
        code: 'no-structure',
        message: 'No atoms (atoms_frac or atoms_cart in seedname.win): valley degeneracy cannot be determined.',
      });
    }
    const fermiEnergy = win?.fermiEnergy ?? null;
    if (data.partial) {
      warnings.push({
        code: 'partial',
        message: `The band file ends inside band ${data.nBands + 1} (truncated or still being written): only the ${data.nBands} complete bands were read; results are provisional.`,
      });
    }
    warnings.push({
      code: 'no-electrons',
      message:
        fermiEnergy !== null
          ? 'Wannier90 band files give no electron count: the fermi_energy of seedname.win places the band edges.'
          : 'Wannier90 band files give no electron count, and seedname.win gives no fermi_energy: band edges cannot be placed.',
    });
    const spinorbit = options.spinorbit ?? win?.spinors ?? false;
    const source = { format: WANNIER90_BAND_FORMAT, file: main.path, files };
    return pathBandStructure(source, data, {
      lattice,
      structure,
      kpoints,
      fermiEnergy,
      electrons: null,
      spinorbit,
      labels,
      writtenDistance,
      warnings,
    });
  },
};
