/**
 * Where a k-point lies on a labelled line of the path, as people say it: "0.85 Γ→X" (85 % of the way from Γ
 * to X). Pure: the lines come from the path's own labelled segments; a point not on a labelled line (or at
 * its ends, which carry their own label) has no such position.
 */
import type { BandStructure, Vec3 } from '../model';
import { pathGeometry } from './kpath';

export interface LabelledLine {
  from: string;
  to: string;
  /** Fractional k of the two ends. */
  kFrom: Vec3;
  kTo: Vec3;
}

/** Fractional tolerance for "on the line" and for "not at an end". */
export const ON_LINE_TOLERANCE = 1e-3;

/** A jump label "K|U" names the end of one segment (K) and the start of the next (U). */
function endPart(label: string): string {
  return label.split('|')[0]!;
}
function startPart(label: string): string {
  const parts = label.split('|');
  return parts[parts.length - 1]!;
}

/** The straight segments of a band structure's path whose two ends are labelled. */
export function labelledLines(bs: BandStructure): LabelledLine[] {
  if (bs.sampling !== 'path' || bs.nk < 2) return [];
  const k = (i: number): Vec3 => [bs.kpoints[3 * i]!, bs.kpoints[3 * i + 1]!, bs.kpoints[3 * i + 2]!];
  const out: LabelledLine[] = [];
  for (const s of pathGeometry(bs).segments) {
    if (s.startLabel === null || s.endLabel === null || s.end <= s.start) continue;
    out.push({ from: startPart(s.startLabel), to: endPart(s.endLabel), kFrom: k(s.start), kTo: k(s.end) });
  }
  return out;
}

/** "0.85 Γ→X" when k lies strictly inside a labelled line; null otherwise. */
export function pathPosition(k: readonly number[], lines: readonly LabelledLine[], tol: number = ON_LINE_TOLERANCE): string | null {
  for (const l of lines) {
    const d = [0, 1, 2].map((i) => l.kTo[i]! - l.kFrom[i]!);
    const dd = d[0]! ** 2 + d[1]! ** 2 + d[2]! ** 2;
    if (dd === 0) continue;
    const t = ((k[0]! - l.kFrom[0]) * d[0]! + (k[1]! - l.kFrom[1]) * d[1]! + (k[2]! - l.kFrom[2]) * d[2]!) / dd;
    if (t <= tol || t >= 1 - tol) continue;
    const off = Math.max(...[0, 1, 2].map((i) => Math.abs(l.kFrom[i]! + t * d[i]! - k[i]!)));
    // Counted from Γ when the line ends there ("0.85 Γ→Z" rather than "0.15 Z→Γ"), as people say it.
    if (off < tol) return l.to === 'Γ' && l.from !== 'Γ' ? `${(1 - t).toFixed(2)} Γ→${l.from}` : `${t.toFixed(2)} ${l.from}→${l.to}`;
  }
  return null;
}
