/**
 * The files beside a Wannier90 seedname_band.dat (see wannier90.ts): seedname_band.kpt (the k-points),
 * seedname_band.labelinfo.dat (the labelled points) and seedname.win (cell, atoms, spinors, fermi_energy).
 */
import type { Mat3, Structure, Vec3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { ReaderError } from '../errors';
import { checkAnnouncedCount } from './announcedCount';
import { TextScanner, decodeText } from './textScanner';
import { BOHR_ANGSTROM } from '../units';
import { det3, mat3Inverse, mulVecMat } from '../lattice/linalg';
import { normaliseLabel } from '../lattice/labels';
import { parseDecimal } from './numbers';

/** seedname_band.kpt: count, then fractional k and a weight per line. */
export function readBandKpt(file: InputFile): Float64Array {
  const sc = TextScanner.atContent(file.bytes, file.path, 'wannier90-kpt', 'the k-point file is empty');
  const n = sc.integer('the number of k-points');
  if (n <= 0) throw sc.error(`the k-point file announces ${n} points`);
  sc.endLine('the number of k-points');
  // Before allocating: each k-point line needs at least 6 bytes ("0 0 0" and a newline; the weight may be left out).
  checkAnnouncedCount(sc, n, 6, 'k-points', sc.line - 1);
  const k = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    sc.skipBlankLines();
    if (sc.atEnd()) throw sc.error(`the file ends after ${i} of ${n} k-points (it is truncated)`);
    for (let j = 0; j < 3; j++) k[3 * i + j] = sc.number(`coordinate ${j + 1} of k-point ${i + 1}`);
    sc.restOfLine();
  }
  return k;
}

export interface LabelInfo {
  label: string;
  /** 0-based. */
  index: number;
  distance: number;
  k: Vec3;
}

/** seedname_band.labelinfo.dat: label, 1-based index, distance, fractional k. */
export function readLabelInfo(file: InputFile): LabelInfo[] {
  const sc = new TextScanner(file.bytes, file.path, 'wannier90-labelinfo');
  const out: LabelInfo[] = [];
  for (;;) {
    sc.skipBlankLines();
    if (sc.atEnd()) break;
    const label = sc.token()!;
    const index = sc.integer(`the index of label "${label}"`);
    const distance = sc.number(`the distance of label "${label}"`);
    const k: Vec3 = [
      sc.number(`k of label "${label}" (1st)`),
      sc.number(`k of label "${label}" (2nd)`),
      sc.number(`k of label "${label}" (3rd)`),
    ];
    sc.endLine(`the k-point of label "${label}"`);
    if (index < 1) throw sc.error(`label "${label}" has index ${index}; indices start at 1`, sc.line - 1, 0);
    out.push({ label: normaliseLabel(label), index: index - 1, distance, k });
  }
  return out;
}

export interface WinSettings {
  lattice: Mat3 | null;
  structure: Structure | null;
  spinors: boolean | null;
  fermiEnergy: number | null;
  /** num_wann: the number of bands the band file must hold. */
  numWann: number | null;
}

/** The parts of seedname.win a band structure needs. Keywords and block names are case-insensitive. */
export function readWin(file: InputFile): WinSettings {
  const text = decodeText(file.bytes).replace(/^\uFEFF/, '');
  const lines = text.split(/\r?\n/).map((l) => l.replace(/[!#].*$/, '').trim());
  const fail = (line: number, reason: string): ReaderError => new ReaderError('wannier90-win', file.path, { line, column: 0 }, reason);
  const block = (name: string): { rows: string[]; line: number } | null => {
    const start = lines.findIndex((l) => new RegExp(`^begin\\s+${name}$`, 'i').test(l));
    if (start < 0) return null;
    const rows: string[] = [];
    for (let i = start + 1; i < lines.length; i++) {
      if (new RegExp(`^end\\s+${name}$`, 'i').test(lines[i]!)) return { rows, line: start + 2 };
      if (lines[i]) rows.push(lines[i]!);
    }
    throw fail(start + 1, `the block "begin ${name}" has no "end ${name}"`);
  };
  const keyword = (name: string): string | null => {
    for (const l of lines) {
      const m = new RegExp(`^${name}\\s*[=:\\s]\\s*(.+)$`, 'i').exec(l);
      if (m) return m[1]!.trim();
    }
    return null;
  };
  const nums = (row: string, n: number, line: number, what: string): number[] => {
    const t = row.split(/\s+/);
    const v = t.slice(-n).map((s) => parseDecimal(s));
    if (t.length < n || v.some((x) => x === null)) throw fail(line, `${what} should end with ${n} numbers, found "${row}"`);
    return v as number[];
  };
  let lattice: Mat3 | null = null;
  const cell = block('unit_cell_cart');
  if (cell) {
    let rows = cell.rows;
    let factor = 1;
    if (rows[0] && /^(bohr|ang)/i.test(rows[0])) {
      factor = /^bohr/i.test(rows[0]) ? BOHR_ANGSTROM : 1;
      rows = rows.slice(1);
    }
    if (rows.length !== 3) throw fail(cell.line, `unit_cell_cart should hold three lattice vectors, found ${rows.length} lines`);
    lattice = rows.map((r, i) => nums(r, 3, cell.line + i, `lattice vector ${i + 1}`).map((x) => x * factor)) as Mat3;
    if (Math.abs(det3(lattice)) < 1e-10) throw fail(cell.line, 'the lattice vectors in unit_cell_cart are linearly dependent');
  }
  let structure: Structure | null = null;
  const frac = block('atoms_frac');
  const cart = block('atoms_cart');
  if (lattice && (frac || cart)) {
    const b = (frac ?? cart)!;
    let rows = b.rows;
    let factor = 1;
    if (!frac && rows[0] && /^(bohr|ang)/i.test(rows[0])) {
      factor = /^bohr/i.test(rows[0]) ? BOHR_ANGSTROM : 1;
      rows = rows.slice(1);
    }
    const species: string[] = [];
    const positions = new Float64Array(3 * rows.length);
    const inv = frac ? null : mat3Inverse(lattice);
    rows.forEach((r, i) => {
      const p = nums(r, 3, b.line + i, `atom ${i + 1}`).map((x) => x * factor) as Vec3;
      species.push(r.split(/\s+/)[0]!.replace(/[0-9_].*$/, ''));
      positions.set(inv ? mulVecMat(p, inv) : p, 3 * i);
    });
    structure = { lattice, species, positions };
  }
  const nw = keyword('num_wann');
  const sp = keyword('spinors');
  const ef = keyword('fermi_energy');
  return {
    lattice,
    structure,
    spinors: sp === null ? null : /^(\.?t|true)/i.test(sp),
    fermiEnergy: ef === null ? null : parseDecimal(ef.split(/\s+/)[0]!),
    numWann: nw === null ? null : parseDecimal(nw.split(/\s+/)[0]!),
  };
}
