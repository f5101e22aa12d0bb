/**
 * The crystal's symmetry as the mass engine needs it: the number of equivalent valleys at a k-point and
 * the little group of k in cartesian form. Null, with the reason, when no structure is known, the symmetry
 * module is not loaded, or the structure's cell is not the band structure's cell.
 */
import type { BandStructure, Mat3, Structure, Vec3 } from '../model';
import { crystalSymmetry, operationSymmetry, symmetryReady, valleyDegeneracy, type CrystalSymmetry } from '../lattice/symmetry';
import { cartesianOperation, littleGroup } from './symmetryTensor';
import { MAX_INTERPOLATION_POINTS } from '../interpolation/meshInterpolation';

export interface SymmetryContext {
  sym: CrystalSymmetry | null;
  /** Why there is no symmetry (said once per extremum). */
  unavailable: string | null;
}

/** Fractional tolerance for a sampled k-point (written to about 7 decimals, often fewer). */
const K_TOL = 2e-4;

function sameLattice(a: Mat3, b: Mat3): boolean {
  return a.every((r, i) => r.every((x, j) => Math.abs(x - b[i]![j]!) < 1e-4 * Math.max(1, Math.abs(x))));
}

/**
 * The crystal's symmetry for a run, found once per structure and cell: the analysis, the valley identities of
 * the annotations and the chosen-fit redo all ask for it. Cached by the structure object (the symmetry depends
 * on the structure alone; a run read again brings a new object).
 */
const contexts = new WeakMap<Structure, SymmetryContext>();
/** The same for runs the mesh interpolation does not take (their operations may come without the library). */
const pointContexts = new WeakMap<Structure, SymmetryContext>();

export function symmetryContext(bs: BandStructure): SymmetryContext {
  if (!bs.structure) return { sym: null, unavailable: 'No crystal structure is known: valley degeneracy cannot be determined.' };
  if (bs.lattice && !sameLattice(bs.lattice, bs.structure.lattice)) {
    return { sym: null, unavailable: "The structure's cell differs from the cell of the k-points: valley degeneracy was not determined." };
  }
  // Not cached: the module may be loaded by the next call.
  if (!symmetryReady())
    return { sym: null, unavailable: 'The crystal-symmetry module is not loaded: valley degeneracy was not determined.' };
  // A run that is not interpolated needs the operations only (valley counts, little groups of k): on a cubic
  // lattice without the library's search. Runs the mesh interpolation may take as listed keep the library's
  // operations (its stars are sums over them, in their order). A longer list is interpolated only when it is a
  // whole mesh (or half of one) whose equivalent points merge: most such lists are not, and the operations from
  // the lattice serve the merge and the interpolation as well (the same operations, in another order).
  const interpolated = bs.sampling !== 'path' && bs.nk <= MAX_INTERPOLATION_POINTS;
  const cache = interpolated ? contexts : pointContexts;
  const known = cache.get(bs.structure);
  if (known) return known;
  let ctx: SymmetryContext;
  try {
    ctx = { sym: interpolated ? crystalSymmetry(bs.structure) : operationSymmetry(bs.structure), unavailable: null };
  } catch (e) {
    ctx = { sym: null, unavailable: `${e instanceof Error ? e.message : String(e)} Valley degeneracy was not determined.` };
  }
  cache.set(bs.structure, ctx);
  return ctx;
}

/**
 * Results per crystal symmetry and k-point (several extrema often share a k: the bands meeting at Γ, the valence
 * and conduction extrema at L), and per lattice for the cartesian operations. Pure functions of their inputs.
 */
const valleyCounts = new WeakMap<CrystalSymmetry, Map<string, number>>();
const littleGroups = new WeakMap<CrystalSymmetry, WeakMap<Mat3, Map<string, Mat3[]>>>();
const coordText = (x: number): string => (Object.is(x, -0) ? '-0' : String(x));
const kText = (k: Vec3): string => `${coordText(k[0])},${coordText(k[1])},${coordText(k[2])}`;

export function valleysAt(ctx: SymmetryContext, k: Vec3): number | null {
  const sym = ctx.sym;
  if (!sym) return null;
  let known = valleyCounts.get(sym);
  if (!known) valleyCounts.set(sym, (known = new Map<string, number>()));
  const key = kText(k);
  let n = known.get(key);
  if (n === undefined) known.set(key, (n = valleyDegeneracy(sym, k, K_TOL)));
  return n;
}

/** The little group of k (with time reversal) as cartesian operations (a new list each call; the operations are shared: do not change them). */
export function cartesianLittleGroup(ctx: SymmetryContext, k: Vec3, lattice: Mat3): Mat3[] | null {
  const sym = ctx.sym;
  if (!sym) return null;
  let perLattice = littleGroups.get(sym);
  if (!perLattice) littleGroups.set(sym, (perLattice = new WeakMap<Mat3, Map<string, Mat3[]>>()));
  let known = perLattice.get(lattice);
  if (!known) perLattice.set(lattice, (known = new Map<string, Mat3[]>()));
  const key = kText(k);
  let ops = known.get(key);
  if (!ops) known.set(key, (ops = littleGroup(sym.reciprocalPointGroup, k, K_TOL).map((r) => cartesianOperation(r, lattice))));
  return [...ops];
}
