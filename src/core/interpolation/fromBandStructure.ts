/**
 * A read band structure as the interpolation's input: one spin channel, a range of bands, the crystal's
 * symmetry (from the structure beside the data) and its special points. Null, with the reason, when the run
 * cannot be interpolated (no structure, symmetry not loaded, cells that differ, a path run).
 */
import type { BandStructure } from '../model';
import { symmetryContext } from '../analysis/valleyCount';
import { specialPointMap } from '../lattice/specialPoints';
import { MeshInterpolation, tooManyListedReason, type MeshRunInput } from './meshInterpolation';
import type { MeshRefusal } from './meshRefusal';

export interface MeshRunRequest {
  spin?: 0 | 1;
  /** 0-based bands to interpolate, first and last inclusive (default: all). */
  firstBand?: number;
  lastBand?: number;
  /** Every `stride`-th band from firstBand (2: one band of each Kramers pair of a spinor run), default 1. */
  stride?: 1 | 2;
  starsPerPoint?: number;
}

/** Why the run cannot be the interpolation's input, from its description alone (no band copied), or null. */
function inputRefusal(bs: BandStructure, req: MeshRunRequest): MeshRefusal | null {
  if (bs.sampling === 'path') return { kind: 'not-a-mesh', reason: 'The k-points form a path, not a mesh.' };
  const ctx = symmetryContext(bs);
  if (!ctx.sym || !bs.structure) return { kind: 'no-symmetry', reason: ctx.unavailable ?? 'No crystal structure is known.' };
  const spin = req.spin ?? 0;
  if (spin >= bs.nSpin) return { kind: 'request', reason: `There is no spin channel ${spin + 1}.` };
  const first = req.firstBand ?? 0;
  const last = req.lastBand ?? bs.nBands - 1;
  if (!(Number.isInteger(first) && Number.isInteger(last) && first >= 0 && last < bs.nBands && first <= last)) {
    return { kind: 'request', reason: `Bands ${first + 1}–${last + 1} are not within the run's ${bs.nBands} bands.` };
  }
  return null;
}

export function meshRunInput(
  bs: BandStructure,
  req: MeshRunRequest = {},
): { input: MeshRunInput; reason: null } | ({ input: null } & MeshRefusal) {
  const refused = inputRefusal(bs, req);
  if (refused !== null || !bs.structure)
    return { input: null, ...(refused ?? { kind: 'no-symmetry', reason: 'No crystal structure is known.' }) };
  const ctx = symmetryContext(bs);
  if (!ctx.sym) return { input: null, kind: 'no-symmetry', reason: ctx.unavailable ?? 'No crystal structure is known.' };
  const spin = req.spin ?? 0;
  const first = req.firstBand ?? 0;
  const last = req.lastBand ?? bs.nBands - 1;
  const e = bs.energies[spin]!;
  const bands: Float64Array[] = [];
  for (let b = first; b <= last; b += req.stride ?? 1) {
    const band = new Float64Array(bs.nk);
    for (let k = 0; k < bs.nk; k++) band[k] = e[k * bs.nBands + b]!;
    bands.push(band);
  }
  let points = null;
  try {
    points = specialPointMap(bs.structure.lattice, bs.structure);
  } catch {
    points = null;
  }
  return {
    input: {
      lattice: bs.structure.lattice,
      kpoints: bs.kpoints,
      weights: bs.weights,
      bands,
      sym: ctx.sym,
      specialPoints: points,
      ...(req.starsPerPoint !== undefined ? { starsPerPoint: req.starsPerPoint } : {}),
    },
    reason: null,
  };
}

/**
 * The reason interpolateRun gives, before any band is read, for a run listing too many points to be recognised
 * as a mesh (MAX_LISTED_POINTS; the bound on the irreducible points applies after merging, in
 * MeshInterpolation.create); null when it has another reason first or none of this kind.
 */
export function tooManyPointsRefusal(bs: BandStructure, req: MeshRunRequest = {}): MeshRefusal | null {
  const reason = inputRefusal(bs, req) === null ? tooManyListedReason(bs.nk) : null;
  return reason === null ? null : { kind: 'too-many', reason };
}

/** The interpolation of a read run (band b of the result is band firstBand + b of the run). */
export function interpolateRun(
  bs: BandStructure,
  req: MeshRunRequest = {},
): { run: MeshInterpolation; reason: null; kind?: undefined } | ({ run: null } & MeshRefusal) {
  // Too many points listed: said before the bands are copied and the special points found (the same reason, in
  // the same order, as MeshInterpolation.create would give after them).
  const tooMany = tooManyPointsRefusal(bs, req);
  if (tooMany) return { run: null, ...tooMany };
  const made = meshRunInput(bs, req);
  if (!made.input) return { run: null, kind: made.kind, reason: made.reason };
  return MeshInterpolation.create(made.input);
}
