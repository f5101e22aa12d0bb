import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { summaryText } from '../../src/core/report/summaryText';
import type { Report, Vec3 } from '../../src/core/model';
import { curvatureToMass } from '../../src/core/units';
import { cartesianToFractional, fractionalToCartesian, reciprocalLattice } from '../../src/core/lattice/reciprocal';
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
  let trueT = 0;
  let trueMl = 0;
  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-meshrun-si-'));
    const crystal = unstrainedCrystal(SILICON);
    const nBands = 8;
    for (const [name, text] of Object.entries(epmMeshRunFiles(crystal, 12, nBands))) writeFileSync(join(dir, name), text);
    const solver = new EpmBandSolver(crystal);
    report = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    // The model's gap: VBM at Γ (band 4), CBM on Γ–X (band 5) found on a 0.0005-step line, Γ–X = (0, t/2, t/2).
    const e = (t: number): number => solver.bandsAt([0, t / 2, t / 2], nBands)[4]!;
    let cbm = Infinity;
    for (let t = 0.75; t <= 0.95; t += 0.0005) {
      if (e(t) < cbm) [cbm, trueT] = [e(t), t];
    }
    trueGap = cbm - solver.bandsAt([0, 0, 0], nBands)[3]!;
    // The longitudinal mass: central difference along Γ–X (|Γ–X| = 2π/a, common practice), step 0.005 Å⁻¹.
    const h = 0.005;
    const dt = h / ((2 * Math.PI) / SILICON.latticeConstant);
    trueMl = curvatureToMass((e(trueT + dt) - 2 * e(trueT) + e(trueT - dt)) / (h * h));
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
    // Γ is a point of the Γ-centred mesh: the VBM's energy is the file's own value there, so leaving that point
    // out of the fit moves no energy that is quoted (its uncertainty stays at rounding, far below the 1e-6 eV
    // the file is written to), and the gap's uncertainty is the conduction side's.
    assert.ok(vbm.interpolated!.energyUncertainty_eV! < 1e-9, String(vbm.interpolated!.energyUncertainty_eV));
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
  });

  it('on the line to X, the pair model puts the valley within 0.01 of the model minimum, the gap within 2 meV, m_l within 5 %', () => {
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    // Position on Γ–X as a fraction: the valley member found lies on the line to X = (0, ½, ½).
    const t = cbm.k[1] * 2;
    assert.ok(Math.abs(cbm.k[1] - cbm.k[2]) < 1e-9 && Math.abs(cbm.k[0]) < 1e-9, JSON.stringify(cbm.k));
    assert.ok(Math.abs(t - trueT) < 0.01, `${t} vs ${trueT}`);
    assert.ok(Math.abs(report.gap!.eV - trueGap) < 2e-3, `${report.gap!.eV} vs ${trueGap}`);
    const along = cbm.masses.find((m) => m.method === 'pair-line');
    assert.ok(along, JSON.stringify(cbm.masses));
    assert.ok(Math.abs(Math.abs(along.direction![0]) - 1) < 1e-9); // Γ–X is cartesian x in this cell (b2 + b3)
    assert.ok(Math.abs(along.mass / trueMl - 1) < 0.05, `${along.mass} vs ${trueMl}`);
    // Quoted only within its own uncertainty; the error lies inside twice the quoted one (leave-one-out is a spread).
    assert.equal(along.determined, true);
    assert.ok(Math.abs(along.mass - trueMl) <= 2 * along.stderr!, `${along.mass} vs ${trueMl} ± ${along.stderr}`);
    // The masses across the line stay the interpolant's; at 12³ they are not quoted.
    assert.ok(cbm.masses.filter((m) => m.method === 'star-interpolation').every((m) => !m.determined));
    assert.equal(cbm.tensor?.determined, false);
  });

  it('quotes a gap whose uncertainty covers its actual error', () => {
    const g = report.gap!;
    assert.equal(g.direct, false);
    assert.ok(typeof g.uncertainty_eV === 'number', String(g.uncertainty_eV));
    assert.ok(Math.abs(g.eV - trueGap) <= g.uncertainty_eV, `${g.eV} vs ${trueGap} ± ${g.uncertainty_eV}`);
  });

  it('germanium: the minimum at L (N_v = 4) is the CBM; along Γ–L the line fit gives m_l within 5 %, quoted; across, not quoted unless within its uncertainty', async () => {
    const geDir = mkdtempSync(join(tmpdir(), 'vs-meshrun-ge-'));
    try {
      const crystal = unstrainedCrystal(GERMANIUM);
      for (const [name, text] of Object.entries(epmMeshRunFiles(crystal, 12, 8))) writeFileSync(join(geDir, name), text);
      const r = analyzeBandStructure(await loadRun(nodeFileAccessor, geDir));
      const cbm = r.extrema.find((e) => e.kind === 'cbm')!;
      assert.equal(cbm.label, 'L'); // germanium's conduction minimum at L (Cohen & Bergstresser 1966; common practice)
      assert.equal(cbm.valleyDegeneracy, 4); // eight half-valleys at the zone faces: four (common practice)
      assert.equal(r.extrema.find((e) => e.kind === 'vbm')!.band, 4);
      // L is a point of the Γ-centred 12³ mesh: the entry keeps the model's energy there.
      const solver = new EpmBandSolver(crystal);
      const atL = solver.bandsAt([0.5, 0.5, 0.5], 8)[4]!;
      assert.ok(Math.abs(cbm.eV - atL) < 2e-6, `${cbm.eV} vs ${atL}`);
      // The model's gap from Γ (band 4) to L (band 5), both mesh points: within 2 meV.
      const trueGe = atL - solver.bandsAt([0, 0, 0], 8)[3]!;
      assert.ok(Math.abs(r.gap!.eV - trueGe) < 2e-3, `${r.gap!.eV} vs ${trueGe}`);
      // Truth: the model's curvature at the reported k by central differences (step 0.005 Å⁻¹, as for silicon)
      // along each principal axis the report gives (cartesian, turned fractional by the lattice).
      const h = 0.005;
      const truth = (d: readonly number[]): number => {
        const e = (s: number): number =>
          solver.bandsAt(
            cartesianToFractional(
              [0, 1, 2].map((i) => fractionalToCartesian(cbm.k, reciprocalLattice(crystal.lattice))[i]! + s * h * d[i]!) as Vec3,
              crystal.lattice,
            ),
            8,
          )[4]!;
        return curvatureToMass((e(1) - 2 * e(0) + e(-1)) / (h * h));
      };
      const along = cbm.masses.find((m) => m.method === 'even-line');
      assert.ok(along, JSON.stringify(cbm.masses));
      const ml = truth(along.direction!);
      assert.ok(Math.abs(along.mass / ml - 1) < 0.05, `${along.mass} vs ${ml}`);
      assert.equal(along.determined, true);
      assert.ok(Math.abs(along.mass - ml) <= 2 * along.stderr!, `${along.mass} vs ${ml} ± ${along.stderr}`);
      // The line to Γ: the reported k is parallel to the line's direction (an L point of the star).
      const kc = fractionalToCartesian(cbm.k, reciprocalLattice(crystal.lattice));
      assert.ok(Math.abs(Math.abs(kc.reduce((acc, v, i) => acc + v * along.direction![i]!, 0)) / Math.hypot(...kc) - 1) < 1e-6);
      // Across the line: the interpolant's curvature; quoted only when its leave-one-out change is within 10 %.
      const across = cbm.masses.filter((x) => x.method === 'star-interpolation');
      assert.equal(across.length, 2);
      for (const m of across) {
        if (m.determined) assert.ok(Math.abs(m.mass / truth(m.direction!) - 1) < 0.05, `${m.mass} vs ${truth(m.direction!)}`);
        else assert.match(m.undeterminedReason ?? '', /across the line/);
      }
      assert.equal(
        cbm.tensor?.determined,
        cbm.masses.every((m) => m.determined),
      );
      // The interpolant's saddle there is no longer listed as a candidate set aside.
      assert.ok(
        !(r.rejected ?? []).some((c) => c.band === cbm.band && c.k.every((v, i) => Math.abs(v - cbm.k[i]!) < 1e-9)),
        JSON.stringify(r.rejected),
      );
    } finally {
      rmSync(geDir, { recursive: true, force: true });
    }
  });
});
