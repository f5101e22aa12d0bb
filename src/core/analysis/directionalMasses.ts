/**
 * Directional masses at an extremum: one curvature fit per path direction leaving it, labelled by where
 * the direction points. At a degenerate edge, one fit per branch and direction, the branches followed by
 * smooth continuation (bandBranches) rather than by band index.
 */
import type { BandStructure, MassFit } from '../model';
import { followBranches } from './bandBranches';
import { fitCurvature, type CurvatureFit, type LineSamples } from './fits/index';
import { spreadAgainstParabola } from './fits/methodSpread';
import { oppositeRay, type Ray } from './pathRays';
import { timeReversalInvariantK } from './candidateChecks';

export interface DirectionalSettings {
  method: string;
  window_meV: number;
  energySigma: number;
}

export interface DirectionalResult {
  masses: MassFit[];
  /** The underlying fits, in the order of `masses` (vertex positions, α errors, ...). */
  fits: CurvatureFit[];
  /** The ray of each fit, in the order of `masses`. */
  rays: Ray[];
  warnings: string[];
  /** True when a branch left its band index along some direction (a crossing was followed). */
  crossed: boolean;
}

function bandAlong(bs: BandStructure, spin: number, band: number, ray: Ray): Float64Array {
  const e = bs.energies[spin]!;
  const out = new Float64Array(ray.indices.length);
  for (let m = 0; m < out.length; m++) out[m] = e[ray.indices[m]! * bs.nBands + band]!;
  return out;
}

export function toMassFit(fit: CurvatureFit, ray: Ray, branch?: number): MassFit {
  const m: MassFit = {
    towards: ray.towards,
    direction: ray.direction,
    mass: fit.mass,
    stderr: fit.stderr,
    points: fit.points,
    window_meV: fit.window_meV,
    method: fit.method,
    residual_meV: fit.residual_meV,
    determined: fit.determined,
  };
  if (!fit.determined && fit.undeterminedReason) m.undeterminedReason = fit.undeterminedReason;
  if (fit.alpha_per_eV !== undefined) m.alpha_per_eV = fit.alpha_per_eV;
  if (branch !== undefined) m.branch = branch;
  if (fit.warnings.length) m.warnings = [...fit.warnings];
  return m;
}

/** A finite-difference mass gets its spread against the parabola on the same samples (fits/methodSpread.ts). */
function withSpread(m: MassFit, fit: CurvatureFit, samples: LineSamples, settings: { window_meV: number; energySigma: number }): MassFit {
  const spread = spreadAgainstParabola(fit, samples, settings);
  if (spread) m.methodSpread = spread;
  return m;
}

/** k ≡ −k modulo a reciprocal lattice vector (2k integer): E is even along every line through it. */
export const isTimeReversalInvariant = timeReversalInvariantK;

export function directionalMasses(
  bs: BandStructure,
  spin: number,
  group: number[],
  band: number,
  rays: Ray[],
  s: DirectionalSettings,
): DirectionalResult {
  const masses: MassFit[] = [];
  const fits: CurvatureFit[] = [];
  const fitRays: Ray[] = [];
  const warnings: string[] = [];
  let crossed = false;
  const fitSettings = { window_meV: s.window_meV, energySigma: s.energySigma };
  const even = rays.length > 0 && rays[0]!.indices.length > 0 && isTimeReversalInvariant(bs, rays[0]!.indices[0]!);
  for (const ray of rays) {
    if (group.length <= 1) {
      const samples: LineSamples = { t: ray.t, e: bandAlong(bs, spin, band, ray), even };
      const opp = oppositeRay(rays, ray);
      if (opp) samples.back = { t: opp.t, e: bandAlong(bs, spin, band, opp) };
      const out = fitCurvature(s.method, samples, fitSettings);
      if (out.fit) {
        masses.push(withSpread(toMassFit(out.fit, ray), out.fit, samples, fitSettings));
        fits.push(out.fit);
        fitRays.push(ray);
      } else warnings.push(`Towards ${ray.towards}: too few points (${ray.indices.length}) along this direction for a ${s.method} fit.`);
      continue;
    }
    const trace = followBranches((k, b) => bs.energies[spin]![k * bs.nBands + b]!, bs.nBands, ray.indices, ray.t, group);
    if (trace.crossed) crossed = true;
    // Branch 1 is the one nearest the gap: the highest at a valence edge, the lowest at a conduction edge.
    const valenceLike = band === group[group.length - 1];
    const order = trace.energies.map((_, j) => j);
    if (valenceLike) order.reverse();
    order.forEach((j, rank) => {
      const samples: LineSamples = { t: ray.t, e: trace.energies[j]!, even };
      const out = fitCurvature(s.method, samples, fitSettings);
      if (out.fit) {
        masses.push(withSpread(toMassFit(out.fit, ray, rank + 1), out.fit, samples, fitSettings));
        fits.push(out.fit);
        fitRays.push(ray);
      } else warnings.push(`Towards ${ray.towards}, branch ${rank + 1}: too few points for a ${s.method} fit.`);
    });
  }
  return { masses, fits, rays: fitRays, warnings, crossed };
}
