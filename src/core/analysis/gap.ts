/**
 * Band edges and the gap: VBM = highest occupied state, CBM = lowest empty state, per spin channel and
 * overall; the fundamental gap (direct when the smallest direct gap equals it) and the smallest direct gap.
 * A metal (an occupied state at or above an empty one, or a band partly filled) has no gap.
 */
import type { BandPoint, BandStructure, GapReport } from '../model';
import { kpointAt, labelAt } from '../model';
import type { OccupationRule } from './occupation';

/** Energies closer than this are one level (eV). */
export const EDGE_TOLERANCE_EV = 1e-4;

export interface EdgeState {
  spin: 0 | 1;
  k: number;
  /** 0-based band index. */
  band: number;
  energy: number;
}

export interface EdgeAnalysis {
  metal: boolean;
  vbm: EdgeState | null;
  cbm: EdgeState | null;
  /** Per spin channel. */
  spins: { vbm: EdgeState | null; cbm: EdgeState | null; metal: boolean }[];
}

/**
 * Per k-point of one channel: the highest occupied state (the highest band among equal values) and the lowest
 * empty one (the lowest band among equal values); band −1 where there is none. One pass over the channel,
 * shared by the edges and the direct gaps (kept per occupation array while the energies are the same).
 */
export interface KPointEdges {
  hi: Float64Array;
  hb: Int32Array;
  lo: Float64Array;
  lb: Int32Array;
}
const kPointEdgesKept = new WeakMap<Uint8Array, { energies: Float64Array; nb: number; nk: number; edges: KPointEdges }>();

/**
 * Keep edges found elsewhere with the same comparisons (occupationScan.ts, in its pass over the occupations:
 * a state is filled there exactly when `occ.occupied` marks it, as the occupation rule marks from the same values).
 */
export function keepKPointEdges(bs: BandStructure, occ: OccupationRule, spin: number, edges: KPointEdges): void {
  kPointEdgesKept.set(occ.occupied[spin]!, { energies: bs.energies[spin]!, nb: bs.nBands, nk: bs.nk, edges });
}

function kPointEdges(bs: BandStructure, occ: OccupationRule, spin: number): KPointEdges {
  const e = bs.energies[spin]!;
  const o = occ.occupied[spin]!;
  const hit = kPointEdgesKept.get(o);
  if (hit && hit.energies === e && hit.nb === bs.nBands && hit.nk === bs.nk) return hit.edges;
  const edges = scanKPointEdges(e, o, bs.nk, bs.nBands);
  kPointEdgesKept.set(o, { energies: e, nb: bs.nBands, nk: bs.nk, edges });
  return edges;
}

function scanKPointEdges(e: Float64Array, o: Uint8Array, nk: number, nb: number): KPointEdges {
  const hi = new Float64Array(nk);
  const hb = new Int32Array(nk);
  const lo = new Float64Array(nk);
  const lb = new Int32Array(nk);
  for (let k = 0; k < nk; k++) {
    let h = -Infinity;
    let l = Infinity;
    let hbk = -1;
    let lbk = -1;
    for (let b = 0; b < nb; b++) {
      const x = e[k * nb + b]!;
      if (o[k * nb + b]) {
        if (x >= h) {
          h = x;
          hbk = b;
        }
      } else if (x < l) {
        l = x;
        lbk = b;
      }
    }
    hi[k] = h;
    hb[k] = hbk;
    lo[k] = l;
    lb[k] = lbk;
  }
  return { hi, hb, lo, lb };
}

function channelEdges(bs: BandStructure, occ: OccupationRule, spin: 0 | 1): { vbm: EdgeState | null; cbm: EdgeState | null } {
  const { hi, hb, lo, lb } = kPointEdges(bs, occ, spin);
  let vbm: EdgeState | null = null;
  let cbm: EdgeState | null = null;
  // Highest occupied (the first k among exact ties; at one k the highest band index); lowest empty (the first).
  for (let k = 0; k < bs.nk; k++) {
    if (hb[k]! >= 0 && (!vbm || hi[k]! > vbm.energy)) vbm = { spin, k, band: hb[k]!, energy: hi[k]! };
    if (lb[k]! >= 0 && (!cbm || lo[k]! < cbm.energy)) cbm = { spin, k, band: lb[k]!, energy: lo[k]! };
  }
  return { vbm, cbm };
}

export function bandEdges(bs: BandStructure, occ: OccupationRule): EdgeAnalysis {
  const spins = [];
  for (let s = 0; s < bs.nSpin; s++) {
    const r = channelEdges(bs, occ, s as 0 | 1);
    spins.push({ ...r, metal: occ.fractionalFilling || (!!r.vbm && !!r.cbm && r.vbm.energy >= r.cbm.energy - EDGE_TOLERANCE_EV) });
  }
  let vbm: EdgeState | null = null;
  let cbm: EdgeState | null = null;
  for (const s of spins) {
    if (s.vbm && (!vbm || s.vbm.energy > vbm.energy + EDGE_TOLERANCE_EV)) vbm = s.vbm;
    if (s.cbm && (!cbm || s.cbm.energy < cbm.energy - EDGE_TOLERANCE_EV)) cbm = s.cbm;
  }
  const metal = occ.fractionalFilling || (!!vbm && !!cbm && vbm.energy >= cbm.energy - EDGE_TOLERANCE_EV);
  return { metal, vbm, cbm, spins };
}

export function bandPoint(bs: BandStructure, s: EdgeState): BandPoint {
  return { band: s.band + 1, spin: s.spin, k: kpointAt(bs, s.k), eV: s.energy, label: labelAt(bs, s.k) };
}

/** Smallest same-spin gap at one k between the highest occupied and lowest empty state. */
export interface DirectGapState {
  eV: number;
  k: number;
  /** Highest occupied and lowest empty states at that k (same spin). */
  top: EdgeState;
  bottom: EdgeState;
}

export function smallestDirectGap(bs: BandStructure, occ: OccupationRule, spins: number[]): DirectGapState | null {
  let best: DirectGapState | null = null;
  for (const s of spins) {
    const { hi, hb, lo, lb } = kPointEdges(bs, occ, s);
    for (let k = 0; k < bs.nk; k++) {
      if (hb[k]! >= 0 && lb[k]! >= 0 && (!best || lo[k]! - hi[k]! < best.eV)) {
        const spin = s as 0 | 1;
        best = {
          eV: lo[k]! - hi[k]!,
          k,
          top: { spin, k, band: hb[k]!, energy: hi[k]! },
          bottom: { spin, k, band: lb[k]!, energy: lo[k]! },
        };
      }
    }
  }
  return best;
}

/** The gap report for the given spin channels (all channels for the overall gap). */
export function gapReport(
  bs: BandStructure,
  occ: OccupationRule,
  vbm: EdgeState | null,
  cbm: EdgeState | null,
  metal: boolean,
  spins: number[],
): GapReport | null {
  if (metal || !vbm || !cbm) return null;
  const dg = smallestDirectGap(bs, occ, spins);
  if (!dg) return null;
  const eV = cbm.energy - vbm.energy;
  const direct = dg.eV - eV <= 2 * EDGE_TOLERANCE_EV;
  let v = vbm;
  let c = cbm;
  if (direct && v.k !== c.k) {
    // The edges are degenerate in k (e.g. Γ written twice, or equivalent points): report both at the
    // k of the direct gap, with the bands found there.
    v = dg.top;
    c = dg.bottom;
  }
  return { eV, direct, vbm: bandPoint(bs, v), cbm: bandPoint(bs, c), directGap: { eV: dg.eV, k: kpointAt(bs, dg.k) } };
}
