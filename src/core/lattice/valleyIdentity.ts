/**
 * The valley an extremum belongs to, as a name that survives re-runs: one chosen member of the star of k
 * (its images under the crystal's point group acting on reciprocal space, together with time reversal
 * k → −k, modulo a reciprocal lattice vector). Two equivalent k-points have the same star and so the same
 * chosen member; a k-point found at an equivalent place in the next run keeps its valley.
 *
 * The choice: each image is brought into (−½, ½] per component and rounded to 4 decimals (the precision of
 * entry ids); the member that is largest component by component (first the largest first component, …) wins.
 * Without the crystal's rotations only time reversal is used (k and −k are one valley), which is true of
 * every crystal without magnetic order.
 */
import type { Mat3, Vec3 } from '../model';

const DECIMALS = 1e4;

/** k brought into (−½, ½] per component, rounded to 4 decimals, without "-0". */
export function centred(k: readonly number[]): Vec3 {
  return [0, 1, 2].map((i) => {
    let x = Math.round((k[i]! - Math.round(k[i]!)) * DECIMALS) / DECIMALS;
    if (x <= -0.5) x += 1;
    return x + 0;
  }) as Vec3;
}

function larger(a: Vec3, b: Vec3): boolean {
  for (let i = 0; i < 3; i++) if (a[i] !== b[i]) return a[i]! > b[i]!;
  return false;
}

function apply(m: Mat3, k: readonly number[]): Vec3 {
  return [
    m[0][0] * k[0]! + m[0][1] * k[1]! + m[0][2] * k[2]!,
    m[1][0] * k[0]! + m[1][1] * k[1]! + m[1][2] * k[2]!,
    m[2][0] * k[0]! + m[2][1] * k[1]! + m[2][2] * k[2]!,
  ];
}

/**
 * The chosen member of the star of `k` (fractional reciprocal coordinates). `reciprocalRotations`: the point
 * group acting on fractional k ((W⁻¹)ᵀ for each real-space rotation W), or null when the crystal is unknown.
 */
export function valleyRepresentative(k: readonly number[], reciprocalRotations: readonly Mat3[] | null): Vec3 {
  const images: Vec3[] =
    reciprocalRotations && reciprocalRotations.length ? reciprocalRotations.map((r) => apply(r, k)) : [[k[0]!, k[1]!, k[2]!]];
  let best: Vec3 | null = null;
  for (const q of images) {
    for (const c of [centred(q), centred([-q[0], -q[1], -q[2]])]) {
      if (best === null || larger(c, best)) best = c;
    }
  }
  return best!;
}
