/**
 * What the mass engine derives once per band structure and reuses for every extremum and click: the path
 * network or grid neighbours, the energies' rounding step, the crystal's symmetry.
 */
import type { BandStructure } from '../model';
import { energyRoundingStep } from './energyResolution';
import { gridNeighbours, pathNeighbours, type NeighbourFn } from './kNeighbours';
import { pathNetwork, type PathNetwork } from './pathRays';
import { symmetryContext, type SymmetryContext } from './valleyCount';
import { pathGeometry } from '../lattice/kpath';

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
