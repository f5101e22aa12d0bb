import assert from 'node:assert/strict';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { MeshInterpolation } from '../../../src/core/interpolation/meshInterpolation';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { latticeSymmetry } from '../../support/unitSymmetry';
import { fccLattice } from '../../support/bandStructure';

// Nearest-neighbour tight-binding bands (analytic models, common practice: Ashcroft & Mermin ch. 10):
// simple cubic E = −2t Σ_i cos(k_i a); fcc E = −t Σ_{12 neighbours R} cos(k·R). Both are sums of the first
// star function, so the star interpolation must reproduce them up to its alias error, and the analytic
// Hessian gives the masses: sc m = ħ²/(2 t a²) at Γ (−that at R); fcc m = ħ²/(t Σ_R R_x²) at Γ.

/** Deterministic points in [−½, ½)³ (a linear congruential sequence, so the test is repeatable). */
function pseudoRandomK(count: number): Vec3[] {
  let s = 12345;
  const next = (): number => (s = (1103515245 * s + 12345) % 2147483648) / 2147483648 - 0.5;
  return Array.from({ length: count }, () => [next(), next(), next()] as Vec3);
}

function cartesian(k: Vec3, b: Mat3): Vec3 {
  return [0, 1, 2].map((x) => k[0] * b[0][x]! + k[1] * b[1][x]! + k[2] * b[2][x]!) as Vec3;
}

describe('star interpolation of tight-binding bands sampled on a mesh', function () {
  this.timeout(60000);
  before(async () => {
    await ensureSymmetryReady();
  });

  it('simple cubic, 16×16×16 mesh: values within 1e-6 of the band width at random k; masses at Γ and R to 2e-4', () => {
    const a = 3;
    const t = 0.5;
    const lattice: Mat3 = [
      [a, 0, 0],
      [0, a, 0],
      [0, 0, a],
    ];
    const sym = latticeSymmetry(lattice);
    const energy = (k: Vec3): number =>
      -2 * t * (Math.cos(2 * Math.PI * k[0]) + Math.cos(2 * Math.PI * k[1]) + Math.cos(2 * Math.PI * k[2]));
    const { kpoints, weights } = irreducibleMesh([16, 16, 16], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const band = new Float64Array(nk);
    for (let i = 0; i < nk; i++) band[i] = energy([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!]);
    const made = MeshInterpolation.create({ lattice, kpoints, weights, bands: [band], sym });
    assert.ok(made.run, made.reason ?? '');
    const run = made.run;
    const width = 12 * t; // band width of the sc band: from −6t to +6t (analytic)
    for (const k of pseudoRandomK(60)) {
      const err = Math.abs(run.energyAt(0, k) - energy(k));
      assert.ok(err < 1e-6 * width, `${JSON.stringify(k)}: ${err}`);
    }
    const mass = HBAR2_OVER_ME_EV_A2 / (2 * t * a * a); // analytic curvature 2ta² at Γ
    const min = run.extrema(0, 'min');
    assert.equal(min.extrema.length, 1);
    const gamma = min.extrema[0]!;
    assert.ok(Math.hypot(...gamma.k) < 1e-9, JSON.stringify(gamma.k));
    for (const m of gamma.masses) assert.ok(Math.abs(m / mass - 1) < 2e-4, `${m} vs ${mass}`);
    assert.equal(gamma.valleyDegeneracy, 1);
    assert.equal(gamma.determined, true);
    // Isotropic single valley: both averaged masses equal the mass (their definitions, physics.md).
    assert.ok(Math.abs(gamma.dosMass! / mass - 1) < 2e-4 && Math.abs(gamma.conductivityMass! / mass - 1) < 2e-4);
    // The quoted uncertainty covers the actual error of the mass.
    gamma.masses.forEach((m, i) =>
      assert.ok(Math.abs(m - mass) <= gamma.uncertainty.masses[i]!, `${m - mass} vs ${gamma.uncertainty.masses[i]}`),
    );
    const max = run.extrema(0, 'max').extrema;
    assert.equal(max.length, 1);
    assert.deepEqual(
      max[0]!.k.map((x) => Math.abs(x)),
      [0.5, 0.5, 0.5],
    ); // R, the band top (analytic)
    for (const m of max[0]!.masses) assert.ok(Math.abs(m / -mass - 1) < 2e-4, String(m));
  });

  it('fcc, 12×12×12 mesh: the minimum at Γ with the analytic isotropic mass', () => {
    const a = 5.43;
    const h = a / 2;
    const t = 0.3;
    const lattice = fccLattice(a);
    const sym = latticeSymmetry(lattice);
    const b = reciprocalLattice(lattice);
    const neighbours: Vec3[] = [];
    for (const s of [
      [0, 1, 1],
      [0, 1, -1],
      [1, 0, 1],
      [1, 0, -1],
      [1, 1, 0],
      [1, -1, 0],
    ]) {
      neighbours.push(s.map((x) => x * h) as Vec3, s.map((x) => -x * h) as Vec3);
    }
    const energy = (k: Vec3): number => {
      const c = cartesian(k, b);
      return -t * neighbours.reduce((e, r) => e + Math.cos(c[0] * r[0] + c[1] * r[1] + c[2] * r[2]), 0);
    };
    const { kpoints, weights } = irreducibleMesh([12, 12, 12], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const band = new Float64Array(nk);
    for (let i = 0; i < nk; i++) band[i] = energy([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!]);
    const run = MeshInterpolation.create({ lattice, kpoints, weights, bands: [band], sym }).run!;
    const sumRx2 = neighbours.reduce((s, r) => s + r[0] * r[0], 0); // 8 h² (analytic)
    const mass = HBAR2_OVER_ME_EV_A2 / (t * sumRx2);
    const gamma = run.extrema(0, 'min').extrema[0]!;
    assert.ok(Math.hypot(...gamma.k) < 1e-9);
    for (const m of gamma.masses) assert.ok(Math.abs(m / mass - 1) < 1e-3, `${m} vs ${mass}`);
    for (const k of pseudoRandomK(30)) assert.ok(Math.abs(run.energyAt(0, k) - energy(k)) < 1e-5 * 16 * t);
  });

  it('hexagonal, 12×12×10 mesh: a triangular-lattice band with interlayer hopping, values and the masses at Γ', () => {
    // E = −2t Σ_{3 in-plane neighbours} cos(k·R) − 2t_z cos(k_z c) (analytic, common practice); at Γ the
    // in-plane curvature is 2t · (3a²/2) = 3ta², the out-of-plane one 2 t_z c².
    const a = 2.5;
    const c = 4;
    const t = 0.4;
    const tz = 0.1;
    const lattice: Mat3 = [
      [a, 0, 0],
      [-a / 2, (Math.sqrt(3) / 2) * a, 0],
      [0, 0, c],
    ];
    const sym = latticeSymmetry(lattice);
    assert.equal(sym.pointGroup.length, 24); // 6/mmm (International Tables)
    const b = reciprocalLattice(lattice);
    const inPlane: Vec3[] = [
      [a, 0, 0],
      [-a / 2, (Math.sqrt(3) / 2) * a, 0],
      [a / 2, (Math.sqrt(3) / 2) * a, 0],
    ];
    const energy = (k: Vec3): number => {
      const q = cartesian(k, b);
      return -2 * t * inPlane.reduce((e, r) => e + Math.cos(q[0] * r[0] + q[1] * r[1]), 0) - 2 * tz * Math.cos(q[2] * c);
    };
    const { kpoints, weights } = irreducibleMesh([12, 12, 10], [0, 0, 0], sym.reciprocalPointGroup);
    const nk = kpoints.length / 3;
    const band = new Float64Array(nk);
    for (let i = 0; i < nk; i++) band[i] = energy([kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!]);
    const made = MeshInterpolation.create({ lattice, kpoints, weights, bands: [band], sym });
    assert.ok(made.run, made.reason ?? '');
    for (const k of pseudoRandomK(40)) assert.ok(Math.abs(made.run.energyAt(0, k) - energy(k)) < 1e-4, JSON.stringify(k));
    const gamma = made.run.extrema(0, 'min').extrema[0]!;
    assert.ok(Math.hypot(...gamma.k) < 1e-9);
    const sorted = [...gamma.masses].sort((x, y) => x - y);
    const mPlane = HBAR2_OVER_ME_EV_A2 / (3 * t * a * a);
    const mAxis = HBAR2_OVER_ME_EV_A2 / (2 * tz * c * c);
    assert.ok(Math.abs(sorted[0]! / mPlane - 1) < 2e-3 && Math.abs(sorted[1]! / mPlane - 1) < 2e-3, `${sorted} vs ${mPlane}`);
    // Tolerance: the method's alias leakage into the curvature, ρ(c)/ρ(9c)·9² + … ≈ 2e-4 here (roughness.ts; estimate).
    assert.ok(Math.abs(sorted[2]! / mAxis - 1) < 2e-3, `${sorted[2]} vs ${mAxis}`);
  });
});
