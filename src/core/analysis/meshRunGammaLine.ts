/**
 * The mesh points on the line from a point P of a Γ-centred mesh to Γ: the points P·m/M, M the greatest common
 * divisor of P's integer mesh coordinates, from P (m = M) towards Γ (m = 1), each with its distance from P and
 * the irreducible point whose energies it has.
 */
import type { Vec3 } from '../model';
import type { MeshInterpolation } from '../interpolation/meshInterpolation';

export interface GammaLinePoints {
  /** P as used (fractional) and its length, Å⁻¹. */
  p: Vec3;
  length: number;
  /** Distance from P, Å⁻¹, ascending from 0, and the irreducible point (0-based) of each. */
  q: number[];
  irreducible: number[];
}

const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));

/** The line's points, or null when the mesh is shifted or P is not a mesh point. */
export function gammaLinePoints(run: MeshInterpolation, p: Vec3): GammaLinePoints | null {
  const { mesh } = run;
  if (mesh.shift.some((s) => s !== 0)) return null;
  const ints = p.map((v, i) => v * mesh.divisions[i]!);
  if (!ints.every((v) => Math.abs(v - Math.round(v)) < 1e-9)) return null;
  const steps = ints.map((v) => Math.abs(Math.round(v))).reduce(gcd, 0);
  if (steps === 0) return null;
  const length = Math.hypot(...run.toCart(p));
  const q: number[] = [];
  const irreducible: number[] = [];
  for (let m = steps; m >= 1; m--) {
    const j = [0, 1, 2].reduce((acc, i) => {
      const n = mesh.divisions[i]!;
      return acc * n + (((((Math.round(ints[i]!) * m) / steps) % n) + n) % n);
    }, 0);
    q.push((1 - m / steps) * length);
    irreducible.push(mesh.irreducibleOf[j]!);
  }
  return { p, length, q, irreducible };
}
