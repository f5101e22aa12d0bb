/**
 * The mesh points near a point of the zone: every point of the full mesh (the irreducible points expanded by
 * symmetry) whose nearest periodic image lies within a radius of k, with its cartesian offset from k.
 */
import type { Mat3, Vec3 } from '../model';
import type { RegularMesh } from './regularMesh';
import { meshPoint } from './meshExtrema';

export interface NearbyMeshPoint {
  /** Full-mesh index. */
  j: number;
  /** The irreducible point whose energies it carries. */
  irreducible: number;
  /** Cartesian offset from k, Å⁻¹. */
  dk: Vec3;
}

/** Mesh points within `radius` (Å⁻¹) of fractional k (each image within the radius listed once). */
export function meshPointsNear(mesh: RegularMesh, reciprocal: Mat3, kFrac: Vec3, radius: number): NearbyMeshPoint[] {
  const out: NearbyMeshPoint[] = [];
  const b = reciprocal;
  for (let j = 0; j < mesh.total; j++) {
    const p = meshPoint(mesh, j);
    const f = [0, 1, 2].map((i) => p[i]! - kFrac[i]! - Math.round(p[i]! - kFrac[i]!));
    // The cartesian nearest image need not be the fractional one in an oblique cell: try the neighbours too.
    for (let a = -1; a <= 1; a++) {
      for (let c = -1; c <= 1; c++) {
        for (let e = -1; e <= 1; e++) {
          const g = [f[0]! + a, f[1]! + c, f[2]! + e];
          const dk = [0, 1, 2].map((x) => g[0]! * b[0][x]! + g[1]! * b[1][x]! + g[2]! * b[2][x]!) as Vec3;
          if (Math.hypot(...dk) <= radius) out.push({ j, irreducible: mesh.irreducibleOf[j]!, dk });
        }
      }
    }
  }
  return out;
}
