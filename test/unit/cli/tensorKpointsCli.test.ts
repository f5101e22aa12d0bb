import assert from 'node:assert/strict';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import type { Vec3 } from '../../../src/core/model';
import { EpmBandSolver } from '../../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../../scripts/epm/crystal';
import { SILICON } from '../../../scripts/epm/materials';
import { fccLattice } from '../../support/models';
import { cartesianDisplacement } from '../../../src/core/lattice/tensorKpoints';
import { capture } from '../../support/unitCliCapture';

const SI = join(__dirname, '..', '..', '..', 'fixtures', 'epm', 'si');

function pointsOf(kpoints: string): { k: Vec3; w: string }[] {
  const lines = kpoints.trim().split('\n');
  return lines.slice(3).map((l) => {
    const f = l.trim().split(/\s+/);
    return { k: f.slice(0, 3).map(Number) as Vec3, w: f[3]! };
  });
}

describe('valleyscope tensor-kpoints', function () {
  this.timeout(60000);

  it('centres on the refined conduction minimum, reduces by symmetry and writes weight 1 by default', async () => {
    const io = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'cbm'], io), 0, io.stderr);
    const lines = io.stdout.trim().split('\n');
    assert.equal(lines[2], 'Reciprocal');
    const pts = pointsOf(io.stdout);
    assert.equal(Number(lines[1]), pts.length);
    assert.ok(
      pts.every((p) => p.w === '1'),
      'nscf weights',
    );
    // The little group of Δ (C4v with time reversal) relates most of the 37 points: far fewer are written.
    assert.ok(pts.length < 37 && pts.length >= 7, String(pts.length));
    // The model's minimum on Γ–X, (0, t, 0)2π/a = (t/2, 0, t/2) fractional, by golden section on the same
    // model (Cohen & Bergstresser 1966, scripts/epm); the sampled point of the fixture is 11/13 of Γ–X.
    const solver = new EpmBandSolver(unstrainedCrystal(SILICON));
    const f = (t: number): number => solver.bandsAt([t / 2, 0, t / 2], 5)[4]!;
    let a = 0.8;
    let b = 0.9;
    for (let i = 0; i < 50; i++) {
      const c = b - 0.618034 * (b - a);
      const d = a + 0.618034 * (b - a);
      if (f(c) < f(d)) b = d;
      else a = c;
    }
    const tMin = (a + b) / 2;
    const centre = pts[0]!.k;
    assert.ok(
      Math.abs(centre[0] * 2 - tMin) < Math.abs(0.4230769 * 2 - tMin) / 3,
      `centre ${centre[0] * 2} vs minimum ${tMin} (sampled 0.846)`,
    );
    assert.ok(Math.abs(centre[0] * 2 - tMin) < 2e-3, `centre ${centre[0] * 2} vs ${tMin}`);
    assert.match(io.stderr, /refined between sampled points/);
    assert.match(io.stderr, /moves 10\.0 meV at h/);
  });

  it('--step fixes h; --for hybrid writes zero weights and says where the mesh goes', async () => {
    const io = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'vbm', '--step', '0.015', '--for', 'hybrid'], io), 0, io.stderr);
    const pts = pointsOf(io.stdout);
    assert.ok(pts.every((p) => p.w === '0'));
    const lat = fccLattice(5.43);
    const r = pts.map((p) => Math.hypot(...cartesianDisplacement(p.k, pts[0]!.k, lat)));
    // Shells at exactly h and 2h (as asked), and the centre.
    assert.ok(
      r.every((x) => Math.abs(x) < 1e-8 || Math.abs(x - 0.015) < 1e-8 || Math.abs(x - 0.03) < 1e-8),
      r.join(' '),
    );
    // Degenerate top: the body diagonals are in the plan (7 orbits at Γ: centre + 3 directions × 2 shells).
    assert.equal(pts.length, 7);
    assert.match(io.stderr, /no weighted mesh/);
  });

  it('--for hybrid --mesh puts the weighted mesh first, then the points with weight 0; a bad mesh file is refused', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-tensor-mesh-'));
    const mesh = join(dir, 'IBZKPT');
    // An explicit weighted list in VASP's IBZKPT layout (common practice): comment, count, "Reciprocal lattice".
    writeFileSync(
      mesh,
      'Automatically generated mesh\n       3\nReciprocal lattice\n    0.0 0.0 0.0   1\n    0.25 0.0 0.0   8\n    0.5 0.0 0.0   4\n',
    );
    const io = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'cbm', '--for', 'hybrid', '--mesh', mesh], io), 0, io.stderr);
    const pts = pointsOf(io.stdout);
    assert.deepEqual(
      pts.slice(0, 3).map((p) => p.w),
      ['1', '8', '4'],
    );
    assert.ok(pts.slice(3).every((p) => p.w === '0') && pts.length > 3);
    assert.equal(Number(io.stdout.split('\n')[1]), pts.length);
    const badMesh = join(dir, 'bad');
    writeFileSync(badMesh, 'x\n  5\nReciprocal\n 0 0 0 1\n');
    const bad = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'cbm', '--for', 'hybrid', '--mesh', badMesh], bad), 1);
    assert.match(bad.stderr, /line 5: expected k1 k2 k3 weight/);
  });

  it('refuses to overwrite, rejects bad options, and the old verb is gone', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-tensor-kpoints-'));
    const out = join(dir, 'KPOINTS');
    const io = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', '0.5,0,0.5', '--step', '0.01', '--out', out], io), 0, io.stderr);
    assert.ok(existsSync(out));
    assert.deepEqual(pointsOf(readFileSync(out, 'utf8'))[0]!.k, [0.5, 0, 0.5]);
    const again = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'vbm', '--out', out], again), 1);
    assert.match(again.stderr, /already exists/);
    const bad = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'somewhere'], bad), 2);
    assert.equal(bad.stderr.trim().split('\n').length, 1);
    const noStep = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', '0.1,0.2,0.3'], noStep), 2);
    assert.match(noStep.stderr, /--step/);
    const badFor = capture();
    assert.equal(await main(['tensor-kpoints', SI, '--at', 'cbm', '--for', 'scf'], badFor), 2);
    const old = capture();
    assert.equal(await main(['stencil', SI, '--at', 'cbm'], old), 2);
    assert.match(old.stderr, /unknown command/);
  });
});
