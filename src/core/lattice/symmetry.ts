/**
 * Crystal symmetry of a structure, the star of a wave vector, and valley degeneracy.
 *
 * Operations come from `@spglib/moyo-wasm` (moyo, a general-purpose crystal-symmetry finder) in the basis of
 * the cell given: a real-space operation {W|t} maps fractional coordinates x to W x + t. A wave vector in
 * fractional reciprocal coordinates (column k, phase 2π k·x) is mapped by the same operation to (W⁻¹)ᵀ k.
 *
 * Valley degeneracy (physics.md §8): the number of distinct points of the star of k0 under the crystal's
 * point group together with time reversal (k → −k), points that differ by a reciprocal lattice vector
 * counted once. Zone-face points whose star members pair up modulo G (Ge's eight L half-valleys) thereby
 * count as full valleys (four).
 */
import type { Mat3, Structure, Vec3 } from '../model';
import { AnalysisError } from '../errors';
import { det3, mat3Inverse, mulMatVec, transpose3 } from './linalg';
import { ensureMoyoReady, moyoAnalyze, moyoReady, moyoSpaceGroupType, prepareMoyoOnDemand, type MoyoDataset } from './moyoRuntime';
import { cubicCrystalOperations } from './cubicPointSymmetry';
import { KeptByKey } from '../keptByKey';
export { moyoCompiledModule as symmetryCompiledModule } from './moyoRuntime';

export interface CrystalSymmetry {
  /** International Tables space-group number, 1–230. */
  spaceGroup: number;
  /** Hermann–Mauguin symbol as the library writes it, e.g. 'F d -3 m'. */
  hmSymbol: string;
  /** Integer rotation W of each operation, acting on fractional real-space coordinates (x → W x + t). */
  rotations: Mat3[];
  /** Translation t of each operation, fractional. */
  translations: Vec3[];
  /** Distinct rotations of `rotations`: the crystal's point group in the cell's fractional basis. */
  pointGroup: Mat3[];
  /** The point group acting on fractional reciprocal coordinates: (W⁻¹)ᵀ for each W of `pointGroup`. */
  reciprocalPointGroup: Mat3[];
  /** True when the point group contains the inversion (then time reversal adds nothing to a star). */
  centrosymmetric: boolean;
  /** Bravais class as in the International Tables, e.g. 'cF', 'hP', 'tI'. */
  bravaisClass: string;
  /** Crystal system, e.g. 'Cubic', 'Hexagonal', 'Trigonal'. */
  crystalSystem: string;
  /** Lattice points per given cell: 1 for a primitive cell, 4 for the conventional cell of an fcc crystal. */
  latticePointsPerCell: number;
  /**
   * Pure translations of the crystal inside the given cell (fractional, nonzero): the centring vectors of a
   * conventional cell, e.g. (0,½,½), (½,0,½), (½,½,0) for fcc. Empty for a primitive cell.
   */
  centringTranslations: Vec3[];
  /** Lattice rows (Å) of the cell the operations refer to. */
  lattice: Mat3;
  /** Distance tolerance used, Å. */
  symprec: number;
}

/** Default distance tolerance, Å: loose enough for positions written with 5–6 decimals. */
export const DEFAULT_SYMPREC = 1e-3;

/** Two fractional k-points closer than this (in every component, modulo 1) are the same point. */
export const K_TOLERANCE = 1e-5;

/** Load the symmetry library (once). `compiled`: its WebAssembly module compiled by another thread, when one has it. */
export async function ensureSymmetryReady(compiled?: WebAssembly.Module): Promise<void> {
  await ensureMoyoReady(compiled);
}

/**
 * Make the symmetry library usable without compiling it yet: in Node its bytes are read now and compiled on its
 * first use (a run that never needs it does not pay for it); elsewhere the same as ensureSymmetryReady.
 */
export async function prepareSymmetryOnDemand(): Promise<void> {
  await prepareMoyoOnDemand();
}

export function symmetryReady(): boolean {
  return moyoReady();
}

/** A 3×3 matrix from the library's flat, column-major layout. */
export function matFromColumnMajor(f: ArrayLike<number>): Mat3 {
  return [
    [f[0]!, f[3]!, f[6]!],
    [f[1]!, f[4]!, f[7]!],
    [f[2]!, f[5]!, f[8]!],
  ];
}

/** Lattice rows a1, a2, a3 from the library's flat basis (the three vectors one after another). */
export function latticeFromMoyo(f: ArrayLike<number>): Mat3 {
  return [
    [f[0]!, f[1]!, f[2]!],
    [f[3]!, f[4]!, f[5]!],
    [f[6]!, f[7]!, f[8]!],
  ];
}

/** Atomic species names to the integer kinds the library needs (equal names, equal kinds). */
function speciesNumbers(species: string[]): number[] {
  const ids = new Map<string, number>();
  return species.map((s) => {
    const key = s.trim();
    let id = ids.get(key);
    if (id === undefined) {
      id = ids.size + 1;
      ids.set(key, id);
    }
    return id;
  });
}

function describe(structure: Structure): string {
  const counts = new Map<string, number>();
  for (const s of structure.species) counts.set(s, (counts.get(s) ?? 0) + 1);
  return [...counts].map(([s, n]) => `${s}${n > 1 ? n : ''}`).join('') || 'empty cell';
}

/**
 * The cell as the library reads it (JSON), after checking the structure: the library's input exactly, so two
 * structures with equal text get equal results. Throws AnalysisError with a plain sentence.
 */
function moyoCellJson(structure: Structure, symprec: number): string {
  if (!moyoReady()) {
    throw new AnalysisError('Crystal symmetry is not available yet: the symmetry module has not been loaded (ensureSymmetryReady).');
  }
  const n = structure.species.length;
  if (n === 0) throw new AnalysisError('Cannot determine crystal symmetry: the structure has no atoms.');
  if (structure.positions.length !== 3 * n) {
    throw new AnalysisError(
      `Cannot determine crystal symmetry: the structure lists ${n} atoms but ${structure.positions.length / 3} positions.`,
    );
  }
  const lat = structure.lattice;
  const vol = det3(lat);
  if (!lat.every((r) => r.every(Number.isFinite)) || !Number.isFinite(vol) || Math.abs(vol) < 1e-8) {
    throw new AnalysisError('Cannot determine crystal symmetry: the lattice vectors are not finite or span no volume.');
  }
  if (!Array.from(structure.positions).every(Number.isFinite)) {
    throw new AnalysisError('Cannot determine crystal symmetry: some atomic positions are not finite numbers.');
  }
  if (!(symprec > 0)) throw new AnalysisError(`The symmetry tolerance must be a positive length in Å, got ${symprec}.`);
  const positions: [number, number, number][] = [];
  for (let i = 0; i < n; i++)
    positions.push([structure.positions[3 * i]!, structure.positions[3 * i + 1]!, structure.positions[3 * i + 2]!]);
  return JSON.stringify({ lattice: { basis: [...lat[0], ...lat[1], ...lat[2]] }, positions, numbers: speciesNumbers(structure.species) });
}

/** The library's dataset for a structure; throws AnalysisError with a plain sentence on failure. */
export function analyzeStructure(structure: Structure, symprec: number = DEFAULT_SYMPREC): MoyoDataset {
  const cellJson = moyoCellJson(structure, symprec);
  try {
    return moyoAnalyze(cellJson, symprec);
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    throw new AnalysisError(
      `Could not determine the crystal symmetry of the structure (${describe(structure)}, ${structure.species.length} atoms) with a tolerance of ${symprec} Å` +
        `${why ? ` (${why})` : ''}; check for overlapping atoms or try another tolerance.`,
    );
  }
}

const cache = new WeakMap<Structure, Map<number, CrystalSymmetry>>();

/**
 * Space group and operations of a structure. Synchronous once ensureSymmetryReady() has resolved. A batch of runs
 * of one crystal asks the library once: moyoAnalyze keeps its answers by exact input (moyoRuntime.ts).
 */
export function crystalSymmetry(structure: Structure, symprec: number = DEFAULT_SYMPREC): CrystalSymmetry {
  const hit = cache.get(structure)?.get(symprec);
  if (hit) return hit;
  const sym = symmetryFromDataset(structure, analyzeStructure(structure, symprec), symprec);
  let perStructure = cache.get(structure);
  if (!perStructure) cache.set(structure, (perStructure = new Map<number, CrystalSymmetry>()));
  perStructure.set(symprec, sym);
  return sym;
}

function symmetryFromDataset(structure: Structure, d: MoyoDataset, symprec: number): CrystalSymmetry {
  const rotations = d.operations.map((op) => matFromColumnMajor(op.rotation));
  const translations = d.operations.map((op) => [op.translation[0], op.translation[1], op.translation[2]] as Vec3);
  const type = moyoSpaceGroupType(d.number);
  const group = { spaceGroup: d.number, hmSymbol: d.hm_symbol, bravaisClass: type.bravais_class, crystalSystem: type.crystal_system };
  return { ...group, ...symmetryFromOperations(structure, rotations, translations, symprec) };
}

/** What the operations alone give (everything but the space-group type). */
type OperationSymmetry = Omit<CrystalSymmetry, 'spaceGroup' | 'hmSymbol' | 'bravaisClass' | 'crystalSystem'>;

function symmetryFromOperations(structure: Structure, rotations: Mat3[], translations: Vec3[], symprec: number): OperationSymmetry {
  const pointGroup: Mat3[] = [];
  const seen = new Set<string>();
  for (const w of rotations) {
    const key = w.flat().join(',');
    if (!seen.has(key)) {
      seen.add(key);
      pointGroup.push(w);
    }
  }
  const reciprocalPointGroup = pointGroup.map((w) => roundMat(transpose3(mat3Inverse(w))));
  const centrosymmetric = pointGroup.some((w) => w.every((r, i) => r.every((x, j) => x === (i === j ? -1 : 0))));
  const centringTranslations: Vec3[] = [];
  rotations.forEach((w, i) => {
    const t = translations[i]!;
    const identity = w.every((r, a) => r.every((x, b) => x === (a === b ? 1 : 0)));
    const wrapped = t.map((x) => x - Math.round(x)) as Vec3;
    if (identity && wrapped.some((x) => Math.abs(x) > 1e-6) && !centringTranslations.some((c) => sameModuloG(c, wrapped, 1e-6))) {
      centringTranslations.push(wrapped.map((x) => (x < -1e-9 ? x + 1 : x) + 0) as Vec3);
    }
  });
  return {
    rotations,
    translations,
    pointGroup,
    reciprocalPointGroup,
    centrosymmetric,
    latticePointsPerCell: Math.max(1, Math.round(rotations.length / pointGroup.length)),
    centringTranslations,
    lattice: structure.lattice,
    symprec,
  };
}

/**
 * The symmetry of a crystal on a cubic lattice from its operations alone (cubicPointSymmetry.ts), without the
 * library's search, when that check is clear; else crystalSymmetry. The space-group type (number, symbol, Bravais
 * class, crystal system) is asked of the library only when read. Valley counts and little groups of k need the
 * operations only.
 */
export function operationSymmetry(structure: Structure, symprec: number = DEFAULT_SYMPREC): CrystalSymmetry {
  // A batch of runs of one crystal: the answer kept by exact input, as the library's is (moyoRuntime.ts).
  const key = `${symprec} ${structure.lattice.flat().join(',')} ${structure.species.join(',')} ${structure.positions.join(',')}`;
  return operationAnswers.answer(key, () => operationSymmetryOf(structure, symprec));
}
const operationAnswers = new KeptByKey<CrystalSymmetry>(16);

function operationSymmetryOf(structure: Structure, symprec: number): CrystalSymmetry {
  const ops = cubicCrystalOperations(structure, symprec);
  if (!ops) return crystalSymmetry(structure, symprec);
  const sym = symmetryFromOperations(structure, ops.rotations, ops.translations, symprec);
  const full = (): CrystalSymmetry => crystalSymmetry(structure, symprec);
  return Object.defineProperties(sym, {
    spaceGroup: { get: () => full().spaceGroup, enumerable: true },
    hmSymbol: { get: () => full().hmSymbol, enumerable: true },
    bravaisClass: { get: () => full().bravaisClass, enumerable: true },
    crystalSystem: { get: () => full().crystalSystem, enumerable: true },
  }) as CrystalSymmetry;
}

function roundMat(m: Mat3): Mat3 {
  return m.map((r) => r.map((x) => Math.round(x) + 0)) as Mat3;
}

/** True when a and b differ by an integer vector (a reciprocal lattice vector), within K_TOLERANCE. */
export function sameModuloG(a: Vec3, b: Vec3, tol: number = K_TOLERANCE): boolean {
  for (let i = 0; i < 3; i++) {
    const d = a[i]! - b[i]!;
    if (Math.abs(d - Math.round(d)) > tol) return false;
  }
  return true;
}

/**
 * True when two k-points of the given cell differ by a reciprocal lattice vector of the crystal's primitive
 * lattice: an integer vector d (a reciprocal vector of the cell) with d·t integer for every centring
 * translation t. For a primitive cell this is sameModuloG.
 */
export function sameModuloCrystalG(sym: CrystalSymmetry, a: Vec3, b: Vec3, tol: number = K_TOLERANCE): boolean {
  if (!sameModuloG(a, b, tol)) return false;
  const d: Vec3 = [Math.round(a[0] - b[0]), Math.round(a[1] - b[1]), Math.round(a[2] - b[2])];
  return sym.centringTranslations.every((t) => {
    const p = d[0] * t[0] + d[1] * t[1] + d[2] * t[2];
    return Math.abs(p - Math.round(p)) < 1e-6;
  });
}

/** Images of k under the point group and time reversal, before removing duplicates (k first). */
function images(sym: CrystalSymmetry, k: Vec3): Vec3[] {
  const out: Vec3[] = [k];
  for (const r of sym.reciprocalPointGroup) {
    const q = mulMatVec(r, k);
    out.push(q, [-q[0], -q[1], -q[2]]);
  }
  return out;
}

/**
 * The star of k: its distinct images under the point group and time reversal (k → −k), points equal
 * modulo a reciprocal lattice vector counted once. k is in fractional reciprocal coordinates of the cell
 * the symmetry was found for; each member is returned as first generated (k itself comes first). "Modulo G"
 * means modulo the reciprocal lattice of the crystal's primitive lattice, also when the cell given is a
 * conventional one (e.g. the cubic cell of an fcc crystal, whose own zone folds the four L points onto one):
 * valleys are counted in the crystal's Brillouin zone, with k taken as written (cartesian k unchanged).
 */
export function starOfK(sym: CrystalSymmetry, k: Vec3, tol: number = K_TOLERANCE): Vec3[] {
  if (!k.every(Number.isFinite)) throw new AnalysisError('The star of k needs a finite k-point.');
  const star: Vec3[] = [];
  for (const q of images(sym, k)) {
    if (!star.some((s) => sameModuloCrystalG(sym, s, q, tol))) star.push([q[0] + 0, q[1] + 0, q[2] + 0]);
  }
  return star;
}

/**
 * Number of symmetry-equivalent valleys at k (the size of its star modulo G). For a fitted vertex k0 that
 * should sit on a special point but carries fit noise, pass a larger `tol` (fractional units, e.g. 1e-3):
 * images closer than `tol` are merged, so a point 1e-4 from L still counts 4 valleys, not 8.
 */
export function valleyDegeneracy(sym: CrystalSymmetry, k: Vec3, tol: number = K_TOLERANCE): number {
  return starOfK(sym, k, tol).length;
}

/** True when k2 is an image of k1 under the point group and time reversal, modulo G. */
export function equivalentK(sym: CrystalSymmetry, k1: Vec3, k2: Vec3, tol: number = K_TOLERANCE): boolean {
  return images(sym, k1).some((q) => sameModuloCrystalG(sym, q, k2, tol));
}
