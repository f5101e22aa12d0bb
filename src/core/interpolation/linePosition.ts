/**
 * Where an extremum found anywhere in the zone lies, as people say it: "0.85 Γ→X" when it sits on the straight
 * line from Γ to an image of a labelled special point (any member of the star, any periodic image of k).
 */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse, mulMatVec } from '../lattice/linalg';
import type { SpecialPointMap } from '../lattice/specialPoints';

/** Fractional tolerance (standard reciprocal basis) for "on the line" and "not at an end". */
export const LINE_TOLERANCE = 2e-3;

export function positionOnGammaLine(map: SpecialPointMap, kUser: Vec3, tol: number = LINE_TOLERANCE): string | null {
  const invM: Mat3 = mat3Inverse(map.M);
  let best: { t: number; label: string } | null = null;
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        const ks = mulMatVec(invM, [kUser[0] + a, kUser[1] + b, kUser[2] + c]);
        for (const p of map.images) {
          if (p.label === 'Γ') continue;
          for (const q of p.k) {
            const qq = q[0] * q[0] + q[1] * q[1] + q[2] * q[2];
            if (qq === 0) continue;
            const t = (ks[0] * q[0] + ks[1] * q[1] + ks[2] * q[2]) / qq;
            if (t <= tol || t >= 1 - tol) continue;
            const off = Math.max(Math.abs(ks[0] - t * q[0]), Math.abs(ks[1] - t * q[1]), Math.abs(ks[2] - t * q[2]));
            if (off < tol && (!best || t < best.t)) best = { t, label: p.label };
          }
        }
      }
    }
  }
  return best ? `${best.t.toFixed(2)} Γ→${best.label}` : null;
}
