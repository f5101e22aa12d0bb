/**
 * The analysis of a mesh run (an ordinary self-consistent run on a uniform k-mesh, reduced to its
 * irreducible points): the bands near the edges are interpolated with star functions (src/core/interpolation),
 * the extrema are found anywhere in the zone, and the gap, the edges and the masses come from the
 * interpolant, each with its leave-one-out uncertainty. Only the bands within `range_eV` of an edge (and one
 * neighbour each side, to see crossings) are fitted: the fit is shared, each band costs one solve.
 */
import { declaredMeshAgrees, declaredMeshMismatch } from './declaredMesh';
import type { AnalysisSettings } from './analyze';
import type { EdgeInputs } from './massEngine';
import type { BandStructure, ExtremumReport, GapReport, RejectedCandidate, Report, Vec3 } from '../model';
import { interpolateRun, tooManyPointsRefusal } from '../interpolation/fromBandStructure';
import type { InterpolatedExtremum, MeshInterpolation } from '../interpolation/meshInterpolation';
import type { MeshRefusal } from '../interpolation/meshRefusal';
import { equivalentK } from '../lattice/symmetry';
import { cartesianToFractional } from '../lattice/reciprocal';
import { StarInterpolant } from '../interpolation/starInterpolant';
import { refineExtremum } from '../interpolation/newtonExtremum';
import { labelOfK } from '../lattice/specialPoints';
import {
  STAR_INTERPOLATION,
  STAR_INTERPOLATION_REFERENCE,
  meshExtremumReport,
  meshRejected,
  runBand,
  type MeshExtremumContext,
} from './meshRunExtremum';
import { nearbyTouching, touchingWarning, type NearbyTouching } from './meshRunTouching';
import { refineOnTouchingLine, type AxisProvenance } from './meshRunLinePair';
import { EVEN_LINE, massesAtEvenMeshPoint } from './meshRunLineMass';
import { kramersRepresentatives } from './kramersPairs';

/** One spin channel's interpolated edges and extrema. */
interface ChannelResult {
  spin: 0 | 1;
  run: MeshInterpolation;
  firstBand: number;
  lastBand: number;
  /** 2 when Kramers pairs are interpolated one band per pair. */
  stride: 1 | 2;
  vbm: ExtremumReport;
  cbm: ExtremumReport;
  extrema: ExtremumReport[];
  rejected: RejectedCandidate[];
}

/**
 * The k-points of a run that may be a mesh to interpolate: not a path, not a full grid in grid order (BXSF),
 * not one point's neighbourhood. A reader that saw an automatic-mesh KPOINTS says 'grid' without a grid.
 */
export function mayBeMeshRun(bs: BandStructure, local: boolean): boolean {
  return (bs.sampling === 'points' || (bs.sampling === 'grid' && bs.grid === null)) && bs.nk > 1 && !local;
}

/**
 * Fill `report.gap`, `report.extrema`, `report.rejected` and `report.interpolation` from the interpolated
 * bands. Returns the reason, and changes nothing, when the run cannot be interpolated (then the caller
 * analyses the points as they are).
 */
export function analyzeMeshRun(bs: BandStructure, report: Report, s: AnalysisSettings, inputs: EdgeInputs): MeshRefusal | null {
  const channels: ChannelResult[] = [];
  for (const spin of bs.nSpin === 2 ? ([0, 1] as const) : ([0] as const)) {
    const e = inputs.edges.spins[spin];
    if (!e?.vbm || !e.cbm) continue;
    const made = channelResult(bs, spin, e.vbm.band, e.cbm.band, s);
    if (!('run' in made)) return made;
    channels.push(made);
  }
  if (!channels.length) return { kind: 'no-edges', reason: 'No spin channel has both band edges.' };
  const vbm = channels.map((c) => c.vbm).reduce((a, b) => (b.eV > a.eV ? b : a));
  const cbm = channels.map((c) => c.cbm).reduce((a, b) => (b.eV < a.eV ? b : a));
  report.gap = interpolatedGap(vbm, cbm, channels, report.gap);
  if (report.spinGaps) {
    report.spinGaps = report.spinGaps.map((g, i) => {
      const c = channels.find((x) => x.spin === i);
      return c ? interpolatedGap(c.vbm, c.cbm, [c], g) : g;
    });
  }
  report.extrema = channels.flatMap((c) => c.extrema);
  // Offsets from the overall edges (a spin channel's own edge may lie below them), as for path runs.
  for (const x of report.extrema) x.offset_eV = x.kind === 'vbm' || x.kind === 'peak' ? vbm.eV - x.eV : x.eV - cbm.eV;
  report.rejected = channels.flatMap((c) => c.rejected);
  const first = channels[0]!.run;
  report.interpolation = {
    method: STAR_INTERPOLATION,
    reference: STAR_INTERPOLATION_REFERENCE,
    divisions: [...first.mesh.divisions],
    shift: [...first.mesh.shift],
    irreduciblePoints: first.input.kpoints.length / 3,
    stars: first.fit.basis.count,
    bands: channels.map((c) => [c.firstBand + 1, c.lastBand + 1]),
    ...(first.merged ? { mergedEquivalentPoints: { ...first.merged } } : {}),
    ...(bs.declaredMesh && declaredMeshAgrees(bs.declaredMesh, first.mesh) ? { declaredBy: bs.declaredMesh.source } : {}),
  };
  const mismatch = declaredMeshMismatch(bs.declaredMesh, first.mesh);
  if (mismatch) report.warnings.push(mismatch);
  return null;
}

/** Bands within range_eV of the channel's edges (the bands searched for extrema). */
function searchedBands(bs: BandStructure, spin: 0 | 1, vb: number, cb: number, range_eV: number): [number, number] {
  const e = bs.energies[spin]!;
  const extreme = (b: number, top: boolean): number => {
    let x = top ? -Infinity : Infinity;
    for (let k = 0; k < bs.nk; k++) x = top ? Math.max(x, e[k * bs.nBands + b]!) : Math.min(x, e[k * bs.nBands + b]!);
    return x;
  };
  const vbm = extreme(vb, true);
  const cbm = extreme(cb, false);
  let first = vb;
  while (first > 0 && extreme(first - 1, true) >= vbm - range_eV) first--;
  let last = cb;
  while (last < bs.nBands - 1 && extreme(last + 1, false) <= cbm + range_eV) last++;
  return [first, last];
}

function channelResult(bs: BandStructure, spin: 0 | 1, vb: number, cb: number, s: AnalysisSettings): ChannelResult | MeshRefusal {
  // Too many points listed: the reason interpolateRun would give below, before the bands are searched.
  const tooMany = tooManyPointsRefusal(bs, { spin });
  if (tooMany) return tooMany;
  const [first, last] = searchedBands(bs, spin, vb, cb, s.range_eV);
  // One more band each side is fitted, not searched: a crossing with it is then seen.
  let lo = Math.max(0, first - 1);
  let hi = Math.min(bs.nBands - 1, last + 1);
  // A spinor run whose bands are Kramers pairs everywhere: one band per pair is interpolated (two identical
  // bands by index would read as touching everywhere).
  const pairLo = lo - (lo % 2);
  const pairHi = Math.min(bs.nBands - 1, hi + ((hi + 1) % 2));
  const paired = kramersRepresentatives(
    bs,
    spin,
    Array.from({ length: pairHi - pairLo + 1 }, (_, i) => pairLo + i),
    pairLo,
  );
  const stride: 1 | 2 = paired && paired.length > 1 ? 2 : 1;
  if (stride === 2) [lo, hi] = [pairLo, pairHi - 1];
  const made = interpolateRun(bs, { spin, firstBand: lo, lastBand: hi, stride });
  if (!made.run) return { kind: made.kind, reason: made.reason };
  const run = made.run;
  const map = run.input.specialPoints ?? null;
  const axes = new Map<InterpolatedExtremum, AxisProvenance>();
  const ctx: MeshExtremumContext = {
    spin,
    stride,
    firstBand: lo,
    points: run.input.kpoints.length / 3,
    labelOf: (k) => (map ? labelOfK(map, [k[0]!, k[1]!, k[2]!]) : null),
    axesOf: (x) => axes.get(x),
  };
  const rejected: RejectedCandidate[] = [];
  // Bands from..to of the run (0-based) as bands of the interpolation.
  const collect = (from: number, to: number, kind: 'min' | 'max'): InterpolatedExtremum[] =>
    Array.from({ length: run.input.bands.length }, (_, j) => j).flatMap((j) => {
      const b = lo + stride * j;
      if (b + stride - 1 < from || b > to) return [];
      const r = run.extrema(j, kind);
      const extrema = r.extrema.map((found) => {
        const atPoint = massesAtEvenMeshPoint(run, found, STAR_INTERPOLATION);
        if (atPoint) axes.set(atPoint.extremum, atPoint.axes);
        const x = atPoint?.extremum ?? found;
        const t = noteNearbyTouching(run, x, ctx);
        const refined = t ? refineOnTouchingLine(run, x, t, STAR_INTERPOLATION) : null;
        if (!refined) return x;
        axes.set(refined.extremum, refined.axes);
        return refined.extremum;
      });
      // The interpolant's saddle at a mesh extremum that the even line resolved is no longer a candidate set aside.
      const resolvedHere = (k: Vec3): boolean =>
        extrema.some((x) => axes.get(x)?.methods.includes(EVEN_LINE) && equivalentK(run.input.sym, x.k, k, 2e-4));
      for (const x of r.rejected) {
        const c = meshRejected(x, ctx);
        if (c && !resolvedHere(x.k)) rejected.push(c);
      }
      return extrema;
    });
  // Valence: the searched bands below the conduction edge; conduction: those above the valence edge.
  const maxima = collect(first, cb - 1, 'max').sort((a, b) => b.energy_eV - a.energy_eV);
  const minima = collect(vb + 1, last, 'min').sort((a, b) => a.energy_eV - b.energy_eV);
  if (!maxima.length || !minima.length) {
    return {
      kind: 'no-edges',
      reason: `The interpolated bands have no ${maxima.length ? 'minimum' : 'maximum'} near the ${maxima.length ? 'conduction' : 'valence'} edge.`,
    };
  }
  const valence = listed(maxima, 'vbm', 'peak', s, run, ctx);
  const conduction = listed(minima, 'cbm', 'valley', s, run, ctx);
  if (stride === 2) {
    for (const x of [...valence, ...conduction]) {
      x.warnings.push(
        'A spin–orbit run whose bands are Kramers pairs at every k-point (time reversal with inversion symmetry): one band of each pair was interpolated, and the averaged masses count the pair once, as a band of a run without spin–orbit coupling holds both spin states.',
      );
    }
  }
  return {
    spin,
    run,
    firstBand: lo,
    lastBand: hi,
    stride,
    vbm: valence[0]!,
    cbm: conduction[0]!,
    extrema: [...valence, ...conduction],
    rejected,
  };
}

/** Says so in the extremum's warnings (and its reason when its masses are not quoted) when a band meets it nearby. */
function noteNearbyTouching(run: MeshInterpolation, x: InterpolatedExtremum, ctx: MeshExtremumContext): NearbyTouching | null {
  const t = nearbyTouching(run, x);
  if (!t) return null;
  const warning = touchingWarning(t, runBand(ctx, t.band), ctx.labelOf(t.k));
  x.warnings.push(warning);
  if (!x.determined && x.undeterminedReason) x.undeterminedReason += ` ${warning}`;
  return t;
}

/**
 * The extrema within range_eV of the edge, best first: the first is the edge; one entry per star of k, the
 * bands meeting there (within degeneracy_meV) counted in `degenerateBands`.
 */
function listed(
  sorted: InterpolatedExtremum[],
  edgeKind: 'vbm' | 'cbm',
  otherKind: 'peak' | 'valley',
  s: AnalysisSettings,
  run: MeshInterpolation,
  ctx: MeshExtremumContext,
): ExtremumReport[] {
  const edge = sorted[0]!.energy_eV;
  const sym = run.input.sym;
  const kept: InterpolatedExtremum[] = [];
  const degenerate: number[] = [];
  for (const x of sorted) {
    if (Math.abs(x.energy_eV - edge) > s.range_eV) break;
    const same = kept.findIndex((y) => equivalentK(sym, y.k, x.k, 2e-4) && Math.abs(y.energy_eV - x.energy_eV) <= s.degeneracy_meV / 1000);
    if (same >= 0) {
      if (x.band !== kept[same]!.band) degenerate[same]!++;
      // A degenerate edge is named by its outermost band, as on paths: the highest of a maximum, the lowest of a minimum.
      if (edgeKind === 'vbm' ? x.band > kept[same]!.band : x.band < kept[same]!.band) kept[same] = x;
      continue;
    }
    kept.push(x);
    degenerate.push(1);
  }
  return kept.map((x, i) => meshExtremumReport(x, i === 0 ? edgeKind : otherKind, edge, ctx.stride * degenerate[i]!, ctx));
}

/**
 * The gap between interpolated edges: direct when both lie at the same k (star) in the same channel; the
 * smallest direct gap is the smaller of the mesh's and the interpolated bands' at the two edge points.
 */
function interpolatedGap(vbm: ExtremumReport, cbm: ExtremumReport, channels: ChannelResult[], mesh: GapReport | null): GapReport {
  const eV = cbm.eV - vbm.eV;
  const ch = channels.find((c) => c.spin === vbm.spin);
  const direct = vbm.spin === cbm.spin && ch !== undefined && equivalentK(ch.run.input.sym, vbm.k, cbm.k, 2e-4);
  let directGap = mesh ? { eV: mesh.directGap.eV, k: mesh.directGap.k } : { eV: Infinity, k: vbm.k };
  for (const c of channels) {
    const found = smallestDirectGap(c, [c.vbm.k, c.cbm.k, ...(mesh ? [mesh.directGap.k] : [])]);
    if (found && found.eV < directGap.eV) directGap = found;
  }
  if (direct || directGap.eV < eV) directGap = { eV, k: [...cbm.k] as Vec3 };
  const [uv, uc] = [vbm, cbm].map((x) => x.interpolated?.energyUncertainty_eV ?? null);
  const point = (x: ExtremumReport): GapReport['vbm'] => ({
    band: x.band,
    spin: x.spin,
    k: [...x.k],
    eV: x.eV,
    label: x.label,
    position: x.position ?? null,
  });
  return {
    eV,
    direct,
    vbm: point(vbm),
    cbm: point(cbm),
    directGap,
    source: 'interpolated',
    uncertainty_eV: typeof uv === 'number' && typeof uc === 'number' ? Math.hypot(uv, uc) : null,
  };
}

/**
 * The smallest direct gap between a channel's edge bands on the interpolant: E_c − E_v is itself a sum of
 * star functions (the difference of the coefficients), refined to its minimum from each start.
 */
function smallestDirectGap(c: ChannelResult, starts: readonly Vec3[]): { eV: number; k: Vec3 } | null {
  const { run } = c;
  // Back from the run's band numbers (runBand) to the interpolation's.
  const upper = run.band((c.cbm.band - 1 - c.firstBand) / c.stride).coefficients;
  const lower = run.band((c.vbm.band - 1 - c.firstBand - (c.stride - 1)) / c.stride).coefficients;
  const difference = new StarInterpolant(
    run.fit.basis,
    upper.map((x, m) => x - lower[m]!),
  );
  const opt = { maxStep: run.halfSpacing, maxTravel: 3 * run.halfSpacing };
  let best: { eV: number; k: Vec3 } | null = null;
  for (const start of starts) {
    const p = refineExtremum(difference, run.toCart(start), 'min', opt);
    const eV = p.rejected ? difference.value(run.toCart(start)) : p.energy;
    const k = p.rejected ? start : cartesianToFractional(p.k, run.input.lattice);
    if (!best || eV < best.eV) best = { eV, k: k.map((x) => x + 0) as Vec3 };
  }
  return best;
}

/** The caution every interpolated result carries (shown with the standard ones). */
export function meshRunCautions(report: Report): string[] {
  const i = report.interpolation;
  if (!i) return [];
  return [
    `Band edges and masses are interpolated from a ${i.divisions.join('×')} mesh (${STAR_INTERPOLATION_REFERENCE}): the interpolation's error grows near band crossings and degeneracies and where the mesh is coarse compared with a valley; the uncertainties are leave-one-out estimates, and masses beyond 10 % are not quoted.`,
  ];
}
