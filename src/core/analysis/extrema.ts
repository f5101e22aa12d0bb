/**
 * Where the band extrema are: the VBM and CBM of each spin channel, and the secondary extrema a reviewer
 * cares about — conduction minima ("valley") and valence maxima ("peak") within a range of the edge.
 *
 * Only minima and maxima are extrema. Every candidate is classified, and those that are not go to the
 * rejected list with a reason:
 *   - rounding: energies are known only to their written digits. A plateau of equal values is one extremum
 *     (stood at its time-reversal-invariant point or its middle); points within ROUNDING_STEPS_MERGED steps of
 *     a higher point of the same band belong to that one; a band that never stands out from the rounding is
 *     "shallow";
 *   - crossing: a band-index kink where another band continues the slopes (bandCrossing.ts);
 *   - saddle: at a corner of the path, stationary but curving up along some directions and down along others
 *     (fitted masses of both signs are caught later, in massEngine.ts);
 *   - boundary: at a path end with the band still falling (rising) beyond it.
 * Neighbours of a k-point are taken along every path direction leaving it (pathRays), so a point at the end
 * of a segment that turns, or at a repeated corner, is judged against both segments.
 *
 * Cost: one pass over k-points × the bands near the edges (scanCandidates), then work per candidate only.
 */
import type { BandStructure, ExtremumKind } from '../model';
import { kpointAt } from '../model';
import type { EdgeAnalysis, EdgeState } from './gap';
import type { OccupationRule } from './occupation';
import { kKeyNumber, oppositeRay, type PathNetwork, type Ray } from './pathRays';
import { CROSSING_POINTS, findCrossing } from './bandCrossing';

export interface ExtremumSite {
  spin: 0 | 1;
  /** k index of the sampled extremum. */
  k: number;
  /** 0-based band representing the site: the top of a degenerate valence group, the bottom of a conduction one. */
  band: number;
  energy: number;
  kind: ExtremumKind;
  /** Distance from the edge of its kind, eV (0 for the edge itself). */
  offset: number;
  /** 0-based bands degenerate at the site (within the tolerance), ascending. */
  group: number[];
  /** Remarks found while locating the site. */
  warnings: string[];
}

/** Neighbouring k indices of a point (path directions or grid axes), or null when unknown. */
export type NeighbourFn = (k: number) => Int32Array | number[];

export function pathNeighbours(net: PathNetwork): NeighbourFn {
  return (k) => net.neighboursOf(k);
}

/** Axis neighbours on a uniform grid stored first index slowest (periodic). */
export function gridNeighbours(bs: BandStructure): NeighbourFn | null {
  const g = bs.grid;
  if (!g) return null;
  const [n1, n2, n3] = g.dims;
  if (n1 * n2 * n3 !== bs.nk) return null;
  const m = g.endpointsRepeated ? [n1 - 1, n2 - 1, n3 - 1] : [n1, n2, n3];
  return (k) => {
    const i = Math.floor(k / (n2 * n3));
    const j = Math.floor(k / n3) % n2;
    const l = k % n3;
    const out: number[] = [];
    const at = (a: number, b: number, c: number): number =>
      ((((a % m[0]!) + m[0]!) % m[0]!) * n2 + (((b % m[1]!) + m[1]!) % m[1]!)) * n3 + (((c % m[2]!) + m[2]!) % m[2]!);
    if (m[0]! > 1) out.push(at(i - 1, j, l), at(i + 1, j, l));
    if (m[1]! > 1) out.push(at(i, j - 1, l), at(i, j + 1, l));
    if (m[2]! > 1) out.push(at(i, j, l - 1), at(i, j, l + 1));
    return [...new Set(out)];
  };
}

/** Bands within `tol` (eV) of band b at k, contiguous around b. */
export function degenerateGroup(bs: BandStructure, spin: number, k: number, band: number, tol: number): number[] {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const e0 = e[k * nb + band]!;
  let lo = band;
  let hi = band;
  while (lo > 0 && Math.abs(e[k * nb + lo - 1]! - e0) <= tol) lo--;
  while (hi < nb - 1 && Math.abs(e[k * nb + hi + 1]! - e0) <= tol) hi++;
  const out: number[] = [];
  for (let b = lo; b <= hi; b++) out.push(b);
  return out;
}

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

export interface ExtremaInput {
  bs: BandStructure;
  occ: OccupationRule;
  edges: EdgeAnalysis;
  /** The k index the gap report places each overall edge at (it may move an edge to the direct-gap k). */
  vbmIndex: number | null;
  cbmIndex: number | null;
  neighbours: NeighbourFn | null;
  network: PathNetwork | null;
  range_eV: number;
  degeneracy_eV: number;
  /** Whether two k-points are equivalent by the crystal's symmetry (when it is known). */
  equivalent?: (k1: number, k2: number) => boolean;
  /** Fit window, eV: a band closer than this at a candidate can be its crossing partner. Default 25 meV. */
  window_eV?: number;
  /** The decimal step the energies are written with, eV (0: full precision). */
  precision_eV?: number;
}

export type RejectReason = 'saddle' | 'crossing' | 'boundary' | 'rounding' | 'shallow';

/** A candidate that is not a minimum or a maximum of its band, and why. */
export interface RejectedSite {
  spin: 0 | 1;
  k: number;
  /** 0-based band. */
  band: number;
  energy: number;
  reason: RejectReason;
  detail: string;
}

export interface ExtremaSearch {
  sites: ExtremumSite[];
  rejected: RejectedSite[];
}

/** Energies that differ by less than this are equal (eV): the same written number read twice. */
const TIE_EV = 1e-9;

/**
 * Candidates closer in energy than this many rounding steps are one extremum, and a candidate must stand
 * out from its surroundings by more than this to be one (energies are known only to the written digits).
 */
export const ROUNDING_STEPS_MERGED = 3;

/** From an edge point, move along the band to the sampled extremum it belongs to (edges are found within a tolerance). */
function climb(bs: BandStructure, spin: number, band: number, k: number, up: boolean, neighbours: NeighbourFn | null): number {
  if (!neighbours) return k;
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  for (let steps = 0; steps < bs.nk; steps++) {
    let best = k;
    for (const j of neighbours(k)) {
      const y = e[j * nb + band]!;
      if (up ? y > e[best * nb + band]! : y < e[best * nb + band]!) best = j;
    }
    if (best === k) break;
    k = best;
  }
  return k;
}

interface TopRegion {
  /** 'top' when nothing higher (for a maximum) lies within the tolerance; else why not. */
  outcome: 'top' | 'higher' | 'flat';
  /** k index of the middle of the plateau of equal top values. */
  representative: number;
  /** Every k index of the region (first occurrences). */
  members: number[];
}

/**
 * The region of a band around a candidate (connected through the neighbours) within `tol` below it (above,
 * for a minimum): a plateau of equal rounded values, or values closer than the rounding can tell apart,
 * is one extremum. Cost: the size of the region.
 */
function topRegion(
  bs: BandStructure,
  e: Float64Array,
  nb: number,
  band: number,
  start: number,
  maximum: boolean,
  tol: number,
  neighbours: NeighbourFn,
  firstOf: Int32Array,
  nk: number,
): TopRegion {
  const x = e[start * nb + band]!;
  const sign = maximum ? 1 : -1;
  const seen = new Set<number>([start]);
  const queue = [start];
  const plateau: number[] = [];
  let outcome: TopRegion['outcome'] = 'top';
  let dropSeen = false;
  for (let q = 0; q < queue.length; q++) {
    const i = queue[q]!;
    if (sign * (e[i * nb + band]! - x) >= -TIE_EV) plateau.push(i);
    for (const j0 of neighbours(i)) {
      const j = firstOf[j0]!;
      if (seen.has(j)) continue;
      const d = sign * (e[j0 * nb + band]! - x);
      if (d > TIE_EV) {
        outcome = 'higher';
        break;
      }
      if (d >= -tol) {
        seen.add(j);
        queue.push(j);
      } else dropSeen = true;
    }
    if (outcome === 'higher') break;
    if (queue.length > nk) break;
  }
  if (outcome === 'top' && !dropSeen) outcome = 'flat';
  return { outcome, representative: outcome === 'higher' ? start : plateauCentre(bs, plateau, neighbours, firstOf), members: queue };
}

/**
 * The point that stands for a plateau of equal values: a time-reversal-invariant k on it (E is even about
 * such a point, so the plateau is centred there), else the middle of the plateau's longest run of
 * neighbours (two breadth-first passes; cost: the plateau's size).
 */
function plateauCentre(bs: BandStructure, plateau: number[], neighbours: NeighbourFn, firstOf: Int32Array): number {
  if (plateau.length <= 2) return Math.min(...plateau);
  for (const i of plateau) if (timeReversalInvariantK(bs, i)) return i;
  const inside = new Set(plateau);
  const walk = (from: number): { far: number; parent: Map<number, number> } => {
    const parent = new Map<number, number>([[from, -1]]);
    const queue = [from];
    for (let q = 0; q < queue.length; q++) {
      for (const j0 of neighbours(queue[q]!)) {
        const j = firstOf[j0]!;
        if (!inside.has(j) || parent.has(j)) continue;
        parent.set(j, queue[q]!);
        queue.push(j);
      }
    }
    return { far: queue[queue.length - 1]!, parent };
  };
  const a = walk(Math.min(...plateau)).far;
  const { far: b, parent } = walk(a);
  const chain: number[] = [];
  for (let x = b; x !== -1; x = parent.get(x)!) chain.push(x);
  return chain[Math.floor((chain.length - 1) / 2)]!;
}

function fracText(bs: BandStructure, k: number): string {
  return `(${kpointAt(bs, k)
    .map((x) => String(Number(x.toFixed(4))))
    .join(', ')})`;
}

export function locateExtrema(inp: ExtremaInput): ExtremaSearch {
  const { bs, occ, edges } = inp;
  const sites: ExtremumSite[] = [];
  const rejected: RejectedSite[] = [];
  const nb = bs.nBands;
  if (!edges.vbm || !edges.cbm) return { sites, rejected };
  // Identity of each k modulo reciprocal lattice vectors, and the first index of each: the point a repeated k
  // is judged at.
  let keys: Float64Array;
  let firstOf: Int32Array;
  if (inp.network) {
    keys = inp.network.keyOf;
    firstOf = inp.network.firstOf;
  } else {
    keys = new Float64Array(bs.nk);
    firstOf = new Int32Array(bs.nk);
    const first = new Map<number, number>();
    const kp = bs.kpoints;
    for (let i = 0; i < bs.nk; i++) {
      const key = kKeyNumber(kp[3 * i]!, kp[3 * i + 1]!, kp[3 * i + 2]!);
      keys[i] = key;
      const f = first.get(key);
      if (f === undefined) first.set(key, i);
      firstOf[i] = f ?? i;
    }
  }
  const precision = inp.precision_eV ?? 0;
  const mergeTol = Math.max(ROUNDING_STEPS_MERGED * precision, TIE_EV);
  const window = inp.window_eV ?? 0.025;
  const siteAt = new Map<string, ExtremumSite[]>();
  const remember = (s: ExtremumSite): void => {
    const key = `${s.spin}|${keys[s.k]}`;
    const list = siteAt.get(key);
    if (list) list.push(s);
    else siteAt.set(key, [s]);
  };
  const seenAt = (spin: number, k: number, energy: number): boolean =>
    (siteAt.get(`${spin}|${keys[k]}`) ?? []).some((s) => Math.abs(s.energy - energy) <= inp.degeneracy_eV);

  const edgeSite = (st: EdgeState, kind: 'vbm' | 'cbm'): ExtremumSite => {
    let k = st.k;
    const overall = kind === 'vbm' ? edges.vbm! : edges.cbm!;
    const moved = kind === 'vbm' ? inp.vbmIndex : inp.cbmIndex;
    if (moved !== null && st.spin === overall.spin && st.band === overall.band && st.energy === overall.energy) k = moved;
    k = climb(bs, st.spin, st.band, k, kind === 'vbm', inp.neighbours);
    // A flat top of equal written values: the middle of the plateau.
    if (inp.neighbours) {
      const region = topRegion(bs, bs.energies[st.spin]!, nb, st.band, firstOf[k]!, kind === 'vbm', TIE_EV, inp.neighbours, firstOf, bs.nk);
      if (region.outcome !== 'higher') k = region.representative;
    }
    const group = degenerateGroup(bs, st.spin, k, st.band, inp.degeneracy_eV);
    const band = kind === 'vbm' ? group[group.length - 1]! : group[0]!;
    const energy = bs.energies[st.spin]![k * nb + band]!;
    const warnings: string[] = [];
    if (inp.network) {
      const rays = inp.network.raysFrom(k, (_, m) => m < 3);
      if (rays.length === 1 && extremumBeyondEnd(bs, st.spin, band, rays[0]!, kind === 'vbm')) {
        warnings.push(
          `The band is still ${kind === 'vbm' ? 'rising' : 'falling'} at the end of the path here: the true ${kind === 'vbm' ? 'maximum' : 'minimum'} lies beyond the sampled path, so this edge and its masses are approximate.`,
        );
      }
      const crossing = crossingAt(inp, st.spin, st.band, k, window, precision);
      if (crossing)
        warnings.push(`This band edge is where two bands cross (${crossing}): band-index masses here are not curvature masses.`);
    }
    return { spin: st.spin, k, band, energy, kind, offset: 0, group, warnings };
  };

  for (const s of edges.spins) {
    if (s.vbm) sites.push(edgeSite(s.vbm, 'vbm'));
    if (s.cbm) sites.push(edgeSite(s.cbm, 'cbm'));
  }
  // Offsets from the overall edges (non-zero only for the other spin channel's edge).
  const overallV = Math.max(...sites.filter((s) => s.kind === 'vbm').map((s) => s.energy));
  const overallC = Math.min(...sites.filter((s) => s.kind === 'cbm').map((s) => s.energy));
  for (const s of sites) {
    s.offset = s.kind === 'vbm' ? overallV - s.energy : s.energy - overallC;
    remember(s);
  }
  const neighbours = inp.neighbours;
  if (!neighbours) return { sites, rejected };

  // Secondary extrema: each k visited once (the first of its repeats), both spin channels; only bands
  // within the range of the edges. A candidate's region (plateau, rounding) is walked once.
  const found: ExtremumSite[] = [];
  const reject = (r: RejectedSite): void => {
    if (rejected.some((x) => x.spin === r.spin && x.band === r.band && keys[x.k] === keys[r.k])) return;
    rejected.push(r);
  };
  for (let spin = 0; spin < bs.nSpin; spin++) {
    const e = bs.energies[spin]!;
    const occupied = occ.occupied[spin]!;
    const done = new Set<number>();
    const bands = bandsInRange(bs, spin, occupied, edges.spins[spin], overallV - inp.range_eV, overallC + inp.range_eV);
    if (!bands.length) continue;
    const table = inp.network ? inp.network.neighbourTable() : gridTable(bs, firstOf, neighbours);
    const found0 = scanCandidates(
      e,
      occupied,
      nb,
      bs.nk,
      firstOf,
      table.start,
      table.list,
      Int32Array.from(bands),
      overallV - inp.range_eV,
      overallC + inp.range_eV,
    );
    for (let c = 0; c < found0.count; c++) {
      const i = found0.k[c]!;
      const b = found0.band[c]!;
      const x = e[i * nb + b]!;
      const valence = occupied[i * nb + b] === 1;
      if (found0.mixed[c] === 1) {
        // Rising along some directions and falling along others: only at a corner of the path can that be
        // anything but the band running through the point.
        if (inp.network && inp.network.isCorner(i)) {
          const saddle = stationarySaddle(inp, spin, b, i, precision);
          if (saddle) reject({ spin: spin as 0 | 1, k: i, band: b, energy: x, reason: 'saddle', detail: saddle });
        }
        continue;
      }
      if (done.has(i * nb + b)) continue;
      // First the plateau of equal values: a step of the rounding on a slope leads higher, silently.
      const plateau = topRegion(bs, e, nb, b, i, valence, TIE_EV, neighbours, firstOf, bs.nk);
      for (const m of plateau.members) done.add(m * nb + b);
      if (plateau.outcome === 'higher') continue;
      let region = plateau;
      if (mergeTol > TIE_EV) {
        // Then everything the rounding cannot tell apart from it.
        region = topRegion(bs, e, nb, b, i, valence, mergeTol, neighbours, firstOf, bs.nk);
        for (const m of region.members) done.add(m * nb + b);
        if (region.outcome === 'higher') {
          reject({
            spin: spin as 0 | 1,
            k: plateau.representative,
            band: b,
            energy: x,
            reason: 'rounding',
            detail: `within ${ROUNDING_STEPS_MERGED} rounding steps (${(mergeTol * 1000).toPrecision(2)} meV) of a ${valence ? 'higher' : 'lower'} point of the same band: one extremum, counted there`,
          });
          continue;
        }
      }
      const k = plateau.representative;
      const xk = e[k * nb + b]!;
      if (region.outcome === 'flat') {
        reject({
          spin: spin as 0 | 1,
          k,
          band: b,
          energy: xk,
          reason: 'shallow',
          detail: `the band varies by no more than ${(mergeTol * 1000).toPrecision(2)} meV around here: no extremum stands out from the rounding`,
        });
        continue;
      }
      if (inp.network) {
        const rays = inp.network.raysFrom(k, (_, m) => m < 3);
        if (rays.length === 1 && extremumBeyondEnd(bs, spin, b, rays[0]!, valence)) {
          reject({
            spin: spin as 0 | 1,
            k,
            band: b,
            energy: xk,
            reason: 'boundary',
            detail: `at the end of the sampled path with the band still ${valence ? 'rising' : 'falling'} beyond it`,
          });
          continue;
        }
        const crossing = crossingAt(inp, spin, b, k, window, precision);
        if (crossing) {
          reject({ spin: spin as 0 | 1, k, band: b, energy: xk, reason: 'crossing', detail: crossing });
          continue;
        }
      }
      if (
        inp.equivalent &&
        [...sites, ...found].some((f) => f.spin === spin && Math.abs(f.energy - xk) <= inp.degeneracy_eV && inp.equivalent!(f.k, k))
      )
        continue;
      if (seenAt(spin, k, xk)) continue;
      const group = degenerateGroup(bs, spin, k, b, inp.degeneracy_eV);
      const rep = valence ? group[group.length - 1]! : group[0]!;
      const site: ExtremumSite = {
        spin: spin as 0 | 1,
        k,
        band: rep,
        energy: e[k * nb + rep]!,
        kind: valence ? 'peak' : 'valley',
        offset: valence ? overallV - e[k * nb + rep]! : e[k * nb + rep]! - overallC,
        group,
        warnings: [],
      };
      found.push(site);
      remember(site);
    }
  }
  found.sort((a, b) => a.offset - b.offset || a.spin - b.spin || a.k - b.k);
  rejected.sort((a, b) => a.spin - b.spin || a.band - b.band || a.k - b.k);
  return { sites: [...sites, ...found], rejected };
}

/**
 * The bands that can hold a candidate: those with an occupied state above `valenceFloor` or an empty one
 * below `conductionCeiling`. Band indices order states by energy at every k, so the highest occupied energy
 * of band b never exceeds that of band b + 1: walking down from the top valence band (up from the bottom
 * conduction band) and stopping at the first band out of range reads only the bands near the edges.
 */
function bandsInRange(
  bs: BandStructure,
  spin: number,
  occupied: Uint8Array,
  edges: { vbm: EdgeState | null; cbm: EdgeState | null } | undefined,
  valenceFloor: number,
  conductionCeiling: number,
): number[] {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const extreme = (b: number, valence: boolean): number => {
    let best = valence ? -Infinity : Infinity;
    for (let k = 0; k < bs.nk; k++) {
      const i = k * nb + b;
      if ((occupied[i] === 1) !== valence) continue;
      const x = e[i]!;
      if (valence ? x > best : x < best) best = x;
    }
    return best;
  };
  const out = new Set<number>();
  if (edges?.vbm) {
    for (let b = edges.vbm.band; b >= 0; b--) {
      if (extreme(b, true) < valenceFloor) break;
      out.add(b);
    }
    // Occupied states in bands above the top band (not expected with a gap): looked at too.
    for (let b = edges.vbm.band + 1; b < nb && extreme(b, true) >= valenceFloor; b++) out.add(b);
  }
  if (edges?.cbm) {
    for (let b = edges.cbm.band; b < nb; b++) {
      if (extreme(b, false) > conductionCeiling) break;
      out.add(b);
    }
    for (let b = edges.cbm.band - 1; b >= 0 && extreme(b, false) <= conductionCeiling; b--) out.add(b);
  }
  return [...out].sort((a, b) => a - b);
}

interface CandidateList {
  k: Int32Array;
  band: Int32Array;
  /** 1 when the band rises along some directions and falls along others (a saddle to test), 0 for a candidate minimum or maximum. */
  mixed: Uint8Array;
  count: number;
}

/**
 * The one pass over k-points × bands near the edges: a point is a candidate maximum of a valence band when no
 * neighbour is higher (minimum of a conduction band: none lower), and a saddle to test when neighbours lie
 * both above and below. Plain loops over typed arrays (this runs over the whole path; everything after it
 * only over the candidates).
 */
function scanCandidates(
  e: Float64Array,
  occupied: Uint8Array,
  nb: number,
  nk: number,
  firstOf: Int32Array,
  start: Int32Array,
  list: Int32Array,
  bands: Int32Array,
  valenceFloor: number,
  conductionCeiling: number,
): CandidateList {
  let cap = 64;
  let k = new Int32Array(cap);
  let band = new Int32Array(cap);
  let mixed = new Uint8Array(cap);
  let count = 0;
  const push = (i: number, b: number, m: number): void => {
    if (count === cap) {
      cap *= 2;
      const k2 = new Int32Array(cap);
      k2.set(k);
      k = k2;
      const b2 = new Int32Array(cap);
      b2.set(band);
      band = b2;
      const m2 = new Uint8Array(cap);
      m2.set(mixed);
      mixed = m2;
    }
    k[count] = i;
    band[count] = b;
    mixed[count] = m;
    count++;
  };
  for (let i = 0; i < nk; i++) {
    if (firstOf[i] !== i) continue;
    const q0 = start[i]!;
    const q1 = start[i + 1]!;
    if (q1 === q0) continue;
    for (let t = 0; t < bands.length; t++) {
      const b = bands[t]!;
      const x = e[i * nb + b]!;
      const valence = occupied[i * nb + b] === 1;
      if (valence ? x < valenceFloor : x > conductionCeiling) continue;
      let up = 0;
      let down = 0;
      for (let q = q0; q < q1; q++) {
        const y = e[list[q]! * nb + b]!;
        if (y > x + TIE_EV) up++;
        else if (y < x - TIE_EV) down++;
      }
      if (valence ? up === 0 : down === 0) push(i, b, 0);
      else if (up > 0 && down > 0 && q1 - q0 >= 2) push(i, b, 1);
    }
  }
  return { k, band, mixed, count };
}

/** The neighbour table of a grid (or any neighbour function), built once in the same layout as a path's. */
function gridTable(bs: BandStructure, firstOf: Int32Array, neighbours: NeighbourFn): { start: Int32Array; list: Int32Array } {
  const start = new Int32Array(bs.nk + 1);
  const all: number[] = [];
  for (let i = 0; i < bs.nk; i++) {
    start[i] = all.length;
    if (firstOf[i] === i) for (const j of neighbours(i)) all.push(j);
  }
  start[bs.nk] = all.length;
  return { start, list: Int32Array.from(all) };
}

/** A few points along each direction: enough for the crossing and saddle tests. */
function shortRays(net: PathNetwork, k: number): Ray[] {
  return net.raysFrom(k, (_, m) => m <= CROSSING_POINTS);
}

/** One sentence naming the crossing at a candidate, or null. */
function crossingAt(inp: ExtremaInput, spin: number, band: number, k: number, window: number, precision: number): string | null {
  const net = inp.network;
  if (!net) return null;
  const e = inp.bs.energies[spin]!;
  const nb = inp.bs.nBands;
  const rays = shortRays(net, k);
  const found = findCrossing({
    energy: (b, kk) => e[kk * nb + b]!,
    nBands: nb,
    band,
    rays,
    opposite: (r) => oppositeRay(rays, r),
    timeReversalInvariant: timeReversalInvariantK(inp.bs, k),
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
  return `bands ${band + 1} and ${found.partner + 1} cross at ${fracText(inp.bs, k)} along the line towards ${found.towards} (near-linear on both sides, slopes swapped between the bands${gapText}): the branches continue through the point, so there is no extremum`;
}

/**
 * At a junction of path directions where the band rises along some and falls along others: a saddle when
 * the band is stationary along every direction (the vertex of the parabola through its first three points
 * lies within half a step of the point). A sloped point (the band just runs through) is not a candidate.
 */
function stationarySaddle(inp: ExtremaInput, spin: number, band: number, k: number, precision: number): string | null {
  const net = inp.network;
  if (!net) return null;
  const e = inp.bs.energies[spin]!;
  const nb = inp.bs.nBands;
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
  const trim = timeReversalInvariantK(inp.bs, k);
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
