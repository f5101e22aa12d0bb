/**
 * An ordinary self-consistent run of an EPM crystal (scripts/epm, Cohen & Bergstresser 1966) for tests: the
 * irreducible points of a Γ-centred n×n×n mesh under the crystal's symmetry, solved by the model, written as
 * VASP's EIGENVAL (weights = star sizes, insulator occupations) and POSCAR (two atoms at 0 and ¼¼¼).
 * Needs ensureSymmetryReady() first.
 */
import { crystalSymmetry } from '../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { EpmBandSolver } from '../../scripts/epm/bandSolver';
import type { EpmCrystal } from '../../scripts/epm/crystal';
import { insulatorOccupations, modelSystemName, writeEigenval, writePoscar } from './writers/vasp';

export function epmMeshRunFiles(crystal: EpmCrystal, n: number, nBands: number): { EIGENVAL: string; POSCAR: string } {
  const m = crystal.material;
  const atoms: [number, number, number][] = [
    [0, 0, 0],
    [0.25, 0.25, 0.25],
  ];
  const sym = crystalSymmetry({ lattice: crystal.lattice, species: [...m.species], positions: Float64Array.from(atoms.flat()) });
  const { kpoints, weights } = irreducibleMesh([n, n, n], [0, 0, 0], sym.reciprocalPointGroup);
  const solver = new EpmBandSolver(crystal);
  const nk = kpoints.length / 3;
  const energies = new Float64Array(nk * nBands);
  for (let i = 0; i < nk; i++)
    energies.set(solver.bandsAt([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!], nBands), i * nBands);
  const same = m.species[0] === m.species[1];
  return {
    EIGENVAL: writeEigenval({
      system: modelSystemName(`${m.name} EPM ${n}x${n}x${n} mesh`),
      nIons: 2,
      electrons: m.electrons,
      nBands,
      kpoints,
      weights,
      energies: [energies],
      occupations: [insulatorOccupations(nk, nBands, m.electrons / 2)],
      lattice: crystal.lattice,
    }),
    POSCAR: writePoscar({
      comment: `${m.name} (EPM model)`,
      lattice: crystal.lattice,
      species: same ? [m.species[0]] : [...m.species],
      counts: same ? [2] : [1, 1],
      positions: atoms,
    }),
  };
}
