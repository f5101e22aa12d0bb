/**
 * A read band structure as the interpolation's input: one spin channel, a range of bands, the crystal's
 * symmetry (from the structure beside the data) and its special points. Null, with the reason, when the run
 * cannot be interpolated (no structure, symmetry not loaded, cells that differ, a path run).
 */
import type { BandStructure } from '../model';
import { symmetryContext } from '../analysis/valleyCount';
import { specialPointMap } from '../lattice/specialPoints';
import { MeshInterpolation, type MeshRunInput } from './meshInterpolation';

export interface MeshRunRequest {
  spin?: 0 | 1;
  /** 0-based bands to interpolate, first and last inclusive (default: all). */
  firstBand?: number;
  lastBand?: number;
  starsPerPoint?: number;
}

export function meshRunInput(
  bs: BandStructure,
  req: MeshRunRequest = {},
): { input: MeshRunInput; reason: null } | { input: null; reason: string } {
  if (bs.sampling === 'path') return { input: null, reason: 'The k-points form a path, not a mesh.' };
  const ctx = symmetryContext(bs);
  if (!ctx.sym || !bs.structure) return { input: null, reason: ctx.unavailable ?? 'No crystal structure is known.' };
  const spin = req.spin ?? 0;
  if (spin >= bs.nSpin) return { input: null, reason: `There is no spin channel ${spin + 1}.` };
  const first = req.firstBand ?? 0;
  const last = req.lastBand ?? bs.nBands - 1;
  if (!(Number.isInteger(first) && Number.isInteger(last) && first >= 0 && last < bs.nBands && first <= last)) {
    return { input: null, reason: `Bands ${first + 1}–${last + 1} are not within the run's ${bs.nBands} bands.` };
  }
  const e = bs.energies[spin]!;
  const bands: Float64Array[] = [];
  for (let b = first; b <= last; b++) {
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

/** The interpolation of a read run (band b of the result is band firstBand + b of the run). */
export function interpolateRun(
  bs: BandStructure,
  req: MeshRunRequest = {},
): { run: MeshInterpolation; reason: null } | { run: null; reason: string } {
  const made = meshRunInput(bs, req);
  if (!made.input) return { run: null, reason: made.reason };
  return MeshInterpolation.create(made.input);
}
