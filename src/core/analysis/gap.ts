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

function channelEdges(bs: BandStructure, occ: OccupationRule, spin: 0 | 1): { vbm: EdgeState | null; cbm: EdgeState | null } {
  const e = bs.energies[spin]!;
  const o = occ.occupied[spin]!;
  const nb = bs.nBands;
  let vbm: EdgeState | null = null;
  let cbm: EdgeState | null = null;
  for (let k = 0; k < bs.nk; k++) {
    for (let b = 0; b < nb; b++) {
      const i = k * nb + b;
      const x = e[i]!;
      if (o[i]) {
        // Highest occupied (the first k among exact ties; at one k the highest band index); lowest empty.
        if (!vbm || x > vbm.energy || (x === vbm.energy && k === vbm.k && b > vbm.band)) {
          vbm = { spin, k, band: b, energy: x };
        }
      } else if (!cbm || x < cbm.energy) {
        cbm = { spin, k, band: b, energy: x };
      }
    }
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
  const nb = bs.nBands;
  for (const s of spins) {
    const e = bs.energies[s]!;
    const o = occ.occupied[s]!;
    for (let k = 0; k < bs.nk; k++) {
      let hi = -Infinity;
      let lo = Infinity;
      let hb = -1;
      let lb = -1;
      for (let b = 0; b < nb; b++) {
        const x = e[k * nb + b]!;
        if (o[k * nb + b]) {
          if (x >= hi) {
            hi = x;
            hb = b;
          }
        } else if (x < lo) {
          lo = x;
          lb = b;
        }
      }
      if (hb >= 0 && lb >= 0 && (!best || lo - hi < best.eV)) {
        const spin = s as 0 | 1;
        best = { eV: lo - hi, k, top: { spin, k, band: hb, energy: hi }, bottom: { spin, k, band: lb, energy: lo } };
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
