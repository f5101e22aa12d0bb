/** Reciprocal lattice (with the 2π) and conversions between fractional and cartesian k. */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse, mulVecMat, transpose3 } from './linalg';

/** Rows b1, b2, b3 in Å⁻¹ with a_i · b_j = 2π δ_ij. */
export function reciprocalLattice(lattice: Mat3): Mat3 {
  const inv = transpose3(mat3Inverse(lattice));
  return inv.map((r) => r.map((x) => 2 * Math.PI * x)) as Mat3;
}

/** Fractional reciprocal coordinates → cartesian Å⁻¹. */
export function fractionalToCartesian(k: Vec3, reciprocal: Mat3): Vec3 {
  return mulVecMat(k, reciprocal);
}

/** Cartesian Å⁻¹ → fractional reciprocal coordinates: k_i = k · a_i / 2π. */
export function cartesianToFractional(k: Vec3, lattice: Mat3): Vec3 {
  const s = 1 / (2 * Math.PI);
  return [
    (k[0] * lattice[0][0] + k[1] * lattice[0][1] + k[2] * lattice[0][2]) * s,
    (k[0] * lattice[1][0] + k[1] * lattice[1][1] + k[2] * lattice[1][2]) * s,
    (k[0] * lattice[2][0] + k[1] * lattice[2][1] + k[2] * lattice[2][2]) * s,
  ];
}

/** All k-points (nk × 3 fractional) to cartesian Å⁻¹. */
export function kpointsToCartesian(kpoints: Float64Array, reciprocal: Mat3): Float64Array {
  const n = kpoints.length / 3;
  const out = new Float64Array(kpoints.length);
  const [b1, b2, b3] = reciprocal;
  for (let i = 0; i < n; i++) {
    const x = kpoints[3 * i]!,
      y = kpoints[3 * i + 1]!,
      z = kpoints[3 * i + 2]!;
    out[3 * i] = x * b1[0] + y * b2[0] + z * b3[0];
    out[3 * i + 1] = x * b1[1] + y * b2[1] + z * b3[1];
    out[3 * i + 2] = x * b1[2] + y * b2[2] + z * b3[2];
  }
  return out;
}
