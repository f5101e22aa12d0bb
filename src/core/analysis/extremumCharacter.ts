/**
 * Characterising one located extremum completely: degeneracy, valley count, directional masses along the
 * path, the tensor (from off-path k-points, or from directional masses where the little group of k makes
 * them sufficient), averaged masses, each number with its provenance and the cautions that go with it.
 */
import type { BandStructure, ExtremumReport, MassFit, MassTensor, Vec3 } from '../model';
import { kpointAt, labelAt } from '../model';
import type { AnalysisSettings } from './analyze';
import type { ExtremumSite } from './extrema';
import type { EngineContext } from './engineContext';
import { oppositeRay, type PathNetwork, type Ray, type RayExtent } from './pathRays';
import { directionalMasses } from './directionalMasses';
import type { CurvatureFit } from './fits/types';
import { cartesianToFractional } from '../lattice/reciprocal';
import { tensorFromNeighbours } from './tensorFit';
import { tensorRunMasses } from './tensorRun';
import { gridWarpedMasses, type OffPathMasses } from './gridWarping';
import { averagedFromPrincipal, pathLimitedDosMass } from './averagedMasses';
import { cubicAxesAreCartesian } from './warpedBands';
import { cartesianLittleGroup, valleysAt } from './valleyCount';
import { tensorFromDirections } from './symmetryTensor';
import { kramersRepresentatives } from './kramersPairs';

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

/** What a fit at a point found besides its report (fitExtremumAt's `detail`): the point fitted, the curvature fits. */
export interface FitDetail {
  /** 0-based index of the k-point fitted (after snapping). */
  kIndex: number;
  /** The directional fits, in the order of the report's masses (their vertices); empty off a path. */
  fits: CurvatureFit[];
}

/** Characterise one located extremum. */
export function characterise(ctx: EngineContext, site: ExtremumSite, settings: AnalysisSettings, detail?: FitDetail): ExtremumReport {
  const { bs, network } = ctx;
  const k = kpointAt(bs, site.k);
  const warnings = [...site.warnings];
  const maximum = site.kind === 'vbm' || site.kind === 'peak';
  // Spinor runs with inversion symmetry: each Kramers pair is one band for the masses (kramersPairs.ts).
  const pairs = kramersRepresentatives(bs, site.spin, site.group, site.band);
  const massGroup = pairs ?? site.group;
  const g = massGroup.length;
  if (pairs) {
    warnings.push(
      `The ${site.group.length} bands here are ${g === 1 ? 'a Kramers pair' : `${g} Kramers pairs`}: in this spin–orbit run every band is twofold degenerate at every k-point (time reversal with inversion symmetry). Each pair is one band for the masses, and the averaged masses count it once, as a band of a run without spin–orbit coupling holds both spin states.`,
    );
  }
  if (g > 1) {
    warnings.push(
      `${g} ${pairs ? 'Kramers pairs' : 'bands'} meet here within ${settings.degeneracy_meV} meV: masses by band index are ill-defined at a degenerate edge, so each mass below follows one branch by smooth continuation of E(k) (branch 1 is the one ${maximum ? 'highest' : 'lowest'} in energy next to the extremum).`,
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
      const dm = directionalMasses(bs, site.spin, massGroup, site.band, rays, {
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
      tensorRunMasses(bs, site.spin, massGroup, site.k, ctx.symmetry.sym, maximum, valleyDegeneracy, ctx.energySigma) ??
      (g > 1 ? gridWarpedMasses(bs, site.spin, massGroup, site.k, ctx.symmetry.sym, ctx.energySigma) : null);
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
    // A spinor run's bands hold one electron each: unpaired, a degenerate set's branches count half a
    // spin-degenerate band each (the density-of-states mass is quoted for N = 2(m kT/2πħ²)^{3/2} per valley).
    const est = pathLimitedDosMass(
      masses.filter((m) => m.branch !== undefined).map((m) => ({ branch: m.branch!, direction: m.direction, mass: m.mass })),
      g,
      ops,
      ops ? cubicAxesAreCartesian(ops) : false,
      valleyDegeneracy,
      maximum,
      bs.spinorbit && !pairs ? 0.5 : 1,
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
    degenerateBands: site.group.length,
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
