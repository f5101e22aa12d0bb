import assert from 'node:assert/strict';
import {
  cartesianDisplacement,
  displacementOperations,
  displacementOrbit,
  kpointLayoutFor,
  planTensorRun,
  stepForEnergy,
  writeTensorKpoints,
} from '../../../src/core/lattice/tensorKpoints';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { SPHERE_26_WEIGHTS } from '../../../src/core/analysis/tensorRun';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import type { Vec3 } from '../../../src/core/model';
import { diamondStructure, fccLattice, parabolicBand, pointsModel } from '../../support/models';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';

describe('tensor-run k-points (two shells, little group of k)', () => {
  const a = 5.43;
  const lattice = fccLattice(a);
  before(async () => {
    await ensureSymmetryReady();
  });

  it('places the centre and two shells at h and 2h along 18 (26 with body diagonals) directions', () => {
    const h = 0.02;
    for (const [body, n] of [
      [false, 18],
      [true, 26],
    ] as const) {
      const plan = planTensorRun([0.425, 0, 0.425], h, lattice, null, body);
      assert.equal(plan.allPoints.length, 1 + 2 * n);
      assert.equal(plan.points.length, plan.allPoints.length); // no symmetry given: every point written
      const r = plan.allPoints.map((k) => Math.hypot(...cartesianDisplacement(k, plan.center, lattice)));
      // Geometry of the plan (by construction): n points at h, n at 2h, the centre at 0.
      assert.equal(r.filter((x) => Math.abs(x - h) < 1e-12).length, n);
      assert.equal(r.filter((x) => Math.abs(x - 2 * h) < 1e-12).length, n);
      assert.equal(new Set(plan.allPoints.map((k) => k.map((x) => x.toFixed(9)).join(','))).size, plan.allPoints.length);
    }
  });

  it('at Γ of diamond writes one point per orbit, and the orbits give back every point', () => {
    const sym = crystalSymmetry(diamondStructure(a, 'Si'));
    const ops = displacementOperations(sym.reciprocalPointGroup, [0, 0, 0]);
    const plan = planTensorRun([0, 0, 0], 0.02, lattice, ops, true);
    // O_h: the axes, face diagonals and body diagonals are one orbit each, per shell (International Tables, Vol. A).
    assert.equal(plan.points.length, 7);
    assert.equal(
      plan.multiplicity.reduce((s, m) => s + m, 0),
      plan.allPoints.length,
    );
    const key = (k: Vec3): string => k.map((x) => x.toFixed(8)).join(',');
    const expanded = new Set(plan.points.flatMap((p) => displacementOrbit(p, ops).map(key)));
    assert.deepEqual([...expanded].sort(), plan.allPoints.map(key).sort());
  });

  it('at L keeps only the operations that map L to ±L without a lattice translation, so both sides of Γ–L are written', () => {
    const sym = crystalSymmetry(diamondStructure(a, 'Si'));
    const ops = displacementOperations(sym.reciprocalPointGroup, [0.5, 0.5, 0.5]);
    // D3d fixes the [111] axis: 12 operations, each with the sign that maps L to +L or −L exactly (group theory).
    assert.equal(ops.length, 12);
    // No exact operation sends an axial displacement d from L to −d (only a lattice translation would): both
    // sides of the axes through L are computed, so the differences there are centred. (Along a two-fold axis
    // perpendicular to [111], the rotation with time reversal does relate them exactly.)
    const plan = planTensorRun([0.5, 0.5, 0.5], 0.02, lattice, ops, false);
    const axial = plan.points
      .map((k) => cartesianDisplacement(k, plan.center, lattice))
      .filter((d) => d.filter((x) => Math.abs(x) > 1e-9).length === 1);
    assert.ok(axial.length >= 4, String(axial.length));
    for (const k of plan.points.slice(1)) {
      const d: Vec3 = [k[0] - 0.5, k[1] - 0.5, k[2] - 0.5];
      const c = cartesianDisplacement(k, plan.center, lattice);
      if (c.filter((x) => Math.abs(x) > 1e-9).length !== 1) continue;
      const orbit = displacementOrbit(d, ops);
      assert.ok(!orbit.some((o) => Math.abs(o[0] + d[0]) + Math.abs(o[1] + d[1]) + Math.abs(o[2] + d[2]) < 1e-12));
    }
    assert.ok(plan.points.length > 10 && plan.points.length < plan.allPoints.length, `${plan.points.length} of ${plan.allPoints.length}`);
  });

  it('chooses h so a band of mass m moves ΔE at h: ħ²h²/(2 m m_e) = ΔE (definition of the effective mass)', () => {
    const h = stepForEnergy(0.067, 0.01, HBAR2_OVER_ME_EV_A2);
    assert.ok(Math.abs((HBAR2_OVER_ME_EV_A2 * h * h) / (2 * 0.067) - 0.01) < 1e-15);
    assert.throws(() => planTensorRun([0, 0, 0], 0, lattice, null, false), RangeError);
    assert.throws(() => planTensorRun([0, 0, 0], Number.NaN, lattice, null, false), RangeError);
  });

  it('writes weights by run type: 1 for nscf; mesh first with its weights, then zeros, for hybrid', () => {
    const plan = planTensorRun([0, 0, 0], 0.01, lattice, null, false);
    const nscf = writeTensorKpoints(plan, 'vasp', 'Γ', 'nscf').trim().split('\n');
    assert.equal(nscf[1], '37');
    assert.equal(nscf[2], 'Reciprocal');
    assert.ok(nscf.slice(3).every((l) => / 1$/.test(l)));
    const mesh = {
      k: [
        [0, 0, 0],
        [0.5, 0, 0],
      ] as Vec3[],
      w: [1, 6],
    };
    const hyb = writeTensorKpoints(plan, 'vasp', 'Γ', 'hybrid', mesh).trim().split('\n');
    assert.equal(hyb[1], String(37 + 2));
    assert.match(hyb[3]!, / 1$/);
    assert.match(hyb[4]!, / 6$/);
    assert.ok(hyb.slice(5).every((l) => / 0$/.test(l)));
    assert.equal(kpointLayoutFor('vasp-eigenval'), 'vasp');
    assert.equal(kpointLayoutFor('qe-xml'), 'qe');
    assert.equal(kpointLayoutFor('castep-bands'), 'castep');
    assert.equal(kpointLayoutFor('wannier90-band'), 'list');
    const qe = writeTensorKpoints(plan, 'qe', 'Γ', 'nscf').trim().split('\n');
    assert.equal(qe[1], 'K_POINTS crystal');
    assert.equal(qe.length, 3 + 37);
    const castep = writeTensorKpoints(plan, 'castep', 'Γ', 'nscf').trim().split('\n');
    assert.equal(castep[castep.length - 1], '%ENDBLOCK SPECTRAL_KPOINT_LIST');
    assert.equal(
      writeTensorKpoints(plan, 'list', 'Γ', 'nscf')
        .trim()
        .split('\n')
        .filter((l) => !l.startsWith('#')).length,
      37,
    );
  });

  it('the 26-direction spherical rule integrates even monomials up to degree 7 exactly (analytic sphere averages)', () => {
    const dirs: { u: Vec3; w: number }[] = [];
    for (let x = -1; x <= 1; x++)
      for (let y = -1; y <= 1; y++)
        for (let z = -1; z <= 1; z++) {
          const nz = (x ? 1 : 0) + (y ? 1 : 0) + (z ? 1 : 0);
          if (!nz) continue;
          const n = Math.sqrt(nz);
          dirs.push({
            u: [x / n, y / n, z / n],
            w: nz === 1 ? SPHERE_26_WEIGHTS.axial : nz === 2 ? SPHERE_26_WEIGHTS.face : SPHERE_26_WEIGHTS.body,
          });
        }
    const avg = (f: (u: Vec3) => number): number => dirs.reduce((s, d) => s + d.w * f(d.u), 0);
    // ⟨x^2a y^2b z^2c⟩ over the sphere = (2a−1)!!(2b−1)!!(2c−1)!!/(2n+1)!!, n = a + b + c (analytic).
    assert.ok(Math.abs(avg(() => 1) - 1) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 2) - 1 / 3) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 4) - 1 / 5) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 2 * u[1] ** 2) - 1 / 15) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 6) - 1 / 7) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 4 * u[1] ** 2) - 1 / 35) < 1e-14);
    assert.ok(Math.abs(avg((u) => u[0] ** 2 * u[1] ** 2 * u[2] ** 2) - 1 / 105) < 1e-14);
  });
});

describe('reading a reduced tensor run without its structure', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('says the structure is needed instead of fitting the fragment', () => {
    const a = 5.43;
    const lattice = fccLattice(a);
    const sym = crystalSymmetry(diamondStructure(a, 'Si'));
    const plan = planTensorRun([0, 0, 0], 0.02, lattice, displacementOperations(sym.reciprocalPointGroup, [0, 0, 0]), false);
    // A parabolic conduction band at Γ (mass 0.2) over a valence band: no structure given to the reader.
    const bs = pointsModel({ lattice, bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.2)], electrons: 2, kpoints: plan.points });
    const cbm = analyzeBandStructure(bs).extrema.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.tensor, null);
    assert.ok(
      cbm.warnings.some((w) => /structure file/.test(w) && /tensor run/.test(w)),
      cbm.warnings.join('\n'),
    );
    // With the structure, the same points give the model's isotropic mass (analytic: 0.2 m_e).
    const full = pointsModel({
      lattice,
      structure: diamondStructure(a, 'Si'),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.2)],
      electrons: 2,
      kpoints: plan.points,
    });
    const t = analyzeBandStructure(full).extrema.find((e) => e.kind === 'cbm')!.tensor!;
    assert.ok(
      t.principal.every((m) => Math.abs(m / 0.2 - 1) < 1e-6),
      String(t.principal),
    );
  });
});
