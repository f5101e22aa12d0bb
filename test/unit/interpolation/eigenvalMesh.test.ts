import assert from 'node:assert/strict';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { interpolateRun } from '../../../src/core/interpolation/fromBandStructure';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { EpmBandSolver } from '../../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../../scripts/epm/crystal';
import { SILICON } from '../../../scripts/epm/materials';
import { insulatorOccupations, writeEigenval, writePoscar } from '../../support/writers/vasp';

// The situation of an ordinary run: silicon in the EPM model (Cohen & Bergstresser, Phys. Rev. 141, 789
// (1966)) on a Γ-centred 12×12×12 mesh reduced to its irreducible points, written as VASP's EIGENVAL (k-points
// with 7 significant digits, energies with 6 decimals) beside a POSCAR, read by the project's reader, then
// recognised as a mesh and interpolated. The dense reference is the model itself along Γ–X.

describe('an EIGENVAL of a mesh run, read and interpolated', function () {
  this.timeout(120000);
  let dir = '';
  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-mesh-'));
    const crystal = unstrainedCrystal(SILICON);
    const structure = { lattice: crystal.lattice, species: [...SILICON.species], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
    const sym = crystalSymmetry(structure);
    const { kpoints, weights } = irreducibleMesh([12, 12, 12], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const nBands = 8;
    const solver = new EpmBandSolver(crystal);
    const energies = new Float64Array(nk * nBands);
    for (let i = 0; i < nk; i++)
      energies.set(solver.bandsAt([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!], nBands), i * nBands);
    writeFileSync(
      join(dir, 'EIGENVAL'),
      writeEigenval({
        system: 'Si model mesh',
        nIons: 2,
        electrons: 8,
        nBands,
        kpoints,
        weights,
        energies: [energies],
        occupations: [insulatorOccupations(nk, nBands, 4)],
        lattice: crystal.lattice,
      }),
    );
    writeFileSync(
      join(dir, 'POSCAR'),
      writePoscar({
        comment: 'Si',
        lattice: crystal.lattice,
        species: ['Si'],
        counts: [2],
        positions: [
          [0, 0, 0],
          [0.25, 0.25, 0.25],
        ],
      }),
    );
  });
  after(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('the 72 written points are recognised as the 12×12×12 mesh; the valley lies on Γ–X with N_v = 6', async () => {
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.equal(bs.nk, 72); // irreducible points of a Γ-centred 12³ fcc mesh under O_h (counted by irreducibleMesh)
    const made = interpolateRun(bs, { firstBand: 3, lastBand: 5 });
    assert.ok(made.run, made.reason ?? '');
    assert.deepEqual(made.run.mesh.divisions, [12, 12, 12]);
    const cbm = made.run.extrema(1, 'min').extrema[0]!;
    assert.equal(cbm.band, 1); // band 5 of the run (index 1 of the range 4–6)
    assert.match(cbm.position ?? '', /^0\.8\d Γ→X$/); // the Δ valley, near 0.85 of Γ–X (physics.md)
    assert.equal(cbm.valleyDegeneracy, 6);
    // Written energies carry 6 decimals: the interpolant still passes through them (to rounding).
    const vbm = made.run.extrema(0, 'max').extrema[0]!;
    assert.ok(Math.hypot(...vbm.k) < 1e-9);
  });
});
