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
  /** Cartesian R of the kept members, Å, 3 numbers each. */
  members: Float64Array;
  /** Factor on Σ_kept cos(k·R) that gives S_m: 2/n_m (1 for R = 0). */
  weight: Float64Array;
  /** |R| of each star, Å. */
  radius: Float64Array;
  /** Number of lattice vectors in each star, n_m. */
  size: Int32Array;
}

function applyInteger(w: Mat3, n: readonly number[]): [number, number, number] {
  return [
    Math.round(w[0][0] * n[0]! + w[0][1] * n[1]! + w[0][2] * n[2]!) + 0,
    Math.round(w[1][0] * n[0]! + w[1][1] * n[1]! + w[1][2] * n[2]!) + 0,
    Math.round(w[2][0] * n[0]! + w[2][1] * n[1]! + w[2][2] * n[2]!) + 0,
  ];
}

/**
 * The first `count` stars of the lattice (rows of `lattice`, Å) under `pointGroup`: the crystal's rotations
 * acting on fractional real-space coordinates (x → W x), as lattice/symmetry.ts gives them. Inversion is
 * added whatever the group (time reversal).
 */
export function buildStarBasis(lattice: Mat3, pointGroup: readonly Mat3[], count: number): StarBasis {
  if (!Number.isInteger(count) || count < 1) throw new RangeError(`The number of stars must be a positive integer, got ${count}.`);
  const volume = Math.abs(det3(lattice));
  if (!(volume > 1e-9)) throw new RangeError('The lattice spans no volume.');
  const b = reciprocalLattice(lattice);
  // Lattice vectors needed: about count × (size of the group with inversion); more are tried if short.
  const order = 2 * Math.max(1, pointGroup.length);
  let points = count * order * 0.6 + 64;
  for (;;) {
    const radius = Math.cbrt((3 * points * volume) / (4 * Math.PI));
    const out = starsWithin(lattice, b, pointGroup, radius, count);
    if (out) return out;
    points *= 2;
  }
}

function starsWithin(lattice: Mat3, b: Mat3, pointGroup: readonly Mat3[], radius: number, count: number): StarBasis | null {
  const reach = b.map((r) => Math.ceil((radius * Math.hypot(...r)) / (2 * Math.PI)));
  // Integer vectors as one number: images under the group stay within 3·reach of the origin per component.
  const off = 3 * Math.max(...reach) + 1;
  const width = 2 * off + 1;
  const key = (i: number, j: number, l: number): number => ((i + off) * width + (j + off)) * width + (l + off);
  const ni: number[] = [];
  const nj: number[] = [];
  const nl: number[] = [];
  const len: number[] = [];
  for (let i = -reach[0]!; i <= reach[0]!; i++) {
    for (let j = -reach[1]!; j <= reach[1]!; j++) {
      for (let l = -reach[2]!; l <= reach[2]!; l++) {
        const x = i * lattice[0][0] + j * lattice[1][0] + l * lattice[2][0];
        const y = i * lattice[0][1] + j * lattice[1][1] + l * lattice[2][1];
        const z = i * lattice[0][2] + j * lattice[1][2] + l * lattice[2][2];
        const r = Math.hypot(x, y, z);
        if (r <= radius) {
          ni.push(i);
          nj.push(j);
          nl.push(l);
          len.push(r);
        }
      }
    }
  }
  const order = Array.from(len.keys()).sort((p, q) => len[p]! - len[q]!);
  const ops: Mat3[] =
    pointGroup.length > 0
      ? [...pointGroup]
      : [
          [
            [1, 0, 0],
            [0, 1, 0],
            [0, 0, 1],
          ],
        ];
  const taken = new Set<number>();
  const start: number[] = [0];
  const members: number[] = [];
  const weight: number[] = [];
  const radii: number[] = [];
  const sizes: number[] = [];
  for (const c of order) {
    const n: [number, number, number] = [ni[c]!, nj[c]!, nl[c]!];
    if (taken.has(key(n[0], n[1], n[2]))) continue;
    if (radii.length === count) break;
    const star = new Map<number, [number, number, number]>();
    for (const w of ops) {
      const m = applyInteger(w, n);
      star.set(key(m[0], m[1], m[2]), m);
      star.set(key(-m[0], -m[1], -m[2]), [-m[0] + 0, -m[1] + 0, -m[2] + 0]);
    }
    for (const k of star.keys()) taken.add(k);
    const kept = new Set<number>();
    for (const [k, m] of star) {
      if (kept.has(key(-m[0], -m[1], -m[2]))) continue;
      kept.add(k);
      members.push(
        m[0] * lattice[0][0] + m[1] * lattice[1][0] + m[2] * lattice[2][0],
        m[0] * lattice[0][1] + m[1] * lattice[1][1] + m[2] * lattice[2][1],
        m[0] * lattice[0][2] + m[1] * lattice[1][2] + m[2] * lattice[2][2],
      );
    }
    start.push(members.length / 3);
    weight.push(len[c] === 0 ? 1 : 2 / star.size);
    radii.push(len[c]!);
    sizes.push(star.size);
  }
  if (radii.length < count) return null;
  return {
    count,
    start: Int32Array.from(start),
    members: Float64Array.from(members),
    weight: Float64Array.from(weight),
    radius: Float64Array.from(radii),
    size: Int32Array.from(sizes),
  };
}

/** S_m(k) for every star m at cartesian k (Å⁻¹), into `out` (length count). */
export function starValues(basis: StarBasis, k: Vec3, out: Float64Array = new Float64Array(basis.count)): Float64Array {
  const { start, members, weight } = basis;
  for (let m = 0; m < basis.count; m++) {
    let s = 0;
    for (let j = start[m]!; j < start[m + 1]!; j++) {
      s += Math.cos(k[0] * members[3 * j]! + k[1] * members[3 * j + 1]! + k[2] * members[3 * j + 2]!);
    }
    out[m] = s * weight[m]!;
  }
  return out;
}
