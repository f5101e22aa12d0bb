/**
 * Checks on a candidate extremum along the path: does the band's extremum lie beyond a path end, do two
 * bands cross at the point, is a corner of the path a stationary saddle; and whether a k-point is
 * time-reversal invariant.
 */
import type { BandStructure } from '../model';
import { kpointAt } from '../model';
import { oppositeRay, type PathNetwork, type Ray } from './pathRays';
import { CROSSING_POINTS, findCrossing } from './bandCrossing';
import { TIE_EV } from './pathLocalExtrema';

/**
 * At a point with one direction only (a path end), whether the band's extremum lies beyond the end: the
 * parabola through the first three points has its vertex more than half a step outside the path, or curves
 * the wrong way for an extremum of this kind.
 */
export function extremumBeyondEnd(bs: BandStructure, spin: number, band: number, ray: Ray, maximum: boolean): boolean {
  if (ray.indices.length < 3) return false;
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const [t1, t2] = [ray.t[1]!, ray.t[2]!];
  const [e0, e1, e2] = [0, 1, 2].map((m) => e[ray.indices[m]! * nb + band]!) as [number, number, number];
  // Parabola e0 + c1 t + c2 t² through the three points.
  const c2 = ((e2 - e0) / t2 - (e1 - e0) / t1) / (t2 - t1);
  const c1 = (e1 - e0) / t1 - c2 * t1;
  const scale = Math.max(Math.abs(e1 - e0), Math.abs(e2 - e0), 1e-9);
  if (Math.abs(c1 * t1) < 1e-3 * scale) return false;
  if (maximum ? c2 >= 0 : c2 <= 0) return true;
  const tv = -c1 / (2 * c2);
  return tv < -0.5 * t1;
}

function fracText(bs: BandStructure, k: number): string {
  return `(${kpointAt(bs, k)
    .map((x) => String(Number(x.toFixed(4))))
    .join(', ')})`;
}

/** A few points along each direction: enough for the crossing and saddle tests. */
function shortRays(net: PathNetwork, k: number): Ray[] {
  return net.raysFrom(k, (_, m) => m <= CROSSING_POINTS);
}

/** One sentence naming the crossing at a candidate, or null. */
export function crossingAt(
  bs: BandStructure,
  net: PathNetwork,
  spin: number,
  band: number,
  k: number,
  window: number,
  precision: number,
): string | null {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const rays = shortRays(net, k);
  const found = findCrossing({
    energy: (b, kk) => e[kk * nb + b]!,
    nBands: nb,
    band,
    rays,
    opposite: (r) => oppositeRay(rays, r),
    timeReversalInvariant: timeReversalInvariantK(bs, k),
    window_eV: window,
    precision_eV: precision,
  });
  if (!found) return null;
  const gap = found.gap_eV * 1000;
  const gapText = found.betweenSamples
    ? `; the crossing falls between sampled points, the bands are ${gap.toFixed(1)} meV apart at this one`
    : gap > 1
      ? `; an avoided crossing with a ${gap.toFixed(1)} meV gap`
      : '';
  return `bands ${band + 1} and ${found.partner + 1} cross at ${fracText(bs, k)} along the line towards ${found.towards} (near-linear on both sides, slopes swapped between the bands${gapText}): the branches continue through the point, so there is no extremum`;
}

/**
 * At a junction of path directions where the band rises along some and falls along others: a saddle when
 * the band is stationary along every direction (the vertex of the parabola through its first three points
 * lies within half a step of the point). A sloped point (the band just runs through) is not a candidate.
 */
export function stationarySaddle(
  bs: BandStructure,
  net: PathNetwork,
  spin: number,
  band: number,
  k: number,
  precision: number,
): string | null {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const rays = net.raysFrom(k, (_, m) => m < 3);
  if (rays.length < 2) return null;
  // Opposite rays with opposite first steps: the band runs through the point along that line.
  for (const r of rays) {
    const o = oppositeRay(rays, r);
    if (!o) continue;
    const a = e[r.indices[1]! * nb + band]! - e[k * nb + band]!;
    const b = e[o.indices[1]! * nb + band]! - e[k * nb + band]!;
    if (a * b < 0) return null;
  }
  let rising = 0;
  let falling = 0;
  const trim = timeReversalInvariantK(bs, k);
  for (const r of rays) {
    if (r.indices.length < 3) return null;
    const [t1, t2] = [r.t[1]!, r.t[2]!];
    const [e0, e1, e2] = [0, 1, 2].map((m) => e[r.indices[m]! * nb + band]!) as [number, number, number];
    const c2 = ((e2 - e0) / t2 - (e1 - e0) / t1) / (t2 - t1);
    const c1 = (e1 - e0) / t1 - c2 * t1;
    if (Math.abs(e2 - e0) <= 3 * precision + TIE_EV) return null;
    if (!trim) {
      if (c2 === 0) return null;
      const tv = -c1 / (2 * c2);
      if (Math.abs(tv) > 0.5 * t1) return null;
    }
    if (c2 > 0) rising++;
    else if (c2 < 0) falling++;
  }
  if (!(rising > 0 && falling > 0)) return null;
  return `the band is stationary here but curves up along ${rising} and down along ${falling} of the ${rays.length} path directions`;
}

/** k ≡ −k modulo a reciprocal lattice vector (2k integer). */
export function timeReversalInvariantK(bs: BandStructure, kIndex: number): boolean {
  for (let c = 0; c < 3; c++) {
    const twice = 2 * bs.kpoints[3 * kIndex + c]!;
    if (Math.abs(twice - Math.round(twice)) > 1e-6) return false;
  }
  return true;
}
