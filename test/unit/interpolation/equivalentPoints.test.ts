/**
 * A mesh run reduced by fewer operations than the crystal has — the whole mesh (VASP ISYM = −1, pw.x nosym) or
 * the mesh halved by time reversal only (ISYM = 0; weight 2 for a pair ±k, 1 for a point equal to its own
 * negative, as the codes weight them: common practice) — is read as the irreducible run it is equivalent to:
 * the same mesh, the same gap and masses. Model: the simple cubic tight-binding pair of bands
 * E_v = −t_v(3 + Σ cos 2πk_i), E_c = E_g + t_c(3 − Σ cos 2πk_i) (a published analytic model; invented numbers),
 * on a Γ-centred 6×6×6 mesh; the truth is the irreducible run of the same model analysed by the same code.
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
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { EQUIVALENT_ENERGY_TOLERANCE_EV } from '../../../src/core/interpolation/equivalentPoints';
import { insulatorOccupations, writeEigenval, writePoscar } from '../../support/writers/vasp';
import { cubicLattice, simpleCubicStructure } from '../../support/models';

const A = 4;
const M = 6;
const root = mkdtempSync(join(tmpdir(), 'vs-equivalent-'));
let n = 0;

const energiesAt = (k: ArrayLike<number>, i: number): [number, number] => {
  const s = [0, 1, 2].reduce((acc, j) => acc + Math.cos(2 * Math.PI * k[3 * i + j]!), 0);
  return [-0.5 * (3 + s), 1.5 + 0.6 * (3 - s)];
};

/** Write the run and analyse it; `nudge`: eV added to band 2 at the last point (breaks the symmetry). */
async function analyzeRun(kpoints: Float64Array, weights: Float64Array, nudge = 0): Promise<Report> {
  const dir = join(root, `run${n++}`);
  mkdirSync(dir);
  const nk = kpoints.length / 3;
  const e = new Float64Array(2 * nk);
  for (let i = 0; i < nk; i++) e.set(energiesAt(kpoints, i), 2 * i);
  e[2 * nk - 1]! += nudge;
  const lattice = cubicLattice(A);
  const eig = { system: 'equivalent points model', nIons: 1, electrons: 2, nBands: 2, kpoints, weights, energies: [e], lattice };
  writeFileSync(join(dir, 'EIGENVAL'), writeEigenval({ ...eig, occupations: [insulatorOccupations(nk, 2, 1)] }));
  writeFileSync(join(dir, 'POSCAR'), writePoscar({ comment: 'sc', lattice, species: ['Po'], counts: [1], positions: [[0, 0, 0]] }));
  return analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
}

/** The whole mesh (first half of the zone for each axis written as −½ < k ≤ ½), and its time-reversal half. */
function wholeMesh(half: boolean): { kpoints: Float64Array; weights: Float64Array } {
  const ks: number[] = [];
  const ws: number[] = [];
  const idx = (x: number): number => ((x % M) + M) % M;
  for (let a = 0; a < M; a++) {
    for (let b = 0; b < M; b++) {
      for (let c = 0; c < M; c++) {
        const own = [a, b, c];
        const neg = own.map((x) => idx(-x));
        const key = (v: number[]): number => (v[0]! * M + v[1]!) * M + v[2]!;
        if (half && key(neg) < key(own)) continue; // its partner −k is listed instead
        ks.push(...own.map((x) => (x > M / 2 ? x - M : x) / M));
        ws.push(half && key(neg) !== key(own) ? 2 : 1);
      }
    }
  }
  return { kpoints: Float64Array.from(ks), weights: Float64Array.from(ws) };
}

describe('mesh runs listing points equivalent by symmetry', function () {
  this.timeout(60000);
  let reference: Report;
  before(async () => {
    await ensureSymmetryReady();
    const sym = crystalSymmetry(simpleCubicStructure(A));
    const irr = irreducibleMesh([M, M, M], [0, 0, 0], sym.reciprocalPointGroup);
    reference = await analyzeRun(irr.kpoints, irr.weights);
    assert.ok(reference.interpolation, 'the irreducible run is interpolated');
  });

  const same = (r: Report): void => {
    assert.ok(r.interpolation, r.warnings.join('\n'));
    assert.deepEqual(r.interpolation.divisions, [M, M, M]);
    assert.equal(r.interpolation.irreduciblePoints, reference.interpolation!.irreduciblePoints);
    assert.ok(Math.abs(r.gap!.eV - reference.gap!.eV) < 1e-9, `${r.gap!.eV} vs ${reference.gap!.eV}`);
    for (const kind of ['vbm', 'cbm'] as const) {
      const a = r.extrema.find((x) => x.kind === kind)!.tensor!.principal;
      const b = reference.extrema.find((x) => x.kind === kind)!.tensor!.principal;
      a.forEach((m, i) => assert.ok(Math.abs(m - b[i]!) < 1e-6 * Math.abs(b[i]!), `${kind}: ${m} vs ${b[i]}`));
    }
  };

  it('the whole mesh (ISYM = −1): read as its irreducible points, the same results, and said so', async () => {
    const { kpoints, weights } = wholeMesh(false);
    const r = await analyzeRun(kpoints, weights);
    same(r);
    assert.deepEqual(r.interpolation!.mergedEquivalentPoints, {
      listed: M ** 3,
      kept: reference.interpolation!.irreduciblePoints,
      largestDifference_eV: 0,
    });
  });

  it('the mesh halved by time reversal (ISYM = 0, weights 2 and 1): the same', async () => {
    const { kpoints, weights } = wholeMesh(true);
    const r = await analyzeRun(kpoints, weights);
    same(r);
    assert.equal(r.interpolation!.mergedEquivalentPoints!.listed, kpoints.length / 3);
  });

  it('weights that do not match the stars: not interpolated; the reason given when the weights say a reduced mesh', async () => {
    const { kpoints } = wholeMesh(true);
    const r = await analyzeRun(kpoints, new Float64Array(kpoints.length / 3).fill(1));
    assert.equal(r.interpolation, undefined);
    // Equal weights and no declared mesh: a list like a path written point by point, so no word about meshes.
    assert.ok(!r.warnings.some((w) => /mesh run/.test(w)), r.warnings.join('\n'));
    // Weights that differ (a symmetry-reduced mesh) but not as the stars: the reason is given.
    const { weights } = wholeMesh(true);
    const wrong = Float64Array.from(weights, (w, i) => (i === 1 ? 3 * w : w));
    const r2 = await analyzeRun(kpoints, wrong);
    assert.equal(r2.interpolation, undefined);
    assert.ok(
      r2.warnings.some((w) => /not interpolated as a mesh run: The weight of k-point \d+ .* differs from its star/.test(w)),
      r2.warnings.join('\n'),
    );
  });

  it('energies that differ at equivalent points (less symmetry than the crystal): not interpolated with its operations', async () => {
    const { kpoints, weights } = wholeMesh(false);
    const ok = await analyzeRun(kpoints, weights, 0.5 * EQUIVALENT_ENERGY_TOLERANCE_EV);
    assert.ok(ok.interpolation, 'within the tolerance: merged');
    const r = await analyzeRun(kpoints, weights, 20 * EQUIVALENT_ENERGY_TOLERANCE_EV);
    assert.equal(r.interpolation, undefined);
    assert.ok(r.gap, 'the points are still analysed');
    const w = r.warnings.find((x) =>
      /not interpolated as a mesh run: k-points \d+ and \d+ are equivalent by the crystal's symmetry, but an interpolated band's energies differ there by 20\.0 meV/.test(
        x,
      ),
    );
    assert.ok(w, r.warnings.join('\n'));
    assert.match(w, /the bands have less symmetry than the crystal/);
  });
});
