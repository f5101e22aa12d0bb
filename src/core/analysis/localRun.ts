/**
 * Runs that sample only a small neighbourhood of one point (a tensor run for a mass tensor, a fine local
 * grid): their band edges are edges of the sampled patch, not of the crystal, so they give no gap, and only
 * the extremum the run was made for (at its centre) is meaningful. Pure.
 */
import type { BandStructure, Vec3 } from '../model';
import { reciprocalLattice } from '../lattice/reciprocal';
import { pathGeometry } from '../lattice/kpath';

/** A run whose k-points all lie within this fraction of the shortest reciprocal vector of their centre is local. */
export const LOCAL_RUN_FRACTION = 0.2;

/** Up to this many points the centre is found by the minimax rule (quadratic in the points); else the centroid. */
const MINIMAX_MAX_POINTS = 4000;

export interface LocalRun {
  /** 0-based index of the k-point at the centre of the sampled patch. */
  centre: number;
  /**
   * Every point that can be the centre (the centre first): a tensor run that holds only its symmetry-inequivalent
   * points can look like two shells around more than one of them.
   */
  centres: number[];
  /** Largest distance of a k-point from the centre, as a fraction of the shortest reciprocal vector. */
  extent: number;
}

/** The patch a local run covers, or null when the k-points span a good part of the zone. */
export function localRun(bs: BandStructure): LocalRun | null {
  if (bs.nk < 3 || bs.grid?.endpointsRepeated) return null;
  const rec = bs.lattice ? reciprocalLattice(bs.lattice) : null;
  // nk × 3 positions: cartesian with a lattice (the path geometry's, computed once per run), fractional without.
  const xyz = rec ? (pathGeometry(bs).cartesian ?? bs.kpoints) : bs.kpoints;
  const scale = rec ? Math.min(...rec.map((r) => Math.hypot(r[0], r[1], r[2]))) : 1;
  // Two points 2d apart lie at least d from any centre (triangle inequality): a run reaching that far from its
  // first point is not local, and the centroid passes are not needed (a path across the zone stops early).
  if (reachesBeyond(xyz, bs.nk, 2 * LOCAL_RUN_FRACTION * scale * (1 + 1e-6))) return null;
  const { extent, centre: nearestCentre } = centroidSpread(xyz, bs.nk);
  let centre = nearestCentre;
  const fraction = extent / scale;
  if (!(fraction > 0 && fraction < LOCAL_RUN_FRACTION)) return null;
  const pts: Vec3[] = [];
  for (let k = 0; k < bs.nk; k++) pts.push([xyz[3 * k]!, xyz[3 * k + 1]!, xyz[3 * k + 2]!]);
  // The centre. A tensor run (tensor-kpoints) has one point whose neighbours all lie on two shells (h and 2h),
  // also when only its symmetry-inequivalent points were computed, which lie on one side of it: that point is
  // the centre. Otherwise (a local grid) the point whose farthest neighbour is nearest (minimax).
  let centres = [centre];
  if (bs.nk <= MINIMAX_MAX_POINTS) {
    const shellCentres = pts.map((p, k) => (onTwoShells(p, pts) ? k : -1)).filter((k) => k >= 0);
    if (shellCentres.length > 0) {
      centre = shellCentres[0]!;
      centres = shellCentres;
    } else {
      let best = Infinity;
      pts.forEach((p, k) => {
        let far = 0;
        for (const q of pts) far = Math.max(far, Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]));
        if (far < best - 1e-12) {
          best = far;
          centre = k;
        }
      });
      centres = [centre];
    }
  }
  return { centre, centres, extent: fraction };
}

/** True when every other point lies at distance r or 2r from `c` (at least one at each): a two-shell centre. */
function onTwoShells(c: Vec3, pts: readonly Vec3[]): boolean {
  const d = pts.map((q) => Math.hypot(q[0] - c[0], q[1] - c[1], q[2] - c[2])).filter((x) => x > 0);
  if (d.length < 2 || d.length !== pts.length - 1) return false;
  const r = Math.min(...d);
  // Files write k with 6–8 decimals: a tenth of a per cent of the shell radius covers that rounding.
  const tol = 1e-3 * r + 1e-12;
  let inner = 0;
  let outer = 0;
  for (const x of d) {
    if (Math.abs(x - r) <= tol) inner++;
    else if (Math.abs(x - 2 * r) <= tol) outer++;
    else return false;
  }
  return inner > 0 && outer > 0;
}

/** True when some point lies farther than `d` from the first one (NaN coordinates never count). */
function reachesBeyond(xyz: Float64Array, nk: number, d: number): boolean {
  const x0 = xyz[0]!;
  const y0 = xyz[1]!;
  const z0 = xyz[2]!;
  const d2 = d * d;
  for (let k = 1; k < nk; k++) {
    const dx = xyz[3 * k]! - x0;
    const dy = xyz[3 * k + 1]! - y0;
    const dz = xyz[3 * k + 2]! - z0;
    if (dx * dx + dy * dy + dz * dz > d2) return true;
  }
  return false;
}

/** The largest distance of a point from the points' centroid, and the point nearest to it (the first on ties). */
function centroidSpread(xyz: Float64Array, nk: number): { extent: number; centre: number } {
  let c0 = 0;
  let c1 = 0;
  let c2 = 0;
  for (let k = 0; k < nk; k++) {
    c0 += xyz[3 * k]! / nk;
    c1 += xyz[3 * k + 1]! / nk;
    c2 += xyz[3 * k + 2]! / nk;
  }
  let extent = 0;
  let centre = 0;
  let nearest = Infinity;
  for (let k = 0; k < nk; k++) {
    const d = Math.hypot(xyz[3 * k]! - c0, xyz[3 * k + 1]! - c1, xyz[3 * k + 2]! - c2);
    if (d > extent) extent = d;
    if (d < nearest) {
      nearest = d;
      centre = k;
    }
  }
  return { extent, centre };
}
