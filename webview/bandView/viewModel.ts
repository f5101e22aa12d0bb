/**
 * What the band view holds after a BandData message: decoded typed arrays, connected pieces of the path,
 * min/max pyramids for fast redraws, and the extrema a click or key can reach. Pure (no DOM).
 */
import type { BandData, ExtremumMark } from '../../src/protocol';
import { decodeArray } from '../../src/protocol';
import { buildPyramid, type EnergyArray, type MinMaxPyramid } from './decimate';
import { findLocalExtrema, piecesFromSegments, type ExtremaSet, type Piece } from './localExtrema';
import { decodeMeshPoints, type MeshPointsView } from './meshPoints';

export interface ViewModel {
  data: BandData;
  /** The report's extrema located on the arrays, with VBM and CBM added from the gap when the report has none. */
  marks: ExtremumMark[];
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  distance: Float64Array;
  kpoints: Float64Array;
  cartesian: Float64Array | null;
  /** One per spin channel, as sent (32-bit for very large runs). */
  energies: EnergyArray[];
  pieces: Piece[];
  /** pyramids[spin][piece] */
  pyramids: MinMaxPyramid[][];
  extrema: ExtremaSet;
  /** Highest occupied band (0-based) when the edges are known, else −1: colours bands as filled or empty. */
  topValenceBand: number[];
  labelAt: Map<number, string>;
  energyMin: number;
  energyMax: number;
  /** A mesh run drawn as interpolated bands: its data points on the path (meshPoints.ts). */
  meshPoints?: MeshPointsView;
}

/** Above this many values per spin channel, build pyramids (smaller data reads faster raw). */
export const PYRAMID_THRESHOLD = 500_000;

function asF64(a: Float64Array | Float32Array): Float64Array {
  return a instanceof Float64Array ? a : Float64Array.from(a);
}

export function buildViewModel(data: BandData): ViewModel {
  const nk = data.nk;
  const nBands = data.nBands;
  const distance = asF64(decodeArray(data.distance));
  const kpoints = asF64(decodeArray(data.kpoints));
  const cartesian = data.cartesian ? asF64(decodeArray(data.cartesian)) : null;
  const energies: EnergyArray[] = data.energies.map((e) => decodeArray(e));
  if (distance.length !== nk) throw new Error(`band data: ${distance.length} path distances for ${nk} k-points`);
  if (kpoints.length !== 3 * nk) throw new Error(`band data: ${kpoints.length / 3} k-points for ${nk}`);
  if (energies.length !== data.nSpin) throw new Error(`band data: ${energies.length} spin channels, expected ${data.nSpin}`);
  for (const e of energies)
    if (e.length !== nk * nBands) throw new Error(`band data: ${e.length} energies for ${nk} k-points × ${nBands} bands`);
  // x must be nondecreasing for the column mapping; path distances are by construction.
  for (let i = 1; i < nk; i++)
    if (distance[i]! < distance[i - 1]!) throw new Error(`band data: path distance decreases at k-point ${i + 1}`);
  const meshPoints = decodeMeshPoints(data, distance);
  const pieces = piecesFromSegments(data.segments, nk);
  const total = nk * nBands;
  const pyramids = energies.map((e) =>
    pieces.map((p) =>
      total >= PYRAMID_THRESHOLD ? buildPyramid(distance, e, nBands, p.i0, p.i1) : { i0: p.i0, i1: p.i1, nBands, levels: [] },
    ),
  );
  const labelAt = new Map<number, string>();
  for (const t of data.ticks) labelAt.set(t.kIndex, t.label);
  const labelled = (k: number): boolean => labelAt.has(k);
  // Time-reversal-invariant k (every fractional coordinate a multiple of 1/2): where the core places a plateau.
  const invariant = (k: number): boolean =>
    [0, 1, 2].every((c) => Math.abs(2 * kpoints[3 * k + c]! - Math.round(2 * kpoints[3 * k + c]!)) <= 1e-6);
  const extrema = findLocalExtrema(energies, nBands, pieces, labelled, invariant);
  let energyMin = Infinity;
  let energyMax = -Infinity;
  for (const e of energies) {
    for (let i = 0; i < e.length; i++) {
      const v = e[i]!;
      if (v < energyMin) energyMin = v;
      if (v > energyMax) energyMax = v;
    }
  }
  const marks = withEdgeMarks(data, kpoints);
  const topValenceBand = [0, 1].slice(0, data.nSpin).map((s) => topValence(data, marks, energies[s]!, nBands, s));
  return {
    data,
    marks,
    nk,
    nBands,
    nSpin: data.nSpin,
    distance,
    kpoints,
    cartesian,
    energies,
    pieces,
    pyramids,
    extrema,
    topValenceBand,
    labelAt,
    energyMin,
    energyMax,
    ...(meshPoints ? { meshPoints } : {}),
  };
}

/**
 * Report extrema as marks; when the report lists no VBM/CBM extremum (e.g. the extrema analysis did not run),
 * the gap's edges still get marks, located on the nearest k-point of the arrays (reportIndex −1).
 */
export function withEdgeMarks(data: BandData, kpoints: Float64Array): ExtremumMark[] {
  const marks = [...data.marks];
  const gap = data.report.gap;
  if (!gap || data.report.metal) return marks;
  for (const [kind, p] of [
    ['vbm', gap.vbm],
    ['cbm', gap.cbm],
  ] as const) {
    if (marks.some((m) => m.kind === kind)) continue;
    let best = -1;
    let bestD = Infinity;
    for (let i = 0; i < data.nk; i++) {
      const d = Math.hypot(kpoints[3 * i]! - p.k[0], kpoints[3 * i + 1]! - p.k[1], kpoints[3 * i + 2]! - p.k[2]);
      if (d < bestD - 1e-12) {
        bestD = d;
        best = i;
      }
    }
    if (best >= 0) marks.push({ kind, spin: p.spin, kIndex: best, band0: p.band - 1, eV: p.eV, label: p.label, reportIndex: -1 });
  }
  return marks;
}

/** The highest band whose every energy lies at or below the VBM (or Fermi level) (colouring only); −1 when unknown. */
function topValence(data: BandData, marks: ExtremumMark[], e: EnergyArray, nBands: number, spin: number): number {
  const vbmMark = marks.find((m) => m.kind === 'vbm' && m.spin === spin) ?? marks.find((m) => m.kind === 'vbm');
  if (vbmMark && data.report.metal !== true) return vbmMark.band0;
  // Without edges (a metal), bands wholly below the Fermi level count as filled.
  const level = data.vbm_eV ?? data.fermiEnergy;
  if (level === null) return -1;
  const tol = 1e-4;
  let top = -1;
  for (let b = 0; b < nBands; b++) {
    let hi = -Infinity;
    for (let k = 0; k < data.nk; k++) hi = Math.max(hi, e[k * nBands + b]!);
    if (hi <= level + tol) top = b;
  }
  return top;
}

/** Nearest k index to a path distance (the first of repeated points). */
export function nearestK(vm: ViewModel, x: number): number {
  const d = vm.distance;
  let lo = 0;
  let hi = vm.nk - 1;
  if (vm.nk === 0) return -1;
  while (lo < hi) {
    const m = (lo + hi) >>> 1;
    if (d[m]! < x) lo = m + 1;
    else hi = m;
  }
  if (lo > 0 && Math.abs(d[lo - 1]! - x) <= Math.abs(d[lo]! - x)) lo--;
  // Step back over repeated points so a label at a repeated point is found.
  while (lo > 0 && d[lo - 1] === d[lo]) lo--;
  return lo;
}

/** A label for the k-point itself, or for a repeated point at the same distance. */
export function labelNear(vm: ViewModel, k: number): string | null {
  const own = vm.labelAt.get(k);
  if (own) return own;
  const d = vm.distance;
  for (let j = k + 1; j < vm.nk && d[j] === d[k]; j++) {
    const l = vm.labelAt.get(j);
    if (l) return l;
  }
  return null;
}

export function energyAt(vm: ViewModel, spin: number, k: number, band0: number): number {
  return vm.energies[spin]![k * vm.nBands + band0]!;
}
