/**
 * One extremum of an interpolated mesh run as the Report states it: the principal masses of the interpolant's
 * analytic Hessian (as directional masses along the principal axes and as a tensor), each marked
 * `source: 'interpolated'` with its leave-one-out uncertainty and whether it can be quoted.
 */
import type { ExtremumKind, ExtremumReport, MassFit, RejectedCandidate } from '../model';
import type { InterpolatedExtremum, RejectedStationaryPoint } from '../interpolation/meshInterpolation';
import type { AxisProvenance } from './meshRunLinePair';

/** The method id of masses from the interpolated bands (not a curvature fit: no window). */
export const STAR_INTERPOLATION = 'star-interpolation';
/** The published method, as the report names it. */
export const STAR_INTERPOLATION_REFERENCE =
  'star-function interpolation through the mesh energies with minimum Pickett–Krakauer–Allen roughness (Shankland 1971; Koelling & Wood, J. Comput. Phys. 67, 253 (1986); Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721 (1988))';

export interface MeshExtremumContext {
  spin: 0 | 1;
  /** 0-based band of the run that is band 0 of the interpolation. */
  firstBand: number;
  /** 2 when a spinor run's Kramers pairs are interpolated one band per pair (kramersPairs.ts), else 1. */
  stride: 1 | 2;
  /** Irreducible data points of the fit (the provenance of each mass). */
  points: number;
  /** The special point's label at k, when k is one. */
  labelOf: (k: readonly number[]) => string | null;
  /** Per principal axis, the method and whether it is quoted, for extrema refined beyond the interpolant. */
  axesOf?: (x: InterpolatedExtremum) => AxisProvenance | undefined;
}

/**
 * The 1-based band of the run for band j of the interpolation. Of a Kramers pair (stride 2) a maximum is named by
 * the pair's upper band and anything else by its lower one, as a degenerate edge is named on paths.
 */
export function runBand(ctx: Pick<MeshExtremumContext, 'firstBand' | 'stride'>, j: number, kind: 'min' | 'max' | null = null): number {
  return ctx.firstBand + ctx.stride * j + 1 + (kind === 'max' ? ctx.stride - 1 : 0);
}

const axisText = (a: readonly number[]): string => `(${a.map((x) => (Math.abs(x) < 5e-4 ? 0 : x).toFixed(3)).join(', ')})`;

/** The principal masses as directional masses along their axes (empty when the extremum has no masses). */
export function principalMassFits(x: InterpolatedExtremum, points: number, axes?: AxisProvenance): MassFit[] {
  if (!x.resolved) return [];
  return x.masses.map((mass, i) => {
    const determined = axes?.determined[i] ?? x.determined;
    return {
      towards: `principal axis ${i + 1} ${axisText(x.axes[i]!)}`,
      direction: [...x.axes[i]!],
      mass,
      stderr: x.uncertainty.masses[i]!,
      points: axes?.points?.[i] ?? points,
      window_meV: 0,
      method: axes?.methods[i] ?? STAR_INTERPOLATION,
      determined,
      ...(determined ? {} : { undeterminedReason: x.undeterminedReason ?? 'The interpolation cannot support this mass.' }),
      source: 'interpolated' as const,
    };
  });
}

export function meshExtremumReport(
  x: InterpolatedExtremum,
  kind: ExtremumKind,
  edge_eV: number,
  degenerateBands: number,
  ctx: MeshExtremumContext,
): ExtremumReport {
  const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);
  const axes = ctx.axesOf?.(x);
  const tensorMethod = axes ? [...new Set(axes.methods)].join('+') : STAR_INTERPOLATION;
  return {
    band: runBand(ctx, x.band, x.kind),
    spin: ctx.spin,
    k: [...x.k],
    eV: x.energy_eV,
    label: ctx.labelOf(x.k),
    position: x.position,
    kind,
    offset_eV: Math.abs(x.energy_eV - edge_eV),
    degenerateBands,
    valleyDegeneracy: x.valleyDegeneracy,
    masses: principalMassFits(x, ctx.points, axes),
    tensor: x.resolved
      ? {
          principal: [...x.masses],
          axes: [[...x.axes[0]], [...x.axes[1]], [...x.axes[2]]],
          method: tensorMethod,
          points: ctx.points,
          stderr: [...x.uncertainty.masses],
          source: 'interpolated',
          determined: x.determined,
          ...(x.determined ? {} : { undeterminedReason: x.undeterminedReason ?? 'The interpolation cannot support these masses.' }),
        }
      : null,
    dosMass: x.dosMass,
    conductivityMass: x.conductivityMass,
    interpolated: {
      energyUncertainty_eV: finite(x.uncertainty.energy_eV),
      positionUncertainty_invA: finite(x.uncertainty.position_invA),
      resolved: x.resolved,
      touchingBands: x.touching.map((b) => runBand(ctx, b)),
    },
    warnings: [...x.warnings],
  };
}

const REJECT_DETAIL: Record<RejectedStationaryPoint['reason'], [RejectedCandidate['reason'], string] | null> = {
  saddle: ['saddle', 'the interpolated band is stationary here but curves both ways'],
  crossing: ['crossing', 'another band comes within the interpolation’s error here: no extremum is placed at a crossing'],
  flat: ['shallow', 'the interpolated band is too flat here to place an extremum'],
  // A Newton refinement that left the neighbourhood of its mesh start found nothing there: not a candidate.
  escaped: null,
};

/** A stationary point the interpolation set aside, as a Report candidate (null for refinements that wandered off). */
export function meshRejected(x: RejectedStationaryPoint, ctx: MeshExtremumContext): RejectedCandidate | null {
  const why = REJECT_DETAIL[x.reason];
  if (!why) return null;
  return {
    band: runBand(ctx, x.band, x.kind),
    spin: ctx.spin,
    k: [...x.k],
    eV: x.energy_eV,
    reason: why[0],
    detail: `Interpolated ${x.kind === 'min' ? 'minimum' : 'maximum'} candidate: ${why[1]}.`,
  };
}
