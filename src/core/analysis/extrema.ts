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
 * What counts as a local extremum (ties, plateaus, where a plateau stands) is pathLocalExtrema.ts's rule,
 * shared with the band view's snapping. Parts: kNeighbours.ts (which points neighbour), candidateScan.ts (the
 * one pass), plateauRegion.ts (plateau and rounding regions), candidateChecks.ts (boundary, crossing, saddle).
 *
 * Cost: one pass over k-points × the bands near the edges (scanCandidates), then work per candidate only.
 */
import type { BandStructure, ExtremumKind } from '../model';
import type { EdgeAnalysis, EdgeState } from './gap';
import type { OccupationRule } from './occupation';
import { kIdentities, type PathNetwork } from './pathRays';
import { TIE_EV } from './pathLocalExtrema';
import { gridTable, type NeighbourFn } from './kNeighbours';
import { climb, topRegion } from './plateauRegion';
import { bandsInRange, scanCandidates } from './candidateScan';
import { crossingAt, extremumBeyondEnd, stationarySaddle } from './candidateChecks';

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

/**
 * Candidates closer in energy than this many rounding steps are one extremum, and a candidate must stand
 * out from its surroundings by more than this to be one (energies are known only to the written digits).
 */
export const ROUNDING_STEPS_MERGED = 3;

export function locateExtrema(inp: ExtremaInput): ExtremaSearch {
  const { bs, occ, edges } = inp;
  const sites: ExtremumSite[] = [];
  const rejected: RejectedSite[] = [];
  const nb = bs.nBands;
  if (!edges.vbm || !edges.cbm) return { sites, rejected };
  // Identity of each k modulo reciprocal lattice vectors, and the first index of each: the point a repeated k
  // is judged at.
  const { keyOf: keys, firstOf } = inp.network ?? kIdentities(bs);
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
      const crossing = crossingAt(bs, inp.network, st.spin, st.band, k, window, precision);
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
    const bands = bandsInRange(bs, spin, occupied, edges.spins[spin], overallV - inp.range_eV, overallC + inp.range_eV);
    if (!bands.length) continue;
    // Points already walked, per band in range: done[slot[b] * nk + k] (a typed array: candidates can be most of the path).
    const slot = new Int32Array(nb).fill(-1);
    bands.forEach((b, i) => (slot[b] = i));
    const done = new Uint8Array(bands.length * bs.nk);
    const mark = (members: readonly number[], b: number): void => {
      const base = slot[b]! * bs.nk;
      for (const m of members) done[base + m] = 1;
    };
    const table = inp.network ? inp.network.neighbourTable() : gridTable(bs, firstOf, neighbours);
    // Where a point rising one way and falling another is tested as a saddle: the corners of a path.
    const saddleTest = inp.network ? cornersOf(inp.network, bs.nk) : null;
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
      saddleTest,
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
          const saddle = stationarySaddle(bs, inp.network, spin, b, i, precision);
          if (saddle) reject({ spin: spin as 0 | 1, k: i, band: b, energy: x, reason: 'saddle', detail: saddle });
        }
        continue;
      }
      if (done[slot[b]! * bs.nk + i] === 1) continue;
      // First the plateau of equal values: a step of the rounding on a slope leads higher, silently.
      const plateau = topRegion(bs, e, nb, b, i, valence, TIE_EV, neighbours, firstOf, bs.nk);
      mark(plateau.members, b);
      if (plateau.outcome === 'higher') continue;
      let region = plateau;
      if (mergeTol > TIE_EV) {
        // Then everything the rounding cannot tell apart from it.
        region = topRegion(bs, e, nb, b, i, valence, mergeTol, neighbours, firstOf, bs.nk);
        mark(region.members, b);
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
        const crossing = crossingAt(bs, inp.network, spin, b, k, window, precision);
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

/** 1 at the k indices that are corners of the path (a segment starts or ends at the point). */
function cornersOf(network: PathNetwork, nk: number): Uint8Array {
  const out = new Uint8Array(nk);
  for (let i = 0; i < nk; i++) if (network.isCorner(i)) out[i] = 1;
  return out;
}
