import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { crystalSymmetry, ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { summaryText } from '../../src/core/report/summaryText';
import type { Report } from '../../src/core/model';
import { EpmBandSolver } from '../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../scripts/epm/crystal';
import { SILICON } from '../../scripts/epm/materials';
import { insulatorOccupations, modelSystemName, writeEigenval, writePoscar } from '../support/writers/vasp';

// Silicon in the empirical pseudopotential model (Cohen & Bergstresser, Phys. Rev. 141, 789 (1966)) as an
// ordinary self-consistent run: a Γ-centred 12×12×12 mesh reduced to its irreducible points, EIGENVAL + POSCAR.
// Truth: the same model solved densely (Γ and a fine Γ–X line). What the analysis must do whatever the
// interpolation's accuracy: the threefold Γ maximum is one edge with three degenerate bands whose one-index
// masses are not quoted, the Δ valley lies near 0.85 of Γ–X with N_v = 6, and the quoted gap uncertainty covers
// the gap's actual error.

describe('an EPM silicon mesh run through loadRun and analyze', function () {
  this.timeout(180000);
  let dir = '';
  let report: Report;
  let trueGap = 0;
  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-meshrun-si-'));
    const crystal = unstrainedCrystal(SILICON);
    const positions = new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]);
    const sym = crystalSymmetry({ lattice: crystal.lattice, species: [...SILICON.species], positions });
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
        system: modelSystemName('Si EPM mesh'),
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
    report = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    // The model's gap: VBM at Γ (band 4), CBM on Γ–X (band 5) found on a 0.0005-step line, Γ–X = (0, t/2, t/2).
    let cbm = Infinity;
    for (let t = 0.75; t <= 0.95; t += 0.0005) cbm = Math.min(cbm, solver.bandsAt([0, t / 2, t / 2], nBands)[4]!);
    trueGap = cbm - solver.bandsAt([0, 0, 0], nBands)[3]!;
  });
  after(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('places the edges: VBM at Γ with three degenerate bands (masses not quoted), CBM near 0.85 Γ→X with N_v = 6', () => {
    const vbm = report.extrema.find((e) => e.kind === 'vbm')!;
    assert.ok(Math.hypot(...vbm.k) < 1e-6);
    assert.equal(vbm.degenerateBands, 3); // Γ25′ is threefold without spin-orbit (group theory of diamond, common practice)
    assert.equal(vbm.tensor?.determined, false);
    assert.ok(vbm.masses.every((m) => !m.determined));
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.valleyDegeneracy, 6); // six Δ valleys (common practice)
    assert.match(cbm.position ?? '', /^0\.8\d Γ→X$/); // the model's Δ minimum near 0.85 of Γ–X (physics.md; dense line above)
    assert.match(summaryText(report), /m1 undetermined/);
  });

  it('quotes a gap whose uncertainty covers its actual error', () => {
    const g = report.gap!;
    assert.equal(g.direct, false);
    assert.ok(typeof g.uncertainty_eV === 'number', String(g.uncertainty_eV));
    assert.ok(Math.abs(g.eV - trueGap) <= g.uncertainty_eV, `${g.eV} vs ${trueGap} ± ${g.uncertainty_eV}`);
  });
});
