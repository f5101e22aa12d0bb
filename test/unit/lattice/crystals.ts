/** Crystal structures for the lattice tests, built from their textbook descriptions. */
import fc from 'fast-check';
import type { Mat3, Structure, Vec3 } from '../../../src/core/model';
import { det3, mat3Inverse, mulMat, mulMatVec, transpose3 } from '../../../src/core/lattice/linalg';

/** fcc primitive vectors a1=(0,a/2,a/2), a2=(a/2,0,a/2), a3=(a/2,a/2,0) for conventional constant a. */
export function fccPrimitive(a: number): Mat3 {
  return [
    [0, a / 2, a / 2],
    [a / 2, 0, a / 2],
    [a / 2, a / 2, 0],
  ];
}

/**
 * Diamond (two equal atoms) or zincblende (two species) in the fcc primitive cell, atoms at 0 and (1/4,1/4,1/4)
 * of the primitive basis = a(1/4,1/4,1/4) cartesian (common practice; Kittel, Introduction to Solid State
 * Physics, ch. 1).
 */
export function diamondLike(a: number, s1: string, s2: string): Structure {
  return { lattice: fccPrimitive(a), species: [s1, s2], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
}

/** Diamond in its conventional cubic cell: 8 atoms (fcc translations of the two-atom basis). */
export function diamondConventional(a: number, s: string): Structure {
  const fcc: Vec3[] = [
    [0, 0, 0],
    [0, 0.5, 0.5],
    [0.5, 0, 0.5],
    [0.5, 0.5, 0],
  ];
  const pos: number[] = [];
  for (const t of fcc) pos.push(...t);
  for (const t of fcc) pos.push(t[0] + 0.25, t[1] + 0.25, t[2] + 0.25);
  return {
    lattice: [
      [a, 0, 0],
      [0, a, 0],
      [0, 0, a],
    ],
    species: Array(8).fill(s) as string[],
    positions: new Float64Array(pos),
  };
}

/** Wurtzite: hexagonal a, c, atoms at (1/3,2/3,0), (2/3,1/3,1/2) and the same shifted by u along c. */
export function wurtzite(a: number, c: number, u: number, s1: string, s2: string): Structure {
  const h = (Math.sqrt(3) / 2) * a;
  return {
    lattice: [
      [a / 2, -h, 0],
      [a / 2, h, 0],
      [0, 0, c],
    ],
    species: [s1, s1, s2, s2],
    positions: new Float64Array([1 / 3, 2 / 3, 0, 2 / 3, 1 / 3, 0.5, 1 / 3, 2 / 3, u, 2 / 3, 1 / 3, 0.5 + u]),
  };
}

/** Rotation about a unit axis u by an angle (rad), as a matrix acting on column vectors. */
export function rotationMatrix(u: Vec3, angle: number): Mat3 {
  const n = Math.hypot(...u);
  const [x, y, z] = [u[0] / n, u[1] / n, u[2] / n];
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  const t = 1 - c;
  return [
    [t * x * x + c, t * x * y - s * z, t * x * z + s * y],
    [t * x * y + s * z, t * y * y + c, t * y * z - s * x],
    [t * x * z - s * y, t * y * z + s * x, t * z * z + c],
  ];
}

/**
 * The same crystal described with other primitive vectors A' = M·A (M integer, det ±1) and rotated rigidly by Q.
 * Fractional positions transform as x' = M⁻ᵀ x; a fractional k transforms as k' = M k.
 */
export function redescribe(s: Structure, M: Mat3, Q: Mat3): Structure {
  if (Math.abs(Math.abs(det3(M)) - 1) > 1e-12) throw new Error('redescribe: M must be unimodular');
  const lat = mulMat(M, s.lattice).map((row) => mulMatVec(Q, row)) as Mat3;
  const minvT = transpose3(mat3Inverse(M));
  const pos = new Float64Array(s.positions.length);
  for (let i = 0; i < s.species.length; i++) {
    const x = mulMatVec(minvT, [s.positions[3 * i]!, s.positions[3 * i + 1]!, s.positions[3 * i + 2]!]);
    for (let j = 0; j < 3; j++) pos[3 * i + j] = x[j]! - Math.floor(x[j]! + 1e-12);
  }
  return { lattice: lat, species: [...s.species], positions: pos };
}

/** k' = M k for the redescribed cell. */
export function redescribeK(M: Mat3, k: Vec3): Vec3 {
  return mulMatVec(M, k);
}

/** Unimodular integer matrices: products of elementary shears and permutations (deterministic list). */
export const UNIMODULAR: Mat3[] = [
  [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [0, 1, 0],
    [0, 0, 1],
    [1, 0, 0],
  ],
  [
    [1, 1, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, 0, 0],
    [1, 1, 0],
    [0, -1, 1],
  ],
  [
    [0, -1, 0],
    [1, 0, 1],
    [0, 0, 1],
  ],
  [
    [2, 1, 0],
    [1, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, 0, -1],
    [0, 1, 1],
    [0, 0, -1],
  ],
];

/**
 * Any primitive cell of a crystal, rotated (for property tests): M, a product of two unimodular integer
 * matrices (another primitive cell of the same lattice), and Q, a rotation about a random axis.
 */
export const anyCellChange: fc.Arbitrary<{ M: Mat3; Q: Mat3 }> = fc
  .tuple(
    fc.constantFrom(...UNIMODULAR),
    fc.constantFrom(...UNIMODULAR),
    fc.tuple(
      fc.double({ min: -1, max: 1, noNaN: true }),
      fc.double({ min: -1, max: 1, noNaN: true }),
      fc.double({ min: 0.1, max: 1, noNaN: true }),
    ),
    fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }),
  )
  .map(([m1, m2, axis, angle]) => ({ M: mulMat(m1, m2), Q: rotationMatrix(axis as Vec3, angle) }));
