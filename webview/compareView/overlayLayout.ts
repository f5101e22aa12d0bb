/**
 * Where each overlaid run goes on the x axis. When every run has the same path (the same labelled segments,
 * in order, with the same breaks), the runs share one axis: each segment of a run is stretched onto the
 * first run's segment, so Γ sits on Γ even when strain changed the segment lengths. Otherwise the runs are
 * drawn side by side, each on its own stretch of the axis. Pure (no DOM).
 */
import type { PathSegmentData, PathTickData } from '../../src/protocol';

export interface PathOf {
  nk: number;
  distance: Float64Array;
  segments: PathSegmentData[];
  ticks: PathTickData[];
}

/** A path's identity: its segments' end labels and breaks (labels compared as written, e.g. 'K|U'). */
export function pathSignature(p: PathOf): string {
  if (p.segments.length === 0) return `points:${p.nk}`;
  return p.segments.map((s) => `${s.afterJump ? '|' : ''}${s.startLabel ?? '?'}-${s.endLabel ?? '?'}`).join(' ');
}

/** True when all runs can share one x axis: same segments with labels at both ends, same breaks. */
export function pathsMatch(paths: readonly PathOf[]): boolean {
  if (paths.length < 2) return true;
  const first = pathSignature(paths[0]!);
  if (paths[0]!.segments.length === 0 || first.includes('?')) return false;
  return paths.every((p) => pathSignature(p) === first);
}

export interface OverlayLayout {
  shared: boolean;
  /** Per run: x (in the layout's own units, 0…total) of every k-point. */
  x: Float64Array[];
  /** Total width in layout units. */
  total: number;
  /** Where each run's stretch starts and ends (side by side; the whole axis when shared). */
  spans: [number, number][];
  /** Ticks to draw: layout x and label. */
  ticks: { x: number; label: string; run: number }[];
  /** Positions of separators between side-by-side runs. */
  separators: number[];
}

/** Space between side-by-side runs, as a fraction of the widest run. */
const GAP_FRACTION = 0.06;

export function layoutOverlay(paths: readonly PathOf[]): OverlayLayout {
  if (paths.length === 0) return { shared: true, x: [], total: 1, spans: [], ticks: [], separators: [] };
  if (pathsMatch(paths)) {
    const ref = paths[0]!;
    const x = paths.map((p) => {
      if (p === ref) return Float64Array.from(ref.distance);
      const out = new Float64Array(p.nk);
      p.segments.forEach((s, i) => {
        const r = ref.segments[i]!;
        const r0 = ref.distance[r.start]!;
        const r1 = ref.distance[r.end]!;
        const d0 = p.distance[s.start]!;
        const d1 = p.distance[s.end]!;
        const scale = d1 > d0 ? (r1 - r0) / (d1 - d0) : 0;
        for (let k = s.start; k <= s.end; k++) out[k] = r0 + (p.distance[k]! - d0) * scale;
      });
      return out;
    });
    const total = Math.max(1e-9, ref.distance[ref.nk - 1]! - ref.distance[0]!);
    const x0 = ref.distance[0]!;
    for (const a of x) for (let i = 0; i < a.length; i++) a[i] = a[i]! - x0;
    return {
      shared: true,
      x,
      total,
      spans: paths.map(() => [0, total] as [number, number]),
      ticks: ref.ticks.map((t) => ({ x: t.distance - x0, label: t.label, run: 0 })),
      separators: [],
    };
  }
  const lengths = paths.map((p) => Math.max(1e-9, p.distance[p.nk - 1]! - p.distance[0]!));
  const gap = Math.max(...lengths) * GAP_FRACTION;
  let at = 0;
  const x: Float64Array[] = [];
  const spans: [number, number][] = [];
  const ticks: OverlayLayout['ticks'] = [];
  const separators: number[] = [];
  paths.forEach((p, i) => {
    if (i > 0) {
      separators.push(at + gap / 2);
      at += gap;
    }
    const d0 = p.distance[0]!;
    const a = new Float64Array(p.nk);
    for (let k = 0; k < p.nk; k++) a[k] = at + p.distance[k]! - d0;
    x.push(a);
    for (const t of p.ticks) ticks.push({ x: at + t.distance - d0, label: t.label, run: i });
    spans.push([at, at + lengths[i]!]);
    at += lengths[i]!;
  });
  return { shared: false, x, total: at, spans, ticks, separators };
}
