import assert from 'node:assert/strict';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import type { CliIO } from '../../../src/cli/io';
import type { Vec3 } from '../../../src/core/model';
import { EpmBandSolver } from '../../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../../scripts/epm/crystal';
import { SILICON } from '../../../scripts/epm/materials';
import { insulatorOccupations, writeEigenval } from '../../support/writers/vasp';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';

function capture(): CliIO & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', out: (t: string) => (io.stdout += `${t}\n`), err: (t: string) => (io.stderr += `${t}\n`) };
  return io;
}

const SI = join(__dirname, '..', '..', '..', 'fixtures', 'epm', 'si');

function pointsOf(kpoints: string): Vec3[] {
  return kpoints
    .trim()
    .split('\n')
    .slice(3)
    .map((l) => l.trim().split(/\s+/).slice(0, 3).map(Number) as Vec3);
}

describe('valleyscope stencil', function () {
  this.timeout(60000);

  it('writes 19 k-points around the CBM in the VASP explicit layout, centre first', async () => {
    const io = capture();
    assert.equal(await main(['stencil', SI, '--at', 'cbm'], io), 0, io.stderr);
    const lines = io.stdout.trim().split('\n');
    assert.equal(lines[1], '19');
    assert.equal(lines[2], 'Reciprocal');
    const pts = pointsOf(io.stdout);
    assert.equal(pts.length, 19);
    // The CBM of the fixture is on Γ–X near 0.85 (Cohen & Bergstresser model): (≈0.425, 0, ≈0.425).
    assert.ok(Math.abs(pts[0]![0] - 0.4230769) < 1e-6 && pts[0]![1] === 0);
    assert.ok(lines.slice(3).every((l) => / 0$/.test(l)), 'zero weights');
  });

  it('accepts a fractional k and refuses to overwrite a file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-stencil-'));
    const out = join(dir, 'KPOINTS');
    const io = capture();
    assert.equal(await main(['stencil', SI, '--at', '0.5,0,0.5', '--step', '0.01', '--out', out], io), 0, io.stderr);
    assert.ok(existsSync(out));
    assert.deepEqual(pointsOf(readFileSync(out, 'utf8'))[0], [0.5, 0, 0.5]);
    const again = capture();
    assert.equal(await main(['stencil', SI, '--at', 'vbm', '--out', out], again), 1);
    assert.match(again.stderr, /already exists/);
    const bad = capture();
    assert.equal(await main(['stencil', SI, '--at', 'somewhere'], bad), 2);
    assert.equal(bad.stderr.trim().split('\n').length, 1);
  });

  it('round trip: the model run at the stencil points, analysed, gives the tensor of the Δ valley', async () => {
    const io = capture();
    assert.equal(await main(['stencil', SI, '--at', 'cbm'], io), 0);
    const pts = pointsOf(io.stdout);
    // The follow-up "run": the same published model (Cohen & Bergstresser 1966, scripts/epm) at these points.
    const solver = new EpmBandSolver(unstrainedCrystal(SILICON));
    const nb = 8;
    const kpoints = Float64Array.from(pts.flat());
    const energies = new Float64Array(pts.length * nb);
    pts.forEach((k, i) => energies.set(solver.bandsAt(k, nb), i * nb));
    const dir = mkdtempSync(join(tmpdir(), 'vs-stencil-run-'));
    const poscar = readFileSync(join(SI, 'POSCAR'), 'utf8');
    writeFileSync(join(dir, 'POSCAR'), poscar);
    writeFileSync(join(dir, 'KPOINTS'), io.stdout);
    writeFileSync(
      join(dir, 'EIGENVAL'),
      writeEigenval({
        system: 'Si stencil',
        nIons: 2,
        electrons: 8,
        nBands: nb,
        kpoints,
        weights: new Float64Array(pts.length),
        energies: [energies],
        occupations: [insulatorOccupations(pts.length, nb, 4)],
      }),
    );
    const run = capture();
    assert.equal(await main(['analyze', dir, '--json'], run), 0, run.stderr);
    const report = JSON.parse(run.stdout) as { extrema: { kind: string; tensor: { principal: number[]; axes: number[][] } | null; valleyDegeneracy: number | null }[] };
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    assert.ok(cbm.tensor);
    assert.equal(cbm.valleyDegeneracy, 6); // six Δ valleys
    const iL = cbm.tensor.principal.indexOf(Math.max(...cbm.tensor.principal));
    assert.ok(Math.abs(Math.abs(cbm.tensor.axes[iL]![1]!) - 1) < 1e-3); // longitudinal axis along Δ (y here)
    // Reference: a centred 5-point finite difference on the fine Γ–X line of the same model
    // (fixtures/epm/si-dense); handbook m_t ≈ 0.19 (memory, Sze & Ng): a loose check.
    const dense = analyzeBandStructure(await loadRun(nodeFileAccessor, join(SI, '..', 'si-dense')), { method: 'central-4' });
    const ml = dense.extrema.find((e) => e.kind === 'cbm')!.masses[0]!.mass;
    assert.ok(Math.abs(cbm.tensor.principal[iL]! / ml - 1) < 0.1, `${cbm.tensor.principal} vs ${ml}`);
    const mt = Math.min(...cbm.tensor.principal);
    assert.ok(Math.abs(mt / 0.19 - 1) < 0.15, String(mt));
  });
});
