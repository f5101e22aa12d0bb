/**
 * When two extrema of two runs are the same valley: the little group of k, the lattice-type check, and the
 * matcher (equivalent under the reference crystal's rotations, or drifted a little within the same crystal
 * with the same little group); and which extrema a comparison follows at all.
 */
import type { ExtremumReport, Mat3, Report, Vec3 } from '../model';
import { equivalenceDistance, type kRotations } from './kEquivalence';
import type { RunInput } from './compareRuns';

/** Tolerance (fractional, max-norm modulo G) within which a drifting extremum of the same crystal is one valley. */
export const VALLEY_K_TOLERANCE = 0.06;
/** Tolerance within which two k-points are the same point (written k, fitted vertices). */
export const VALLEY_SAME_K_TOLERANCE = 2e-3;

function apply(m: Mat3, k: Vec3): Vec3 {
  return [
    m[0][0] * k[0] + m[0][1] * k[1] + m[0][2] * k[2],
    m[1][0] * k[0] + m[1][1] * k[1] + m[1][2] * k[2],
    m[2][0] * k[0] + m[2][1] * k[1] + m[2][2] * k[2],
  ];
}

/** Order of the little group of k (operations with time reversal that map k to itself modulo G). */
export function littleGroupOrder(k: Vec3, kRots: Mat3[] | null): number {
  const ops =
    kRots && kRots.length
      ? kRots
      : [
          [
            [1, 0, 0],
            [0, 1, 0],
            [0, 0, 1],
          ] as Mat3,
        ];
  let n = 0;
  for (const r of ops) {
    const q = apply(r, k);
    for (const s of [q, [-q[0], -q[1], -q[2]] as Vec3]) {
      let same = true;
      for (let i = 0; i < 3; i++) {
        const d = s[i]! - k[i]!;
        if (Math.abs(d - Math.round(d)) > VALLEY_SAME_K_TOLERANCE) same = false;
      }
      if (same) n++;
    }
  }
  return n;
}

/** Lattices describe the same cell choice when their metrics are within 20 % (a strain series, not another cell). */
export function sameShape(a: Mat3, b: Mat3): boolean {
  for (let i = 0; i < 3; i++) {
    const la = Math.hypot(...a[i]!);
    const lb = Math.hypot(...b[i]!);
    if (Math.abs(la / lb - 1) > 0.2) return false;
  }
  return true;
}

/** Whether two runs share a lattice type, and why not when they do not. */
export function shareLatticeType(a: RunInput, b: RunInput): { shared: boolean; why: string } {
  if (a.latticeType && b.latticeType && a.latticeType === b.latticeType) return { shared: true, why: '' };
  if (a.lattice && b.lattice) {
    if (sameShape(a.lattice, b.lattice)) return { shared: true, why: '' };
    return {
      shared: false,
      why: `its cell${a.latticeType && b.latticeType ? ` (${b.latticeType})` : ''} is not the reference's${a.latticeType && b.latticeType ? ` (${a.latticeType})` : ''}, strained or not`,
    };
  }
  if (a.latticeType && b.latticeType)
    return { shared: false, why: `its lattice type ${b.latticeType} differs from the reference's ${a.latticeType}` };
  // Nothing known about one of them: k-points are compared as written (same point only).
  return { shared: true, why: '' };
}

export interface Matcher {
  kRots: Mat3[] | null;
  /** Drift of an off-symmetry valley allowed (the same crystal). */
  drift: boolean;
  shared: boolean;
}

export function sameValley(m: Matcher, a: Vec3, b: Vec3): boolean {
  if (!m.shared) return false;
  const d = equivalenceDistance(a, b, m.kRots);
  if (d < VALLEY_SAME_K_TOLERANCE) return true;
  if (!m.drift || d >= VALLEY_K_TOLERANCE) return false;
  // A drifting valley keeps its symmetry: the same little group, and never a high-symmetry point's.
  const ga = littleGroupOrder(a, m.kRots);
  return ga === littleGroupOrder(b, m.kRots) && ga < (m.kRots && m.kRots.length ? 2 * m.kRots.length : 2);
}

/**
 * The extrema a comparison follows: never a candidate the analysis set aside (a saddle, a crossing, a path
 * end), even when a report lists it among its extrema too (reports built from older annotations files).
 */
export function trackedExtrema(report: Report, rots: ReturnType<typeof kRotations> | null): ExtremumReport[] {
  const rejected = report.rejected ?? [];
  if (!rejected.length) return report.extrema;
  return report.extrema.filter(
    (e) =>
      e.kind === 'vbm' ||
      e.kind === 'cbm' ||
      !rejected.some(
        (x) => x.spin === e.spin && (x.band === e.band || Math.abs(x.eV - e.eV) <= 1e-3) && equivalenceDistance(x.k, e.k, rots) < 1e-4,
      ),
  );
}
