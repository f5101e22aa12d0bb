import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { summaryText } from '../../src/core/report/summaryText';
import { analysisJson } from '../../src/cli/analysisJson';
import type { BandStructure, Report } from '../../src/core/model';
import { axisValleyBands, axisValleyMeshRun, axisValleyTruth, type AxisValleyParameters } from '../../scripts/meshModel/axisValleyModel';
import { insulatorOccupations, writeEigenval, writePoscar } from '../support/writers/vasp';

// A mesh run of a tight-binding model (scripts/meshModel/axisValleyModel.ts): a valence band with its maximum
// at Γ and a conduction band with six minima on Γ–X, written on the irreducible points of a Γ-centred 12×12×12
// mesh as VASP's EIGENVAL + POSCAR, read by loadRun and analysed. The truth is the model's closed form
// (axisValleyTruth: stationary point and analytic Hessian of the cosine sums; analytic model).
const MODEL: AxisValleyParameters = { L: 4, v0: 0, tv: 0.5, ec: 5.35, a: -2.029, b: 0.3, B: 1.5 };

type Json = Record<string, unknown>;

describe('a mesh run through loadRun and analyze', function () {
  this.timeout(120000);
  const dirs: string[] = [];
  let bs: BandStructure;
  let report: Report;
  const truth = axisValleyTruth(MODEL);

  const runDir = (files: Record<string, string>): string => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-meshrun-'));
    dirs.push(dir);
    for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
    return dir;
  };

  before(async () => {
    await ensureSymmetryReady();
    const run = axisValleyMeshRun(MODEL, 12, 'axis-valley test model');
    bs = await loadRun(nodeFileAccessor, runDir({ EIGENVAL: run.eigenval, POSCAR: run.poscar }));
    report = analyzeBandStructure(bs);
  });
  after(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

  it('gives the model gap and edges: VBM at Γ, CBM on Γ–X at the model position, N_v from the star', () => {
    assert.equal(bs.nk, 84); // irreducible points of a Γ-centred 12³ simple-cubic mesh under O_h: C(9, 3) (counting, common practice)
    const g = report.gap!;
    assert.ok(g, 'a gap');
    assert.equal(g.direct, false);
    // Gap of the model: truth.cbm_eV − truth.vbm_eV (closed form); the written energies carry 6 decimals.
    assert.ok(Math.abs(g.eV - (truth.cbm_eV - truth.vbm_eV)) < 1e-3, `${g.eV} vs ${truth.cbm_eV - truth.vbm_eV}`);
    assert.equal(g.source, 'interpolated');
    assert.ok(typeof g.uncertainty_eV === 'number' && g.uncertainty_eV >= 0 && g.uncertainty_eV < 5e-3, String(g.uncertainty_eV));
    assert.equal(g.vbm.band, 2);
    assert.ok(Math.hypot(...g.vbm.k) < 1e-6); // Γ (analytic: t_v Σ cos is largest at k = 0)
    assert.equal(g.cbm.band, 3);
    // The minimum lies at cos 2πx₀ = −(a + 2B)/(4b) on an axis (analytic model); 0.4000 is not a 12³ mesh point.
    const along = Math.max(...g.cbm.k.map(Math.abs));
    assert.ok(Math.abs(along - truth.x0) < 2e-3, `${along} vs ${truth.x0}`);
    assert.equal(g.cbm.k.filter((x) => Math.abs(x) < 1e-6).length, 2);
    assert.equal(g.cbm.position, `${(truth.x0 / 0.5).toFixed(2)} Γ→X`); // X = (½, 0, 0) in the simple-cubic zone (common practice)
    // The smallest direct gap of the model, E_c − E_v minimised by a dense scan of the wedge 0 ≤ k_z ≤ k_y ≤ k_x ≤ ½
    // and a fine one along Γ–X, where it lies (the model itself, evaluated).
    let smallest = Infinity;
    const directAt = (k: number[]): number => {
      const e = axisValleyBands(MODEL, k);
      return e[2]! - e[1]!;
    };
    for (let i = 0; i <= 40; i++)
      for (let j = 0; j <= i; j++) for (let l = 0; l <= j; l++) smallest = Math.min(smallest, directAt([i / 80, j / 80, l / 80]));
    for (let x = 0; x <= 0.5; x += 1e-5) smallest = Math.min(smallest, directAt([x, 0, 0]));
    assert.ok(Math.abs(g.directGap.eV - smallest) < 1e-3, `${g.directGap.eV} vs ${smallest}`);
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.valleyDegeneracy, 6); // ±x, ±y, ±z: the star of (x₀, 0, 0) under O_h (group theory, common practice)
  });

  it('gives the model masses as interpolated tensors, with uncertainties, determined', () => {
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    const t = cbm.tensor!;
    assert.equal(t.source, 'interpolated');
    assert.equal(t.determined, true);
    const sorted = [...t.principal].sort((a, b) => b - a);
    // Analytic Hessian of the model (axisValleyTruth): one longitudinal and two transverse masses.
    assert.ok(Math.abs(sorted[0]! / truth.mLongitudinal - 1) < 0.02, `${sorted[0]} vs ${truth.mLongitudinal}`);
    assert.ok(Math.abs(sorted[1]! / truth.mTransverse - 1) < 0.02, `${sorted[1]} vs ${truth.mTransverse}`);
    assert.ok(Math.abs(sorted[2]! / truth.mTransverse - 1) < 0.02, `${sorted[2]} vs ${truth.mTransverse}`);
    // The longitudinal axis points along the valley's axis (the Hessian is diagonal there, analytic).
    const il = t.principal.indexOf(sorted[0]!);
    const axis = g0(cbm.k);
    assert.ok(Math.abs(Math.abs(t.axes[il]![axis]!) - 1) < 1e-3, JSON.stringify(t.axes));
    assert.ok(t.stderr!.every((u) => u >= 0 && u < 0.1 * Math.abs(sorted[0]!)));
    for (const m of cbm.masses) {
      assert.equal(m.source, 'interpolated');
      assert.equal(m.determined, true);
    }
    // DOS mass N_v^(2/3) (m1 m2 m3)^(1/3) and conductivity mass 3/(Σ 1/m_i) (their definitions; physics.md, common practice).
    const dos = 6 ** (2 / 3) * Math.cbrt(truth.mLongitudinal * truth.mTransverse ** 2);
    const cond = 3 / (1 / truth.mLongitudinal + 2 / truth.mTransverse);
    assert.ok(Math.abs(cbm.dosMass! / dos - 1) < 0.02, `${cbm.dosMass} vs ${dos}`);
    assert.ok(Math.abs(cbm.conductivityMass! / cond - 1) < 0.02, `${cbm.conductivityMass} vs ${cond}`);
    const vbm = report.extrema.find((e) => e.kind === 'vbm')!;
    // Valence mass at Γ: ħ²/(−L² t_v) in every direction (analytic model).
    for (const m of vbm.tensor!.principal) assert.ok(Math.abs(m / truth.mValence - 1) < 1e-3, `${m} vs ${truth.mValence}`);
    assert.equal(vbm.valleyDegeneracy, 1);
  });

  it('writes the additive JSON keys and says in the text that the masses are interpolated, naming the method', () => {
    const json = analysisJson(bs, report, 'raw');
    const interp = json.interpolation as Json;
    assert.deepEqual(interp.divisions, [12, 12, 12]);
    assert.equal(interp.irreduciblePoints, 84);
    const gap = json.gap as Json;
    assert.equal(gap.source, 'interpolated');
    assert.ok('uncertainty_eV' in gap);
    assert.equal((gap.cbm as Json).position, `${(truth.x0 / 0.5).toFixed(2)} Γ→X`);
    const cbm = (json.extrema as Json[]).find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.pathPosition, `${(truth.x0 / 0.5).toFixed(2)} Γ→X`);
    const tensor = cbm.tensor as Json;
    assert.equal(tensor.source, 'interpolated');
    assert.equal(tensor.determined, true);
    assert.equal(tensor.method, 'star-interpolation');
    for (const m of cbm.masses as Json[]) assert.equal(m.source, 'interpolated');
    assert.deepEqual(Object.keys(cbm.interpolated as Json), [
      'energyUncertainty_eV',
      'positionUncertainty_invA',
      'resolved',
      'touchingBands',
    ]);
    const text = summaryText(report);
    assert.match(text, /interpolated/);
    assert.match(text, /star-function interpolation/);
    assert.match(text, /Pickett–Krakauer–Allen/);
    assert.match(text, /CBM: band 3 at 0\.80 Γ→X/);
    assert.ok(report.cautions.some((c) => /interpolated from a 12×12×12 mesh/.test(c) && /crossings/.test(c)));
  });

  it('is interpolated too when an automatic-mesh KPOINTS lies beside the EIGENVAL', async () => {
    const run = axisValleyMeshRun(MODEL, 12, 'axis-valley test model');
    // VASP's automatic Γ-centred mesh layout: comment, 0, Gamma, divisions, shift (common practice of the format).
    const kpoints = 'Automatic mesh\n0\nGamma\n 12 12 12\n 0 0 0\n';
    const withMesh = await loadRun(nodeFileAccessor, runDir({ EIGENVAL: run.eigenval, POSCAR: run.poscar, KPOINTS: kpoints }));
    const r = analyzeBandStructure(withMesh);
    assert.deepEqual(r.interpolation?.divisions, [12, 12, 12]);
    assert.equal(r.gap?.source, 'interpolated');
    assert.ok(Math.abs(r.gap!.eV - (truth.cbm_eV - truth.vbm_eV)) < 1e-3); // closed form (axisValleyTruth)
  });

  it('spin-polarised: each channel interpolated, the overall gap between the channels’ edges', async () => {
    // Spin down: the model's valence band raised by 0.05 eV and conduction band lowered by 0.1 eV (a rigid shift
    // of our own), so the down channel's gap is the model's minus 0.15 eV (closed form, axisValleyTruth).
    const run = axisValleyMeshRun(MODEL, 12, 'axis-valley test model');
    const up = await loadRun(nodeFileAccessor, runDir({ EIGENVAL: run.eigenval, POSCAR: run.poscar }));
    const down = new Float64Array(up.energies[0]!).map((e, i) => e + [0, 0.05, -0.1, 0][i % 4]!);
    const dir = runDir({
      EIGENVAL: writeEigenval({
        system: 'two channels',
        nIons: 1,
        electrons: 4,
        nBands: 4,
        kpoints: up.kpoints,
        weights: up.weights!,
        energies: [up.energies[0]!, down],
        occupations: [insulatorOccupations(up.nk, 4, 2), insulatorOccupations(up.nk, 4, 2)],
        lattice: up.lattice!,
      }),
      POSCAR: run.poscar,
    });
    const r = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    const gap = truth.cbm_eV - truth.vbm_eV;
    assert.deepEqual(
      r.spinGaps?.map((g) => g?.source),
      ['interpolated', 'interpolated'],
    );
    assert.ok(Math.abs(r.spinGaps![0]!.eV - gap) < 1e-3 && Math.abs(r.spinGaps![1]!.eV - (gap - 0.15)) < 1e-3);
    assert.ok(Math.abs(r.gap!.eV - (gap - 0.15)) < 1e-3);
    assert.equal(r.gap!.vbm.spin, 1);
    assert.equal(r.gap!.cbm.spin, 1);
    // The up channel's edges lie 0.05 eV below the VBM and 0.1 eV above the CBM (the shifts above).
    const upVbm = r.extrema.find((e) => e.kind === 'vbm' && e.spin === 0)!;
    assert.ok(Math.abs(upVbm.offset_eV - 0.05) < 1e-4, String(upVbm.offset_eV));
    assert.match(summaryText(r), /bands 1–4 \(spin up\) and bands 1–4 \(spin down\)/);
  });

  it('k-points that form no mesh are analysed as points, as before (no interpolation)', async () => {
    // Eleven scattered points (not a regular mesh): the earlier behaviour, with its warning, is kept.
    const nk = 11;
    const kpoints = new Float64Array(nk * 3).map((_, i) => ((i * 0.137) % 0.5) - 0.1);
    const energies = new Float64Array(nk * 2).map((_, i) => (i % 2 ? 3 + 0.01 * i : 0.01 * i));
    const lattice = (
      [
        [4, 0, 0],
        [0, 4, 0],
        [0, 0, 4],
      ] as const
    ).map((r) => [...r]) as [[number, number, number], [number, number, number], [number, number, number]];
    const dir = runDir({
      EIGENVAL: writeEigenval({
        system: 'scattered points',
        nIons: 1,
        electrons: 2,
        nBands: 2,
        kpoints,
        energies: [energies],
        occupations: [insulatorOccupations(nk, 2, 1)],
        lattice,
      }),
      POSCAR: writePoscar({ comment: 'sc', lattice, species: ['Po'], counts: [1], positions: [[0, 0, 0]] }),
    });
    const r = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    assert.equal(r.interpolation, undefined);
    assert.equal(r.gap?.source, undefined);
    assert.ok(r.warnings.some((w) => /neither a path nor a known grid/.test(w)));
  });

  it("a path run's JSON keeps exactly the earlier keys (the mesh keys are additive)", async () => {
    const path = await loadRun(nodeFileAccessor, join(__dirname, '../../fixtures/epm/si'));
    const r = analyzeBandStructure(path);
    const json = analysisJson(path, r, 'raw');
    assert.equal(json.interpolation, undefined);
    // The keys of the CLI contract before mesh runs (src/core/report/reportJson.ts at the previous commit).
    assert.deepEqual(Object.keys(json.gap as Json), ['eV', 'direct', 'vbm', 'cbm', 'directGap']);
    assert.deepEqual(Object.keys((json.gap as Json).vbm as Json), ['band', 'spin', 'k', 'eV', 'label']);
    for (const x of json.extrema as Json[]) {
      assert.ok(!('interpolated' in x));
      for (const m of x.masses as Json[]) assert.ok(!('source' in m));
      if (x.tensor) assert.ok(!('source' in (x.tensor as Json)));
    }
    assert.ok(!r.cautions.some((c) => /interpolated from/.test(c)));
  });
});

/** The axis a point on a cubic axis lies along. */
function g0(k: readonly number[]): number {
  const a = k.map(Math.abs);
  return a.indexOf(Math.max(...a));
}
