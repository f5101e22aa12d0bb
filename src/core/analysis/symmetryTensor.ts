/**
 * The mass tensor from directional masses and the little group of k. An extremum's inverse mass tensor is
 * unchanged by every operation R of the point group that maps k0 to itself or to −k0 (time reversal),
 * modulo G: M⁻¹ = R M⁻¹ Rᵀ. Those conditions leave r independent components (1 for a non-degenerate band
 * at a cubic point, 2 for a uniaxial valley such as Si's Δ or Ge's L, 3 for orthorhombic symmetry, ...).
 * Each directional mass gives one linear equation dᵀ M⁻¹ d = 1/m_d; when the path's directions determine
 * the r components, the whole tensor follows. (Symmetry argument: common practice, e.g. the longitudinal and
 * transverse masses of an ellipsoidal valley.)
 */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse, mulMat, transpose3 } from '../lattice/linalg';
import { reciprocalLattice } from '../lattice/reciprocal';
import { leastSquares } from './fits/leastSquares';
import { symmetricEigen3 } from './symmetricEigen';

export interface DirectionalInverseMass {
  /** Cartesian unit vector. */
  direction: Vec3;
  /** Signed 1/m along it, 1/m_e. */
  inverseMass: number;
}

/** Point-group operations (acting on fractional reciprocal coordinates) that keep k0 or send it to −k0, modulo G. */
export function littleGroup(reciprocalOps: Mat3[], k0: Vec3, tol = 1e-5): Mat3[] {
  const same = (a: Vec3, b: Vec3): boolean => a.every((x, i) => Math.abs(x - b[i]! - Math.round(x - b[i]!)) < tol);
  return reciprocalOps.filter((r) => {
    const q: Vec3 = [
      r[0][0] * k0[0] + r[0][1] * k0[1] + r[0][2] * k0[2],
      r[1][0] * k0[0] + r[1][1] * k0[1] + r[1][2] * k0[2],
      r[2][0] * k0[0] + r[2][1] * k0[1] + r[2][2] * k0[2],
    ];
    return same(q, k0) || same(q, [-k0[0], -k0[1], -k0[2]]);
  });
}

/** A fractional reciprocal-space operation as a cartesian rotation: Bᵀ R (Bᵀ)⁻¹, B the reciprocal rows. */
export function cartesianOperation(r: Mat3, lattice: Mat3): Mat3 {
  const bt = transpose3(reciprocalLattice(lattice));
  return mulMat(mulMat(bt, r), mat3Inverse(bt));
}

/**
 * The six symmetric unit tensors (xx, yy, zz, xy, xz, yz) as index pairs: E_ij = e_i e_jᵀ + e_j e_iᵀ for i ≠ j.
 */
const SYM_PAIRS: readonly (readonly [number, number])[] = [
  [0, 0],
  [1, 1],
  [2, 2],
  [0, 1],
  [0, 2],
  [1, 2],
];
/** flat6 order: (row, column) of the six independent entries of a symmetric matrix. */
const FLAT6: readonly (readonly [number, number])[] = SYM_PAIRS;

const unflat6 = (v: number[]): Mat3 => [
  [v[0]!, v[3]!, v[4]!],
  [v[3]!, v[1]!, v[5]!],
  [v[4]!, v[5]!, v[2]!],
];

/**
 * Entry (a, b) of R E Rᵀ for a unit tensor E of SYM_PAIRS: R_ai R_bi on the diagonal pairs, R_aj R_bi + R_ai R_bj
 * off it (the same value the two matrix products give: the other terms of their sums are exact zeros).
 */
function rotatedUnitEntry(r: Mat3, i: number, j: number, a: number, b: number): number {
  const ra = r[a]!;
  const rb = r[b]!;
  return i === j ? ra[i]! * rb[i]! : ra[j]! * rb[i]! + ra[i]! * rb[j]!;
}

/**
 * Bases already found, by the operation objects themselves (valleyCount.ts keeps one list of operations per k:
 * extrema of several bands at one k ask with the same objects). Operations are never changed after they are made.
 */
const basesByFirstOp = new WeakMap<Mat3, { ops: Mat3[]; basis: Mat3[] }[]>();

/** An orthonormal basis (as symmetric matrices) of the tensors invariant under the cartesian operations. */
export function invariantTensorBasis(cartesianOps: Mat3[]): Mat3[] {
  const first = cartesianOps[0];
  if (!first) return computeInvariantBasis(cartesianOps);
  let known = basesByFirstOp.get(first);
  if (!known) basesByFirstOp.set(first, (known = []));
  const hit = known.find((x) => x.ops.length === cartesianOps.length && x.ops.every((o, i) => o === cartesianOps[i]));
  if (hit) return hit.basis.map((m) => m.map((r) => [...r]) as Mat3);
  const basis = computeInvariantBasis(cartesianOps);
  known.push({ ops: [...cartesianOps], basis: basis.map((m) => m.map((r) => [...r]) as Mat3) });
  return basis;
}

function computeInvariantBasis(cartesianOps: Mat3[]): Mat3[] {
  const images: number[][] = SYM_PAIRS.map(([i, j]) => {
    const acc = [0, 0, 0, 0, 0, 0];
    for (const r of cartesianOps) {
      for (let c = 0; c < 6; c++) {
        const [a, b] = FLAT6[c]!;
        acc[c] = acc[c]! + rotatedUnitEntry(r, i, j, a, b) / cartesianOps.length;
      }
    }
    return acc;
  });
  // Gram-Schmidt with the metric in which off-diagonal pairs count twice (the Frobenius product).
  const w = [1, 1, 1, 2, 2, 2];
  const inner = (a: number[], b: number[]): number => a.reduce((s, x, i) => s + w[i]! * x * b[i]!, 0);
  const basis: number[][] = [];
  for (const v0 of images) {
    const v = [...v0];
    for (const b of basis) {
      const c = inner(v, b);
      for (let i = 0; i < 6; i++) v[i] = v[i]! - c * b[i]!;
    }
    const n = Math.sqrt(inner(v, v));
    if (n > 1e-8) basis.push(v.map((x) => x / n));
  }
  return basis.map(unflat6);
}

export interface SymmetryTensorResult {
  /** Signed inverse mass tensor, 1/m_e. */
  inverseMass: Mat3;
  principal: Vec3;
  axes: Mat3;
  /** Independent components allowed by the little group. */
  components: number;
  /** Operations in the little group (with time reversal). */
  operations: number;
}

/**
 * Solve for the tensor; null (with the reason) when the directions do not determine it.
 */
export function tensorFromDirections(
  measurements: DirectionalInverseMass[],
  cartesianOps: Mat3[],
): { result: SymmetryTensorResult | null; reason?: string } {
  const basis = invariantTensorBasis(
    cartesianOps.length
      ? cartesianOps
      : [
          [
            [1, 0, 0],
            [0, 1, 0],
            [0, 0, 1],
          ],
        ],
  );
  const r = basis.length;
  const n = measurements.length;
  if (n < r) {
    return {
      result: null,
      reason: `the little group of k allows ${r} independent tensor components, and the path gives ${n} direction${n === 1 ? '' : 's'}`,
    };
  }
  const a = new Float64Array(n * r);
  const y = new Float64Array(n);
  measurements.forEach((m, i) => {
    const d = m.direction;
    basis.forEach((b, j) => {
      a[i * r + j] =
        d[0] * (b[0][0] * d[0] + b[0][1] * d[1] + b[0][2] * d[2]) +
        d[1] * (b[1][0] * d[0] + b[1][1] * d[1] + b[1][2] * d[2]) +
        d[2] * (b[2][0] * d[0] + b[2][1] * d[1] + b[2][2] * d[2]);
    });
    y[i] = m.inverseMass;
  });
  // Directions that all probe the same combination (e.g. only along a valley's axis) leave the system singular.
  const fit = leastSquares(a, y, n, r);
  if (!fit || !isWellDetermined(a, n, r)) {
    return {
      result: null,
      reason: `the path's directions do not determine the ${r} independent tensor components the little group of k allows`,
    };
  }
  const inv: Mat3 = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  basis.forEach((b, j) => {
    for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) inv[p]![q] = inv[p]![q]! + fit.coef[j]! * b[p]![q]!;
  });
  const eig = symmetricEigen3(inv);
  const items = [0, 1, 2].map((i) => ({ mass: 1 / eig.values[i]!, axis: eig.vectors[i]! }));
  items.sort((x, y2) => Math.abs(x.mass) - Math.abs(y2.mass));
  return {
    result: {
      inverseMass: inv,
      principal: items.map((x) => x.mass) as Vec3,
      axes: items.map((x) => x.axis) as Mat3,
      components: r,
      operations: cartesianOps.length,
    },
  };
}

/** Columns of A (n × r) well conditioned: smallest singular value not negligible against the largest. */
function isWellDetermined(a: Float64Array, n: number, r: number): boolean {
  // Gram matrix eigenvalues by power-free route: Gaussian elimination pivots of AᵀA, scaled.
  const g = new Float64Array(r * r);
  for (let i = 0; i < r; i++)
    for (let j = 0; j < r; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += a[k * r + i]! * a[k * r + j]!;
      g[i * r + j] = s;
    }
  let maxDiag = 0;
  for (let i = 0; i < r; i++) maxDiag = Math.max(maxDiag, g[i * r + i]!);
  for (let c = 0; c < r; c++) {
    let piv = c;
    for (let i = c + 1; i < r; i++) if (Math.abs(g[i * r + c]!) > Math.abs(g[piv * r + c]!)) piv = i;
    if (piv !== c) for (let j = 0; j < r; j++) [g[c * r + j], g[piv * r + j]] = [g[piv * r + j]!, g[c * r + j]!];
    const pv = g[c * r + c]!;
    if (!(Math.abs(pv) > 1e-6 * maxDiag)) return false;
    for (let i = c + 1; i < r; i++) {
      const f = g[i * r + c]! / pv;
      for (let j = c; j < r; j++) g[i * r + j] = g[i * r + j]! - f * g[c * r + j]!;
    }
  }
  return true;
}
