/**
 * Where an extremum found anywhere in the zone lies, as people say it: "0.85 Γ→X" when it sits on the straight
 * line from Γ to an image of a labelled special point (any member of the star, any periodic image of k).
 */
import type { Mat3, Vec3 } from '../model';
import { mat3Inverse, mulMatVec } from '../lattice/linalg';
import type { SpecialPointMap } from '../lattice/specialPoints';

/** Fractional tolerance (standard reciprocal basis) for "on the line" and "not at an end". */
export const LINE_TOLERANCE = 2e-3;

/** A map's images other than Γ, flat (qx, qy, qz, |q|² each, in the map's order), and what every call needs of it. */
interface LineEnds {
  invM: Mat3;
  q: Float64Array;
  labels: string[];
  /** The largest |component| of any image: a point on a line Γ→q has no component beyond it (plus the tolerance). */
  reach: number;
}

/** Per map, made once: a run asks for the position of every extremum, in code that mostly runs unoptimised. */
const lineEnds = new WeakMap<SpecialPointMap, LineEnds>();

function lineEndsOf(map: SpecialPointMap): LineEnds {
  let known = lineEnds.get(map);
  if (known) return known;
  const q: number[] = [];
  const labels: string[] = [];
  let reach = 0;
  for (const p of map.images) {
    if (p.label === 'Γ') continue;
    for (const v of p.k) {
      const qq = v[0] * v[0] + v[1] * v[1] + v[2] * v[2];
      if (qq === 0) continue;
      q.push(v[0], v[1], v[2], qq);
      labels.push(p.label);
      reach = Math.max(reach, Math.abs(v[0]), Math.abs(v[1]), Math.abs(v[2]));
    }
  }
  known = { invM: mat3Inverse(map.M), q: Float64Array.from(q), labels, reach };
  lineEnds.set(map, known);
  return known;
}

export function positionOnGammaLine(map: SpecialPointMap, kUser: Vec3, tol: number = LINE_TOLERANCE): string | null {
  const ends = lineEndsOf(map);
  const bound = ends.reach + tol;
  let best: { t: number; label: string } | null = null;
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        const ks = mulMatVec(ends.invM, [kUser[0] + a, kUser[1] + b, kUser[2] + c]);
        // On a line Γ→q (0 < t < 1, every component within tol of t·q) no component exceeds reach + tol: this
        // periodic image of k lies on none (most of the 27 do not), so its lines are not tried.
        if (Math.abs(ks[0]) > bound || Math.abs(ks[1]) > bound || Math.abs(ks[2]) > bound) continue;
        best = nearestOnLines(ks, ends, tol, best);
      }
    }
  }
  return best ? `${best.t.toFixed(2)} Γ→${best.label}` : null;
}

/** The line Γ→q (of ends) with the smallest t that ks lies on, or `best` when none has a smaller one. */
function nearestOnLines(
  ks: Vec3,
  ends: LineEnds,
  tol: number,
  best: { t: number; label: string } | null,
): { t: number; label: string } | null {
  const q = ends.q;
  for (let i = 0; i < q.length; i += 4) {
    const t = (ks[0] * q[i]! + ks[1] * q[i + 1]! + ks[2] * q[i + 2]!) / q[i + 3]!;
    if (t <= tol || t >= 1 - tol) continue;
    const off = Math.max(Math.abs(ks[0] - t * q[i]!), Math.abs(ks[1] - t * q[i + 1]!), Math.abs(ks[2] - t * q[i + 2]!));
    if (off < tol && (!best || t < best.t)) best = { t, label: ends.labels[i / 4]! };
  }
  return best;
}
