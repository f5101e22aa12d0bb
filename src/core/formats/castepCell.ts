/**
 * CASTEP's .cell input (the code's documented free-format layout): the cell from `%BLOCK LATTICE_CART` (three
 * rows) or `%BLOCK LATTICE_ABC` (a b c, then α β γ in degrees), and the atoms from `%BLOCK POSITIONS_FRAC` or
 * `%BLOCK POSITIONS_ABS` (species and three numbers per line). A block may start with a unit line (ang, bohr,
 * a0, nm, m, cm; Å when absent). Keywords are case-insensitive; `#`, `!` and `;` start comments; a species may
 * carry a label after a colon ("Si:1"). Only what the structure needs is read; everything else is left alone.
 * Hostile input: counts bounded, numbers finite, the cell not degenerate; errors name the line.
 */
import type { BandStructure, Mat3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import { sha256Hex } from '../hash';
import { ReaderError } from '../errors';
import { decodeText } from './textScanner';
import { parseDecimal } from './numbers';
import { BOHR_ANGSTROM } from '../units';
import { det3, mat3Inverse } from '../lattice/linalg';

export const CASTEP_CELL_FORMAT = 'castep-cell';

/** Most atoms read from a .cell (far above any cell an eigenvalue run uses). */
const MAX_ATOMS = 100_000;

const UNITS: Record<string, number> = { ang: 1, bohr: BOHR_ANGSTROM, a0: BOHR_ANGSTROM, nm: 10, m: 1e10, cm: 1e8 };

/** The structure of a .cell: the cell in Å (null when the file gives none), species, fractional positions. */
export interface CastepCell {
  lattice: Mat3 | null;
  species: string[];
  /** Fractional in `lattice` (POSITIONS_ABS converted with the file's own cell). */
  positions: Float64Array;
}

interface Line {
  n: number;
  words: string[];
}

export function detectCastepCell(head: Uint8Array): boolean {
  return /%block\s+(lattice_cart|lattice_abc|positions_frac|positions_abs)\b/i.test(decodeText(head, 0, Math.min(head.length, 65536)));
}

export function readCastepCell(file: InputFile): CastepCell {
  const fail = (line: number, reason: string): ReaderError => new ReaderError(CASTEP_CELL_FORMAT, file.path, { line, column: 1 }, reason);
  const lines: Line[] = decodeText(file.bytes, 0, file.bytes.length)
    .split(/\r?\n/)
    .map((t, i) => ({
      n: i + 1,
      words: t
        .replace(/[#!;].*$/, '')
        .trim()
        .split(/\s+/)
        .filter(Boolean),
    }));
  const blocks = new Map<string, Line[]>();
  for (let i = 0; i < lines.length; i++) {
    const w = lines[i]!.words;
    if (w[0]?.toLowerCase() !== '%block' || !w[1]) continue;
    const name = w[1].toLowerCase();
    const body: Line[] = [];
    let j = i + 1;
    for (; j < lines.length; j++) {
      const v = lines[j]!.words;
      if (v[0]?.toLowerCase() === '%endblock') break;
      if (v.length) body.push(lines[j]!);
      if (body.length > MAX_ATOMS + 2) throw fail(lines[i]!.n, `the block ${w[1]} holds more than ${MAX_ATOMS} lines`);
    }
    if (j >= lines.length) throw fail(lines[i]!.n, `the block ${w[1]} has no %ENDBLOCK`);
    if (blocks.has(name)) throw fail(lines[i]!.n, `the block ${w[1]} is given twice`);
    blocks.set(name, body);
    i = j;
  }
  const numbersOf = (l: Line, from: number, count: number, what: string): number[] => {
    const out = l.words.slice(from, from + count).map((x) => parseDecimal(x.replace(/[dD]/, 'e')));
    if (out.length !== count || !out.every((x) => x !== null && Number.isFinite(x)))
      throw fail(l.n, `${what} should be ${count} numbers, found "${l.words.join(' ')}"`);
    return out as number[];
  };
  /** The block's unit (a line holding one unit word), then the other lines. */
  const withUnit = (body: Line[]): { scale: number; rows: Line[] } => {
    const first = body[0]?.words;
    if (first?.length === 1 && first[0]!.toLowerCase() in UNITS) return { scale: UNITS[first[0]!.toLowerCase()]!, rows: body.slice(1) };
    return { scale: 1, rows: body };
  };

  let lattice: Mat3 | null = null;
  const cart = blocks.get('lattice_cart');
  const abc = blocks.get('lattice_abc');
  if (cart && abc) throw fail(cart[0]?.n ?? 1, 'the file gives both LATTICE_CART and LATTICE_ABC');
  if (cart) {
    const { scale, rows } = withUnit(cart);
    if (rows.length !== 3) throw fail(cart[0]?.n ?? 1, `LATTICE_CART should hold three rows, found ${rows.length}`);
    lattice = rows.map((r) => numbersOf(r, 0, 3, 'a lattice vector').map((x) => x * scale)) as Mat3;
  } else if (abc) {
    const { scale, rows } = withUnit(abc);
    if (rows.length !== 2) throw fail(abc[0]?.n ?? 1, `LATTICE_ABC should hold two rows (a b c, α β γ), found ${rows.length}`);
    const [a, b, c] = numbersOf(rows[0]!, 0, 3, 'the lengths a b c').map((x) => x * scale) as [number, number, number];
    const [al, be, ga] = numbersOf(rows[1]!, 0, 3, 'the angles α β γ').map((x) => (x * Math.PI) / 180) as [number, number, number];
    // a along x, b in the xy plane (the usual construction of a cell from its lengths and angles).
    const cx = c * Math.cos(be);
    const cy = (c * (Math.cos(al) - Math.cos(be) * Math.cos(ga))) / Math.sin(ga);
    lattice = [
      [a, 0, 0],
      [b * Math.cos(ga), b * Math.sin(ga), 0],
      [cx, cy, Math.sqrt(Math.max(0, c * c - cx * cx - cy * cy))],
    ];
  }
  if (lattice && !(Math.abs(det3(lattice)) > 1e-6)) throw fail((cart ?? abc)![0]?.n ?? 1, 'the cell has no volume');

  const frac = blocks.get('positions_frac');
  const abs = blocks.get('positions_abs');
  if (frac && abs) throw fail(frac[0]?.n ?? 1, 'the file gives both POSITIONS_FRAC and POSITIONS_ABS');
  const block = frac ?? abs;
  if (!block) throw fail(1, 'the file has no POSITIONS_FRAC or POSITIONS_ABS block: the atoms are unknown');
  const { scale, rows } = frac ? { scale: 1, rows: block } : withUnit(block);
  if (rows.length === 0) throw fail(block[0]?.n ?? 1, 'the positions block lists no atoms');
  const species: string[] = [];
  const positions = new Float64Array(3 * rows.length);
  const inverse = abs ? (lattice ? mat3Inverse(lattice) : null) : null;
  if (abs && !inverse)
    throw fail(abs[0]?.n ?? 1, 'POSITIONS_ABS needs the cell (LATTICE_CART or LATTICE_ABC) to give fractional positions');
  rows.forEach((r, i) => {
    const name = (r.words[0] ?? '').split(':')[0]!;
    // An element symbol or label, or an atomic number (only equality of species matters here).
    if (!/^([A-Za-z][A-Za-z0-9_]{0,15}|[1-9]\d{0,2})$/.test(name)) throw fail(r.n, `"${r.words[0] ?? ''}" is not a species`);
    species.push(name);
    let p = numbersOf(r, 1, 3, 'a position');
    if (inverse) {
      const x = p.map((v) => v * scale);
      // Fractional f with x = f · L (rows of L the cell vectors): f = x · L⁻¹.
      p = [0, 1, 2].map((j) => x[0]! * inverse[0][j]! + x[1]! * inverse[1][j]! + x[2]! * inverse[2][j]!);
    }
    positions.set(p, 3 * i);
  });
  return { lattice, species, positions };
}

/**
 * A CASTEP run (.bands: the cell, no atoms) with the atoms of its .cell: fractional positions in the run's own
 * cell. A .cell whose cell differs from the run's (a geometry optimisation's input) is said so; one that cannot be
 * read is a warning, never an error (the run is read without atoms, as before).
 */
export function withCastepCell(bs: BandStructure, cellFile: InputFile): BandStructure {
  let cell: CastepCell;
  try {
    cell = readCastepCell(cellFile);
  } catch (e) {
    if (!(e instanceof ReaderError)) throw e;
    bs.warnings.push({
      code: 'structure-unreadable',
      message: `${e.message}; the structure was not used`,
      file: cellFile.path,
      line: e.line,
    });
    return bs;
  }
  if (!bs.lattice) return bs;
  const warnings = bs.warnings.filter((w) => w.code !== 'no-structure');
  if (cell.lattice && !sameMetric(cell.lattice, bs.lattice)) {
    warnings.push({
      code: 'structure-cell-differs',
      message: `The cell of ${basename(cellFile.path)} differs from the one the eigenvalue file gives (an input before a geometry optimisation?): its atoms' fractional positions are placed in the eigenvalue file's cell.`,
      file: cellFile.path,
    });
  }
  return {
    ...bs,
    structure: { lattice: bs.lattice, species: cell.species, positions: cell.positions },
    source: { ...bs.source, files: [...bs.source.files, { role: 'structure', path: cellFile.path, sha256: sha256Hex(cellFile.bytes) }] },
    warnings,
  };
}

/** Same lengths and angles (Gram matrices within 0.1 %): cells that differ only by orientation are the same. */
function sameMetric(a: Mat3, b: Mat3): boolean {
  const g = (m: Mat3, i: number, j: number): number => m[i]![0] * m[j]![0] + m[i]![1] * m[j]![1] + m[i]![2] * m[j]![2];
  const scale = Math.max(g(b, 0, 0), g(b, 1, 1), g(b, 2, 2));
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) if (Math.abs(g(a, i, j) - g(b, i, j)) > 1e-3 * scale) return false;
  return true;
}
