/**
 * A run listing the whole mesh (VASP ISYM = −1, pw.x nosym): 12×12×12 = 1 728 points, more than the
 * interpolation takes (MAX_INTERPOLATION_POINTS), but 72 once the points equivalent by symmetry are merged. The
 * bound applies to the points kept, so the run is interpolated, with the same edges as its irreducible form.
 *
 * Model: s-band tight binding on the fcc lattice (one atom per cell, point group m-3m), analytic:
 *   valence    E_v = −t_v (3 − Σ_{i<j} cos(k_i a/2) cos(k_j a/2))   (first neighbours at (a/2)(1,1,0): the fcc
 *              s band of Ashcroft & Mermin, Solid State Physics, ch. 10 (memory)), maximum 0 at Γ;
 *   conduction E_c = E_g + t_c (3 + Σ_i cos(k_i a))                  (second neighbours at a(1,0,0)), minimum E_g at
 *              the L points, 4 valleys (8 half-valleys on the zone faces; common practice).
 * Expanded to second order: E_v ≈ −t_v a² k²/4, so m_v = −2 (ħ²/m_e)/(t_v a²); E_c ≈ E_g + t_c a² q²/2, so
 * m_c = (ħ²/m_e)/(t_c a²), with ħ²/m_e = 7.6199642 eV Å² (CODATA 2018). The parameters are invented.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Report } from '../../../src/core/model';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { MAX_INTERPOLATION_POINTS } from '../../../src/core/interpolation/meshInterpolation';
import { insulatorOccupations, modelSystemName, writeEigenval, writePoscar } from '../../support/writers/vasp';
import { fccLattice } from '../../support/models';

const A = 3.6;
const M = 12;
const T_V = 0.4;
const T_C = 0.25;
const E_G = 1.2;
const HBAR2_OVER_ME = 7.6199642; // eV Å², CODATA 2018
const lattice = fccLattice(A);
const B = reciprocalLattice(lattice);
const root = mkdtempSync(join(tmpdir(), 'vs-whole-mesh-'));

function energies(kpoints: Float64Array): Float64Array {
  const nk = kpoints.length / 3;
  const e = new Float64Array(2 * nk);
  for (let i = 0; i < nk; i++) {
    const k = [0, 1, 2].map((x) => kpoints[3 * i]! * B[0][x]! + kpoints[3 * i + 1]! * B[1][x]! + kpoints[3 * i + 2]! * B[2][x]!);
    const h = k.map((c) => Math.cos((c * A) / 2));
    const first = h[0]! * h[1]! + h[1]! * h[2]! + h[2]! * h[0]!;
    const second = k.reduce((s, c) => s + Math.cos(c * A), 0);
    e[2 * i] = -T_V * (3 - first);
    e[2 * i + 1] = E_G + T_C * (3 + second);
  }
  return e;
}

async function analyzeRun(name: string, kpoints: Float64Array, weights: Float64Array): Promise<Report> {
  const dir = join(root, name);
  mkdirSync(dir);
  const nk = kpoints.length / 3;
  const eig = {
    system: modelSystemName('fcc s-band tight binding'),
    nIons: 1,
    electrons: 2,
    nBands: 2,
    kpoints,
    weights,
    energies: [energies(kpoints)],
    occupations: [insulatorOccupations(nk, 2, 1)],
    lattice,
  };
  writeFileSync(join(dir, 'EIGENVAL'), writeEigenval(eig));
  writeFileSync(join(dir, 'POSCAR'), writePoscar({ comment: 'fcc', lattice, species: ['Cu'], counts: [1], positions: [[0, 0, 0]] }));
  return analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
}

/** Every point of the Γ-centred mesh, each component written in (−½, ½], weight 1 (as a run without symmetry lists them). */
function wholeMesh(): { kpoints: Float64Array; weights: Float64Array } {
  const ks: number[] = [];
  for (let a = 0; a < M; a++)
    for (let b = 0; b < M; b++) for (let c = 0; c < M; c++) ks.push(...[a, b, c].map((j) => (j > M / 2 ? j - M : j) / M));
  return { kpoints: Float64Array.from(ks), weights: new Float64Array(M ** 3).fill(1) };
}

describe('a run listing the whole 12³ mesh (more points than the interpolation takes before merging)', function () {
  this.timeout(120000);
  let irreducible: Report;
  let whole: Report;
  before(async () => {
    await ensureSymmetryReady();
    const sym = crystalSymmetry({ lattice, species: ['Cu'], positions: new Float64Array([0, 0, 0]) });
    const irr = irreducibleMesh([M, M, M], [0, 0, 0], sym.reciprocalPointGroup);
    irreducible = await analyzeRun('irreducible', irr.kpoints, irr.weights);
    const w = wholeMesh();
    assert.ok(w.kpoints.length / 3 > MAX_INTERPOLATION_POINTS, 'the listing is above the bound on interpolated points');
    whole = await analyzeRun('whole', w.kpoints, w.weights);
  });

  it('is interpolated from its 72 irreducible points, and says it merged them', () => {
    assert.ok(whole.interpolation, whole.warnings.join('\n'));
    // 72 irreducible points of the Γ-centred 12³ fcc mesh under m-3m with time reversal (counted by irreducibleMesh).
    assert.equal(irreducible.interpolation!.irreduciblePoints, 72);
    assert.equal(whole.interpolation.irreduciblePoints, 72);
    assert.deepEqual(whole.interpolation.mergedEquivalentPoints, { listed: M ** 3, kept: 72, largestDifference_eV: 0 });
    assert.deepEqual(whole.interpolation.divisions, [M, M, M]);
  });

  it('gives the same edges as the irreducible run, and those of the analytic model', () => {
    const r = whole;
    assert.ok(r.gap && irreducible.gap);
    assert.ok(Math.abs(r.gap.eV - irreducible.gap.eV) < 1e-9, `${r.gap.eV} vs ${irreducible.gap.eV}`);
    assert.ok(Math.abs(r.gap.eV - E_G) < 1e-6, `gap ${r.gap.eV} vs the model's ${E_G}`); // analytic model: E_c(L) − E_v(Γ)
    assert.equal(r.gap.direct, false);
    for (const kind of ['vbm', 'cbm'] as const) {
      const a = r.extrema.find((x) => x.kind === kind)!;
      const b = irreducible.extrema.find((x) => x.kind === kind)!;
      assert.ok(Math.abs(a.eV - b.eV) < 1e-9, `${kind}: ${a.eV} vs ${b.eV}`);
      assert.equal(a.valleyDegeneracy, b.valleyDegeneracy);
      assert.equal(a.label, b.label);
      a.tensor!.principal.forEach((m, i) => {
        const ref = b.tensor!.principal[i]!;
        assert.ok(Math.abs(m - ref) < 1e-6 * Math.abs(ref), `${kind}: ${m} vs ${ref}`);
      });
    }
    const vbm = r.extrema.find((x) => x.kind === 'vbm')!;
    const cbm = r.extrema.find((x) => x.kind === 'cbm')!;
    assert.equal(vbm.label, 'Γ');
    assert.equal(cbm.label, 'L');
    assert.equal(cbm.valleyDegeneracy, 4); // four L valleys of the fcc zone (common practice)
    const mv = (-2 * HBAR2_OVER_ME) / (T_V * A * A); // analytic model, see the header
    const mc = HBAR2_OVER_ME / (T_C * A * A);
    for (const m of vbm.tensor!.principal) assert.ok(Math.abs(m / mv - 1) < 1e-3, `valence ${m} vs ${mv}`);
    for (const m of cbm.tensor!.principal) assert.ok(Math.abs(m / mc - 1) < 1e-3, `conduction ${m} vs ${mc}`);
  });
});
