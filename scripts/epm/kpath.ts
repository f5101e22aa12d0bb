/**
 * k-paths for the fixtures, in fractional coordinates of the fcc primitive reciprocal lattice
 * (a1 = (0, ½, ½)a, a2 = (½, 0, ½)a, a3 = (½, ½, 0)a).
 *
 * Special points and the standard path Γ–X–W–K–Γ–L–U–W–L–K|U–X: W. Setyawan and S. Curtarolo,
 * Comput. Mater. Sci. 49, 299 (2010), table for the FCC lattice.
 */
import type { Vec3 } from '../../src/core/model';

export interface PathPoint {
  label: string;
  k: Vec3;
}

export const FCC_POINTS: Record<string, Vec3> = {
  Γ: [0, 0, 0],
  X: [0.5, 0, 0.5],
  W: [0.5, 0.25, 0.75],
  K: [0.375, 0.375, 0.75],
  L: [0.5, 0.5, 0.5],
  U: [0.625, 0.25, 0.625],
  /**
   * Not a Setyawan–Curtarolo label: the X point along the [001] strain axis, (2π/a)(0, 0, 1), named Z in
   * the strained demo runs so it is told apart from the in-plane X = (2π/a)(0, 1, 0).
   */
  Z: [0.5, 0.5, 0],
};

/** Path segments as pairs of labels. */
export type SegmentList = [string, string][];

export const FCC_STANDARD_PATH: SegmentList = [
  ['Γ', 'X'],
  ['X', 'W'],
  ['W', 'K'],
  ['K', 'Γ'],
  ['Γ', 'L'],
  ['L', 'U'],
  ['U', 'W'],
  ['W', 'L'],
  ['L', 'K'],
  ['U', 'X'],
];

/** The path of the strained demo runs: both kinds of Δ valley (in-plane X, out-of-plane Z) and L. */
export const STRAIN_DEMO_PATH: SegmentList = [
  ['Z', 'Γ'],
  ['Γ', 'X'],
  ['X', 'W'],
  ['W', 'K'],
  ['K', 'Γ'],
  ['Γ', 'L'],
];

export interface LinePath {
  pointsPerSegment: number;
  segments: [PathPoint, PathPoint][];
  /** nk × 3 fractional k-points in line-mode order (segment ends repeated, as VASP writes them). */
  kpoints: Float64Array;
}

/** Sample each segment with n points including both ends, like VASP's line mode. */
export function linePath(segmentLabels: SegmentList, pointsPerSegment: number): LinePath {
  const segments = segmentLabels.map(([a, b]) => [point(a), point(b)] as [PathPoint, PathPoint]);
  const n = pointsPerSegment;
  const kpoints = new Float64Array(segments.length * n * 3);
  segments.forEach(([a, b], s) => {
    for (let i = 0; i < n; i++) {
      const t = i / (n - 1);
      for (let j = 0; j < 3; j++) kpoints[3 * (s * n + i) + j] = a.k[j]! + (b.k[j]! - a.k[j]!) * t;
    }
  });
  return { pointsPerSegment: n, segments, kpoints };
}

function point(label: string): PathPoint {
  const k = FCC_POINTS[label];
  if (!k) throw new Error(`unknown fcc point ${label}`);
  return { label, k };
}
