/**
 * The mesh points near a point of the zone: every point of the full mesh (the irreducible points expanded by
 * symmetry), in every periodic image, that lies within a radius of k, with its cartesian offset from k. Only
 * the box of mesh indices the radius can reach is visited (|Δf_i| ≤ |Δk| · |column i of B⁻¹|).
 */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse } from '../lattice/linalg';
import type { RegularMesh } from './regularMesh';

export interface NearbyMeshPoint {
  /** Full-mesh index. */
  j: number;
  /** The irreducible point whose energies it carries. */
  irreducible: number;
  /** Cartesian offset from k, Å⁻¹. */
  dk: Vec3;
}

/** Mesh points within `radius` (Å⁻¹) of fractional k; `reciprocal` holds the reciprocal vectors as rows. */
export function meshPointsNear(mesh: RegularMesh, reciprocal: Mat3, kFrac: Vec3, radius: number): NearbyMeshPoint[] {
  const inv = mat3Inverse(reciprocal);
  const [n1, n2, n3] = mesh.divisions;
  const range = [0, 1, 2].map((i) => {
    const reach = radius * Math.hypot(inv[0][i]!, inv[1][i]!, inv[2][i]!);
    const n = mesh.divisions[i]!;
    const s = mesh.shift[i]!;
    return [Math.ceil((kFrac[i]! - reach) * n - s), Math.floor((kFrac[i]! + reach) * n - s)] as const;
  });
  const wrap = (d: number, n: number): number => ((d % n) + n) % n;
  const out: NearbyMeshPoint[] = [];
  for (let d1 = range[0]![0]; d1 <= range[0]![1]; d1++) {
    for (let d2 = range[1]![0]; d2 <= range[1]![1]; d2++) {
      for (let d3 = range[2]![0]; d3 <= range[2]![1]; d3++) {
        const g = [(d1 + mesh.shift[0]) / n1 - kFrac[0], (d2 + mesh.shift[1]) / n2 - kFrac[1], (d3 + mesh.shift[2]) / n3 - kFrac[2]];
        const dk = [0, 1, 2].map((x) => g[0]! * reciprocal[0][x]! + g[1]! * reciprocal[1][x]! + g[2]! * reciprocal[2][x]!) as Vec3;
        if (Math.hypot(...dk) > radius) continue;
        const j = (wrap(d1, n1) * n2 + wrap(d2, n2)) * n3 + wrap(d3, n3);
        out.push({ j, irreducible: mesh.irreducibleOf[j]!, dk });
      }
    }
  }
  return out;
}
