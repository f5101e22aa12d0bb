/**
 * Whether two k-points (fractional) are the same valley: equal modulo a reciprocal lattice vector, up to
 * time reversal (k → −k) and, when the crystal's rotations are known, up to symmetry. A tolerance allows
 * for valleys that drift under strain (e.g. the Δ minimum moving along Γ–X).
 */
import type { Mat3, Vec3 } from '../model';

/** Distance between two fractional k modulo reciprocal lattice vectors (max-norm of the wrapped difference). */
export function wrappedDistance(a: Vec3, b: Vec3): number {
  let m = 0;
  for (let i = 0; i < 3; i++) {
    let d = a[i]! - b[i]!;
    d -= Math.round(d);
    m = Math.max(m, Math.abs(d));
  }
  return m;
}

/**
 * Rotations acting on fractional k (for a real-space integer rotation R acting on fractional coordinates,
 * k transforms with (R⁻¹)ᵀ; for a group, the set {(R⁻¹)ᵀ} equals {Rᵀ} up to order, so Rᵀ is used).
 */
export function kRotations(realSpaceRotations: Mat3[]): Mat3[] {
  return realSpaceRotations.map((r) => [
    [r[0][0], r[1][0], r[2][0]],
    [r[0][1], r[1][1], r[2][1]],
    [r[0][2], r[1][2], r[2][2]],
  ]);
}

function apply(m: Mat3, k: Vec3): Vec3 {
  return [
    m[0][0] * k[0] + m[0][1] * k[1] + m[0][2] * k[2],
    m[1][0] * k[0] + m[1][1] * k[1] + m[1][2] * k[2],
    m[2][0] * k[0] + m[2][1] * k[1] + m[2][2] * k[2],
  ];
}

/** Smallest wrapped distance between k1 and any image of k2 under the rotations and time reversal. */
export function equivalenceDistance(k1: Vec3, k2: Vec3, kRots: Mat3[] | null): number {
  const images: Vec3[] = kRots && kRots.length ? kRots.map((r) => apply(r, k2)) : [k2];
  let best = Infinity;
  for (const im of images) {
    best = Math.min(best, wrappedDistance(k1, im), wrappedDistance(k1, [-im[0], -im[1], -im[2]]));
  }
  return best;
}
