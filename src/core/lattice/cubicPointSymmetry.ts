/**
 * The symmetry operations of a crystal on a cubic lattice, found without the crystal-symmetry library. A cubic
 * lattice has the 48 operations of m-3m, the most any lattice has; a search over integer matrices with entries
 * −1, 0, 1 (latticePointGroup.ts) that finds 48 has therefore missed none. The crystal keeps those that map every
 * atom onto an atom of the same species after some translation (common practice: a space-group operation {W|t}
 * sends atom 0 to one of its own species, so t is one of those differences; each is then checked on all atoms).
 *
 * Only clear cases are answered: the lattice shows exactly 48 operations at a tenth and at ten times the position
 * tolerance, every operation maps the atoms to within a tenth of it or misses by more than ten times it, and the
 * cell is primitive (no translation alone maps the crystal onto itself). Anything else returns null, and the
 * caller asks the library. Pure.
 */
import type { Mat3, Structure, Vec3 } from '../model';
import { latticeOperations } from './latticePointGroup';
import { det3 } from './linalg';

/** The most atoms checked this way (the check grows as 48 × atoms³). */
const MOST_ATOMS = 64;

export interface CubicOperations {
  /** Rotations W acting on fractional coordinates (x → W x + t), in the order the lattice search finds them. */
  rotations: Mat3[];
  /** The translation of each, fractional, in [0, 1). */
  translations: Vec3[];
}

/** The crystal's operations when its lattice is cubic and every decision is clear; null otherwise. */
export function cubicCrystalOperations(structure: Structure, symprec: number): CubicOperations | null {
  const n = structure.species.length;
  const x = structure.positions;
  if (n === 0 || n > MOST_ATOMS || x.length !== 3 * n || !(symprec > 0)) return null;
  const cell = structure.lattice;
  const tight = latticeOperations(cell, 0.1 * symprec, 48);
  const loose = latticeOperations(cell, 10 * symprec, 48);
  if (!tight || !loose || tight.length !== 48 || loose.length !== 48) return null;
  const kind = speciesKinds(structure.species);
  const near = 0.1 * symprec;
  const far = 10 * symprec;
  const rotations: Mat3[] = [];
  const translations: Vec3[] = [];
  for (const w of tight) {
    let best = Infinity;
    let bestT: Vec3 | null = null;
    const w0 = apply(w, x, 0);
    const identity = isIdentity(w);
    for (let j = 0; j < n; j++) {
      if (kind[j] !== kind[0]) continue;
      const t: Vec3 = [x[3 * j]! - w0[0], x[3 * j + 1]! - w0[1], x[3 * j + 2]! - w0[2]];
      const pureTranslation = identity && j !== 0;
      const d = worstMiss(cell, w, t, x, kind, n, pureTranslation ? far : best);
      if (pureTranslation) {
        // A pure translation that maps the crystal onto itself: the cell is not primitive (or it is unclear).
        if (d <= far) return null;
        continue;
      }
      if (d < best) {
        best = d;
        bestT = t;
      }
    }
    if (best <= near && bestT) {
      rotations.push(w);
      translations.push(bestT.map((v) => v - Math.floor(v)).map((v) => (v >= 1 ? 0 : v + 0)) as Vec3);
    } else if (!(best > far)) return null;
  }
  return { rotations, translations };
}

/** Equal species names, equal kinds (0, 1, ...). */
function speciesKinds(species: readonly string[]): Int32Array {
  const ids = new Map<string, number>();
  const out = new Int32Array(species.length);
  species.forEach((s, i) => {
    const key = s.trim();
    let id = ids.get(key);
    if (id === undefined) ids.set(key, (id = ids.size));
    out[i] = id;
  });
  return out;
}

function apply(w: Mat3, x: Float64Array, i: number): Vec3 {
  const a = x[3 * i]!;
  const b = x[3 * i + 1]!;
  const c = x[3 * i + 2]!;
  return [w[0][0] * a + w[0][1] * b + w[0][2] * c, w[1][0] * a + w[1][1] * b + w[1][2] * c, w[2][0] * a + w[2][1] * b + w[2][2] * c];
}

function isIdentity(w: Mat3): boolean {
  return w.every((r, i) => r.every((v, j) => v === (i === j ? 1 : 0)));
}

/**
 * The largest distance (Å) from an image W x_i + t to the nearest atom of the same species (differences taken to
 * the nearest lattice vector by rounding), over all atoms; stops once it exceeds `stopAbove`.
 */
function worstMiss(cell: Mat3, w: Mat3, t: Vec3, x: Float64Array, kind: Int32Array, n: number, stopAbove: number): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    const p = apply(w, x, i);
    let nearest = Infinity;
    for (let m = 0; m < n; m++) {
      if (kind[m] !== kind[i]) continue;
      let d0 = p[0] + t[0] - x[3 * m]!;
      let d1 = p[1] + t[1] - x[3 * m + 1]!;
      let d2 = p[2] + t[2] - x[3 * m + 2]!;
      d0 -= Math.round(d0);
      d1 -= Math.round(d1);
      d2 -= Math.round(d2);
      const cx = d0 * cell[0][0] + d1 * cell[1][0] + d2 * cell[2][0];
      const cy = d0 * cell[0][1] + d1 * cell[1][1] + d2 * cell[2][1];
      const cz = d0 * cell[0][2] + d1 * cell[1][2] + d2 * cell[2][2];
      const d = Math.sqrt(cx * cx + cy * cy + cz * cz);
      if (d < nearest) nearest = d;
    }
    if (nearest > worst) worst = nearest;
    if (worst > stopAbove) return worst;
  }
  return worst;
}

/** Conventional cubic cells per primitive cell's lattice points: P 1, I 2, F 4. */
const CUBIC_CENTRINGS = [
  { bravaisClass: 'cP', points: 1 },
  { bravaisClass: 'cI', points: 2 },
  { bravaisClass: 'cF', points: 4 },
] as const;

/**
 * The Bravais class and conventional edge (Å) of a crystal with a cubic point group (eight threefold rotations)
 * given in a primitive cell, from cubicCrystalOperations and the cell's shortest vector against its volume: the
 * shortest lattice vector of cP, cI, cF is a, a√3/2, a/√2 for a conventional cube of a³ = 1, 2, 4 primitive
 * volumes (common practice). Null when the operations are not settled here, the point group is not cubic (a
 * crystal of lower symmetry on a cubic lattice), or the ratio is not clearly one of the three.
 */
export function cubicBravais(structure: Structure, symprec: number): { bravaisClass: 'cP' | 'cI' | 'cF'; a: number } | null {
  const ops = cubicCrystalOperations(structure, symprec);
  if (!ops) return null;
  const threefold = ops.rotations.filter((w) => w[0][0] + w[1][1] + w[2][2] === 0 && det3(w) === 1).length;
  if (threefold !== 8) return null;
  const cell = structure.lattice;
  const volume = Math.abs(det3(cell));
  let shortest = Infinity;
  for (let i = -1; i <= 1; i++)
    for (let j = -1; j <= 1; j++)
      for (let l = -1; l <= 1; l++) {
        if (!i && !j && !l) continue;
        const v = [0, 1, 2].map((c) => i * cell[0][c]! + j * cell[1][c]! + l * cell[2][c]!);
        shortest = Math.min(shortest, Math.hypot(v[0]!, v[1]!, v[2]!));
      }
  for (const { bravaisClass, points } of CUBIC_CENTRINGS) {
    const a = Math.cbrt(points * volume);
    const expected = bravaisClass === 'cP' ? a : bravaisClass === 'cI' ? (a * Math.sqrt(3)) / 2 : a / Math.SQRT2;
    if (Math.abs(shortest - expected) < 1e-3 * expected) return { bravaisClass, a };
  }
  return null;
}
