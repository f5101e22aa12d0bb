/**
 * Runs that sample only a small neighbourhood of one point (a tensor run for a mass tensor, a fine local
 * grid): their band edges are edges of the sampled patch, not of the crystal, so they give no gap, and only
 * the extremum the run was made for (at its centre) is meaningful. Pure.
 */
import type { BandStructure, Vec3 } from '../model';
import { reciprocalLattice } from '../lattice/reciprocal';

/** A run whose k-points all lie within this fraction of the shortest reciprocal vector of their centre is local. */
export const LOCAL_RUN_FRACTION = 0.2;

export interface LocalRun {
  /** 0-based index of the k-point nearest the centre of the sampled patch. */
  centre: number;
  /** Largest distance of a k-point from the centre, as a fraction of the shortest reciprocal vector. */
  extent: number;
}

/** The patch a local run covers, or null when the k-points span a good part of the zone. */
export function localRun(bs: BandStructure): LocalRun | null {
  if (bs.nk < 3 || bs.grid?.endpointsRepeated) return null;
  const rec = bs.lattice ? reciprocalLattice(bs.lattice) : null;
  const cart = (k: number): Vec3 => {
    const f: Vec3 = [bs.kpoints[3 * k]!, bs.kpoints[3 * k + 1]!, bs.kpoints[3 * k + 2]!];
    if (!rec) return f;
    return [0, 1, 2].map((j) => f[0] * rec[0][j]! + f[1] * rec[1][j]! + f[2] * rec[2][j]!) as Vec3;
  };
  const scale = rec ? Math.min(...rec.map((r) => Math.hypot(r[0], r[1], r[2]))) : 1;
  const c: Vec3 = [0, 0, 0];
  const pts: Vec3[] = [];
  for (let k = 0; k < bs.nk; k++) {
    const p = cart(k);
    pts.push(p);
    for (let j = 0; j < 3; j++) c[j]! += p[j]! / bs.nk;
  }
  let extent = 0;
  let centre = 0;
  let nearest = Infinity;
  pts.forEach((p, k) => {
    const d = Math.hypot(p[0] - c[0], p[1] - c[1], p[2] - c[2]);
    if (d > extent) extent = d;
    if (d < nearest) {
      nearest = d;
      centre = k;
    }
  });
  const fraction = extent / scale;
  return fraction > 0 && fraction < LOCAL_RUN_FRACTION ? { centre, extent: fraction } : null;
}
