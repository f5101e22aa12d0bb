/**
 * Path labels from a KPOINTS file in line mode, placed on the k-points of an eigenvalue file (EIGENVAL or
 * vasprun.xml): one rule for both readers.
 *   1. When the file holds exactly segments × points-per-segment k-points, each segment's ends label its first
 *      and last point, provided the coordinates agree (within SAME_K_TOLERANCE).
 *   2. Otherwise (or when a coordinate disagrees) each labelled end labels every k-point equal to it.
 */
import type { InputWarning, KLabel, Mat3, SourceFile, Vec3 } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { ReaderError } from '../../errors';
import { sha256Hex } from '../../hash';
import { kpointsCartesianToFractional, readKpoints, type KpointsContent, type LineModePath } from './kpoints';

/** Largest difference of a fractional coordinate for two k-points to count as the same (files print 6–8 digits). */
export const SAME_K_TOLERANCE = 2e-4;

/** Whether the fractional k-point `a` equals the one at kpoints[off .. off+2] within `tol` per coordinate. */
export function sameK(a: Vec3, kpoints: ArrayLike<number>, off: number, tol = SAME_K_TOLERANCE): boolean {
  return Math.abs(a[0] - kpoints[off]!) < tol && Math.abs(a[1] - kpoints[off + 1]!) < tol && Math.abs(a[2] - kpoints[off + 2]!) < tol;
}

/**
 * Place the KPOINTS segment-end labels on `nk` fractional k-points. `latticeOverScale` (the POSCAR lattice
 * divided by its scale factor) converts a cartesian path; without it a cartesian path places no label.
 * `warning` says what did not fit, in one sentence, or is null.
 */
export function labelsFromLineMode(
  path: LineModePath,
  kpoints: Float64Array,
  nk: number,
  latticeOverScale: Mat3 | null,
): { labels: KLabel[]; warning: string | null } {
  let ends = path.ends.map((e) => ({ ...e }));
  if (path.coordinates === 'cartesian') {
    if (!latticeOverScale)
      return { labels: [], warning: 'KPOINTS gives the path in cartesian coordinates but no structure is known: labels were not placed.' };
    ends = ends.map((e) => ({ ...e, k: kpointsCartesianToFractional(e.k, latticeOverScale) }));
  }
  const n = path.pointsPerSegment;
  const segs = ends.length / 2;
  const labels = new Map<number, string>();
  if (nk === n * segs) {
    let ok = true;
    for (let s = 0; s < segs; s++) {
      const a = ends[2 * s]!;
      const b = ends[2 * s + 1]!;
      const ia = s * n;
      const ib = s * n + n - 1;
      if (!sameK(a.k, kpoints, 3 * ia) || !sameK(b.k, kpoints, 3 * ib)) ok = false;
      if (a.label) labels.set(ia, a.label);
      if (b.label) labels.set(ib, b.label);
    }
    if (ok) return { labels: labelList(labels), warning: null };
    labels.clear();
  }
  // Fall back to matching coordinates: each end labels the k-points equal to it.
  let matched = 0;
  for (const e of ends) {
    if (!e.label) continue;
    let hit = false;
    for (let i = 0; i < nk; i++) {
      if (sameK(e.k, kpoints, 3 * i)) {
        labels.set(i, e.label);
        hit = true;
      }
    }
    if (hit) matched++;
  }
  const named = ends.filter((e) => e.label).length;
  const warning =
    nk === n * segs
      ? null
      : `KPOINTS describes ${segs} segments of ${n} points (${n * segs} k-points) but the eigenvalue file has ${nk}; labels were placed by matching coordinates (${matched} of ${named} found).`;
  return { labels: labelList(labels), warning };
}

/** Labels by k-point index, in index order. */
export function labelList(m: ReadonlyMap<number, string>): KLabel[] {
  return [...m.entries()].sort((a, b) => a[0] - b[0]).map(([index, label]) => ({ index, label }));
}

/**
 * A KPOINTS beside the eigenvalue file, read for its path: recorded in `files` when `use` accepts what it
 * holds; a file that cannot be read becomes a warning (labels are then not used), never an error.
 */
export function readKpointsCompanion(
  kfile: InputFile,
  files: SourceFile[],
  warnings: InputWarning[],
  use: (content: KpointsContent) => boolean = () => true,
): KpointsContent | null {
  try {
    const content = readKpoints(kfile);
    if (!use(content)) return null;
    files.push({ role: 'kpath', path: kfile.path, sha256: sha256Hex(kfile.bytes) });
    return content;
  } catch (e) {
    if (!(e instanceof ReaderError)) throw e;
    warnings.push({ code: 'kpath-unreadable', message: `${e.message}; labels were not used`, file: kfile.path, line: e.line });
    return null;
  }
}

/** labelsFromLineMode, its warning added to `warnings` (attributed to the KPOINTS file). */
export function placeLineModeLabels(
  path: LineModePath,
  kpoints: Float64Array,
  nk: number,
  latticeOverScale: Mat3 | null,
  kfile: string,
  warnings: InputWarning[],
): KLabel[] {
  const r = labelsFromLineMode(path, kpoints, nk, latticeOverScale);
  if (r.warning) warnings.push({ code: 'kpath-mismatch', message: r.warning, file: kfile });
  return r.labels;
}
