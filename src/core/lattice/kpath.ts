/**
 * Geometry of a k-path: cartesian k (Å⁻¹, with the 2π), cumulative distance, straight segments, jumps.
 *
 * Segment rules (common practice of line-mode runs):
 * - a repeated point (the end of one segment written again as the start of the next) continues the path:
 *   distance does not advance and a new segment starts there;
 * - a change of direction at a point starts a new segment that shares that point;
 * - a jump (consecutive points that are both labelled with different labels, e.g. K then U, or a step far
 *   longer than the path's typical step) starts a new, disconnected segment: distance does not advance.
 */
import type { BandStructure } from '../model';
import { reciprocalLattice, kpointsToCartesian } from './reciprocal';

export interface PathSegment {
  /** First and last k index (inclusive). */
  start: number;
  end: number;
  startLabel: string | null;
  endLabel: string | null;
  /** True when this segment starts with a jump from the previous one (not connected). */
  afterJump: boolean;
}

export interface PathTick {
  distance: number;
  label: string;
  index: number;
}

export interface PathGeometry {
  /** nk × 3 cartesian k in Å⁻¹, or null when the lattice is unknown. */
  cartesian: Float64Array | null;
  /** Cumulative distance along the path. */
  distance: Float64Array;
  /** 'inverse-angstrom' with a lattice, 'fractional' without, 'written' when the file gave distances. */
  units: 'inverse-angstrom' | 'fractional' | 'written';
  segments: PathSegment[];
  /** Label ticks; labels meeting at one distance are joined as 'K|U'. */
  ticks: PathTick[];
}

const DUP_TOL = 1e-7;

/**
 * One geometry per band structure (the analysis, the path-position text and the editor all ask for it), kept
 * while the arrays it was computed from are the same ones. Callers must not change what it returns.
 */
interface CachedGeometry {
  kpoints: Float64Array;
  labels: BandStructure['labels'];
  lattice: BandStructure['lattice'];
  writtenDistance: BandStructure['writtenDistance'];
  nk: number;
  geometry: PathGeometry;
}
const geometries = new WeakMap<BandStructure, CachedGeometry>();

export function pathGeometry(bs: BandStructure): PathGeometry {
  const hit = geometries.get(bs);
  if (
    hit &&
    hit.kpoints === bs.kpoints &&
    hit.labels === bs.labels &&
    hit.lattice === bs.lattice &&
    hit.writtenDistance === bs.writtenDistance &&
    hit.nk === bs.nk
  )
    return hit.geometry;
  const geometry = computePathGeometry(bs);
  geometries.set(bs, {
    kpoints: bs.kpoints,
    labels: bs.labels,
    lattice: bs.lattice,
    writtenDistance: bs.writtenDistance,
    nk: bs.nk,
    geometry,
  });
  return geometry;
}

function computePathGeometry(bs: BandStructure): PathGeometry {
  const nk = bs.nk;
  const cart = bs.lattice ? kpointsToCartesian(bs.kpoints, reciprocalLattice(bs.lattice)) : null;
  const pts = cart ?? bs.kpoints;
  // The label at each k (the last given for an index, as a Map built from the list would keep): an array read
  // per point, not a Map lookup.
  const labelAt: (string | undefined)[] = new Array<string | undefined>(nk).fill(undefined);
  for (const l of bs.labels) if (Number.isInteger(l.index) && l.index >= 0 && l.index < nk) labelAt[l.index] = l.label;
  const step = new Float64Array(nk);
  for (let i = 1; i < nk; i++) {
    step[i] = Math.hypot(pts[3 * i]! - pts[3 * i - 3]!, pts[3 * i + 1]! - pts[3 * i - 2]!, pts[3 * i + 2]! - pts[3 * i - 1]!);
  }

  const segments: PathSegment[] = [];
  const distance = new Float64Array(nk);
  let segStart = 0;
  let afterJump = false;
  // Direction of the previous step (a unit vector; hasDir false when there is none): three numbers, not an array per point.
  let hasDir = false;
  let dx = 0;
  let dy = 0;
  let dz = 0;
  const close = (end: number, nextAfterJump: boolean): void => {
    segments.push({ start: segStart, end, startLabel: labelAt[segStart] ?? null, endLabel: labelAt[end] ?? null, afterJump });
    afterJump = nextAfterJump;
  };
  for (let i = 1; i < nk; i++) {
    const s = step[i]!;
    if (s <= DUP_TOL) {
      // Repeated point: the path continues; a new segment starts here.
      distance[i] = distance[i - 1]!;
      if (i - 1 > segStart) close(i - 1, false);
      segStart = i;
      hasDir = false;
      continue;
    }
    const la = labelAt[i - 1];
    const lb = labelAt[i];
    // A labelled jump: the end of one segment and the start of the next, both labelled, with the new
    // segment continuing unlabelled after it (a path written only at its corners has no jumps this way).
    const labelledJump =
      la !== undefined && lb !== undefined && la !== lb && i - 1 > segStart && i + 1 < nk && labelAt[i + 1] === undefined;
    // An unlabelled jump: a step far longer than the steps on both sides of it (legs of different
    // densities are not jumps: their steps are alike within each leg).
    // neighbourStep's answers, read directly when the adjacent step is not a repeat (nearly always).
    const before = i - 1 >= 1 && step[i - 1]! > DUP_TOL ? step[i - 1]! : neighbourStep(step, i, -1);
    const after = i + 1 < nk && step[i + 1]! > DUP_TOL ? step[i + 1]! : neighbourStep(step, i, +1);
    const longJump = before > 0 && after > 0 && s > 4 * Math.max(before, after);
    if (labelledJump || longJump) {
      distance[i] = distance[i - 1]!;
      close(i - 1, true);
      segStart = i;
      hasDir = false;
      continue;
    }
    const ux = (pts[3 * i]! - pts[3 * i - 3]!) / s;
    const uy = (pts[3 * i + 1]! - pts[3 * i - 2]!) / s;
    const uz = (pts[3 * i + 2]! - pts[3 * i - 1]!) / s;
    if (hasDir && ux * dx + uy * dy + uz * dz < 1 - 1e-6) {
      // A turn at point i-1: it ends one segment and starts the next.
      close(i - 1, false);
      segStart = i - 1;
    }
    hasDir = true;
    dx = ux;
    dy = uy;
    dz = uz;
    distance[i] = distance[i - 1]! + s;
  }
  if (nk > 0) close(nk - 1, false);

  let units: PathGeometry['units'] = cart ? 'inverse-angstrom' : 'fractional';
  let dist: Float64Array = distance;
  if (bs.writtenDistance && (!cart || bs.writtenDistance.length === nk)) {
    if (!cart) {
      dist = bs.writtenDistance;
      units = 'written';
    }
  }
  const ticks: PathTick[] = [];
  for (const l of bs.labels) {
    const x = dist[l.index]!;
    const last = ticks[ticks.length - 1];
    if (last && Math.abs(last.distance - x) < 1e-9) {
      if (last.label !== l.label) last.label = `${last.label}|${l.label}`;
    } else ticks.push({ distance: x, label: l.label, index: l.index });
  }
  return { cartesian: cart, distance: dist, units, segments, ticks };
}

/** The nearest non-zero step before (dir −1) or after (dir +1) step i; 0 when there is none. */
function neighbourStep(step: Float64Array, i: number, dir: -1 | 1): number {
  for (let j = i + dir; j >= 1 && j < step.length; j += dir) if (step[j]! > DUP_TOL) return step[j]!;
  return 0;
}
