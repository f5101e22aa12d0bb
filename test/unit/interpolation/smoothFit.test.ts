import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { buildStarBasis, starValues } from '../../../src/core/interpolation/starBasis';
import { roughness } from '../../../src/core/interpolation/roughness';
import { SmoothStarFit, toCartesian } from '../../../src/core/interpolation/smoothFit';
import { choleskyFactor, choleskySolve } from '../../../src/core/interpolation/cholesky';
import { latticeSymmetry } from '../../support/unitSymmetry';

// The published conditions of the smoothness-constrained fit (Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721
// (1988)): (1) the interpolant passes exactly through every data point; (2) it minimises Σ_{m≥1} ρ_m c_m² among
// all star sums that do, i.e. (Lagrange) the vector (ρ_m c_m)_{m≥1} lies in the span of the rows
// ΔS_m(k_i) = S_m(k_i) − S_m(k_r). Checked here with arbitrary data (any values must be fitted this way).

describe('smoothness-constrained star fit: exactness and minimum roughness', function () {
  this.timeout(30000);
  before(async () => {
    await ensureSymmetryReady();
  });

  it('a diamond 6×6×6 mesh with arbitrary energies: exact at the data, minimum roughness, leave-one-out exact at the rest', () => {
    const lattice: Mat3 = [
      [0, 2.715, 2.715],
      [2.715, 0, 2.715],
      [2.715, 2.715, 0],
    ];
    const sym = crystalSymmetry({ lattice, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const { kpoints } = irreducibleMesh([6, 6, 6], [0, 0, 0], sym.reciprocalPointGroup);
    const n = kpoints.length / 3;
    const basis = buildStarBasis(lattice, sym.pointGroup, 6 * n);
    // Stars are whole: sizes divide the order of the group with inversion (48 for m-3m; Lagrange's theorem).
    for (let m = 0; m < basis.count; m++) assert.equal(48 % basis.size[m]!, 0);
    for (let m = 1; m < basis.count; m++) assert.ok(basis.radius[m]! >= basis.radius[m - 1]! - 1e-9);
    const kCart = toCartesian(kpoints, reciprocalLattice(lattice));
    const fit = new SmoothStarFit(basis, kCart);
    const energies = Float64Array.from({ length: n }, (_, i) => Math.sin(1.7 * i) + 0.1 * i);
    const interp = fit.fit(energies);
    const k = (i: number): [number, number, number] => [kCart[3 * i]!, kCart[3 * i + 1]!, kCart[3 * i + 2]!];
    for (let i = 0; i < n; i++) assert.ok(Math.abs(interp.value(k(i)) - energies[i]!) < 1e-9, `point ${i}`);
    // Minimum roughness: project g = (ρ_m c_m) on the span of the ΔS rows; the remainder must vanish.
    const M = basis.count;
    const rows: Float64Array[] = [];
    const s0 = starValues(basis, k(0));
    for (let i = 1; i < n; i++) {
      const si = starValues(basis, k(i));
      rows.push(Float64Array.from({ length: M - 1 }, (_, j) => si[j + 1]! - s0[j + 1]!));
    }
    const g = Float64Array.from(
      { length: M - 1 },
      (_, j) => roughness(basis.radius[j + 1]!, basis.radius[1]!) * interp.coefficients[j + 1]!,
    );
    const r = rows.length;
    const gram = new Float64Array(r * r);
    const rhs = new Float64Array(r);
    for (let a = 0; a < r; a++) {
      for (let b = 0; b < r; b++) gram[a * r + b] = rows[a]!.reduce((acc, x, j) => acc + x * rows[b]![j]!, 0);
      rhs[a] = rows[a]!.reduce((acc, x, j) => acc + x * g[j]!, 0);
    }
    const l = choleskyFactor(gram, r);
    assert.ok(l);
    const coef = choleskySolve(l, r, rhs);
    let rest = 0;
    let norm = 0;
    for (let j = 0; j < M - 1; j++) {
      let p = 0;
      for (let a = 0; a < r; a++) p += coef[a]! * rows[a]![j]!;
      rest += (g[j]! - p) ** 2;
      norm += g[j]! ** 2;
    }
    assert.ok(Math.sqrt(rest / norm) < 1e-8, String(Math.sqrt(rest / norm)));
    // Leave-one-out: exact at every other point, not (in general) at the one left out.
    const reduced = fit.fit(energies, 3);
    for (let i = 0; i < n; i++) if (i !== 3) assert.ok(Math.abs(reduced.value(k(i)) - energies[i]!) < 1e-9);
    assert.ok(Math.abs(reduced.value(k(3)) - energies[3]!) > 1e-6);
    // Leaving out the reference point (the first) works the same way.
    const noFirst = fit.fit(energies, 0);
    for (let i = 1; i < n; i++) assert.ok(Math.abs(noFirst.value(k(i)) - energies[i]!) < 1e-9);
  });

  it('the roughness weight has the published form with c1 = c2 = 3/4', () => {
    // ρ(R) = (1 − c1 (R/R_min)²)² + c2 (R/R_min)⁶ (Pickett, Krakauer & Allen 1988): at R_min (1/4)² + 3/4, at 2R_min (1 − 3)² + 48.
    assert.ok(Math.abs(roughness(1, 1) - 0.8125) < 1e-15);
    assert.ok(Math.abs(roughness(2, 1) - 52) < 1e-12);
    assert.ok(Math.abs(roughness(0, 1) - 1) < 1e-15);
  });

  it('the analytic gradient and Hessian agree with finite differences of the interpolant', () => {
    const lattice: Mat3 = [
      [3, 0, 0],
      [0, 3.2, 0],
      [0, 0, 3.5],
    ];
    const sym = latticeSymmetry(lattice);
    const { kpoints } = irreducibleMesh([6, 6, 6], [0, 0, 0], sym.reciprocalPointGroup);
    const n = kpoints.length / 3;
    const fit = new SmoothStarFit(buildStarBasis(lattice, sym.pointGroup, 8 * n), toCartesian(kpoints, reciprocalLattice(lattice)));
    const interp = fit.fit(Float64Array.from({ length: n }, (_, i) => Math.cos(0.9 * i)));
    const k0: [number, number, number] = [0.31, -0.22, 0.47];
    const d = interp.derivatives(k0);
    assert.ok(Math.abs(d.value - interp.value(k0)) < 1e-12);
    const h = 1e-4;
    for (let a = 0; a < 3; a++) {
      const e = [0, 0, 0];
      e[a] = h;
      const plus = interp.derivatives([k0[0] + e[0]!, k0[1] + e[1]!, k0[2] + e[2]!]);
      const minus = interp.derivatives([k0[0] - e[0]!, k0[1] - e[1]!, k0[2] - e[2]!]);
      // Central differences, error O(h²) (common practice).
      assert.ok(Math.abs((plus.value - minus.value) / (2 * h) - d.gradient[a]!) < 1e-6);
      for (let b = 0; b < 3; b++) assert.ok(Math.abs((plus.gradient[b]! - minus.gradient[b]!) / (2 * h) - d.hessian[a]![b]!) < 1e-5);
    }
  });
});
