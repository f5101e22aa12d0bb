/**
 * Star functions: plane waves symmetrised over the crystal's point group and time reversal,
 *     S_m(k) = (1/n_m) Σ_{R ∈ star m} cos(k·R),
 * for the lattice vectors R of the cell, grouped into stars (the images of one R under the point group and
 * inversion; time reversal makes E(k) = E(−k), so the stars are closed under R → −R and the functions are
 * real). Stars come in order of increasing |R|; the first is R = 0 (S = 1). Used by the smoothness-constrained
 * interpolation of Shankland (Int. J. Quantum Chem. 5, 497 (1971)), Koelling & Wood (J. Comput. Phys. 67, 253
 * (1986)) and Pickett, Krakauer & Allen (Phys. Rev. B 38, 2721 (1988)).
 *
 * Everything is cartesian here: k in Å⁻¹ (with the 2π), R in Å, so k·R is the plane wave's phase.
 */
import type { Mat3, Vec3 } from '../model';
import { det3 } from '../lattice/linalg';
import { reciprocalLattice } from '../lattice/reciprocal';

export interface StarBasis {
  /** Number of stars, the first being R = 0. */
  count: number;
  /**
   * Members kept per star: one of each ±R pair (R = 0 alone). Star m owns members start[m] .. start[m+1]−1.
   */
  start: Int32Array;
  /** Cartesian R of the kept members, Å, 3 numbers each (made on first use: the interpolation reads `integer`). */
  readonly members: Float64Array;
  /** The same members in lattice coordinates (R = n1 a1 + n2 a2 + n3 a3), 3 integers each. */
  integer: Int32Array;
  /** The lattice rows a1, a2, a3, Å. */
  lattice: Mat3;
  /** Factor on Σ_kept cos(k·R) that gives S_m: 2/n_m (1 for R = 0). */
  weight: Float64Array;
  /** |R| of each star, Å. */
  radius: Float64Array;
  /** Number of lattice vectors in each star, n_m. */
  size: Int32Array;
}

/**
 * The first `count` stars of the lattice (rows of `lattice`, Å) under `pointGroup`: the crystal's rotations
 * acting on fractional real-space coordinates (x → W x), as lattice/symmetry.ts gives them. Inversion is
 * added whatever the group (time reversal). The last few bases are kept (the same lattice and group give the
 * same stars), so building one again for the same crystal costs nothing.
 */
export function buildStarBasis(lattice: Mat3, pointGroup: readonly Mat3[], count: number): StarBasis {
  if (!Number.isInteger(count) || count < 1) throw new RangeError(`The number of stars must be a positive integer, got ${count}.`);
  const volume = Math.abs(det3(lattice));
  if (!(volume > 1e-9)) throw new RangeError('The lattice spans no volume.');
  const key = JSON.stringify([lattice, pointGroup, count]);
  const hit = recent.get(key);
  if (hit) return hit;
  const ops = integerOps(pointGroup);
  // Lattice vectors needed: at most about count × (size of the group with inversion), a general star's size
  // (special stars are smaller); more are tried if short. The stars kept do not depend on the radius tried.
  const inversion = ops.some((w) => w.every((x, i) => x === (i % 4 === 0 ? -1 : 0)));
  let points = count * (inversion ? ops.length : 2 * ops.length) + 64;
  for (;;) {
    const radius = Math.cbrt((3 * points * volume) / (4 * Math.PI));
    const out = starsWithin(lattice, reciprocalLattice(lattice), ops, radius, count);
    if (out) {
      recent.set(key, out);
      if (recent.size > RECENT_BASES) recent.delete(recent.keys().next().value!);
      return out;
    }
    points *= 2;
  }
}

const RECENT_BASES = 4;
const recent = new Map<string, StarBasis>();

/** The operations as integer matrices (identity alone for an empty group). */
function integerOps(pointGroup: readonly Mat3[]): Int32Array[] {
  const ops = pointGroup.length > 0 ? pointGroup : [IDENTITY];
  return ops.map((w) => Int32Array.from([0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => Math.round(w[i]![j]!)))));
}

const IDENTITY: Mat3 = [
  [1, 0, 0],
  [0, 1, 0],
  [0, 0, 1],
];

function starsWithin(lattice: Mat3, b: Mat3, ops: Int32Array[], radius: number, count: number): StarBasis | null {
  const reach = b.map((r) => Math.ceil((radius * Math.hypot(...r)) / (2 * Math.PI)));
  // Integer vectors as one index in a box: the operations keep lengths, so images of vectors within the
  // radius stay in the box.
  const off = Math.max(...reach) + 1;
  const width = 2 * off + 1;
  const cells = width * width * width;
  if (cells > 2 ** 31) throw new RangeError('The star basis is too large for this lattice.');
  const { vi, found } = vectorsWithin(lattice, reach, radius);
  // Every star within the radius is whole (the operations keep lengths): find them all in any order, then
  // keep the `count` shortest (a sort of the stars, not of the vectors).
  // The operations' entries one after another (9 each), read with plain indices.
  const w = new Int32Array(9 * ops.length);
  ops.forEach((op, o) => w.set(op, 9 * o));
  const grouped = groupIntoStars(vi, found, w, off, width);
  const starRadius = Array.from(grouped.representative.subarray(0, grouped.stars), (c) =>
    Math.sqrt(squaredLength(lattice, vi[3 * c]!, vi[3 * c + 1]!, vi[3 * c + 2]!)),
  );
  if (starRadius.length < count) return null;
  const order = byRadius(starRadius);
  const rank = new Int32Array(starRadius.length).fill(-1);
  for (let r = 0; r < count; r++) rank[order[r]!] = r;
  const { keptStar, kept } = grouped;
  const start = new Int32Array(count + 1);
  for (let j = 0; j < kept; j++) {
    const r = rank[keptStar[j]!]!;
    if (r >= 0) start[r + 1]!++;
  }
  for (let r = 0; r < count; r++) start[r + 1] = start[r + 1]! + start[r]!;
  const total = start[count]!;
  const integer = new Int32Array(3 * total);
  placeMembers(grouped, rank, start, off, width, integer);
  const weight = new Float64Array(count);
  const radii = new Float64Array(count);
  const size = new Int32Array(count);
  for (let r = 0; r < count; r++) {
    const st = order[r]!;
    radii[r] = starRadius[st]!;
    size[r] = grouped.size[st]!;
    weight[r] = radii[r] === 0 ? 1 : 2 / size[r]!;
  }
  let members: Float64Array | null = null;
  return {
    count,
    start,
    get members(): Float64Array {
      return (members ??= cartesianMembers(lattice, integer));
    },
    integer,
    lattice,
    weight,
    radius: radii,
    size,
  };
}

/** R = n1 a1 + n2 a2 + n3 a3 of every member, Å. */
function cartesianMembers(lattice: Mat3, integer: Int32Array): Float64Array {
  const members = new Float64Array(integer.length);
  for (let at = 0; at < integer.length / 3; at++) {
    const [m0, m1, m2] = [integer[3 * at]!, integer[3 * at + 1]!, integer[3 * at + 2]!];
    for (let x = 0; x < 3; x++) members[3 * at + x] = m0 * lattice[0][x]! + m1 * lattice[1][x]! + m2 * lattice[2][x]!;
  }
  return members;
}

// The loops below are functions of their own, each run once per basis: the runtime optimises a long loop while
// it runs, and code after it that had not yet run would otherwise send the function back to the interpreter.

/**
 * The stars' indices by radius, equal radii in the order found: a native sort of the radii and, per distinct
 * radius, its stars in order (the same order as sorting the indices by radius, then index; no comparator calls).
 */
function byRadius(radius: number[]): number[] {
  const holders = new Map<number, number[]>();
  for (let p = 0; p < radius.length; p++) {
    const list = holders.get(radius[p]!);
    if (list) list.push(p);
    else holders.set(radius[p]!, [p]);
  }
  const sorted = Float64Array.from(holders.keys()).sort();
  const order: number[] = [];
  for (const r of sorted) order.push(...holders.get(r)!);
  return order;
}

/**
 * Integer vectors (i, j, l) within the radius, row by row. For each (i, j) the range of l solves a quadratic;
 * only its two ends can fall outside by rounding (inside them the quadratic is below zero by at least |a3|²), so
 * only they are measured.
 */
function vectorsWithin(lattice: Mat3, reach: number[], radius: number): { vi: Int32Array; found: number } {
  const radius2 = radius * radius;
  const [a0, a1, a2] = lattice;
  const a22 = a2[0] * a2[0] + a2[1] * a2[1] + a2[2] * a2[2];
  let vi: Int32Array = new Int32Array(3 * 4096);
  let found = 0;
  for (let i = -reach[0]!; i <= reach[0]!; i++) {
    for (let j = -reach[1]!; j <= reach[1]!; j++) {
      const px = i * a0[0] + j * a1[0];
      const py = i * a0[1] + j * a1[1];
      const pz = i * a0[2] + j * a1[2];
      // |p + l a2|² ≤ r²: a22 l² + 2 (p·a2) l + |p|² − r² ≤ 0.
      const pa = px * a2[0] + py * a2[1] + pz * a2[2];
      const disc = pa * pa - a22 * (px * px + py * py + pz * pz - radius2);
      if (disc < 0) continue;
      const root = Math.sqrt(disc);
      // (+ 0: an integer, never −0, which the optimised loop would have to leave for.)
      const lo = Math.max(-reach[2]!, Math.ceil((-pa - root) / a22)) + 0;
      const hi = Math.min(reach[2]!, Math.floor((-pa + root) / a22)) + 0;
      if (3 * (found + hi - lo + 1) > vi.length) vi = grown(vi, 3 * (found + hi - lo + 1));
      for (let l = lo; l <= hi; l++) {
        if ((l === lo || l === hi) && squaredLength(lattice, i, j, l) > radius2) continue;
        vi[3 * found] = i;
        vi[3 * found + 1] = j;
        vi[3 * found + 2] = l;
        found++;
      }
    }
  }
  return { vi, found };
}

/** |i a1 + j a2 + l a3|², always by the same expression (the stars' radii come from it). */
function squaredLength(lattice: Mat3, i: number, j: number, l: number): number {
  const [a0, a1, a2] = lattice;
  const x = i * a0[0] + j * a1[0] + l * a2[0];
  const y = i * a0[1] + j * a1[1] + l * a2[1];
  const z = i * a0[2] + j * a1[2] + l * a2[2];
  return x * x + y * y + z * z;
}

/** vi with room for at least `need` entries (doubling). */
function grown(vi: Int32Array, need: number): Int32Array {
  let size = vi.length;
  while (size < need) size *= 2;
  const v2 = new Int32Array(size);
  v2.set(vi);
  return v2;
}

interface GroupedStars {
  /** Stars found, and per star the vector (index into the list) that opened it and its size. */
  stars: number;
  representative: Int32Array;
  size: Int32Array;
  /** Kept members (one per ±R pair): their cell in the box and their star. */
  keptCell: Int32Array;
  keptStar: Int32Array;
  kept: number;
}

/** The vectors grouped into stars under the operations `w` (9 integers each) and inversion. */
function groupIntoStars(vi: Int32Array, found: number, w: Int32Array, off: number, width: number): GroupedStars {
  const taken = new Int32Array(width * width * width); // 0 free, else 1 + the star that holds the vector
  // One kept member per ±R pair at most per vector found; at most one star per vector.
  const keptCell = new Int32Array(found);
  const keptStar = new Int32Array(found);
  const representative = new Int32Array(found);
  const size = new Int32Array(found);
  let kept = 0;
  let stars = 0;
  for (let c = 0; c < found; c++) {
    const n0 = vi[3 * c]!;
    const n1 = vi[3 * c + 1]!;
    const n2 = vi[3 * c + 2]!;
    if (taken[((n0 + off) * width + n1 + off) * width + n2 + off]) continue;
    const star = stars + 1;
    let members = 0;
    for (let o = 0; o < w.length; o += 9) {
      const x = w[o]! * n0 + w[o + 1]! * n1 + w[o + 2]! * n2;
      const y = w[o + 3]! * n0 + w[o + 4]! * n1 + w[o + 5]! * n2;
      const z = w[o + 6]! * n0 + w[o + 7]! * n1 + w[o + 8]! * n2;
      const cell = ((x + off) * width + y + off) * width + z + off;
      if (taken[cell]) continue;
      // Keep one of each ±R pair, marking both (R = 0 is its own partner).
      const partner = ((off - x) * width + off - y) * width + off - z;
      taken[cell] = star;
      taken[partner] = star;
      members += partner === cell ? 1 : 2;
      keptCell[kept] = cell;
      keptStar[kept++] = star - 1;
    }
    representative[stars] = c;
    size[stars++] = members;
  }
  return { stars, representative, size, keptCell, keptStar, kept };
}

/** The kept members of the ranked stars into `integer`, star by star from `start`. */
function placeMembers(g: GroupedStars, rank: Int32Array, start: Int32Array, off: number, width: number, integer: Int32Array): void {
  const fill = start.slice(0, start.length - 1);
  for (let j = 0; j < g.kept; j++) {
    const r = rank[g.keptStar[j]!]!;
    if (r < 0) continue;
    const at = fill[r]!++;
    const cell = g.keptCell[j]!;
    const m2 = (cell % width) - off;
    const m1 = (Math.floor(cell / width) % width) - off;
    const m0 = Math.floor(cell / (width * width)) - off;
    integer[3 * at] = m0;
    integer[3 * at + 1] = m1;
    integer[3 * at + 2] = m2;
  }
}

const reaches = new WeakMap<StarBasis, number>();

/**
 * S_m(k) for every star m at cartesian k (Å⁻¹), into `out` (length count). Each cos(k·R) is the real part of
 * Π_a exp(i n_a θ_a), θ_a = k·a_a, from three short tables.
 */
export function starValues(basis: StarBasis, k: Vec3, out: Float64Array = new Float64Array(basis.count)): Float64Array {
  const a = basis.lattice;
  const theta = [0, 1, 2].map((x) => k[0] * a[x]![0] + k[1] * a[x]![1] + k[2] * a[x]![2]) as Vec3;
  return starValuesAtPhases(basis, theta, out);
}

/** S_m(k) for every star m at fractional k (reciprocal-lattice coordinates of the basis's lattice). */
export function starValuesFractional(basis: StarBasis, kFrac: Vec3, out: Float64Array = new Float64Array(basis.count)): Float64Array {
  return starValuesAtPhases(basis, [2 * Math.PI * kFrac[0], 2 * Math.PI * kFrac[1], 2 * Math.PI * kFrac[2]], out);
}

/** S_m for every star, θ_a = k·a_a. */
function starValuesAtPhases(basis: StarBasis, theta: Vec3, out: Float64Array): Float64Array {
  const { start, integer: z, weight } = basis;
  let reach = reaches.get(basis);
  if (reach === undefined) {
    reach = 0;
    for (let j = 0; j < z.length; j++) reach = Math.max(reach, Math.abs(z[j]!));
    reaches.set(basis, reach);
  }
  const width = 2 * reach + 1;
  const tc = new Float64Array(3 * width);
  const ts = new Float64Array(3 * width);
  for (let a = 0; a < 3; a++) {
    for (let n = -reach; n <= reach; n++) {
      tc[a * width + reach + n] = Math.cos(n * theta[a]!);
      ts[a * width + reach + n] = Math.sin(n * theta[a]!);
    }
  }
  const o1 = width + reach;
  const o2 = 2 * width + reach;
  for (let m = 0; m < basis.count; m++) {
    let s = 0;
    for (let j = start[m]!; j < start[m + 1]!; j++) {
      const i0 = z[3 * j]! + reach;
      const i1 = z[3 * j + 1]! + o1;
      const i2 = z[3 * j + 2]! + o2;
      const cr = tc[i0]! * tc[i1]! - ts[i0]! * ts[i1]!;
      const ci = tc[i0]! * ts[i1]! + ts[i0]! * tc[i1]!;
      s += cr * tc[i2]! - ci * ts[i2]!;
    }
    out[m] = s * weight[m]!;
  }
  return out;
}
