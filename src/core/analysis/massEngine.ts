/**
 * The effective-mass engine: locates the extrema (extrema.ts), characterises each one (extremumCharacter.ts),
 * sets aside saddles found in the fits, and lists the rejected candidates; a metal's pockets; and the
 * editor's entry point, a fit at a clicked point (snapped along the band to its nearest extremum).
 */
import type { BandStructure, ExtremumKind, ExtremumReport, MassFit, RejectedCandidate, Report } from '../model';
import { kpointAt } from '../model';
import type { AnalysisSettings } from './analyze';
import { bandEdges, type EdgeAnalysis } from './gap';
import { occupationRule, type OccupationRule } from './occupation';
import { classifyConduction } from './conductionClass';
import { degenerateGroup, locateExtrema, type ExtremumSite } from './extrema';
import { kKey } from './pathRays';
import { equivalentK } from '../lattice/symmetry';
import { engineContext, type EngineContext } from './engineContext';
import { characterise, type FitDetail } from './extremumCharacter';
import { compareNeighbour } from './pathLocalExtrema';
import { kIndexOf } from './kIndex';

export type { FitDetail };

export { engineContext, type EngineContext } from './engineContext';

/** Symmetry-equivalent k-points (by the crystal's point group and time reversal), when the symmetry is known. */
function equivalenceOf(ctx: EngineContext): ((a: number, b: number) => boolean) | undefined {
  const sym = ctx.symmetry.sym;
  if (!sym) return undefined;
  return (a, b) => equivalentK(sym, kpointAt(ctx.bs, a), kpointAt(ctx.bs, b), 2e-4);
}

export interface EdgeInputs {
  occ: OccupationRule;
  edges: EdgeAnalysis;
}

/** Fill `report.extrema` (called by analyzeBandStructure once the gap is known). */
export function analyzeExtrema(bs: BandStructure, report: Report, settings: AnalysisSettings, inputs: EdgeInputs): void {
  const ctx = engineContext(bs);
  const search = locateExtrema({
    bs,
    occ: inputs.occ,
    edges: inputs.edges,
    vbmIndex: report.gap ? kIndexOf(bs, report.gap.vbm.k) : null,
    cbmIndex: report.gap ? kIndexOf(bs, report.gap.cbm.k) : null,
    neighbours: ctx.neighbours,
    network: ctx.network,
    range_eV: settings.range_eV,
    degeneracy_eV: settings.degeneracy_meV / 1000,
    equivalent: equivalenceOf(ctx),
    window_eV: settings.window_meV / 1000,
    precision_eV: ctx.energyStep,
  });
  if (!ctx.neighbours && bs.nk > 1) {
    report.warnings.push('The k-points form neither a path nor a known grid: secondary extrema were not searched.');
  }
  const rejected: RejectedCandidate[] = search.rejected.map((r) => ({
    band: r.band + 1,
    spin: r.spin,
    k: kpointAt(bs, r.k),
    eV: r.energy,
    reason: r.reason,
    detail: r.detail,
  }));
  const extrema: ExtremumReport[] = [];
  for (const site of search.sites) {
    const x = characterise(ctx, site, settings);
    const saddle = saddleFromMasses(x);
    if (saddle && (x.kind === 'peak' || x.kind === 'valley')) {
      // One entry per point and band: the fits' account replaces a first one from the search.
      const entry: RejectedCandidate = { band: x.band, spin: x.spin, k: x.k, eV: x.eV, reason: 'saddle', detail: saddle };
      const same = rejected.findIndex((r) => r.spin === x.spin && r.band === x.band && r.k.every((c, i) => Math.abs(c - x.k[i]!) < 1e-9));
      if (same >= 0) rejected[same] = entry;
      else rejected.push(entry);
      continue;
    }
    if (saddle) x.warnings.push(`This band edge is a saddle point of the band, not an extremum: ${saddle}.`);
    extrema.push(x);
  }
  report.extrema = extrema;
  report.rejected = listedRejections(rejected, report.warnings);
}

/** Most set-aside candidates listed per reason (noisy data can hold thousands of rounding bumps). */
export const MAX_REJECTED_PER_REASON = 50;

function listedRejections(all: RejectedCandidate[], warnings: string[]): RejectedCandidate[] {
  const count = new Map<string, number>();
  const out: RejectedCandidate[] = [];
  for (const x of all) {
    const n = (count.get(x.reason) ?? 0) + 1;
    count.set(x.reason, n);
    if (n <= MAX_REJECTED_PER_REASON) out.push(x);
  }
  for (const [reason, n] of count) {
    if (n > MAX_REJECTED_PER_REASON)
      warnings.push(`${n} candidates were set aside as ${reason}; the first ${MAX_REJECTED_PER_REASON} are listed.`);
  }
  return out;
}

/**
 * A saddle seen in the fits: a determined directional mass of the wrong sign for the kind of extremum
 * (positive at a maximum, negative at a minimum; clear of zero by two standard errors) — for a single band,
 * masses of both signs; at a degenerate point, a branch that curves the wrong way, so the point is not a
 * maximum (minimum) of every branch — or a fitted tensor with principal masses of both signs.
 */
export function saddleFromMasses(x: ExtremumReport): string | null {
  const maximum = x.kind === 'vbm' || x.kind === 'peak';
  const clear = x.masses.filter((m) => m.determined && Math.abs(m.mass) > 2 * m.stderr);
  const wrong = clear.filter((m) => (maximum ? m.mass > 0 : m.mass < 0));
  const right = clear.filter((m) => (maximum ? m.mass < 0 : m.mass > 0));
  const list = (ms: MassFit[]): string => ms.map((m) => `${m.towards}${m.branch !== undefined ? ` (branch ${m.branch})` : ''}`).join(', ');
  const values = (ms: MassFit[]): string => ms.map((m) => m.mass.toPrecision(3)).join(', ');
  if (wrong.length && right.length) {
    const [up, down] = maximum ? [wrong, right] : [right, wrong];
    const where = x.degenerateBands > 1 ? ' (at this degenerate point not every branch has its extremum here)' : '';
    return `the band curves up towards ${list(up)} (m* ${values(up)} m_e) and down towards ${list(down)} (m* ${values(down)} m_e)${where}`;
  }
  if (x.tensor && !x.tensor.method.startsWith('from')) {
    const p = x.tensor.principal;
    if (p.some((m) => m > 0) && p.some((m) => m < 0))
      return `the fitted mass tensor has principal masses of both signs (${p.map((m) => m.toPrecision(3)).join(', ')} m_e)`;
  }
  return null;
}

/**
 * A metal's pockets near the Fermi level: the top of each crossing band that rises above E_F (a hole pocket)
 * and the bottom of each that dips below it (an electron pocket), within `range_eV` of E_F, characterised like
 * band edges (kind 'peak' / 'valley', offset measured from E_F).
 */
export function analyzePocketExtrema(
  bs: BandStructure,
  report: Report,
  settings: AnalysisSettings,
  crossing: { spin: 0 | 1; band: number }[],
  fermi: number,
): void {
  const ctx = engineContext(bs);
  const tol = settings.degeneracy_meV / 1000;
  const nb = bs.nBands;
  const sites: ExtremumSite[] = [];
  for (const c of crossing) {
    const e = bs.energies[c.spin]!;
    let kMax = 0;
    let kMin = 0;
    for (let k = 1; k < bs.nk; k++) {
      if (e[k * nb + c.band]! > e[kMax * nb + c.band]!) kMax = k;
      if (e[k * nb + c.band]! < e[kMin * nb + c.band]!) kMin = k;
    }
    const top = e[kMax * nb + c.band]!;
    const bottom = e[kMin * nb + c.band]!;
    if (top > fermi && top - fermi <= settings.range_eV) {
      const group = degenerateGroup(bs, c.spin, kMax, c.band, tol);
      sites.push({
        spin: c.spin,
        k: kMax,
        band: group[group.length - 1]!,
        energy: top,
        kind: 'peak',
        offset: top - fermi,
        group,
        warnings: ['Top of a hole pocket: the offset is measured from the Fermi level.'],
      });
    }
    if (bottom < fermi && fermi - bottom <= settings.range_eV) {
      const group = degenerateGroup(bs, c.spin, kMin, c.band, tol);
      sites.push({
        spin: c.spin,
        k: kMin,
        band: group[0]!,
        energy: bottom,
        kind: 'valley',
        offset: fermi - bottom,
        group,
        warnings: ['Bottom of an electron pocket: the offset is measured from the Fermi level.'],
      });
    }
  }
  report.extrema = sites.map((site) => characterise(ctx, site, settings));
}

// ---------------------------------------------------------------------------------------------------------
// The editor's entry points.

/** Walk from k along the band to the nearest local extremum (uphill or downhill, whichever is closer). */
function snap(ctx: EngineContext, spin: number, kIndex: number, band: number): { k: number; maximum: boolean } {
  const e = ctx.bs.energies[spin]!;
  const nb = ctx.bs.nBands;
  const nbrs = ctx.neighbours ?? (() => []);
  const climb = (up: boolean): { k: number; steps: number } => {
    let k = kIndex;
    let steps = 0;
    for (; steps <= ctx.bs.nk; steps++) {
      let best = k;
      for (const j of nbrs(k)) {
        // Higher (lower) by more than a tie, pathLocalExtrema.ts's rule.
        if (compareNeighbour(e[best * nb + band]!, e[j * nb + band]!) === (up ? 1 : -1)) best = j;
      }
      if (best === k) break;
      k = best;
    }
    return { k, steps };
  };
  const up = climb(true);
  const down = climb(false);
  if (up.steps === down.steps) {
    // Already at an extremum of one kind (0 steps each way only on a flat spot): curvature decides.
    let d2 = 0;
    for (const j of nbrs(kIndex)) d2 += e[j * nb + band]! - e[kIndex * nb + band]!;
    return d2 < 0 ? { k: up.k, maximum: true } : { k: down.k, maximum: false };
  }
  return up.steps < down.steps ? { k: up.k, maximum: true } : { k: down.k, maximum: false };
}

/**
 * Fit at a clicked point: snaps to the local extremum of band `band0` (0-based) nearest `kIndex`, then
 * characterises it like the analysis does (kind vbm/cbm when it is the edge, else peak/valley). With `at`,
 * the point is taken as the extremum (a maximum or a minimum, as given) without moving.
 */
export function fitExtremumAt(
  bs: BandStructure,
  spin: number,
  kIndex: number,
  band0: number,
  settings: AnalysisSettings,
  at?: { maximum: boolean },
  detail?: FitDetail,
): ExtremumReport {
  if (!(spin >= 0 && spin < bs.nSpin)) throw new RangeError(`spin ${spin} is not in this band structure`);
  if (!(kIndex >= 0 && kIndex < bs.nk)) throw new RangeError(`k index ${kIndex} is out of range`);
  if (!(band0 >= 0 && band0 < bs.nBands)) throw new RangeError(`band ${band0 + 1} is out of range`);
  const ctx = engineContext(bs);
  // `at`: the caller names the extremum (a listed one, or one saved before): fit exactly there, never snap.
  const { k, maximum } = at ? { k: kIndex, maximum: at.maximum } : snap(ctx, spin, kIndex, band0);
  const energy = bs.energies[spin]![k * bs.nBands + band0]!;
  const tol = settings.degeneracy_meV / 1000;
  const group = degenerateGroup(bs, spin, k, band0, tol);
  const occ = occupationRule(bs);
  const edges = occ ? bandEdges(bs, occ) : null;
  // A metal (by the classification's evidence: occupations, Fermi energy, count, band order) has no edges.
  const metal = occ ? classifyConduction(bs, occ).metal !== false : true;
  let kind: ExtremumKind = maximum ? 'peak' : 'valley';
  let offset = 0;
  const key = kKey(kpointAt(bs, k));
  if (edges && !metal && edges.vbm && edges.cbm) {
    const edge = maximum ? edges.vbm : edges.cbm;
    if (edge.spin === spin && Math.abs(edge.energy - energy) <= tol && kKey(kpointAt(bs, edge.k)) === key) kind = maximum ? 'vbm' : 'cbm';
    offset = maximum ? edges.vbm.energy - energy : energy - edges.cbm.energy;
  }
  const site: ExtremumSite = {
    spin: spin as 0 | 1,
    k,
    band: maximum ? group[group.length - 1]! : group[0]!,
    energy,
    kind,
    offset,
    group,
    warnings: k !== kIndex ? [`Moved from the clicked point to the nearest ${maximum ? 'maximum' : 'minimum'} of band ${band0 + 1}.`] : [],
  };
  if (detail) detail.kIndex = k;
  const x = characterise(ctx, site, settings, detail);
  const saddle = saddleFromMasses(x);
  if (saddle) x.warnings.unshift(`Not an extremum but a saddle point: ${saddle}.`);
  return x;
}
