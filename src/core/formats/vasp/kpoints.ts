/**
 * VASP KPOINTS in line mode: the ends of each path segment with their `!` labels.
 * Other KPOINTS modes (automatic meshes, explicit lists) give no path and are reported as such.
 */
import type { Mat3, Vec3 } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { TextScanner } from '../textScanner';
import { normaliseLabel } from '../../lattice/labels';

export const KPOINTS_FORMAT = 'vasp-kpoints';

export interface LineModePath {
  pointsPerSegment: number;
  /** 'reciprocal' (fractional) or 'cartesian' (units of 2π/scale, needs the POSCAR). */
  coordinates: 'reciprocal' | 'cartesian';
  /** Segment ends as written, pairs [start, end] per segment. */
  ends: { k: Vec3; label: string | null; line: number }[];
}

export type KpointsContent = { mode: 'line'; path: LineModePath } | { mode: 'other'; description: string };

/** Largest |coordinate| of a path end accepted (fractional or 2π/scale units); see kpointSanity.ts. */
const MAX_PATH_COORDINATE = 1000;

/** Bytes that never occur in a text KPOINTS: NUL and the C0 controls other than tab, newline, CR, form feed. */
function binaryAt(bytes: Uint8Array): number {
  const n = Math.min(bytes.length, 4096);
  for (let i = 0; i < n; i++) {
    const b = bytes[i]!;
    if (b < 32 && b !== 9 && b !== 10 && b !== 12 && b !== 13) return i;
  }
  return -1;
}

export function readKpoints(file: InputFile): KpointsContent {
  const sc = new TextScanner(file.bytes, file.path, KPOINTS_FORMAT);
  if (sc.atEnd()) throw sc.error('the k-points file is empty');
  if (binaryAt(file.bytes) >= 0) {
    throw sc.error(
      'KPOINTS is not a text file (it holds binary bytes): the k-point layout could not be read, so the run is treated as having no KPOINTS',
      0,
      0,
    );
  }
  sc.restOfLine();
  const nLine = sc.line;
  const n = sc.tryNumberAfterSpaces();
  sc.nextLine();
  const modeLine = sc.line;
  const mode = sc.restOfLine().trim();
  if (!/^[lL]/.test(mode)) {
    if (n === null || !Number.isSafeInteger(n) || n < 0) {
      throw sc.error(
        'line 2 of KPOINTS should hold the number of k-points (0 for an automatic mesh): the k-point layout could not be read',
        nLine,
        1,
      );
    }
    return { mode: 'other', description: n === 0 ? 'an automatic k-point mesh' : 'an explicit list of k-points' };
  }
  if (n === null || !Number.isSafeInteger(n) || n < 2) {
    throw sc.error('line mode needs the number of points per segment (2 or more) on line 2', nLine, 1);
  }
  const coordText = sc.restOfLine().trim();
  let coordinates: 'reciprocal' | 'cartesian';
  if (/^[rR]/.test(coordText)) coordinates = 'reciprocal';
  else if (/^[cCkK]/.test(coordText)) coordinates = 'cartesian';
  else throw sc.error(`expected "Reciprocal" or "Cartesian" after "${mode}", found "${coordText}"`, modeLine + 1, 1);
  const ends: LineModePath['ends'] = [];
  for (;;) {
    sc.skipBlankLines();
    if (sc.atEnd()) break;
    const line = sc.line;
    const k: Vec3 = [sc.number('a path end k-point (1st)'), sc.number('a path end k-point (2nd)'), sc.number('a path end k-point (3rd)')];
    if (k.some((x) => Math.abs(x) > MAX_PATH_COORDINATE))
      throw sc.error(`a path end has a coordinate beyond ±${MAX_PATH_COORDINATE}: not a k-point of a calculation`, line, 1);
    let rest = sc.restOfLine().trim();
    if (rest.startsWith('!')) rest = rest.slice(1).trim();
    // A weight column may precede the label in some hand-written files.
    const toks = rest.split(/\s+/).filter(Boolean);
    while (toks.length > 1 && /^[+-]?\d*\.?\d+$/.test(toks[0]!)) toks.shift();
    if (toks[0] === '!') toks.shift();
    const label = toks.length > 0 ? normaliseLabel(toks.join(' ').replace(/^!\s*/, '')) : null;
    ends.push({ k, label, line });
  }
  if (ends.length < 2) throw sc.error('line mode needs at least one segment (two end points)');
  if (ends.length % 2 !== 0) {
    throw sc.error(
      `line mode lists ${ends.length} end points; segments need them in pairs (the last one has no partner)`,
      ends[ends.length - 1]!.line,
      1,
    );
  }
  return { mode: 'line', path: { pointsPerSegment: n, coordinates, ends } };
}

/** Convert KPOINTS cartesian coordinates (units of 2π/s, s the POSCAR scale) to fractional. */
export function kpointsCartesianToFractional(v: Vec3, latticeOverScale: Mat3): Vec3 {
  return [
    v[0] * latticeOverScale[0][0] + v[1] * latticeOverScale[0][1] + v[2] * latticeOverScale[0][2],
    v[0] * latticeOverScale[1][0] + v[1] * latticeOverScale[1][1] + v[2] * latticeOverScale[1][2],
    v[0] * latticeOverScale[2][0] + v[1] * latticeOverScale[2][1] + v[2] * latticeOverScale[2][2],
  ];
}
