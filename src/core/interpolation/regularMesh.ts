/**
 * Recognising a regular (Monkhorst–Pack or Γ-centred) k-mesh from the irreducible points a code wrote, and
 * expanding them to the full mesh with the crystal's point group and time reversal (k → −k).
 *
 * A mesh n1×n2×n3 with shift s (each 0 or ½) holds k = (j + s)/n per axis (fractional reciprocal
 * coordinates). The irreducible points must, once expanded by the operations, land on the mesh, cover each
 * mesh point exactly once, and carry weights proportional to their star sizes (the number of mesh points
 * each stands for): a weight that disagrees means the code used other operations than the crystal's (a
 * magnetic or lower-symmetry run), and the expansion is refused with that reason.
 */
import type { Mat3 } from '../model';
import type { MeshRefusal } from './meshRefusal';

export interface RegularMesh {
  /**
   * Only with `mergeEquivalent`: for each listed point, the earlier listed point it is equivalent to by symmetry
   * (−1 for the first of its star). Absent when no two listed points are equivalent.
   */
  duplicateOf?: Int32Array;
  divisions: [number, number, number];
  /** 0 or ½ per axis. */
  shift: [number, number, number];
  /** n1 n2 n3. */
  total: number;
  /** For each mesh point j = j1 n2 n3 + j2 n3 + j3: the irreducible point it is an image of. */
  irreducibleOf: Int32Array;
  /** For each irreducible point: how many mesh points it stands for. */
  starSize: Int32Array;
}

export type MeshRecognition =
  { mesh: RegularMesh; reason: null; kind?: undefined } | ({ mesh: null } & MeshRefusal & { kind: 'not-a-mesh' | 'weights' | 'too-many' });

/** Largest number of divisions per axis considered, and of mesh points expanded. */
export const MAX_DIVISIONS = 400;
export const MAX_MESH_POINTS = 4_000_000;
/** A component within this of (j + s)/n is on the mesh (k-points are often written with 6–8 decimals). */
const ON_MESH = 2e-5;

function images(k: readonly number[], ops: readonly Mat3[]): number[][] {
  const out: number[][] = [];
  for (const r of ops) {
    const q = [0, 1, 2].map((i) => r[i]![0] * k[0]! + r[i]![1] * k[1]! + r[i]![2] * k[2]!);
    out.push(
      q,
      q.map((x) => -x),
    );
  }
  return out;
}

/** The point group given, or the identity alone when none is (no symmetry known). */
function opsOrIdentity(reciprocalOps: readonly Mat3[]): Mat3[] {
  if (reciprocalOps.length > 0) return [...reciprocalOps];
  return [
    [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ],
  ];
}

function offMesh(x: number, n: number, s: number): number {
  const y = x * n - s;
  return Math.abs(y - Math.round(y)) / n;
}

/**
 * `kFrac`: nk × 3 fractional k-points; `weights`: their weights (any normalisation) or null; `reciprocalOps`:
 * the point group acting on fractional k (CrystalSymmetry.reciprocalPointGroup).
 */
export function recogniseMesh(
  kFrac: Float64Array,
  weights: ArrayLike<number> | null,
  reciprocalOps: readonly Mat3[],
  options: { mergeEquivalent?: boolean; listedFirst?: boolean } = {},
): MeshRecognition {
  const nk = kFrac.length / 3;
  if (!Number.isInteger(nk) || nk < 1) return { mesh: null, kind: 'not-a-mesh', reason: 'There are no k-points.' };
  if (!Array.from(kFrac).every(Number.isFinite)) return { mesh: null, kind: 'not-a-mesh', reason: 'Some k-points are not finite numbers.' };
  if (options.listedFirst) {
    const refused = listedPointsRefusal(kFrac);
    if (refused) return refused;
  }
  const ops = opsOrIdentity(reciprocalOps);
  // Every image (each operation, and its negative) of every point, flat: point i's images at i·per .. (i+1)·per − 1.
  const per = 2 * ops.length;
  const all = allImages(kFrac, Float64Array.from(ops.flatMap((r) => [...r[0], ...r[1], ...r[2]])));
  const divisions: number[] = [];
  const shift: number[] = [];
  for (let axis = 0; axis < 3; axis++) {
    const along = meshAlong(all, axis);
    if (!along) {
      return {
        mesh: null,
        kind: 'not-a-mesh',
        reason: `Along reciprocal axis ${axis + 1} the k-points (with their symmetry images) lie on no regular mesh of up to ${MAX_DIVISIONS} divisions.`,
      };
    }
    divisions.push(along.n);
    shift.push(along.s);
  }
  const [n1, n2, n3] = divisions as [number, number, number];
  const total = n1 * n2 * n3;
  if (total > MAX_MESH_POINTS)
    return { mesh: null, kind: 'too-many', reason: `The mesh ${n1}×${n2}×${n3} has more than ${MAX_MESH_POINTS} points.` };
  const irreducibleOf = new Int32Array(total).fill(-1);
  const starSize = new Int32Array(nk);
  // A point whose first image belongs to an earlier point's star lies wholly in it (stars are disjoint).
  const duplicates = options.mergeEquivalent ? new Int32Array(nk).fill(-1) : null;
  const clash = markImages(all, per, [n1, n2, n3], shift, irreducibleOf, starSize, duplicates);
  if (clash) {
    return {
      mesh: null,
      kind: 'not-a-mesh',
      reason: `k-points ${clash[0] + 1} and ${clash[1] + 1} are equivalent by symmetry: the list is not an irreducible set for this crystal.`,
    };
  }
  const duplicateOf = duplicates && duplicates.some((d) => d >= 0) ? duplicates : null;
  let missing = 0;
  for (let j = 0; j < total; j++) if (irreducibleOf[j] === -1) missing++;
  if (missing > 0) {
    return {
      mesh: null,
      kind: 'not-a-mesh',
      reason: `Expanded by symmetry, the k-points leave ${missing} of the ${total} points of the ${n1}×${n2}×${n3} mesh uncovered.`,
    };
  }
  if (weights) {
    if (weights.length !== nk) return { mesh: null, kind: 'weights', reason: `There are ${weights.length} weights for ${nk} k-points.` };
    let sum = 0;
    for (let i = 0; i < nk; i++) {
      const w = weights[i]!;
      if (!Number.isFinite(w) || w < 0)
        return { mesh: null, kind: 'weights', reason: `The weight of k-point ${i + 1} is not a finite non-negative number.` };
      sum += w;
    }
    if (!(sum > 0)) return { mesh: null, kind: 'weights', reason: 'The k-point weights do not add up to a positive number.' };
    // Points equivalent to an earlier one (merged) add their weight to its star's.
    const starWeight = Float64Array.from({ length: nk }, (_, i) => weights[i]!);
    if (duplicateOf) {
      for (let i = 0; i < nk; i++) {
        if (duplicateOf[i]! >= 0) {
          starWeight[duplicateOf[i]!]! += starWeight[i]!;
          starWeight[i] = 0;
        }
      }
    }
    for (let i = 0; i < nk; i++) {
      if (duplicateOf && duplicateOf[i]! >= 0) continue;
      const expected = starSize[i]! / total;
      const got = starWeight[i]! / sum;
      if (Math.abs(got - expected) > 1e-3 * expected + 1e-7) {
        return {
          mesh: null,
          kind: 'weights',
          reason: `The weight of k-point ${i + 1} (${got.toPrecision(4)} of the total) differs from its star (${starSize[i]} of ${total} mesh points): the run used other symmetry operations than the crystal's.`,
        };
      }
    }
  }
  const mesh: RegularMesh = { divisions: [n1, n2, n3], shift: shift as [number, number, number], total, irreducibleOf, starSize };
  if (duplicateOf) mesh.duplicateOf = duplicateOf;
  return { mesh, reason: null };
}

// The loops over every image are small functions of their own (they run once per run, mostly before the
// runtime has optimised them: plain loops, no calls per image).

/** Every image (each operation, and its negative) of every point, flat: point i's images at i·per .. (i+1)·per − 1. */
function allImages(kFrac: Float64Array, ops: Float64Array): Float64Array {
  const nk = kFrac.length / 3;
  const all = new Float64Array(((3 * 2 * ops.length) / 9) * nk);
  for (let i = 0, at = 0; i < nk; i++) {
    const k0 = kFrac[3 * i]!;
    const k1 = kFrac[3 * i + 1]!;
    const k2 = kFrac[3 * i + 2]!;
    for (let o = 0; o < ops.length; o += 9) {
      for (let x = 0; x < 3; x++) {
        const q = ops[o + 3 * x]! * k0 + ops[o + 3 * x + 1]! * k1 + ops[o + 3 * x + 2]! * k2;
        all[at + x] = q;
        all[at + 3 + x] = -q;
      }
      at += 6;
    }
  }
  return all;
}

/** Whether component `axis` of every image lies on the mesh (j + s)/n (offMesh below ON_MESH). */
/**
 * A long list (a whole mesh, listed before its equivalent points are merged) is refused from its listed points
 * alone, before the symmetry images are made, when those already lie on no mesh: the images include the points
 * themselves, so they can only need a finer mesh. This keeps the cost of a long list that is no mesh (a path
 * written as points) to one pass over it.
 */
function listedPointsRefusal(kFrac: Float64Array): MeshRecognition | null {
  const divisions: number[] = [];
  for (let axis = 0; axis < 3; axis++) {
    const along = meshAlong(kFrac, axis);
    if (!along) {
      return {
        mesh: null,
        kind: 'not-a-mesh',
        reason: `Along reciprocal axis ${axis + 1} the k-points lie on no regular mesh of up to ${MAX_DIVISIONS} divisions.`,
      };
    }
    divisions.push(along.n);
  }
  const total = divisions[0]! * divisions[1]! * divisions[2]!;
  if (total > MAX_MESH_POINTS)
    return {
      mesh: null,
      kind: 'too-many',
      reason: `The k-points need a mesh of at least ${divisions.join('×')}: more than ${MAX_MESH_POINTS} points.`,
    };
  return null;
}

/** The coarsest mesh along `axis` (fewest divisions n ≤ MAX_DIVISIONS, unshifted before shifted by ½) holding every value, or null. */
function meshAlong(values: Float64Array, axis: number): { n: number; s: number } | null {
  for (let n = 1; n <= MAX_DIVISIONS; n++) for (const s of [0, 0.5]) if (allOnMesh(values, axis, n, s)) return { n, s };
  return null;
}

function allOnMesh(all: Float64Array, axis: number, n: number, s: number): boolean {
  for (let t = axis; t < all.length; t += 3) {
    const y = all[t]! * n - s;
    if (!(Math.abs(y - Math.round(y)) / n < ON_MESH)) return false;
  }
  return true;
}

/**
 * Marks the mesh point of every image with its irreducible point and counts the stars; the first two points
 * found equivalent, or null.
 */
function markImages(
  all: Float64Array,
  per: number,
  dims: readonly [number, number, number],
  shift: readonly number[],
  irreducibleOf: Int32Array,
  starSize: Int32Array,
  /** When given, a point whose first image is already taken is recorded as a duplicate of its owner (not a clash). */
  duplicateOf: Int32Array | null = null,
): [number, number] | null {
  const [n1, n2, n3] = dims;
  const [s1, s2, s3] = [shift[0]!, shift[1]!, shift[2]!];
  for (let i = 0; i < starSize.length; i++) {
    for (let t = 3 * per * i; t < 3 * per * (i + 1); t += 3) {
      const j1 = ((Math.round(all[t]! * n1 - s1) % n1) + n1) % n1;
      const j2 = ((Math.round(all[t + 1]! * n2 - s2) % n2) + n2) % n2;
      const j3 = ((Math.round(all[t + 2]! * n3 - s3) % n3) + n3) % n3;
      const j = (j1 * n2 + j2) * n3 + j3;
      const owner = irreducibleOf[j]!;
      if (owner === -1) {
        irreducibleOf[j] = i;
        starSize[i]!++;
      } else if (owner !== i) {
        if (!duplicateOf || t !== 3 * per * i) return [owner, i];
        duplicateOf[i] = owner;
        break;
      }
    }
  }
  return null;
}

/**
 * The irreducible points of a mesh (for making model runs and for tests): one representative per star of
 * mesh points, the first met in mesh order, with its weight (star size / total).
 */
export function irreducibleMesh(
  divisions: [number, number, number],
  shift: [number, number, number],
  reciprocalOps: readonly Mat3[],
): { kpoints: Float64Array; weights: Float64Array } {
  const [n1, n2, n3] = divisions;
  const total = n1 * n2 * n3;
  const seen = new Uint8Array(total);
  const ops = opsOrIdentity(reciprocalOps);
  const k: number[] = [];
  const w: number[] = [];
  const wrap = (x: number, n: number, s: number): number => ((Math.round(x * n - s) % n) + n) % n;
  const centred = (j: number, n: number, s: number): number => {
    const x = (j + s) / n;
    return x > 0.5 + 1e-12 ? x - 1 : x;
  };
  for (let j1 = 0; j1 < n1; j1++) {
    for (let j2 = 0; j2 < n2; j2++) {
      for (let j3 = 0; j3 < n3; j3++) {
        const j = (j1 * n2 + j2) * n3 + j3;
        if (seen[j]) continue;
        const p = [centred(j1, n1, shift[0]), centred(j2, n2, shift[1]), centred(j3, n3, shift[2])];
        let size = 0;
        for (const q of images(p, ops)) {
          if (q.some((x, a) => offMesh(x, divisions[a]!, shift[a]!) > ON_MESH))
            throw new RangeError('The mesh is not symmetric under the operations given.');
          const t = (wrap(q[0]!, n1, shift[0]) * n2 + wrap(q[1]!, n2, shift[1])) * n3 + wrap(q[2]!, n3, shift[2]);
          if (!seen[t]) {
            seen[t] = 1;
            size++;
          }
        }
        k.push(p[0]! + 0, p[1]! + 0, p[2]! + 0);
        w.push(size / total);
      }
    }
  }
  return { kpoints: Float64Array.from(k), weights: Float64Array.from(w) };
}
