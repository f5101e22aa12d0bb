/**
 * CASTEP .bands: a short header, then per k-point its index, fractional coordinates and weight, and per spin
 * component the eigenvalues, one per line. Atomic units: energies in Hartree, cell vectors in Bohr.
 *
 *   Number of k-points    120
 *   Number of spin components 1
 *   Number of electrons   8.000            (two values when spin-polarised: up, down)
 *   Number of eigenvalues      8           (two values when spin-polarised)
 *   Fermi energy (in atomic units)     0.196834      ("Fermi energies" with two values when spin-polarised)
 *   Unit cell vectors
 *      -5.131200    5.131200    5.131200
 *       5.131200   -5.131200    5.131200
 *       5.131200    5.131200   -5.131200
 *   K-point    1  0.00000000  0.00000000  0.00000000  0.00833333
 *   Spin component    1
 *     -0.21102436
 *   ...
 *
 * CASTEP writes k-points in the order its processes finish them: they are put back in index order here.
 */
import type { BandStructure, InputWarning, Mat3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import type { FormatReader, ReadOptions } from './types';
import { mainFileSha256 } from './sourceHash';
import { CancelledError, ReaderError } from '../errors';
import { endsOnThisLine } from './cutAtEnd';
import { checkAnnouncedCount } from './announcedCount';
import { TextScanner, decodeText } from './textScanner';
import { bohrToAngstrom, hartreeToEv } from '../units';
import { det3 } from '../lattice/linalg';
import { parseDecimal } from './numbers';
import { withCastepCell } from './castepCell';

export const CASTEP_BANDS_FORMAT = 'castep-bands';

/** Expect the words of a header line (case-insensitive, spaces flexible); throws with the line otherwise. */
function expectWords(sc: TextScanner, words: string[], what: string): void {
  sc.skipBlankLines();
  const line = sc.line;
  for (const w of words) {
    const t = sc.token();
    if (t === null || t.toLowerCase() !== w.toLowerCase()) {
      throw sc.error(`expected the header line "${what}", found "${t ?? 'the end of the line'}" where "${w}" should be`, line);
    }
  }
}

export function readCastepBands(file: InputFile, options: ReadOptions = {}): BandStructure {
  const sc = TextScanner.atContent(file.bytes, file.path, CASTEP_BANDS_FORMAT, 'the .bands file is empty');
  expectWords(sc, ['Number', 'of', 'k-points'], 'Number of k-points');
  const countLine = sc.line;
  const nkAnnounced = sc.integer('the number of k-points');
  if (nkAnnounced <= 0) throw sc.error(`the header announces ${nkAnnounced} k-points; at least one is needed`, countLine, 0);
  sc.endLine('the number of k-points');
  expectWords(sc, ['Number', 'of', 'spin', 'components'], 'Number of spin components');
  const spinLine = sc.line;
  const nSpin = sc.integer('the number of spin components');
  if (nSpin !== 1 && nSpin !== 2) throw sc.error(`the number of spin components must be 1 or 2, found ${nSpin}`, spinLine, 0);
  sc.endLine('the number of spin components');
  expectWords(sc, ['Number', 'of', 'electrons'], 'Number of electrons');
  let electrons = 0;
  for (let s = 0; s < nSpin; s++) electrons += sc.number(`the number of electrons${nSpin === 2 ? ` of spin ${s + 1}` : ''}`);
  sc.endLine('the number of electrons');
  expectWords(sc, ['Number', 'of', 'eigenvalues'], 'Number of eigenvalues');
  const eigLine = sc.line;
  const counts: number[] = [];
  for (let s = 0; s < nSpin; s++) counts.push(sc.integer(`the number of eigenvalues${nSpin === 2 ? ` of spin ${s + 1}` : ''}`));
  sc.endLine('the number of eigenvalues');
  const nBands = counts[0]!;
  if (nBands <= 0) throw sc.error(`the header announces ${nBands} eigenvalues per k-point; at least one is needed`, eigLine, 0);
  // Before allocating: one k-point's eigenvalues (a number and a newline each) must fit in the file.
  checkAnnouncedCount(sc, nBands * nSpin, 2, 'eigenvalues per k-point', eigLine);
  if (counts.some((c) => c !== nBands)) {
    throw sc.error(
      `the spin channels have different numbers of eigenvalues (${counts.join(' and ')}); Valleyscope needs the same number in both`,
      eigLine,
      0,
    );
  }
  sc.skipBlankLines();
  const fermiLine = sc.line;
  const fermiText = sc.restOfLine();
  const fm = /^\s*Fermi\s+energ(?:y|ies)\s*\(in\s+atomic\s+units\)\s*(.*)$/i.exec(fermiText);
  if (!fm) throw sc.error('expected the header line "Fermi energy (in atomic units)"', fermiLine, 1);
  const fermiValues = fm[1]!
    .trim()
    .split(/\s+/)
    .filter(Boolean)
    .map((t) => parseDecimal(t) ?? Number.NaN);
  if (fermiValues.length < 1 || fermiValues.length > 2 || fermiValues.some((x) => !Number.isFinite(x))) {
    throw sc.error(`the Fermi energy should be ${nSpin === 2 ? 'one or two numbers' : 'a number'}, found "${fm[1]!.trim()}"`, fermiLine, 1);
  }
  expectWords(sc, ['Unit', 'cell', 'vectors'], 'Unit cell vectors');
  sc.nextLine();
  const cell: number[][] = [];
  for (let i = 0; i < 3; i++) {
    sc.skipBlankLines();
    const row = [
      sc.number(`unit cell vector ${i + 1} (x)`),
      sc.number(`unit cell vector ${i + 1} (y)`),
      sc.number(`unit cell vector ${i + 1} (z)`),
    ];
    sc.endLine(`unit cell vector ${i + 1}`);
    cell.push(row.map(bohrToAngstrom));
  }
  const lattice = cell as Mat3;
  if (Math.abs(det3(lattice)) < 1e-10) throw sc.error('the unit cell vectors are linearly dependent (zero cell volume)', sc.line - 3, 0);

  const remaining = file.bytes.length - sc.pos;
  const maxK = Math.min(nkAnnounced, Math.floor(remaining / (20 + nSpin * (16 + 3 * nBands))) + 1);
  const kpoints = new Float64Array(3 * maxK);
  const weights = new Float64Array(maxK);
  const energies = Array.from({ length: nSpin }, () => new Float64Array(maxK * nBands));
  const seen = new Uint8Array(maxK);
  let read = 0;
  /** The k-point (fractional) and weight of the block being read, kept only once the block is complete. */
  const kw = new Float64Array(4);
  let partial = false;
  const progressEvery = Math.max(1, Math.floor(nkAnnounced / 100));
  for (let n = 0; n < nkAnnounced; n++) {
    if (n % progressEvery === 0) {
      if (options.isCancelled?.()) throw new CancelledError();
      options.onProgress?.(sc.pos / file.bytes.length);
    }
    sc.skipBlankLines();
    if (sc.atEnd()) {
      if (options.allowPartial && n > 0) {
        partial = true;
        break;
      }
      throw sc.error(
        `the file ends after ${n} of the ${nkAnnounced} k-points its header announces (it is truncated, or the run is still writing it)`,
      );
    }
    let complete = true;
    let k = 0;
    try {
      const kLine = sc.line;
      const word = sc.token();
      if (word === null || word.toLowerCase() !== 'k-point')
        throw sc.error(`expected "K-point" starting the block of k-point ${n + 1}, found "${word ?? 'the end of the line'}"`, kLine, 1);
      const index = sc.integer('the k-point index');
      if (index < 1 || index > nkAnnounced) throw sc.error(`k-point index ${index} is outside 1…${nkAnnounced}`, kLine, 0);
      if (index > maxK) throw sc.error(`k-point index ${index} cannot fit in what remains of the file (it is truncated)`, kLine, 0);
      if (seen[index - 1]) throw sc.error(`k-point ${index} appears twice`, kLine, 0);
      k = index - 1;
      kw[0] = sc.number(`the first coordinate of k-point ${index}`);
      kw[1] = sc.number(`the second coordinate of k-point ${index}`);
      kw[2] = sc.number(`the third coordinate of k-point ${index}`);
      kw[3] = sc.number(`the weight of k-point ${index}`);
      sc.endLine(`the weight of k-point ${index}`);
      for (let s = 0; s < nSpin && complete; s++) {
        sc.skipBlankLines();
        if (sc.atEnd()) {
          if (options.allowPartial) {
            complete = false;
            break;
          }
          throw sc.error(`the file ends inside k-point ${index} before spin component ${s + 1} (it is truncated)`);
        }
        expectWords(sc, ['Spin', 'component'], `Spin component ${s + 1}`);
        const sLine = sc.line;
        const sIdx = sc.integer('the spin component');
        if (sIdx !== s + 1) throw sc.error(`expected spin component ${s + 1} of k-point ${index}, found ${sIdx}`, sLine, 0);
        sc.endLine('the spin component');
        const e = energies[s]!;
        for (let b = 0; b < nBands; b++) {
          sc.skipBlankLines();
          if (sc.atEnd()) {
            if (options.allowPartial) {
              complete = false;
              break;
            }
            throw sc.error(`the file ends inside k-point ${index}, spin ${s + 1}, after ${b} of ${nBands} eigenvalues (it is truncated)`);
          }
          e[k * nBands + b] = hartreeToEv(sc.number(`eigenvalue ${b + 1} of k-point ${index}${nSpin === 2 ? `, spin ${s + 1}` : ''}`));
          if (!sc.atEol()) sc.endLine(`eigenvalue ${b + 1} of k-point ${index}`);
          // A last line without its newline may have been cut inside a number: not trusted in a file still being written.
          else if (!sc.nextLine() && options.allowPartial && !(n === nkAnnounced - 1 && s === nSpin - 1 && b === nBands - 1)) {
            complete = false;
            break;
          }
        }
      }
    } catch (e) {
      // Cut inside this k-point's block (a running job, a copy cut short): keep the complete k-points before it.
      if (!(options.allowPartial && n > 0 && e instanceof ReaderError && endsOnThisLine(sc))) throw e;
      complete = false;
    }
    if (!complete) {
      partial = true;
      break;
    }
    seen[k] = 1;
    kpoints[3 * k] = kw[0]!;
    kpoints[3 * k + 1] = kw[1]!;
    kpoints[3 * k + 2] = kw[2]!;
    weights[k] = kw[3]!;
    read++;
  }
  if (read === 0)
    throw sc.error(
      'the file ends inside the first k-point block, before its eigenvalues are complete (it is truncated, or still being written)',
    );
  sc.skipBlankLines();
  if (!sc.atEnd() && !partial)
    throw sc.error(`unexpected data after the ${nkAnnounced} k-points the header announces: "${sc.peekToken()}"`);
  options.onProgress?.(1);

  // Keep the k-points read, in index order (all of them unless partial).
  let nk = read;
  let kOut = kpoints;
  let wOut = weights;
  let eOut = energies;
  if (read < maxK || partial) {
    const order: number[] = [];
    for (let k = 0; k < maxK; k++) if (seen[k]) order.push(k);
    nk = order.length;
    kOut = new Float64Array(3 * nk);
    wOut = new Float64Array(nk);
    eOut = energies.map(() => new Float64Array(nk * nBands));
    order.forEach((k, i) => {
      kOut.set(kpoints.subarray(3 * k, 3 * k + 3), 3 * i);
      wOut[i] = weights[k]!;
      energies.forEach((e, s) => eOut[s]!.set(e.subarray(k * nBands, (k + 1) * nBands), i * nBands));
    });
  }
  const warnings: InputWarning[] = [];
  if (partial) {
    warnings.push({
      code: 'partial',
      message: `The file holds ${nk} of the ${nkAnnounced} k-points its header announces (a running or interrupted job): results are provisional.`,
    });
  }
  if (!options.structure)
    warnings.push({
      code: 'no-structure',
      message:
        "A .bands file holds the cell but not the atoms: valley degeneracy needs the structure (the run's <seed>.cell beside it, or --structure with a .cell, POSCAR-like or pw.x XML file).",
    });
  if (nSpin === 1 && options.spinorbit === undefined) {
    warnings.push({
      code: 'spinorbit-unknown',
      message:
        'A .bands file does not say whether the run was non-collinear (spin-orbit): read as collinear, two electrons per band; give --soc if it was.',
    });
  }
  let sampling: BandStructure['sampling'] = 'points';
  let allWeighted = nk > 1;
  for (let i = 0; i < nk; i++) if (!(wOut[i]! > 0)) allWeighted = false;
  if (allWeighted) {
    let equal = true;
    for (let i = 1; i < nk; i++) if (Math.abs(wOut[i]! - wOut[0]!) > 1e-8) equal = false;
    // Equal weights: a path or an unreduced list; unequal: a symmetry-reduced mesh.
    sampling = equal ? 'points' : 'grid';
  }
  // A spin-polarised file gives two Fermi energies; the higher one bounds the occupied states of both.
  const fermi = hartreeToEv(Math.max(...fermiValues));
  return {
    source: {
      format: CASTEP_BANDS_FORMAT,
      file: file.path,
      files: [{ role: 'eigenvalues', path: file.path, sha256: mainFileSha256(file.bytes, options) }],
    },
    lattice,
    structure: options.structure ?? null,
    nk,
    nBands,
    nSpin: nSpin,
    kpoints: kOut,
    weights: wOut,
    energies: eOut,
    occupations: null,
    fermiEnergy: fermi,
    ...(nSpin === 2 && fermiValues.length === 2 && fermiValues[0] !== fermiValues[1]
      ? { fermiEnergies: [hartreeToEv(fermiValues[0]!), hartreeToEv(fermiValues[1]!)] as [number, number] }
      : {}),
    electrons,
    spinorbit: options.spinorbit ?? false,
    labels: [],
    sampling,
    grid: null,
    writtenDistance: null,
    partial,
    warnings,
  };
}

export function detectCastepBands(head: Uint8Array, name: string): number {
  const text = decodeText(head, 0, Math.min(head.length, 1024)).replace(/^\uFEFF/, '');
  if (!/^\s*Number of k-points\s+\d+\s*\r?\n\s*Number of spin components\s+\d/i.test(text)) return 0;
  return /\.bands$/i.test(name) ? 1 : 0.95;
}

export const castepBandsReader: FormatReader = {
  id: CASTEP_BANDS_FORMAT,
  label: 'CASTEP .bands',
  detect: detectCastepBands,
  /** The run's .cell for the atoms: `<seed>-out.cell` (the final structure) before `<seed>.cell`. */
  companions(mainName: string, siblings: string[]): string[] {
    const seed = mainName.replace(/\.bands$/i, '');
    const hit = [`${seed}-out.cell`, `${seed}.cell`].find((c) => siblings.includes(c));
    return hit ? [hit] : [];
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    const bs = readCastepBands(main, options);
    const cell = companions.find((c) => /\.cell$/i.test(c.path));
    return cell && !options.structure ? withCastepCell(bs, cell) : bs;
  },
};
