/**
 * Writes a mesh run for the benchmark (not committed): a folder with EIGENVAL (the irreducible points of a
 * Γ-centred n×n×n mesh of a diamond or zincblende crystal, silicon by default, with their weights, normalised as
 * VASP writes them, and `nb` bands with occupations), KPOINTS (automatic mesh form), POSCAR, and energies.json
 * (the energies as written, as one JSON array, for the JSON.parse comparison).
 * Every band is the local empirical pseudopotential model of Cohen & Bergstresser (1966) (scripts/epm), solved
 * in a plane-wave basis large enough for `nb` bands (the smallest cutoff with 16 plane waves to spare; for 400
 * bands |G|² ≤ 56 (2π/a)², 459 plane waves, about 40 s for a 24³ mesh): the lowest
 * bands are the published model; the high ones are the same model's eigenvalues at that cutoff, not converged
 * and not meant as physics (only the edge bands are analysed; the others are read and carried).
 * Usage: tsx scripts/bench/meshRunFiles.ts <folder> [nb=400] [n=24] [material=si (si, ge, gaas)]
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ensureSymmetryReady, crystalSymmetry } from '../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import type { Structure } from '../../src/core/model';
import { EpmBandSolver } from '../epm/bandSolver';
import { unstrainedCrystal } from '../epm/crystal';
import { MATERIALS, type EpmMaterial } from '../epm/materials';
import { insulatorOccupations, writeEigenval, writePoscar } from '../../test/support/writers/vasp';

/** The smallest cutoff ((2π/a)², reciprocal-lattice shells) whose basis holds `nb` bands. */
function cutoffFor(material: EpmMaterial, nb: number): number {
  for (let c = 27; ; c++) if (new EpmBandSolver(unstrainedCrystal(material), c).size >= nb + 16) return c;
}

async function main(): Promise<void> {
  const folder = process.argv[2];
  if (!folder) throw new Error('usage: meshRunFiles.ts <folder> [nb] [n]');
  const nb = Number(process.argv[3] ?? 400);
  const n = Number(process.argv[4] ?? 24);
  const material = MATERIALS[process.argv[5] ?? 'si'];
  if (!material) throw new Error(`unknown material ${process.argv[5]}`);
  await ensureSymmetryReady();
  const crystal = unstrainedCrystal(material);
  const solver = new EpmBandSolver(crystal, cutoffFor(material, nb));
  const species = [...material.species];
  const structure: Structure = { lattice: crystal.lattice, species, positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
  const sym = crystalSymmetry(structure);
  const { kpoints, weights } = irreducibleMesh([n, n, n], [0, 0, 0], sym.reciprocalPointGroup);
  const nk = kpoints.length / 3;
  const total = weights.reduce((a, b) => a + b, 0);
  const energies = new Float64Array(nk * nb);
  const t0 = performance.now();
  for (let i = 0; i < nk; i++) {
    energies.set(solver.bandsAt([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!], nb), i * nb);
  }
  const seconds = (performance.now() - t0) / 1000;
  mkdirSync(folder, { recursive: true });
  const description = `${material.name} EPM scf ${n}x${n}x${n}, ${nb} bands (benchmark)`;
  writeFileSync(
    join(folder, 'EIGENVAL'),
    writeEigenval({
      system: description,
      nIons: 2,
      electrons: 8,
      nBands: nb,
      kpoints,
      weights: weights.map((w) => w / total),
      energies: [energies],
      occupations: [insulatorOccupations(nk, nb, 4)],
      lattice: crystal.lattice,
    }),
  );
  const positions: [number, number, number][] = [
    [0, 0, 0],
    [0.25, 0.25, 0.25],
  ];
  writeFileSync(
    join(folder, 'POSCAR'),
    writePoscar(
      species[0] === species[1]
        ? { comment: description, lattice: crystal.lattice, species: [species[0]!], counts: [2], positions }
        : { comment: description, lattice: crystal.lattice, species, counts: [1, 1], positions },
    ),
  );
  writeFileSync(join(folder, 'KPOINTS'), `Automatic mesh\n0\nGamma\n ${n} ${n} ${n}\n 0 0 0\n`);
  // The energies as the EIGENVAL holds them (six decimals), one array.
  writeFileSync(join(folder, 'energies.json'), `[${Array.from(energies, (e) => e.toFixed(6)).join(',')}]`);
  console.log(`${folder}: ${nk} irreducible points × ${nb} bands (${solver.size} plane waves), solved in ${seconds.toFixed(0)} s`);
}

void main();
