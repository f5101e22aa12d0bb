/**
 * An EPM crystal (Cohen & Bergstresser 1966) as an ordinary self-consistent run: the irreducible points of a
 * Γ-centred n×n×n mesh under the crystal's symmetry, the lowest bands solved there, and the run interpolated
 * (src/core/interpolation). For tests and measurements; needs ensureSymmetryReady() first.
 */
import type { Structure } from '../../src/core/model';
import { crystalSymmetry } from '../../src/core/lattice/symmetry';
import { specialPointMap, type SpecialPointMap } from '../../src/core/lattice/specialPoints';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { MeshInterpolation } from '../../src/core/interpolation/meshInterpolation';
import { EpmBandSolver } from './bandSolver';
import { unstrainedCrystal, type EpmCrystal } from './crystal';
import type { EpmMaterial } from './materials';

export interface EpmMeshRun {
  crystal: EpmCrystal;
  solver: EpmBandSolver;
  structure: Structure;
  specialPoints: SpecialPointMap | null;
  /** Irreducible k-points (fractional) and the energies of bands 1…nBands there: bands[b][i]. */
  kpoints: Float64Array;
  bands: Float64Array[];
  /** The interpolation, or the reason there is none. */
  run: MeshInterpolation | null;
  reason: string | null;
}

export function epmMeshRun(material: EpmMaterial, n: number, nBands = 8): EpmMeshRun {
  const crystal = unstrainedCrystal(material);
  const solver = new EpmBandSolver(crystal);
  const structure: Structure = {
    lattice: crystal.lattice,
    species: [...material.species],
    positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]),
  };
  const sym = crystalSymmetry(structure);
  const { kpoints, weights } = irreducibleMesh([n, n, n], [0, 0, 0], sym.reciprocalPointGroup);
  const nk = kpoints.length / 3;
  const bands = Array.from({ length: nBands }, () => new Float64Array(nk));
  for (let i = 0; i < nk; i++) {
    const e = solver.bandsAt([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!], nBands);
    for (let b = 0; b < nBands; b++) bands[b]![i] = e[b]!;
  }
  const specialPoints = specialPointMap(crystal.lattice, structure);
  const made = MeshInterpolation.create({ lattice: crystal.lattice, kpoints, weights, bands, sym, specialPoints });
  return { crystal, solver, structure, specialPoints, kpoints, bands, run: made.run, reason: made.reason };
}
