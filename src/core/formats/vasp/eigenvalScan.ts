/**
 * VASP EIGENVAL: eigenvalues per k-point, with or without the occupation column, one or two spin channels.
 *
 *   line 1   NIONS NIONS NBLOCK ISPIN
 *   line 2   volume a b c POTIM
 *   line 3   TEBEG
 *   line 4   'CAR'
 *   line 5   system name
 *   line 6   NELECT NKPTS NBANDS
 *   then per k-point: a blank line, "kx ky kz weight", NBANDS lines "index E [E_down] [occ [occ_down]]"
 */
import type { InputFile } from '../../io/fileAccessor';
import { CancelledError, ReaderError } from '../../errors';
import { TextScanner } from '../textScanner';
import { endsOnThisLine } from '../cutAtEnd';
import { mainFileHasher, mainFileSha256 } from '../sourceHash';
import type { ReadOptions } from '../types';
import { fastKBlock, KBlocks, type EigenvalHeader } from './eigenvalBlocks';

export const EIGENVAL_FORMAT = 'vasp-eigenval';

export interface EigenvalData {
  nSpin: 1 | 2;
  electrons: number;
  nk: number;
  nBands: number;
  kpoints: Float64Array;
  weights: Float64Array;
  energies: Float64Array[];
  occupations: Float32Array[] | null;
  system: string;
  /** Number of k-points the header announced (equals nk unless partial). */
  announcedK: number;
  partial: boolean;
  /** SHA-256 of the file's bytes ('' when ReadOptions.hashSources is false). */
  sha256: string;
}

export function readEigenval(file: InputFile, options: ReadOptions = {}): EigenvalData {
  const hasher = file.stream ? mainFileHasher(options) : null;
  const sc = file.stream
    ? TextScanner.streaming(file.stream, file.path, EIGENVAL_FORMAT, hasher ? (c) => hasher.update(c) : undefined)
    : new TextScanner(file.bytes, file.path, EIGENVAL_FORMAT);
  const h = readHeader(sc);
  const st = new KBlocks(h);
  readKBlocks(sc, st, options);
  const nk = st.nk;
  const nBands = h.nBands;
  const trim = (a: Float64Array, n: number): Float64Array => (a.length === n ? a : a.slice(0, n));
  return {
    nSpin: h.ispin,
    electrons: h.electrons,
    nk,
    nBands,
    kpoints: trim(st.kpoints, nk * 3),
    weights: trim(st.weights, nk),
    energies: st.energies.map((e) => trim(e, nk * nBands)),
    occupations: st.occupations ? st.occupations.map((e) => (e.length === nk * nBands ? e : e.slice(0, nk * nBands))) : null,
    system: h.system,
    announcedK: h.nkAnnounced,
    partial: nk < h.nkAnnounced,
    sha256: hasher ? (sc.drain(), hasher.hex()) : file.stream ? '' : mainFileSha256(file.bytes, options),
  };
}

/** The six header lines, checked; the scanner is left at the first k-point's block. */
function readHeader(sc: TextScanner): EigenvalHeader {
  if (sc.atEnd()) throw sc.error('the eigenvalue file is empty');
  sc.integer('the number of ions');
  sc.integer('the number of ions');
  sc.integer('the block count');
  const ispinLine = sc.line;
  const ispin = sc.integer('ISPIN (1 or 2)');
  if (ispin !== 1 && ispin !== 2) throw sc.error(`ISPIN must be 1 or 2, found ${ispin}`, ispinLine, 0);
  sc.nextLine();
  for (let i = 0; i < 3; i++) {
    if (!sc.nextLine()) throw sc.error('the header ends early (six lines are expected before the k-points)');
  }
  const system = sc.restOfLine().trim();
  if (sc.atEnd()) throw sc.error('the header ends early: the line with NELECT, NKPTS and NBANDS is missing');
  const countsLine = sc.line;
  const electrons = sc.number('the number of electrons (NELECT)');
  const nkAnnounced = sc.integer('the number of k-points (NKPTS)');
  const nBands = sc.integer('the number of bands (NBANDS)');
  if (electrons < 0) throw sc.error(`the number of electrons cannot be negative (${electrons})`, countsLine, 0);
  if (nkAnnounced <= 0) throw sc.error(`the header announces ${nkAnnounced} k-points; at least one is needed`, countsLine, 0);
  if (nBands <= 0) throw sc.error(`the header announces ${nBands} bands; at least one is needed`, countsLine, 0);
  const remaining = sc.remainingBytes;
  // Every band line holds at least the index, one energy and a newline (4 bytes; 6 with two spins): a header
  // claiming more bands than the rest of the file can hold is refused before anything is allocated.
  const minLine = ispin === 2 ? 6 : 4;
  if (nBands * minLine > remaining) {
    throw sc.error(
      `the header announces ${nBands} bands, but the rest of the file (${remaining} bytes) cannot hold one k-point of them (at least ${minLine} bytes a band line): the file is truncated, or its header is damaged`,
      countsLine,
      0,
    );
  }
  // Every band line holds at least two numbers and a newline (4 bytes or more): never allocate for more
  // k-points than the file can hold (a corrupt header must not exhaust memory).
  const maxK = Math.min(nkAnnounced, Math.floor(remaining / Math.max(1, 4 * nBands)) + 1);
  sc.nextLine();
  return { ispin, electrons, nkAnnounced, nBands, system, maxK };
}

/** Every k-point's block, then the check that nothing follows the last one. */
function readKBlocks(sc: TextScanner, st: KBlocks, options: ReadOptions): void {
  const { nkAnnounced, nBands, maxK } = st.h;
  const progressEvery = Math.max(1, Math.floor(nkAnnounced / 100));
  // Bytes one k-point block may take, generously: streaming keeps at least two blocks in the window.
  const blockBytes = (nBands + 3) * 256;
  for (let k = 0; k < nkAnnounced; k++) {
    sc.ensure(2 * blockBytes);
    if (k % progressEvery === 0) {
      if (options.isCancelled?.()) throw new CancelledError();
      options.onProgress?.(sc.filePosition / sc.fileSize);
    }
    if (k < maxK && st.columns > 0 && fastKBlock(sc, st, k)) {
      st.nk = k + 1;
      continue;
    }
    sc.skipBlankLines();
    if (sc.atEnd() || k >= maxK) {
      if (options.allowPartial && k > 0) break;
      throw sc.error(`the file ends after ${k} of ${nkAnnounced} k-points (it is truncated, or the run is still writing it)`);
    }
    let complete: boolean;
    try {
      complete = readKBlock(sc, st, k, options);
    } catch (e) {
      // Cut inside this k-point's block (a running job, a copy cut short): keep the complete k-points before it.
      if (!(options.allowPartial && k > 0 && e instanceof ReaderError && endsOnThisLine(sc))) throw e;
      complete = false;
    }
    if (!complete) break;
    st.nk = k + 1;
  }
  sc.ensure(blockBytes);
  sc.skipBlankLines();
  if (!sc.atEnd() && st.nk === nkAnnounced) {
    throw sc.error(`unexpected data after the last of the ${nkAnnounced} k-points the header announces: "${sc.peekToken()}"`);
  }
  options.onProgress?.(1);
}

/**
 * One k-point that fastKBlock left (the first one, exponents, damage): its line and its band lines, number by
 * number (generalBandLine). False when the file ends inside it and partial files are allowed.
 */
function readKBlock(sc: TextScanner, st: KBlocks, k: number, options: ReadOptions): boolean {
  const kx = sc.number(() => `the first coordinate of k-point ${k + 1}`);
  const ky = sc.number(() => `the second coordinate of k-point ${k + 1}`);
  const kz = sc.number(() => `the third coordinate of k-point ${k + 1}`);
  const w = sc.number(() => `the weight of k-point ${k + 1}`);
  sc.endLine(`the weight of k-point ${k + 1}`);
  for (let b = 0; b < st.h.nBands; b++) if (!generalBandLine(sc, st, k, b, options)) return false;
  st.kpoints[3 * k] = kx;
  st.kpoints[3 * k + 1] = ky;
  st.kpoints[3 * k + 2] = kz;
  st.weights[k] = w;
  return true;
}

/**
 * A band line the fast path left (the first one, exponents, damage): read number by number, every error in the
 * reader's words; the first line fixes the column layout. False when the file is cut here (partial files allowed).
 */
function generalBandLine(sc: TextScanner, st: KBlocks, k: number, b: number, options: ReadOptions): boolean {
  const { ispin, nBands, nkAnnounced, maxK } = st.h;
  const base = k * nBands;
  if (sc.atEnd()) {
    if (options.allowPartial) return false;
    throw sc.error(
      `the file ends inside k-point ${k + 1} of ${nkAnnounced}, after ${b} of ${nBands} bands (it is truncated, or the run is still writing it)`,
    );
  }
  const lineNo = sc.line;
  const idx = sc.tryNumberAfterSpaces() ?? bandIndexError(sc, k, b, nBands);
  if (idx !== b + 1) {
    // Band 1 again: the next k-point began early, so the header's NBANDS is wrong. Any other index: this line.
    throw sc.error(
      idx === 1 && b > 0
        ? `expected band ${b + 1} of k-point ${k + 1}, found band index ${idx}: the header's NBANDS (${nBands}) does not match the data`
        : `band line ${b + 1} of k-point ${k + 1} has the band index ${idx}, expected ${b + 1}: the line is damaged or out of order`,
      lineNo,
      1,
    );
  }
  if (st.columns < 0) {
    const save = sc.pos;
    let c = 1;
    while (!sc.atEol()) {
      if (sc.tryNumber() === null) sc.token();
      c++;
    }
    sc.pos = save;
    st.columns = c;
    const expectOcc = ispin === 1 ? 3 : 5;
    const expectNoOcc = ispin === 1 ? 2 : 3;
    if (c !== expectOcc && c !== expectNoOcc) {
      throw sc.error(
        `a band line has ${c} columns; with ISPIN = ${ispin} expected ${expectNoOcc} (index, energies) or ${expectOcc} (with occupations)`,
      );
    }
    if (c === expectOcc) {
      const occupations: Float32Array[] = [];
      for (let s = 0; s < ispin; s++) occupations.push(new Float32Array(maxK * nBands));
      st.occupations = occupations;
    }
  }
  for (let s = 0; s < ispin; s++) {
    const v = sc.tryNumberAfterSpaces();
    st.energies[s]![base + b] = v ?? valueError(sc, 'the energy', k, b, ispin === 2 ? s : -1);
  }
  const occupations = st.occupations;
  if (occupations) {
    for (let s = 0; s < ispin; s++) {
      const v = sc.tryNumberAfterSpaces();
      occupations[s]![base + b] = v ?? valueError(sc, 'the occupation', k, b, ispin === 2 ? s : -1);
    }
  }
  if (!sc.atEol()) {
    throw sc.error(`band ${b + 1} of k-point ${k + 1} has more columns than the first band line (${st.columns}): "${sc.peekToken()}"`);
  }
  // A last line without its newline may have been cut inside a number: not trusted in a file still being written.
  return sc.nextLine() || !options.allowPartial || (k === nkAnnounced - 1 && b === nBands - 1);
}

/** Recognise EIGENVAL by its header: four integers, then on line 6 three numbers. */
export function detectEigenval(head: Uint8Array, name: string): number {
  const text = new TextDecoder().decode(head.subarray(0, 4096)).replace(/^\uFEFF/, '');
  const lines = text.split(/\r?\n/);
  const ints = (l: string | undefined): boolean[] =>
    (l ?? '')
      .trim()
      .split(/\s+/)
      .map((t) => /^[+-]?\d+$/.test(t));
  const l1 = ints(lines[0]);
  if (l1.length !== 4 || !l1.every(Boolean)) return 0;
  // A header cut short (a job that has just started, or a truncated copy): let the reader say where.
  if (lines.length < 7) return /eigenval/i.test(name) ? 0.5 : 0.2;
  const l6 = (lines[5] ?? '').trim().split(/\s+/);
  if (l6.length !== 3 || !l6.every((t) => /^[+-]?\d*\.?\d+([eE][+-]?\d+)?$/.test(t))) return 0;
  const l2 = (lines[1] ?? '').trim().split(/\s+/);
  if (l2.length !== 5) return 0.6;
  return /eigenval/i.test(name) ? 1 : 0.95;
}

/** The band-index field did not hold a number: say why in the reader's words. */
function bandIndexError(sc: TextScanner, k: number, b: number, nBands: number): never {
  if (sc.lineIsBlank()) {
    throw sc.error(`k-point ${k + 1} lists ${b} bands, but the header's NBANDS is ${nBands}: the header does not match the data`);
  }
  sc.number(() => `the band index (k-point ${k + 1}, band ${b + 1})`);
  throw sc.error(`expected the band index (k-point ${k + 1}, band ${b + 1})`);
}

/** A value field did not hold a number: the scanner's sentence for it (overflow, NaN, missing...). */
function valueError(sc: TextScanner, what: string, k: number, b: number, spin: number): never {
  const channel = spin === 0 ? ' (spin up)' : spin === 1 ? ' (spin down)' : '';
  sc.number(`${what} of band ${b + 1} at k-point ${k + 1}${channel}`);
  throw sc.error(`expected ${what} of band ${b + 1} at k-point ${k + 1}${channel}`);
}
