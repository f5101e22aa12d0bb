import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { summaryText } from '../../src/core/report/summaryText';
import type { Report } from '../../src/core/model';
import { EpmBandSolver } from '../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../scripts/epm/crystal';
import { GERMANIUM, SILICON } from '../../scripts/epm/materials';
import { epmMeshRunFiles } from '../support/epmMeshRun';

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
    const nBands = 8;
    for (const [name, text] of Object.entries(epmMeshRunFiles(crystal, 12, nBands))) writeFileSync(join(dir, name), text);
    const solver = new EpmBandSolver(crystal);
    report = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    // The model's gap: VBM at Γ (band 4), CBM on Γ–X (band 5) found on a 0.0005-step line, Γ–X = (0, t/2, t/2).
    let cbm = Infinity;
    for (let t = 0.75; t <= 0.95; t += 0.0005) cbm = Math.min(cbm, solver.bandsAt([0, t / 2, t / 2], nBands)[4]!);
    trueGap = cbm - solver.bandsAt([0, 0, 0], nBands)[3]!;
  });

  it('is not taken for a path: no path labels inferred, and no warning about path labels', async () => {
    // Common practice: codes write a band path with equal weights; an irreducible mesh carries multiplicities.
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.deepEqual(bs.labels, []);
    assert.equal(
      bs.warnings.some((w) => w.code === 'labels-inferred' || w.code === 'labels-not-inferred'),
      false,
      JSON.stringify(bs.warnings),
    );
  });
  after(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('places the edges: VBM at Γ with three degenerate bands (masses not quoted), CBM near 0.85 Γ→X with N_v = 6', () => {
    const vbm = report.extrema.find((e) => e.kind === 'vbm')!;
    assert.ok(Math.hypot(...vbm.k) < 1e-6);
    assert.equal(vbm.degenerateBands, 3); // Γ25′ is threefold without spin-orbit (group theory of diamond, common practice)
    assert.equal(vbm.band, 4); // named by the top band of the triplet, as on paths: 8 electrons fill bands 1–4 (common practice)
    assert.equal(vbm.tensor?.determined, false);
    assert.ok(vbm.masses.every((m) => !m.determined));
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.valleyDegeneracy, 6); // six Δ valleys (common practice)
    assert.match(cbm.position ?? '', /^0\.8\d Γ→X$/); // the model's Δ minimum near 0.85 of Γ–X (physics.md; dense line above)
    assert.match(summaryText(report), /m1 undetermined/);
  });

  it('says that band 6 meets the conduction band at X, a mesh spacing or two from the valley', () => {
    // Diamond's lowest conduction level at X is twofold (X1; group theory of the diamond structure, common
    // practice): bands 5 and 6 of the model meet there, so band 5 by index has a kink next to its Δ valley. The
    // model's plane-wave set (a sphere about Γ, not about k) splits them by about a meV.
    const atX = new EpmBandSolver(unstrainedCrystal(SILICON)).bandsAt([0, 0.5, 0.5], 8);
    assert.ok(Math.abs(atX[5]! - atX[4]!) < 5e-3, `${atX[4]} ${atX[5]}`);
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    const note = cbm.warnings.find((w) => w.startsWith('Band 6 meets this band'));
    assert.ok(note, JSON.stringify(cbm.warnings));
    assert.match(note, / at X /);
    if (cbm.tensor && !cbm.tensor.determined) assert.ok(cbm.tensor.undeterminedReason?.includes('Band 6 meets this band'));
  });

  it('quotes a gap whose uncertainty covers its actual error', () => {
    const g = report.gap!;
    assert.equal(g.direct, false);
    assert.ok(typeof g.uncertainty_eV === 'number', String(g.uncertainty_eV));
    assert.ok(Math.abs(g.eV - trueGap) <= g.uncertainty_eV, `${g.eV} vs ${trueGap} ± ${g.uncertainty_eV}`);
  });

  it('germanium: the minimum at L (N_v = 4) is the CBM; an extremum the interpolation cannot resolve keeps the mesh energy and no masses', async () => {
    const geDir = mkdtempSync(join(tmpdir(), 'vs-meshrun-ge-'));
    try {
      const crystal = unstrainedCrystal(GERMANIUM);
      for (const [name, text] of Object.entries(epmMeshRunFiles(crystal, 12, 8))) writeFileSync(join(geDir, name), text);
      const r = analyzeBandStructure(await loadRun(nodeFileAccessor, geDir));
      const cbm = r.extrema.find((e) => e.kind === 'cbm')!;
      assert.equal(cbm.label, 'L'); // germanium's conduction minimum at L (Cohen & Bergstresser 1966; common practice)
      assert.equal(cbm.valleyDegeneracy, 4); // eight half-valleys at the zone faces: four (common practice)
      assert.equal(r.extrema.find((e) => e.kind === 'vbm')!.band, 4);
      if (cbm.interpolated!.resolved) {
        assert.ok(cbm.tensor && cbm.tensor.source === 'interpolated');
      } else {
        // L is a point of the Γ-centred 12³ mesh: the entry keeps the model's energy there, and no masses.
        const atL = new EpmBandSolver(crystal).bandsAt([0.5, 0.5, 0.5], 8)[4]!;
        assert.ok(Math.abs(cbm.eV - atL) < 2e-6, `${cbm.eV} vs ${atL}`);
        assert.equal(cbm.tensor, null);
        assert.deepEqual(cbm.masses, []);
        assert.equal(r.gap!.uncertainty_eV, null);
      }
    } finally {
      rmSync(geDir, { recursive: true, force: true });
    }
  });
});
