/**
 * VASP POSCAR / CONTCAR: the crystal structure beside a run.
 * Handles both header variants (with and without the species line), Direct and Cartesian positions,
 * a negative scale (the cell volume in Å³), three per-axis scale factors, and Selective dynamics.
 */
import type { Mat3, Structure, Vec3 } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { TextScanner } from '../textScanner';
import { det3, mat3Inverse, mulVecMat } from '../../lattice/linalg';
import { checkAnnouncedCount } from '../announcedCount';

/** Largest cell edge accepted, Å: far beyond any periodic calculation (common practice: cells of 1–100 Å). */
const MAX_CELL_EDGE_ANGSTROM = 1e4;
/** Bytes of the shortest position line, "0 0 0" and a newline. */
const MIN_POSITION_LINE_BYTES = 6;

export const POSCAR_FORMAT = 'vasp-poscar';

export function readPoscar(file: InputFile): Structure {
  return readPoscarWithScale(file).structure;
}

/** The structure and the universal length scale s (KPOINTS cartesian coordinates are in units of 2π/s). */
export function readPoscarWithScale(file: InputFile): { structure: Structure; scale: number } {
  const sc = new TextScanner(file.bytes, file.path, POSCAR_FORMAT);
  if (sc.atEnd()) throw sc.error('the structure file is empty');
  const comment = sc.restOfLine();
  const scaleLine = sc.line;
  const s1 = sc.number('the scaling factor');
  let scales: Vec3 = [s1, s1, s1];
  if (!sc.atEol()) {
    const s2 = sc.number('the second scaling factor');
    const s3 = sc.number('the third scaling factor');
    scales = [s1, s2, s3];
  }
  sc.nextLine();
  const raw: Vec3[] = [];
  for (let i = 0; i < 3; i++) {
    const v: Vec3 = [
      sc.number(`lattice vector a${i + 1} (x)`),
      sc.number(`lattice vector a${i + 1} (y)`),
      sc.number(`lattice vector a${i + 1} (z)`),
    ];
    raw.push(v);
    sc.nextLine();
  }
  let lattice: Mat3;
  let lengthScale = scales[0];
  if (scales[0] < 0 && scales[1] === scales[0] && scales[2] === scales[0]) {
    // Negative scale: the volume of the cell in Å³.
    const vol = Math.abs(det3(raw as Mat3));
    if (vol === 0) throw sc.error('the lattice vectors are linearly dependent (zero cell volume)', scaleLine + 1, 1);
    const f = Math.cbrt(-scales[0] / vol);
    lengthScale = f;
    lattice = raw.map((r) => r.map((x) => x * f)) as Mat3;
  } else {
    if (scales.some((x) => x <= 0)) throw sc.error('per-axis scaling factors must be positive', scaleLine, 1);
    lattice = raw.map((r) => r.map((x, j) => x * scales[j]!)) as Mat3;
  }
  if (!lattice.every((r) => r.every((x) => Number.isFinite(x) && Math.abs(x) <= MAX_CELL_EDGE_ANGSTROM))) {
    throw sc.error(
      `a lattice vector component (after scaling) is not finite or larger than ${MAX_CELL_EDGE_ANGSTROM} Å: not the cell of a calculation`,
      scaleLine + 1,
      1,
    );
  }
  if (Math.abs(det3(lattice)) < 1e-8) throw sc.error('the lattice vectors are linearly dependent (zero cell volume)', scaleLine + 1, 1);

  // Species line (VASP 5+) or counts directly (VASP 4).
  sc.skipSpaces();
  let names: string[] | null = null;
  const first = sc.bytes[sc.pos];
  const speciesLine = sc.line;
  if (first !== undefined && !(first >= 48 && first <= 57)) {
    names = [];
    for (let t = sc.token(); t !== null; t = sc.token()) {
      // VASP 6 may write "Si/abc123" (POTCAR hash): keep the element.
      names.push(t.split(/[/_]/)[0]!);
    }
    sc.nextLine();
  }
  const counts: number[] = [];
  const countsLine = sc.line;
  while (!sc.atEol()) {
    const c = sc.integer('the number of atoms of a species');
    if (c < 0) throw sc.error(`a species has ${c} atoms; counts cannot be negative`, countsLine, 0);
    counts.push(c);
  }
  if (counts.length === 0) throw sc.error('expected the numbers of atoms per species');
  if (names && names.length !== counts.length) {
    throw sc.error(`the species line names ${names.length} species but ${counts.length} atom counts follow`, speciesLine, 1);
  }
  sc.nextLine();
  if (!names) {
    // VASP 4 layout: the species may be in the comment line.
    const fromComment = comment
      .trim()
      .split(/\s+/)
      .filter((t) => /^[A-Z][a-z]?$/.test(t));
    names = fromComment.length === counts.length ? fromComment : counts.map((_, i) => `X${i + 1}`);
  }
  let mode = sc.token();
  if (mode && /^[sS]/.test(mode)) {
    sc.nextLine();
    mode = sc.token();
  }
  if (!mode) throw sc.error('expected "Direct" or "Cartesian" before the positions');
  const cartesian = /^[cCkK]/.test(mode);
  if (!cartesian && !/^[dD]/.test(mode)) throw sc.error(`expected "Direct" or "Cartesian", found "${mode}"`);
  sc.nextLine();
  const nAtoms = counts.reduce((a, b) => a + b, 0);
  if (nAtoms === 0) throw sc.error('the atom counts add up to zero: the structure has no atoms', countsLine, 0);
  // Before allocating: the positions that follow must be able to hold that many atoms.
  checkAnnouncedCount(sc, nAtoms, MIN_POSITION_LINE_BYTES, 'atoms', countsLine);
  const positions = new Float64Array(nAtoms * 3);
  const species: string[] = [];
  counts.forEach((c, i) => {
    for (let j = 0; j < c; j++) species.push(names[i]!);
  });
  const inv = cartesian ? mat3Inverse(lattice) : null;
  for (let a = 0; a < nAtoms; a++) {
    if (sc.atEnd()) throw sc.error(`the file ends after ${a} of ${nAtoms} atomic positions (it may be truncated)`);
    const p: Vec3 = [
      sc.number(`position of atom ${a + 1} (1st coordinate)`),
      sc.number(`position of atom ${a + 1} (2nd coordinate)`),
      sc.number(`position of atom ${a + 1} (3rd coordinate)`),
    ];
    if (!p.every((x) => Math.abs(x) <= MAX_CELL_EDGE_ANGSTROM))
      throw sc.error(`the position of atom ${a + 1} is larger than ${MAX_CELL_EDGE_ANGSTROM}: not a position in a cell`);
    let f = p;
    if (inv) f = mulVecMat([p[0] * lengthScale, p[1] * lengthScale, p[2] * lengthScale], inv);
    positions.set(f, 3 * a);
    sc.nextLine();
  }
  return { structure: { lattice, species, positions }, scale: lengthScale };
}
