import assert from 'node:assert/strict';
import { join } from 'node:path';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import type { ExtremumReport, Report } from '../../../src/core/model';

// Band structures of the local empirical pseudopotential method with Cohen & Bergstresser's form factors
// (Phys. Rev. 141, 789 (1966)), solved by scripts/epm and written in VASP layouts (fixtures/epm/README.md).
const ROOT = join(__dirname, '..', '..', '..', 'fixtures', 'epm');

async function analyzeRun(folder: string, settings: Parameters<typeof analyzeBandStructure>[1] = {}): Promise<Report> {
  return analyzeBandStructure(await loadRun(nodeFileAccessor, join(ROOT, folder)), settings);
}
const edge = (r: Report, kind: string): ExtremumReport => {
  const e = r.extrema.find((x) => x.kind === kind);
  assert.ok(e, `no ${kind}`);
  return e;
};

describe('effective masses on the EPM fixtures (Cohen & Bergstresser 1966)', function () {
  this.timeout(60000);
  let denseLongitudinal = 0;

  before(async () => {
    await ensureSymmetryReady();
    // Reference: a centred 5-point finite difference on the fine Γ–X line of the same model (301 points).
    const cbm = edge(await analyzeRun('si-dense', { method: 'central-4' }), 'cbm');
    const central = cbm.masses.filter((m) => m.method === 'central-4' && !(m.warnings ?? []).some((w) => /One-sided/.test(w)));
    assert.equal(central.length, 2, 'the dense minimum is interior: both directions are centred differences');
    denseLongitudinal = central[0]!.mass;
    // Handbook m_l ≈ 0.92-0.98 (memory, Sze & Ng); this model is near it.
    assert.ok(denseLongitudinal > 0.8 && denseLongitudinal < 1.0, String(denseLongitudinal));
  });

  it('Si: conduction minimum along Γ–X near 0.85, N_v = 6, longitudinal mass within 10 % of the dense finite difference', async () => {
    const cbm = edge(await analyzeRun('si'), 'cbm');
    // fcc: Γ–X runs to (0.5, 0, 0.5); the Δ minimum at about 0.85 of the way (physics.md; Cohen & Bergstresser model).
    assert.ok(Math.abs(cbm.k[0] / 0.5 - 0.85) < 0.03 && cbm.k[1] === 0 && Math.abs(cbm.k[2] - cbm.k[0]) < 1e-9, JSON.stringify(cbm.k));
    assert.equal(cbm.valleyDegeneracy, 6); // six Δ valleys (physics.md step 8)
    const along = cbm.masses.filter((m) => m.towards === 'Γ' || m.towards === 'X');
    assert.equal(along.length, 2);
    for (const m of along) assert.ok(Math.abs(m.mass / denseLongitudinal - 1) < 0.1, `${m.towards}: ${m.mass} vs ${denseLongitudinal}`);
    // Along Δ the directions are cartesian ±y (X = (2π/a)(0, 1, 0) for this primitive cell).
    assert.ok(along.every((m) => Math.abs(Math.abs(m.direction[1]) - 1) < 1e-9));
  });

  it('Si: the 5×5×5 list around the minimum gives the tensor: longitudinal axis along Δ, m_l near the dense value, m_t ≈ 0.19', async () => {
    const cbm = edge(await analyzeRun('si-cbm-grid'), 'cbm');
    assert.ok(cbm.tensor);
    const sorted = cbm.tensor.principal.map((m, i) => ({ m, axis: cbm.tensor!.axes[i]! })).sort((a, b) => a.m - b.m);
    const [t1, t2, l] = sorted as [(typeof sorted)[0], (typeof sorted)[0], (typeof sorted)[0]];
    assert.ok(Math.abs(Math.abs(l.axis[1]) - 1) < 1e-3, JSON.stringify(l.axis));
    assert.ok(Math.abs(l.m / denseLongitudinal - 1) < 0.1, `${l.m} vs ${denseLongitudinal}`);
    assert.ok(Math.abs(t1.m / t2.m - 1) < 0.01); // uniaxial valley: the two transverse masses agree (symmetry)
    assert.ok(Math.abs(t1.m / 0.19 - 1) < 0.15, String(t1.m)); // handbook m_t ≈ 0.19 (memory, Sze & Ng), loose
    assert.equal(cbm.valleyDegeneracy, 6);
    assert.ok(cbm.dosMass !== null && cbm.conductivityMass !== null);
  });

  it('Si: the threefold-degenerate valence top at Γ is flagged, with per-branch masses', async () => {
    const vbm = edge(await analyzeRun('si'), 'vbm');
    assert.equal(vbm.label, 'Γ');
    assert.equal(vbm.degenerateBands, 3); // heavy, heavy, light hole without spin-orbit (physics.md step 7)
    assert.ok(vbm.warnings.some((w) => /ill-defined/.test(w)));
    assert.ok(vbm.masses.every((m) => m.branch !== undefined && m.mass < 0));
    assert.deepEqual([...new Set(vbm.masses.map((m) => m.branch))].sort(), [1, 2, 3]);
  });

  it('Ge: conduction minima at L with N_v = 4 and a tensor from the path (Γ–L longitudinal, L–W/U/K transverse)', async () => {
    const cbm = edge(await analyzeRun('ge'), 'cbm');
    assert.equal(cbm.label, 'L');
    assert.equal(cbm.valleyDegeneracy, 4); // four L valleys (physics.md step 8)
    assert.ok(cbm.tensor);
    const l = Math.max(...cbm.tensor.principal);
    const t = Math.min(...cbm.tensor.principal);
    // Handbook Ge m_l ≈ 1.6, m_t ≈ 0.08 (memory, Sze & Ng): the model must give a strongly prolate valley.
    assert.ok(l / t > 8, `${l} / ${t}`);
  });

  it('GaAs: direct gap at Γ with N_v = 1 and an isotropic conduction mass', async () => {
    const r = await analyzeRun('gaas');
    assert.equal(r.gap!.direct, true);
    const cbm = edge(r, 'cbm');
    assert.equal(cbm.label, 'Γ');
    assert.equal(cbm.valleyDegeneracy, 1);
    assert.equal(cbm.degenerateBands, 1);
    assert.ok(cbm.tensor && /1 independent component/.test(cbm.tensor.method)); // cubic little group at Γ
  });
});
