/**
 * The points of a k-mesh (the full zone, after symmetry expansion) that lie on a drawn path: where the
 * interpolated bands of a mesh run are pinned to data. A mesh n1×n2×n3 with shift s holds k = (j + s)/n per
 * axis (fractional reciprocal coordinates, any periodic image); a straight segment k(t) = a + t (b − a),
 * 0 ≤ t ≤ 1, passes through a mesh point where (a_i + t d_i) n_i − s_i is an integer on every axis. The
 * candidates t are those of the axis the segment crosses fastest; the other axes are checked at each.
 */
import type { BandStructure, Vec3 } from '../model';
import { symmetryContext } from '../analysis/valleyCount';
import { recogniseMesh, type RegularMesh } from './regularMesh';

/** A mesh point counts as on the segment when every axis is within this fraction of a mesh step. */
export const ON_PATH_STEPS = 1e-4;

export interface MeshPointOnSegment {
  /** Fraction of the segment, 0 at its start, 1 at its end. */
  t: number;
  /** Index of the mesh point in mesh order, j = (j1 n2 + j2) n3 + j3 (as RegularMesh.irreducibleOf). */
  meshIndex: number;
}

/** The mesh points on the segment from `a` to `b` (fractional), in order along it. */
export function meshPointsOnSegment(
  mesh: Pick<RegularMesh, 'divisions' | 'shift'>,
  a: Vec3,
  b: Vec3,
  tolerance = ON_PATH_STEPS,
): MeshPointOnSegment[] {
  const n = mesh.divisions;
  const s = mesh.shift;
  // u_i(t) = (a_i + t d_i) n_i − s_i, in mesh steps.
  const u0 = [0, 1, 2].map((i) => a[i]! * n[i]! - s[i]!);
  const du = [0, 1, 2].map((i) => (b[i]! - a[i]!) * n[i]!);
  let axis = 0;
  for (let i = 1; i < 3; i++) if (Math.abs(du[i]!) > Math.abs(du[axis]!)) axis = i;
  const out: MeshPointOnSegment[] = [];
  const offInteger = (x: number): number => Math.abs(x - Math.round(x));
  if (Math.abs(du[axis]!) < tolerance) {
    // A segment shorter than the tolerance: its start, if that is a mesh point.
    if (u0.every((x) => offInteger(x) <= tolerance)) out.push({ t: 0, meshIndex: meshIndexOf(n, u0) });
    return out;
  }
  const lo = Math.min(u0[axis]!, u0[axis]! + du[axis]!);
  const hi = Math.max(u0[axis]!, u0[axis]! + du[axis]!);
  for (let m = Math.ceil(lo - tolerance); m <= Math.floor(hi + tolerance); m++) {
    const t = Math.min(1, Math.max(0, (m - u0[axis]!) / du[axis]!));
    const u = [0, 1, 2].map((i) => u0[i]! + t * du[i]!);
    if (u.every((x) => offInteger(x) <= tolerance)) out.push({ t, meshIndex: meshIndexOf(n, u) });
  }
  return out.sort((p, q) => p.t - q.t);
}

function meshIndexOf(n: readonly number[], u: readonly number[]): number {
  const j = [0, 1, 2].map((i) => ((Math.round(u[i]!) % n[i]!) + n[i]!) % n[i]!);
  return (j[0]! * n[1]! + j[1]!) * n[2]! + j[2]!;
}

/** The mesh points on a drawn path, with where they are drawn and whose energies they carry. */
export interface MeshPointsOnPath {
  /** Path distance of each point (the units of the path's geometry). */
  distance: Float64Array;
  /** Fractional k of each point as it lies on the path (count × 3). */
  kpoints: Float64Array;
  /** 0-based index of the run's k-point (as written in the file) that stands for it by symmetry. */
  irreducible: Int32Array;
}

/** What of a path the search needs: its k-points, their distances, its straight segments (inclusive). */
export interface PathForMeshPoints {
  kpoints: Float64Array;
  distance: Float64Array;
  segments: readonly { start: number; end: number }[];
}

/**
 * The mesh points on each segment of the path, in path order. A point where two segments meet is kept once
 * (at one distance, for the same k-point of the run); at a break of the path both sides keep theirs.
 */
export function meshPointsOnPath(mesh: RegularMesh, path: PathForMeshPoints): MeshPointsOnPath {
  const distance: number[] = [];
  const kpoints: number[] = [];
  const irreducible: number[] = [];
  const k = (i: number): Vec3 => [path.kpoints[3 * i]!, path.kpoints[3 * i + 1]!, path.kpoints[3 * i + 2]!];
  for (const seg of path.segments) {
    if (seg.end <= seg.start) continue;
    const [a, b] = [k(seg.start), k(seg.end)];
    const [d0, d1] = [path.distance[seg.start]!, path.distance[seg.end]!];
    for (const p of meshPointsOnSegment(mesh, a, b)) {
      const irr = mesh.irreducibleOf[p.meshIndex]!;
      const x = d0 + p.t * (d1 - d0);
      const last = irreducible.length - 1;
      if (last >= 0 && irreducible[last] === irr && Math.abs(distance[last]! - x) <= 1e-9 * (1 + Math.abs(x))) continue;
      distance.push(x);
      kpoints.push(...[0, 1, 2].map((c) => a[c]! + p.t * (b[c]! - a[c]!)));
      irreducible.push(irr);
    }
  }
  return { distance: Float64Array.from(distance), kpoints: Float64Array.from(kpoints), irreducible: Int32Array.from(irreducible) };
}

/** The mesh points on the path with the run's energies there: energies[spin][i * nBands + band] (eV, as written). */
export interface MeshPointsWithEnergies extends MeshPointsOnPath {
  nBands: number;
  energies: Float64Array[];
}

/**
 * The mesh points of a mesh run on the path its interpolated bands are drawn along (the path's k-points in
 * the run's fractional coordinates), each with the run's energies of the first `nBands` bands; or the reason
 * there are none to draw (the run's k-points are not a mesh expanded by the crystal's symmetry).
 */
export function meshRunPointsOnPath(
  run: BandStructure,
  path: PathForMeshPoints,
  nBands: number,
): { points: MeshPointsWithEnergies; reason: null } | { points: null; reason: string } {
  const ctx = symmetryContext(run);
  if (!ctx.sym) return { points: null, reason: ctx.unavailable ?? 'The crystal symmetry is unknown.' };
  // Points listed more than once by symmetry (a run reduced by fewer operations) are drawn with the first one's energies.
  const rec = recogniseMesh(run.kpoints, run.weights, ctx.sym.reciprocalPointGroup, { mergeEquivalent: true });
  if (!rec.mesh) return { points: null, reason: rec.reason };
  const on = meshPointsOnPath(rec.mesh, path);
  const count = on.irreducible.length;
  const bands = Math.min(nBands, run.nBands);
  const energies = run.energies.map((e) => {
    const out = new Float64Array(count * bands);
    for (let i = 0; i < count; i++)
      out.set(e.subarray(on.irreducible[i]! * run.nBands, on.irreducible[i]! * run.nBands + bands), i * bands);
    return out;
  });
  return { points: { ...on, nBands: bands, energies }, reason: null };
}
