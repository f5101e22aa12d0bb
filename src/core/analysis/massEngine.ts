/**
 * The effective-mass engine: locates the extrema (extrema.ts) and characterises each one completely —
 * degeneracy, valley count, directional masses along the path, the tensor (from off-path k-points, or from
 * directional masses where the little group of k makes them sufficient), averaged masses — each number with
 * its provenance. Also the editor's entry points: a fit at a clicked point and the mass-versus-window scan.
 */
import type { BandStructure, ExtremumKind, ExtremumReport, MassFit, MassTensor, RejectedCandidate, Report, Vec3 } from '../model';
import { kpointAt, labelAt } from '../model';
import type { AnalysisSettings } from './analyze';
import { bandEdges, type EdgeAnalysis } from './gap';
import { occupationRule, type OccupationRule } from './occupation';
import { classifyConduction } from './conductionClass';
import { energyRoundingStep } from './energyResolution';
import { degenerateGroup, gridNeighbours, locateExtrema, pathNeighbours, type ExtremumSite, type NeighbourFn } from './extrema';
import { pathNetwork, kKey, type PathNetwork, type RayExtent } from './pathRays';
import { directionalMasses } from './directionalMasses';
import type { CurvatureFit } from './fits/types';
import { oppositeRay, type Ray } from './pathRays';
import { cartesianToFractional } from '../lattice/reciprocal';
import { tensorFromNeighbours } from './tensorFit';
import { gridWarpedMasses, tensorRunMasses, type OffPathMasses } from './tensorRun';
import { averagedFromPrincipal, pathLimitedDosMass } from './averagedMasses';
import { cubicAxesAreCartesian } from './warpedBands';
import { cartesianLittleGroup, symmetryContext, valleysAt, type SymmetryContext } from './valleyCount';
import { tensorFromDirections } from './symmetryTensor';
import { pathGeometry } from '../lattice/kpath';
import { equivalentK } from '../lattice/symmetry';

/** What the engine derives once per band structure and reuses for every extremum and click. */
export interface EngineContext {
  bs: BandStructure;
  /** The path's directions, when the k-points form a path. */
  network: PathNetwork | null;
  neighbours: NeighbourFn | null;
  energySigma: number;
  /** The decimal step the energies are written with, eV (0: full precision). */
  energyStep: number;
  symmetry: SymmetryContext;
}

const contexts = new WeakMap<BandStructure, EngineContext>();

/** True when the k-points run along lines (a band path), even if the file did not say so. */
function looksLikePath(bs: BandStructure, net: PathNetwork): boolean {
  if (bs.sampling === 'path') return true;
  if (bs.sampling === 'grid' || bs.grid) return false;
  const segs = net.geometry.segments;
  if (segs.length === 0) return false;
  const mean = segs.reduce((s, g) => s + g.end - g.start + 1, 0) / segs.length;
  return mean >= 5;
}

export function engineContext(bs: BandStructure): EngineContext {
  const hit = contexts.get(bs);
  if (hit) return hit;
  let network: PathNetwork | null = null;
  let neighbours: NeighbourFn | null = null;
  if (bs.nk > 1) {
    const net = pathNetwork(bs, pathGeometry(bs));
    if (looksLikePath(bs, net)) {
      network = net;
      neighbours = pathNeighbours(net);
    } else neighbours = gridNeighbours(bs);
  }
  const energyStep = energyRoundingStep(bs);
  const ctx: EngineContext = {
    bs,
    network,
    neighbours,
    energySigma: energyStep / Math.sqrt(12),
    energyStep,
    symmetry: symmetryContext(bs),
  };
  contexts.set(bs, ctx);
  return ctx;
}

function pointLabel(bs: BandStructure, net: PathNetwork | null, k: number): string | null {
  const own = labelAt(bs, k);
  if (own || !net) return own;
  for (const j of net.visitsOf(k)) {
    const l = labelAt(bs, j);
    if (l) return l;
  }
  return null;
}

/** The closest band outside the site's degenerate group, at the site's k. */
function nearestOtherBand(bs: BandStructure, site: ExtremumSite): { band: number; gap_meV: number } | null {
  const e = bs.energies[site.spin]!;
  const nb = bs.nBands;
  let best: { band: number; gap_meV: number } | null = null;
  for (const b of [site.group[0]! - 1, site.group[site.group.length - 1]! + 1]) {
    if (b < 0 || b >= nb) continue;
    const gap = Math.abs(e[site.k * nb + b]! - site.energy) * 1000;
    if (!best || gap < best.gap_meV) best = { band: b, gap_meV: gap };
  }
  return best;
}

/**
 * Where a free-vertex fit puts the extremum when it lies between sampled points (Si's Δ minimum): the
 * vertex of the best-determined fit whose vertex falls inside its own direction, more than a tenth of a step
 * from the sampled point. Null when every vertex sits at the sampled point.
 */
/** `sampledE`: the energy at the sampled point (eV); the note gives the vertex's energy relative to it (no energy zero needed). */
function vertexNote(bs: BandStructure, k: number, fits: CurvatureFit[], rays: Ray[], maximum: boolean, sampledE: number): string | null {
  if (!bs.lattice) return null;
  let best: { fit: CurvatureFit; ray: Ray } | null = null;
  fits.forEach((fit, i) => {
    const ray = rays[i]!;
    const h = ray.t.length > 1 ? ray.t[1]! : 0;
    // Only along a straight line through the point (both sides sampled): elsewhere a one-sided fit's vertex
    // says more about higher-order terms than about where the extremum is.
    if (!oppositeRay(rays, ray)) return;
    if (fit.vertexT === undefined || !(h > 0) || fit.vertexT < 0.1 * h || fit.vertexT > 0.6 * h) return;
    if (!best || fit.stderr < best.fit.stderr) best = { fit, ray };
  });
  if (!best) return null;
  const { fit, ray } = best as { fit: CurvatureFit; ray: Ray };
  const k0 = kpointAt(bs, k);
  const d = cartesianToFractional(ray.direction.map((x) => x * fit.vertexT!) as Vec3, bs.lattice);
  const kv = [k0[0] + d[0], k0[1] + d[1], k0[2] + d[2]].map((x) => Number(x.toFixed(4)));
  const step = fit.vertexT! / ray.t[1]!;
  return `The ${maximum ? 'maximum' : 'minimum'} lies between sampled points: the free-vertex ${fit.method} fit towards ${ray.towards} puts it ${step.toFixed(2)} of a step (${fit.vertexT!.toFixed(4)} Å⁻¹) from the sampled point, at k ≈ (${kv.join(', ')})${fit.vertexE !== undefined ? `, ${Math.abs(fit.vertexE - sampledE) * 1000 < 0.05 ? 'at the sampled energy' : `${(Math.abs(fit.vertexE - sampledE) * 1000).toFixed(1)} meV ${maximum ? 'above' : 'below'} the sampled energy`}` : ''}.`;
}

/** Characterise one located extremum. */
/** What a fit at a point found besides its report (fitExtremumAt's `detail`): the point fitted, the curvature fits. */
export interface FitDetail {
  /** 0-based index of the k-point fitted (after snapping). */
  kIndex: number;
  /** The directional fits, in the order of the report's masses (their vertices); empty off a path. */
  fits: CurvatureFit[];
}

export function characterise(ctx: EngineContext, site: ExtremumSite, settings: AnalysisSettings, detail?: FitDetail): ExtremumReport {
  const { bs, network } = ctx;
  const k = kpointAt(bs, site.k);
  const warnings = [...site.warnings];
  const maximum = site.kind === 'vbm' || site.kind === 'peak';
  const g = site.group.length;
  if (g > 1) {
    warnings.push(
      `${g} bands meet here within ${settings.degeneracy_meV} meV: masses by band index are ill-defined at a degenerate edge, so each mass below follows one branch by smooth continuation of E(k) (branch 1 is the one ${maximum ? 'highest' : 'lowest'} in energy next to the extremum).`,
    );
  }
  const near = nearestOtherBand(bs, site);
  if (near && near.gap_meV < settings.window_meV) {
    warnings.push(
      `Band ${near.band + 1} lies only ${near.gap_meV.toFixed(1)} meV away at this point, inside the ${settings.window_meV} meV fit window: the bands may mix (an avoided crossing) and the curvature of one band index can be unreliable; compare a smaller window.`,
    );
  }
  const valleyDegeneracy = valleysAt(ctx.symmetry, k);
  if (valleyDegeneracy === null && ctx.symmetry.unavailable) warnings.push(ctx.symmetry.unavailable);

  let masses: MassFit[] = [];
  let tensor: MassTensor | null = null;
  let crossed = false;
  let offPath: OffPathMasses | null = null;
  let dosPathLimited: { error: number } | null = null;
  if (network) {
    if (!network.hasLengths) warnings.push('No lattice and no written path distances: masses cannot be given in m_e.');
    else {
      if (network.geometry.cartesian === null)
        warnings.push('No lattice: distances are as the file wrote them and directions are unknown (written as zero vectors).');
      const rays = network.raysFrom(site.k, fitExtent(bs, site, settings.window_meV / 1000));
      const dm = directionalMasses(bs, site.spin, site.group, site.band, rays, {
        method: settings.method,
        window_meV: settings.window_meV,
        energySigma: ctx.energySigma,
      });
      masses = dm.masses;
      if (detail) detail.fits = dm.fits;
      crossed = dm.crossed;
      if (g === 1) {
        const v = vertexNote(bs, site.k, dm.fits, dm.rays, maximum, site.energy);
        if (v) warnings.push(v);
      }
      warnings.push(...dm.warnings);
      if (crossed)
        warnings.push('Along some direction a branch crosses another band: it was followed across the crossing, not by band index.');
    }
  } else if (bs.nk > 1) {
    // A tensor run (tensor-kpoints), or a grid around a degenerate edge: tensorRun.ts.
    offPath =
      tensorRunMasses(bs, site.spin, site.group, site.k, ctx.symmetry.sym, maximum, valleyDegeneracy, ctx.energySigma) ??
      (g > 1 ? gridWarpedMasses(bs, site.spin, site.group, site.k, ctx.symmetry.sym, ctx.energySigma) : null);
    if (offPath) {
      masses = offPath.masses;
      tensor = offPath.tensor;
      warnings.push(...offPath.warnings);
    } else if (g > 1) warnings.push('No mass tensor at a degenerate edge: the branches have no common tensor.');
    else {
      const t = tensorFromNeighbours(bs, site.spin, site.band, site.k, settings.window_meV, ctx.energySigma);
      tensor = t.tensor;
      warnings.push(...t.warnings);
    }
  }

  // Tensor from directional masses and the little group of k, when the path and symmetry suffice.
  const quotable = masses.filter((m) => m.determined);
  if (masses.length > quotable.length) {
    warnings.push(
      `${masses.length - quotable.length} of the ${masses.length} directional masses are undetermined (see each one): averaged masses and the tensor use only the determined ones.`,
    );
  }
  if (!tensor && g === 1 && quotable.length > 0 && bs.lattice && network?.geometry.cartesian) {
    const ops = cartesianLittleGroup(ctx.symmetry, k, bs.lattice);
    if (ops) {
      const r = tensorFromDirections(
        quotable.map((m) => ({ direction: m.direction, inverseMass: 1 / m.mass })),
        ops,
      );
      if (r.result) {
        tensor = {
          principal: r.result.principal,
          axes: r.result.axes,
          method: `from ${quotable.length} directional mass${quotable.length === 1 ? '' : 'es'} and the little group of k (${r.result.operations} operations with time reversal, ${r.result.components} independent component${r.result.components === 1 ? '' : 's'})`,
          points: quotable.reduce((s, m) => s + m.points, 0),
        };
      } else if (r.reason) {
        warnings.push(
          `No mass tensor: ${r.reason}. A tensor run (valleyscope tensor-kpoints --at ${site.kind === 'vbm' || site.kind === 'cbm' ? site.kind : fracText(k)}) gives the full tensor.`,
        );
      }
    }
  }

  let dosMass: number | null = null;
  let conductivityMass: number | null = null;
  if (tensor) {
    const av = averagedFromPrincipal(
      tensor.principal,
      valleyDegeneracy,
      tensor.method.startsWith('from') ? 'tensor built from the directional masses' : 'fitted mass tensor',
    );
    dosMass = av.dosMass;
    conductivityMass = av.conductivityMass;
    warnings.push(av.note);
  } else if (offPath) {
    dosMass = offPath.dosMass;
  } else if (g > 1 && masses.length > 0 && quotable.length < masses.length) {
    warnings.push('No density-of-states mass for the degenerate branches: some branch masses are undetermined.');
  } else if (g > 1 && masses.length > 0) {
    // Several bands share the edge: path-limited DOS mass, directions weighted by their stars (averagedMasses.ts).
    const ops = bs.lattice ? cartesianLittleGroup(ctx.symmetry, k, bs.lattice) : null;
    const est = pathLimitedDosMass(
      masses.filter((m) => m.branch !== undefined).map((m) => ({ branch: m.branch!, direction: m.direction, mass: m.mass })),
      g,
      ops,
      ops ? cubicAxesAreCartesian(ops) : false,
      valleyDegeneracy,
      maximum,
    );
    if (est) {
      dosMass = est.dosMass;
      dosPathLimited = { error: est.error };
      warnings.push(est.note);
    }
  }
  return {
    band: site.band + 1,
    spin: site.spin,
    k,
    eV: site.energy,
    label: pointLabel(bs, network, site.k),
    kind: site.kind,
    offset_eV: site.offset,
    degenerateBands: g,
    valleyDegeneracy,
    masses,
    tensor,
    dosMass,
    conductivityMass,
    ...(dosPathLimited ? { dosMassPathLimited: dosPathLimited } : {}),
    ...(offPath?.warping ? { warping: offPath.warping } : {}),
    warnings,
  };
}

function fracText(k: Vec3): string {
  return k.map((x) => String(Number(x.toFixed(4)))).join(',');
}

function kIndexOf(bs: BandStructure, k: Vec3): number | null {
  for (let i = 0; i < bs.nk; i++) {
    if (
      Math.abs(bs.kpoints[3 * i]! - k[0]) < 1e-7 &&
      Math.abs(bs.kpoints[3 * i + 1]! - k[1]) < 1e-7 &&
      Math.abs(bs.kpoints[3 * i + 2]! - k[2]) < 1e-7
    )
      return i;
  }
  return null;
}

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
 * How far along each direction the fits need points: past the window of every band of the site (twice
 * the window, for branches that change band), and never fewer than a dozen points (the window grows to
 * the fewest points a fit needs). Keeps the work per extremum proportional to the points near it.
 */
function fitExtent(bs: BandStructure, site: ExtremumSite, window_eV: number): RayExtent {
  const e = bs.energies[site.spin]!;
  const nb = bs.nBands;
  const e0 = site.energy;
  const limit = 2 * window_eV + 1e-9;
  return (k, m) => {
    if (m < 12) return true;
    for (const b of site.group) if (Math.abs(e[k * nb + b]! - e0) <= limit) return true;
    return false;
  };
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
        const better = up ? e[j * nb + band]! > e[best * nb + band]! + 1e-12 : e[j * nb + band]! < e[best * nb + band]! - 1e-12;
        if (better) best = j;
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
 * the point is taken as the extremum (a maximum or a minimum, as given) without moving. `detail`, when given,
 * receives the k index fitted and the directional fits (for drawing the fitted curves without fitting again).
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
