import assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { symmetricEigen3 } from '../../../src/core/analysis/symmetricEigen';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { EpmBandSolver } from '../../../scripts/epm/bandSolver';
import { unstrainedCrystal } from '../../../scripts/epm/crystal';
import { GALLIUM_ARSENIDE, GERMANIUM, SILICON, type EpmMaterial } from '../../../scripts/epm/materials';
import { insulatorOccupations, writeEigenval } from '../../support/writers/vasp';
import { capture } from '../../support/unitCliCapture';

// Round trips on the empirical pseudopotential model (Cohen & Bergstresser, Phys. Rev. 141, 789 (1966);
// scripts/epm): plan a tensor run on the committed path fixture, solve the same model at the planned points,
// analyse the run, and compare with dense central differences of the same model at its true extremum.

const ROOT = join(__dirname, '..', '..', '..', 'fixtures', 'epm');
const NB = 8;

function pointsOf(kpoints: string): { k: Vec3; w: number }[] {
  const lines = kpoints.trim().split('\n');
  const n = Number(lines[1]);
  return lines.slice(3, 3 + n).map((l) => {
    const f = l.trim().split(/\s+/).map(Number);
    return { k: [f[0]!, f[1]!, f[2]!] as Vec3, w: f[3]! };
  });
}

interface ExtremumJson {
  kind: string;
  k: number[];
  degenerateBands: number;
  masses: { towards: string; mass: number; branch?: number; direction: number[] }[];
  tensor: { principal: number[]; axes: number[][] } | null;
  warping?: { A: number; B: number; C: number; unit: string; heavy: { m100: number }; light: { m100: number } };
  dosMass: number | null;
  warnings: string[];
}

/** Plan with tensor-kpoints (default settings), run the model at the points, analyse: the edge's JSON. */
async function roundTrip(
  folder: string,
  material: EpmMaterial,
  at: 'cbm' | 'vbm',
  solver: EpmBandSolver,
  extra: string[] = [],
): Promise<{ edge: ExtremumJson; points: number; plan: string; dir: string }> {
  const io = capture();
  assert.equal(await main(['tensor-kpoints', join(ROOT, folder), '--at', at, ...extra], io), 0, io.stderr);
  const pts = pointsOf(io.stdout);
  const kpoints = Float64Array.from(pts.flatMap((p) => p.k));
  const energies = new Float64Array(pts.length * NB);
  pts.forEach((p, i) => energies.set(solver.bandsAt(p.k, NB), i * NB));
  const dir = mkdtempSync(join(tmpdir(), `vs-tensor-run-${folder}-`));
  writeFileSync(join(dir, 'POSCAR'), readFileSync(join(ROOT, folder, 'POSCAR'), 'utf8'));
  writeFileSync(join(dir, 'KPOINTS'), io.stdout);
  writeFileSync(
    join(dir, 'EIGENVAL'),
    writeEigenval({
      system: `${material.name} tensor run`,
      nIons: 2,
      electrons: material.electrons,
      nBands: NB,
      kpoints,
      weights: Float64Array.from(pts.map((p) => p.w)),
      energies: [energies],
      occupations: [insulatorOccupations(pts.length, NB, material.electrons / 2)],
    }),
  );
  const run = capture();
  assert.equal(await main(['analyze', dir, '--json'], run), 0, run.stderr);
  const report = JSON.parse(run.stdout) as { extrema: ExtremumJson[] };
  const edge = report.extrema.find((e) => e.kind === at);
  assert.ok(edge, `no ${at} in the run`);
  return { edge, points: pts.length, plan: io.stderr, dir };
}

/** Cartesian k (Å⁻¹) → fractional for the solver's lattice. */
function fractional(solver: EpmBandSolver, kc: Vec3): Vec3 {
  const b = reciprocalLattice(solver.crystal.lattice);
  // k_c = Σ f_i b_i → f = (Bᵀ)⁻¹ k_c, solved directly (3×3).
  const m: Mat3 = [
    [b[0][0], b[1][0], b[2][0]],
    [b[0][1], b[1][1], b[2][1]],
    [b[0][2], b[1][2], b[2][2]],
  ];
  const det =
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const col = (j: number): Mat3 => m.map((r, i) => r.map((x, c) => (c === j ? kc[i]! : x))) as Mat3;
  const d3 = (a: Mat3): number =>
    a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) -
    a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0]) +
    a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
  return [d3(col(0)) / det, d3(col(1)) / det, d3(col(2)) / det];
}

/** Energy of band `band` (0-based) at cartesian k. */
const energy = (solver: EpmBandSolver, kc: Vec3, band: number): number => solver.bandsAt(fractional(solver, kc), NB)[band]!;

/** Dense central differences (h = 0.002 Å⁻¹) of the model's Hessian at cartesian k0: principal masses, sorted. */
function referenceMasses(solver: EpmBandSolver, k0: Vec3, band: number): number[] {
  const h = 0.002;
  const E = (d: Vec3): number => energy(solver, [k0[0] + d[0], k0[1] + d[1], k0[2] + d[2]], band);
  const e0 = E([0, 0, 0]);
  const H: number[][] = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const unit = (i: number, s: number): Vec3 => [0, 1, 2].map((j) => (j === i ? s * h : 0)) as Vec3;
  for (let i = 0; i < 3; i++) H[i]![i] = (E(unit(i, 1)) + E(unit(i, -1)) - 2 * e0) / (h * h);
  for (let i = 0; i < 3; i++)
    for (let j = i + 1; j < 3; j++) {
      const d = (si: number, sj: number): Vec3 => [0, 1, 2].map((c) => (c === i ? si * h : c === j ? sj * h : 0)) as Vec3;
      H[i]![j] = H[j]![i] = (E(d(1, 1)) + E(d(-1, -1)) - E(d(1, -1)) - E(d(-1, 1))) / (4 * h * h);
    }
  return [...symmetricEigen3(H as Mat3).values].map((l) => HBAR2_OVER_ME_EV_A2 / l).sort((a, b) => a - b);
}

/** The true minimum along a line from k0 in direction u (golden section, ±0.05 Å⁻¹). */
function minimumAlong(solver: EpmBandSolver, k0: Vec3, u: Vec3, band: number): Vec3 {
  let a = -0.05;
  let b = 0.05;
  const f = (t: number): number => energy(solver, [k0[0] + t * u[0], k0[1] + t * u[1], k0[2] + t * u[2]], band);
  const r = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 60; i++) {
    const c = b - r * (b - a);
    const d = a + r * (b - a);
    if (f(c) < f(d)) b = d;
    else a = c;
  }
  const t = (a + b) / 2;
  return [k0[0] + t * u[0], k0[1] + t * u[1], k0[2] + t * u[2]];
}

/**
 * Full-sphere DOS mass of the model's three top valence bands at Γ (reference for the tests below).
 */
function sphereDosMass(solver: EpmBandSolver): number {
  // Reference: the model's three top valence bands at Γ, curvature by central difference (h = 0.003 Å⁻¹,
  // inversion makes E(−k) = E(k)) along 8 × 16 directions of a product rule (Gauss–Legendre nodes in cos θ on
  // [0, 1] from the 8-point table of Abramowitz & Stegun 25.4.30 (memory; the weights sum to 2), midpoint in φ
  // over [0, π/2)), each branch ⟨|m|^(3/2)⟩^(2/3), combined as (Σ m_i^(3/2))^(2/3) (physics.md step 9).
  const x8 = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
  const w8 = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];
  const nodes = [...x8.map((x, i) => ({ x: -x, w: w8[i]! })), ...x8.map((x, i) => ({ x, w: w8[i]! }))];
  const h = 0.003;
  const e0 = solver.bandsAt([0, 0, 0], NB)[3]!;
  const acc = [0, 0, 0];
  for (const { x, w } of nodes) {
    const mu = (x + 1) / 2;
    const s = Math.sqrt(1 - mu * mu);
    for (let j = 0; j < 16; j++) {
      const ph = ((j + 0.5) * (Math.PI / 2)) / 16;
      const e = [...solver.bandsAt(fractional(solver, [h * s * Math.cos(ph), h * s * Math.sin(ph), h * mu]), NB).slice(1, 4)].sort(
        (p, q) => q - p,
      );
      e.forEach((v, b) => (acc[b] = acc[b]! + ((w / 2) * Math.abs(HBAR2_OVER_ME_EV_A2 / ((2 * (v - e0)) / (h * h))) ** 1.5) / 16));
    }
  }
  return acc.reduce((t, a) => t + a, 0) ** (2 / 3);
}

describe('tensor runs on the EPM model (Cohen & Bergstresser 1966): plan, run, read back', function () {
  this.timeout(300000);

  for (const [folder, material, where] of [
    ['si', SILICON, 'Δ'],
    ['ge', GERMANIUM, 'L'],
    ['gaas', GALLIUM_ARSENIDE, 'Γ'],
  ] as const) {
    it(`${material.name}: the conduction tensor at default settings is within 1 % of dense central differences (${where})`, async () => {
      const solver = new EpmBandSolver(unstrainedCrystal(material));
      const { edge, points, plan } = await roundTrip(folder, material, 'cbm', solver);
      assert.ok(edge.tensor, JSON.stringify(edge.warnings));
      const a = material.latticeConstant;
      const u = (2 * Math.PI) / a;
      // Where the model's minimum is: Δ on Γ–X (0, y, 0)2π/a near y = 0.85 (located here by golden section),
      // L = (½, ½, ½)2π/a, Γ (Cohen & Bergstresser model; fixtures/epm/README.md).
      const k0: Vec3 =
        where === 'Δ'
          ? minimumAlong(solver, [0, 0.85 * u, 0], [0, 1, 0], material.electrons / 2)
          : where === 'L'
            ? [u / 2, u / 2, u / 2]
            : [0, 0, 0];
      const ref = referenceMasses(solver, k0, material.electrons / 2);
      const got = [...edge.tensor.principal].sort((x, y) => x - y);
      for (let i = 0; i < 3; i++)
        assert.ok(
          Math.abs(got[i]! / ref[i]! - 1) < 0.01,
          `${material.name} m${i + 1}: ${got[i]} vs dense ${ref[i]} (${points} points; ${plan})`,
        );
    });
  }

  it('Si valence maximum: the DOS mass of the three branches is within 2 % of a full-sphere average of the model', async () => {
    const solver = new EpmBandSolver(unstrainedCrystal(SILICON));
    const { edge } = await roundTrip('si', SILICON, 'vbm', solver);
    const ref = sphereDosMass(solver);
    assert.ok(edge.dosMass !== null);
    assert.ok(Math.abs(edge.dosMass / ref - 1) < 0.02, `${edge.dosMass} vs sphere ${ref}`);
  });

  it('Si path only: the path-limited valence DOS mass carries an error estimate that covers the full-sphere value', async () => {
    const solver = new EpmBandSolver(unstrainedCrystal(SILICON));
    const run = capture();
    assert.equal(await main(['analyze', join(ROOT, 'si'), '--json'], run), 0, run.stderr);
    const vbm = (JSON.parse(run.stdout) as { extrema: (ExtremumJson & { dosMassPathLimited?: { error: number } })[] }).extrema.find(
      (e) => e.kind === 'vbm',
    )!;
    assert.ok(vbm.dosMass !== null && vbm.dosMassPathLimited);
    const ref = sphereDosMass(solver);
    assert.ok(
      Math.abs(vbm.dosMass - ref) <= vbm.dosMassPathLimited.error,
      `${vbm.dosMass} ± ${vbm.dosMassPathLimited.error} vs sphere ${ref}`,
    );
  });

  it('Si, hybrid layout: the weighted mesh first, the tensor points with weight 0; the tensor is found among them', async () => {
    const solver = new EpmBandSolver(unstrainedCrystal(SILICON));
    const dir = mkdtempSync(join(tmpdir(), 'vs-tensor-hybrid-'));
    // A small weighted list standing for the self-consistent mesh (IBZKPT layout): Γ, X, L and a general point.
    const mesh = join(dir, 'IBZKPT');
    writeFileSync(mesh, 'mesh\n4\nReciprocal lattice\n 0 0 0 1\n 0.5 0 0.5 3\n 0.5 0.5 0.5 4\n 0.25 0.125 0.375 24\n');
    const plain = await roundTrip('si', SILICON, 'cbm', solver);
    const hybrid = await roundTrip('si', SILICON, 'cbm', solver, ['--for', 'hybrid', '--mesh', mesh]);
    assert.ok(hybrid.edge.tensor && plain.edge.tensor);
    assert.equal(hybrid.points, plain.points + 4);
    // The same points give the same tensor (the mesh lies far from the shells).
    hybrid.edge.tensor.principal.forEach((m, i) => assert.ok(Math.abs(m / plain.edge.tensor!.principal[i]! - 1) < 1e-9));
    // Planning again from that run (weighted points followed by zero-weight ones): hybrid is the default. The
    // reader keeps only the zero-weight points, so the mesh must come from --mesh; without it, only zeros.
    const again = capture();
    assert.equal(await main(['tensor-kpoints', hybrid.dir, '--at', 'cbm'], again), 0, again.stderr);
    assert.ok(pointsOf(again.stdout).every((p) => p.w === 0));
    assert.match(again.stderr, /no weighted mesh/);
    const withMesh = capture();
    assert.equal(await main(['tensor-kpoints', hybrid.dir, '--at', 'cbm', '--mesh', mesh], withMesh), 0, withMesh.stderr);
    assert.deepEqual(
      pointsOf(withMesh.stdout)
        .slice(0, 4)
        .map((p) => p.w),
      [1, 3, 4, 24],
    );
  });

  for (const [folder, material] of [
    ['si', SILICON],
    ['ge', GERMANIUM],
    ['gaas', GALLIUM_ARSENIDE],
  ] as const) {
    it(`${material.name} valence maximum: every branch, heavy and light masses along [100] within 2 %, and the warped fit`, async () => {
      const solver = new EpmBandSolver(unstrainedCrystal(material));
      const { edge, points } = await roundTrip(folder, material, 'vbm', solver);
      assert.equal(edge.degenerateBands, 3); // threefold Γ maximum without spin-orbit (physics.md)
      assert.equal(edge.tensor, null);
      assert.ok(edge.masses.length >= 9, `${edge.masses.length} masses`);
      assert.deepEqual([...new Set(edge.masses.map((m) => m.branch))].sort(), [1, 2, 3]);
      // Reference: dense central differences (h = 0.002 Å⁻¹) of the model along [100] at Γ, bands sorted.
      const h = 0.002;
      const at = (t: number): number[] => [...solver.bandsAt(fractional(solver, [t, 0, 0]), NB).slice(1, 4)].sort((x, y) => y - x);
      const [p, z, m] = [at(h), at(0), at(-h)];
      const ref = [0, 1, 2].map((b) => HBAR2_OVER_ME_EV_A2 / ((p[b]! + m[b]! - 2 * z[b]!) / (h * h)));
      const along100 = edge.masses.filter((x) => x.towards === '[100]');
      assert.equal(along100.length, 3);
      const heavy = along100.find((x) => x.branch === 1)!.mass;
      const light = along100.find((x) => x.branch === 3)!.mass;
      assert.ok(Math.abs(heavy / ref[0]! - 1) < 0.02, `heavy ${heavy} vs ${ref[0]} (${points} points)`);
      assert.ok(Math.abs(light / ref[2]! - 1) < 0.02, `light ${light} vs ${ref[2]}`);
      assert.ok(edge.warping, JSON.stringify(edge.warnings));
      assert.equal(edge.warping.unit, 'hbar^2/(2 m_e)');
      assert.ok(edge.warping.A < 0); // a maximum: A negative (holes; Dresselhaus, Kip & Kittel sign convention for energies)
      assert.ok(edge.warping.B > 0 && edge.warping.C > 0);
      // Without spin-orbit three branches meet; the two-branch form is then an approximation and the report says
      // so beside the fit (its fidelity on the form itself is tested in warpedBands.test.ts).
      assert.ok(edge.warnings.some((w) => /Three bands without spin-orbit/.test(w)));
      // Its light [100] mass is of the right size (same sign, within 20 % of the direct line: the approximation).
      assert.ok(Math.abs(edge.warping.light.m100 / ref[2]! - 1) < 0.2, `warped light ${edge.warping.light.m100} vs ${ref[2]}`);
      assert.ok(edge.dosMass !== null && edge.dosMass > 0);
    });
  }
});
