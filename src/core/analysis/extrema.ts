/**
 * Where the band extrema are: the VBM and CBM of each spin channel, and the secondary extrema a reviewer
 * cares about — conduction minima ("valley") and valence maxima ("peak") within a range of the edge.
 *
 * Neighbours of a k-point are taken along every path direction leaving it (pathRays), so a point at the end
 * of a segment that turns, or at a repeated corner, is judged against both segments: an extremum there is
 * an extremum of the continued band, not an artefact of the segment boundary. A point with a single
 * direction (a path end, either side of a jump) is an extremum only if the band is flat there; when the band
 * still falls beyond the end, the point is not reported as a secondary extremum, and a band edge found there
 * carries a warning.
 */
import type { BandStructure, ExtremumKind } from '../model';
import { kpointAt } from '../model';
import type { EdgeAnalysis, EdgeState } from './gap';
import type { OccupationRule } from './occupation';
import { kKey, type PathNetwork, type Ray } from './pathRays';

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
export type NeighbourFn = (k: number) => number[];

export function pathNeighbours(net: PathNetwork): NeighbourFn {
  return (k) => net.raysFrom(k).map((r) => r.indices[1]!);
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
    const at = (a: number, b: number, c: number): number => (((a % m[0]!) + m[0]!) % m[0]! * n2 + (((b % m[1]!) + m[1]!) % m[1]!)) * n3 + (((c % m[2]!) + m[2]!) % m[2]!);
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
}

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

export function locateExtrema(inp: ExtremaInput): ExtremumSite[] {
  const { bs, occ, edges } = inp;
  const sites: ExtremumSite[] = [];
  const nb = bs.nBands;
  if (!edges.vbm || !edges.cbm) return sites;
  const keys: string[] = [];
  for (let i = 0; i < bs.nk; i++) keys.push(kKey(kpointAt(bs, i)));
  const seen = (spin: number, k: number, energy: number): boolean =>
    sites.some((s) => s.spin === spin && keys[s.k] === keys[k] && Math.abs(s.energy - energy) <= inp.degeneracy_eV);

  const edgeSite = (st: EdgeState, kind: 'vbm' | 'cbm'): ExtremumSite => {
    let k = st.k;
    const overall = kind === 'vbm' ? edges.vbm! : edges.cbm!;
    const moved = kind === 'vbm' ? inp.vbmIndex : inp.cbmIndex;
    if (moved !== null && st.spin === overall.spin && st.band === overall.band && st.energy === overall.energy) k = moved;
    k = climb(bs, st.spin, st.band, k, kind === 'vbm', inp.neighbours);
    const group = degenerateGroup(bs, st.spin, k, st.band, inp.degeneracy_eV);
    const band = kind === 'vbm' ? group[group.length - 1]! : group[0]!;
    const energy = bs.energies[st.spin]![k * nb + band]!;
    const warnings: string[] = [];
    if (inp.network) {
      const rays = inp.network.raysFrom(k);
      if (rays.length === 1 && extremumBeyondEnd(bs, st.spin, band, rays[0]!, kind === 'vbm')) {
        warnings.push(`The band is still ${kind === 'vbm' ? 'rising' : 'falling'} at the end of the path here: the true ${kind === 'vbm' ? 'maximum' : 'minimum'} lies beyond the sampled path, so this edge and its masses are approximate.`);
      }
    }
    return {
      spin: st.spin,
      k,
      band,
      energy,
      kind,
      offset: 0,
      group,
      warnings,
    };
  };

  for (const s of edges.spins) {
    if (s.vbm) sites.push(edgeSite(s.vbm, 'vbm'));
    if (s.cbm) sites.push(edgeSite(s.cbm, 'cbm'));
  }
  // Offsets from the overall edges (non-zero only for the other spin channel's edge).
  const overallV = Math.max(...sites.filter((s) => s.kind === 'vbm').map((s) => s.energy));
  const overallC = Math.min(...sites.filter((s) => s.kind === 'cbm').map((s) => s.energy));
  for (const s of sites) s.offset = s.kind === 'vbm' ? overallV - s.energy : s.energy - overallC;
  const neighbours = inp.neighbours;
  if (!neighbours) return sites;

  // Secondary extrema, each k visited once (the first of its repeats), both spin channels.
  const firstOfKey = new Map<string, number>();
  for (let i = 0; i < bs.nk; i++) if (!firstOfKey.has(keys[i]!)) firstOfKey.set(keys[i]!, i);
  const found: ExtremumSite[] = [];
  for (let spin = 0; spin < bs.nSpin; spin++) {
    const e = bs.energies[spin]!;
    const occupied = occ.occupied[spin]!;
    for (const i of firstOfKey.values()) {
      const nbrs = neighbours(i);
      if (nbrs.length === 0) continue;
      for (let b = 0; b < nb; b++) {
        const x = e[i * nb + b]!;
        const valence = occupied[i * nb + b] === 1;
        if (valence ? x < overallV - inp.range_eV : x > overallC + inp.range_eV) continue;
        let extremum = true;
        let strict = false;
        for (const j of nbrs) {
          const y = e[j * nb + b]!;
          if (valence ? y > x + 1e-9 : y < x - 1e-9) {
            extremum = false;
            break;
          }
          if (Math.abs(y - x) > 1e-9) strict = true;
        }
        if (!extremum || !strict) continue;
        if (inp.network) {
          const rays = inp.network.raysFrom(i);
          if (rays.length === 1 && extremumBeyondEnd(bs, spin, b, rays[0]!, valence)) continue;
        }
        if (inp.equivalent && [...sites, ...found].some((f) => f.spin === spin && Math.abs(f.energy - x) <= inp.degeneracy_eV && inp.equivalent!(f.k, i))) continue;
        if (seen(spin, i, x) || found.some((f) => f.spin === spin && keys[f.k] === keys[i] && Math.abs(f.energy - x) <= inp.degeneracy_eV)) continue;
        // Equal-energy neighbours on either side of a vertex midway between samples: keep one.
        if (found.some((f) => f.spin === spin && f.band === b && Math.abs(f.energy - x) < 1e-9 && nbrs.includes(f.k))) continue;
        const group = degenerateGroup(bs, spin, i, b, inp.degeneracy_eV);
        const rep = valence ? group[group.length - 1]! : group[0]!;
        found.push({
          spin: spin as 0 | 1,
          k: i,
          band: rep,
          energy: e[i * nb + rep]!,
          kind: valence ? 'peak' : 'valley',
          offset: valence ? overallV - e[i * nb + rep]! : e[i * nb + rep]! - overallC,
          group,
          warnings: [],
        });
      }
    }
  }
  found.sort((a, b) => a.offset - b.offset || a.spin - b.spin || a.k - b.k);
  return [...sites, ...found];
}
