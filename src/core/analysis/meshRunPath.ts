/**
 * A mesh run drawn like a path run: its interpolated bands sampled along the standard path of its lattice
 * (lattice/standardPaths.ts), as a path BandStructure that the band view draws and fits like any other. The energies are the
 * interpolant's, not computed ones: the caution returned with it says so.
 */
import type { BandStructure, KLabel, Vec3 } from '../model';
import { interpolateRun } from '../interpolation/fromBandStructure';
import { starValues } from '../interpolation/starBasis';
import type { MeshInterpolation } from '../interpolation/meshInterpolation';
import type { SpecialPointMap } from '../lattice/specialPoints';
import { STANDARD_PATHS } from '../lattice/standardPaths';

export interface MeshRunPathOptions {
  /** Points along the whole path (shared by the segments by length). */
  points?: number;
  /** Most bands drawn, counted from the first (default: the occupied bands and 24 above, at most 96). */
  maxBands?: number;
}

export type MeshRunPath = { path: BandStructure; caution: string; reason: null } | { path: null; caution: null; reason: string };

/** The standard path of the lattice in the run's fractional coordinates, with a label at each corner. */
export function standardPathPoints(
  map: SpecialPointMap,
  reciprocal: number[][],
  total: number,
): { kpoints: Float64Array; labels: KLabel[] } {
  const at = new Map(map.userPoints.map((p) => [p.label, p.k]));
  const cart = (k: Vec3): Vec3 =>
    [0, 1, 2].map((x) => k[0] * reciprocal[0]![x]! + k[1] * reciprocal[1]![x]! + k[2] * reciprocal[2]![x]!) as Vec3;
  const pieces = STANDARD_PATHS[map.kind].map((piece) => piece.filter((l) => at.has(l)));
  const segments: [string, string][] = pieces.flatMap((p) => p.slice(1).map((l, i) => [p[i]!, l] as [string, string]));
  const length = (a: string, b: string): number => {
    const [p, q] = [cart(at.get(a)!), cart(at.get(b)!)];
    return Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);
  };
  const whole = segments.reduce((s, [a, b]) => s + length(a, b), 0);
  const ks: number[] = [];
  const labels: KLabel[] = [];
  for (const [a, b] of segments) {
    const n = Math.max(8, Math.round((total * length(a, b)) / whole));
    const [p, q] = [at.get(a)!, at.get(b)!];
    for (let i = 0; i <= n; i++) {
      if (i === 0 || i === n) labels.push({ index: ks.length / 3, label: i === 0 ? a : b });
      ks.push(...[0, 1, 2].map((x) => p[x]! + ((q[x]! - p[x]!) * i) / n + 0));
    }
  }
  return { kpoints: Float64Array.from(ks), labels };
}

/** The interpolated bands of a mesh run along the standard path of its lattice, or why they cannot be drawn. */
export function interpolatedPathRun(bs: BandStructure, o: MeshRunPathOptions = {}): MeshRunPath {
  const perBand = bs.spinorbit ? 1 : 2;
  const occupied = bs.electrons !== null ? Math.ceil(bs.electrons / (bs.nSpin === 2 ? 2 : perBand) - 1e-9) : 72;
  const nBands = Math.min(bs.nBands, o.maxBands ?? Math.min(96, occupied + 24));
  const runs: MeshInterpolation[] = [];
  for (let spin = 0; spin < bs.nSpin; spin++) {
    const made = interpolateRun(bs, { spin: spin as 0 | 1, firstBand: 0, lastBand: nBands - 1 });
    if (!made.run) return { path: null, caution: null, reason: made.reason };
    runs.push(made.run);
  }
  const first = runs[0]!;
  const map = first.input.specialPoints;
  if (!map) return { path: null, caution: null, reason: 'The lattice is not one whose standard path is known here.' };
  const { kpoints, labels } = standardPathPoints(map, first.reciprocal, o.points ?? 360);
  const nk = kpoints.length / 3;
  const basis = first.fit.basis;
  const s = new Float64Array(basis.count);
  const energies = runs.map(() => new Float64Array(nk * nBands));
  for (let i = 0; i < nk; i++) {
    starValues(basis, first.toCart([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!]), s);
    runs.forEach((run, spin) => {
      for (let b = 0; b < nBands; b++) {
        const c = run.band(b).coefficients;
        let e = 0;
        for (let m = 0; m < c.length; m++) e += c[m]! * s[m]!;
        energies[spin]![i * nBands + b] = e;
      }
    });
  }
  const mesh = first.mesh.divisions.join('×');
  const caution = `Interpolated from a ${mesh} mesh: these bands are the star-function interpolant of the run's energies along the standard ${map.kind} path (Setyawan & Curtarolo 2010), not computed energies; fits here measure the interpolant, whose error grows near band crossings and on coarse meshes.${nBands < bs.nBands ? ` Bands 1–${nBands} of ${bs.nBands} are drawn.` : ''}`;
  const path: BandStructure = {
    source: bs.source,
    lattice: first.input.lattice,
    structure: bs.structure,
    nk,
    nBands,
    nSpin: bs.nSpin,
    kpoints,
    weights: null,
    energies,
    occupations: null,
    fermiEnergy: bs.fermiEnergy,
    electrons: bs.electrons,
    spinorbit: bs.spinorbit,
    ...(bs.method ? { method: bs.method } : {}),
    ...(bs.fermiEnergies ? { fermiEnergies: bs.fermiEnergies } : {}),
    ...(bs.fermiSource ? { fermiSource: bs.fermiSource } : {}),
    ...(bs.bandNumberOffset ? { bandNumberOffset: bs.bandNumberOffset } : {}),
    labels,
    sampling: 'path',
    grid: null,
    writtenDistance: null,
    partial: bs.partial,
    interpolatedFrom: { divisions: [...first.mesh.divisions] },
    warnings: [...bs.warnings],
  };
  return { path, caution, reason: null };
}
