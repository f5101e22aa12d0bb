import assert from 'node:assert/strict';
import {
  cubicAnisotropy,
  cubicSphereAverage,
  fitWarpedBands,
  threefoldDosMasses,
  threefoldFromDirections,
  threefoldInverseMasses,
  heavyLightMasses,
  warpedDosMass,
  warpedEnergies,
  warpedInverseMass,
  type WarpingParameters,
} from '../../../src/core/analysis/warpedBands';
import type { Vec3 } from '../../../src/core/model';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { displacementOperations, planTensorRun } from '../../../src/core/lattice/tensorKpoints';
import { cubicLattice, gridModel, pointsModel, simpleCubicStructure } from '../../support/models';

/** The 26 directions ⟨100⟩, ⟨110⟩, ⟨111⟩ (unit vectors) and a few general ones. */
function directions(): Vec3[] {
  const out: Vec3[] = [];
  for (let x = -1; x <= 1; x++)
    for (let y = -1; y <= 1; y++)
      for (let z = -1; z <= 1; z++) {
        if (!x && !y && !z) continue;
        const n = Math.hypot(x, y, z);
        out.push([x / n, y / n, z / n]);
      }
  const g = Math.hypot(1, 2, 3);
  out.push([1 / g, 2 / g, 3 / g], [-3 / g, 1 / g, 2 / g]);
  return out;
}

/** Points on two shells (h, 2h) of the warped form plus an optional isotropic quartic term (eV·Å⁴). */
function samples(p: WarpingParameters, h: number, quartic = 0, round = 0) {
  const dirs = directions();
  const pts: Vec3[] = [[0, 0, 0]];
  for (const u of dirs) for (const t of [h, 2 * h]) pts.push([u[0] * t, u[1] * t, u[2] * t]);
  const d = new Float64Array(pts.length * 3);
  const upper = new Float64Array(pts.length);
  const lower = new Float64Array(pts.length);
  const r = (x: number): number => (round ? Math.round(x / round) * round : x);
  pts.forEach((k, i) => {
    d.set(k, 3 * i);
    const e = warpedEnergies(p, k);
    const k4 = (k[0] ** 2 + k[1] ** 2 + k[2] ** 2) ** 2;
    upper[i] = r(10 + e.upper + quartic * k4);
    lower[i] = r(10 + e.lower + quartic * k4);
  });
  return { d, upper, lower };
}

// Cyclotron-resonance parameters of the valence bands (Dresselhaus, Kip & Kittel, Phys. Rev. 98, 368 (1955);
// values as in physics.md, memory), in units of ħ²/2m.
const SI: WarpingParameters = { A: -4.1, B: 1.6, C: 3.3 };
const GE: WarpingParameters = { A: -13.1, B: 8.3, C: 12.5 };

describe('warped degenerate bands (Dresselhaus, Kip & Kittel form)', () => {
  it('the anisotropy function is 0, 1/4, 1/3 along [100], [110], [111] (analytic)', () => {
    assert.equal(cubicAnisotropy([1, 0, 0]), 0);
    assert.ok(Math.abs(cubicAnisotropy([1, 1, 0]) - 0.25) < 1e-15);
    assert.ok(Math.abs(cubicAnisotropy([1, 1, 1]) - 1 / 3) < 1e-15);
  });

  for (const [name, p] of [
    ['Si', SI],
    ['Ge', GE],
  ] as const) {
    it(`${name}: the form built from A, B, C is fitted back within 1 % (exact data, then 1e-6 eV rounding)`, () => {
      for (const round of [0, 1e-6]) {
        const f = fitWarpedBands(samples(p, 0.02, 0, round), false, round / Math.sqrt(12));
        assert.ok(f);
        // Built-in values (the model the samples come from): within 1 %.
        assert.ok(Math.abs(f.A / p.A - 1) < 0.01, `A ${f.A}`);
        assert.ok(Math.abs(f.B / p.B - 1) < 0.01, `B ${f.B}`);
        assert.ok(Math.abs(f.C / p.C - 1) < 0.01, `C ${f.C}`);
        assert.ok(Math.abs(f.e0 - 10) < 1e-5);
      }
    });

    it(`${name}: heavy and light masses along [100] and [111] are 1/(A ± |B|) and 1/(A ± √(B² + C²/3))`, () => {
      const f = fitWarpedBands(samples(p, 0.02), false)!;
      const hl = heavyLightMasses(f);
      // Analytic masses of the DKK form (Dresselhaus, Kip & Kittel 1955, with the parameters above).
      const heavy100 = 1 / (p.A + p.B);
      const light100 = 1 / (p.A - p.B);
      const r = Math.sqrt(p.B ** 2 + p.C ** 2 / 3);
      const heavy111 = 1 / (p.A + r);
      const light111 = 1 / (p.A - r);
      for (const [got, want] of [
        [hl.heavy.m100, heavy100],
        [hl.light.m100, light100],
        [hl.heavy.m111, heavy111],
        [hl.light.m111, light111],
      ]) {
        assert.ok(Math.abs(got! / want! - 1) < 0.01, `${got} vs ${want}`);
      }
      // Holes at a maximum: both masses negative, the heavy branch is the upper one.
      assert.equal(hl.heavyBranch, 1);
      assert.ok(hl.heavy.m100 < 0 && hl.light.m111 < 0);
    });
  }

  it('Si (memory values): heavy holes about 0.40 / 0.62 m_e along [100] / [111], light about 0.175 / 0.152', () => {
    // 1/(−4.1 ± 1.6) and 1/(−4.1 ± √(1.6² + 3.3²/3)) computed by hand (analytic, from the memory values).
    const hl = heavyLightMasses(SI);
    assert.ok(Math.abs(hl.heavy.m100 + 0.4) < 1e-3);
    assert.ok(Math.abs(hl.heavy.m111 + 0.6203) < 1e-3);
    assert.ok(Math.abs(hl.light.m100 + 0.1754) < 1e-3);
    assert.ok(Math.abs(hl.light.m111 + 0.1518) < 1e-3);
  });

  it('two shells separate the curvature from a quartic term that biases a one-shell fit', () => {
    // A strong isotropic quartic term −2000 eV·Å⁴ (both branches): the two-shell fit with the higher-order
    // invariants recovers A within 1 %, the quadratic-only fit does not (analytic model).
    const s = samples(GE, 0.03, -2000);
    const two = fitWarpedBands(s, true)!;
    const one = fitWarpedBands(s, false)!;
    assert.ok(Math.abs(two.A / GE.A - 1) < 0.01, `two shells: ${two.A}`);
    assert.ok(Math.abs(one.A / GE.A - 1) > 0.01, `one shell should be biased: ${one.A}`);
  });

  it('angular average: exact for an isotropic branch, and equal to a brute-force sphere integral otherwise', () => {
    // C = 0: the branch is isotropic, the DOS mass is |1/(A ± B)| (analytic).
    const iso: WarpingParameters = { A: -5, B: 1, C: 0 };
    assert.ok(Math.abs(warpedDosMass(iso, 1)! - 0.25) < 1e-12);
    assert.ok(Math.abs(warpedDosMass(iso, -1)! - 1 / 6) < 1e-12);
    // Reference: a fine midpoint rule over the whole sphere in (θ, φ), 800 × 1600 cells (independent rule).
    const brute = (branch: 1 | -1): number => {
      let s = 0;
      let wsum = 0;
      const nt = 800;
      const np = 1600;
      for (let i = 0; i < nt; i++) {
        const th = ((i + 0.5) * Math.PI) / nt;
        const w = Math.sin(th);
        for (let j = 0; j < np; j++) {
          const ph = ((j + 0.5) * 2 * Math.PI) / np;
          const u: Vec3 = [Math.sin(th) * Math.cos(ph), Math.sin(th) * Math.sin(ph), Math.cos(th)];
          s += w * Math.abs(warpedInverseMass(SI, u, branch)) ** -1.5;
          wsum += w;
        }
      }
      return (s / wsum) ** (2 / 3);
    };
    for (const b of [1, -1] as const) {
      const got = warpedDosMass(SI, b)!;
      assert.ok(Math.abs(got / brute(b) - 1) < 1e-5, `${got} vs ${brute(b)}`);
    }
    // The average of 1 over the sphere is 1, and of u_z² is 1/3 (analytic).
    assert.ok(Math.abs(cubicSphereAverage(() => 1) - 1) < 1e-13);
    assert.ok(Math.abs(cubicSphereAverage((u) => u[2] * u[2]) - 1 / 3) < 1e-13);
  });

  it('a branch whose curvature changes sign with direction has no DOS mass', () => {
    // A + √(B² + C² f) crosses zero between [100] and [111] when A = −2, B = 1, C = 4 (analytic).
    assert.equal(warpedDosMass({ A: -2, B: 1, C: 4 }, 1), null);
  });
});

describe('warped-band fit from a grid around a degenerate maximum', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('a simple cubic grid of the form with Ge parameters gives A, B, C within 1 % and every branch mass', () => {
    // Ge cyclotron-resonance parameters (Dresselhaus, Kip & Kittel 1955; physics.md, memory) on a 10×10×10
    // grid of a simple cubic crystal (m-3m); a conduction band far above.
    const a = 5;
    const P = { A: -13.1, B: 8.3, C: 12.5 };
    // The grid covers the zone as [0, 1)³: the form is evaluated at the image nearest Γ (a periodic model).
    const wrap = (kf: Vec3): Vec3 => kf.map((x) => ((x - Math.round(x)) * 2 * Math.PI) / a) as Vec3;
    const bs = gridModel({
      lattice: cubicLattice(a),
      structure: simpleCubicStructure(a),
      bands: [(_kc, kf) => warpedEnergies(P, wrap(kf)).lower, (_kc, kf) => warpedEnergies(P, wrap(kf)).upper, () => 50],
      electrons: 4,
      dims: [10, 10, 10],
    });
    const vbm = analyzeBandStructure(bs).extrema.find((e) => e.kind === 'vbm')!;
    assert.equal(vbm.degenerateBands, 2);
    assert.ok(vbm.warping, vbm.warnings.join('\n'));
    // The built-in parameters (the model): within 1 %.
    assert.ok(Math.abs(vbm.warping.A / P.A - 1) < 0.01, String(vbm.warping.A));
    assert.ok(Math.abs(vbm.warping.B / P.B - 1) < 0.01, String(vbm.warping.B));
    assert.ok(Math.abs(vbm.warping.C / P.C - 1) < 0.01, String(vbm.warping.C));
    assert.equal(vbm.masses.length, 6); // two branches × [100], [110], [111]
    const heavy100 = vbm.masses.find((m) => m.branch === 1 && m.towards === '[100]')!;
    // 1/(A + |B|) (analytic, Dresselhaus, Kip & Kittel form).
    assert.ok(Math.abs(heavy100.mass / (1 / (P.A + P.B)) - 1) < 0.01, String(heavy100.mass));
    assert.ok(vbm.warnings.some((w) => /Warped-band fit/.test(w)));
  });
});

describe('three degenerate bands without spin-orbit (L, M, N form of Dresselhaus, Kip & Kittel 1955)', () => {
  // Parameters of the size of silicon's (units ħ²/2m_e; illustrative, chosen here, not quoted).
  const P = { L: -6.3, M: -3.6, N: -9.1 };

  it('has eigenvalues L, M, M along [100] and (L + 2M + 2N)/3, (L + 2M − N)/3 twice along [111] (analytic)', () => {
    const a = threefoldInverseMasses(P, [1, 0, 0]);
    assert.deepEqual(
      a.map((x) => Number(x.toFixed(12))),
      [P.M, P.M, P.L],
    );
    const b = threefoldInverseMasses(P, [1, 1, 1]);
    const single = (P.L + 2 * P.M + 2 * P.N) / 3;
    const double = (P.L + 2 * P.M - P.N) / 3;
    assert.ok(Math.abs(b[0] - double) < 1e-12 && Math.abs(b[1] - double) < 1e-12 && Math.abs(b[2] - single) < 1e-12);
  });

  it('L, M, N are recovered from the branches along [100], [110], [111], and the DOS masses match a brute-force sphere', () => {
    const dirs: Vec3[] = [[1, 0, 0], [Math.SQRT1_2, Math.SQRT1_2, 0], [1, 1, 1].map((x) => x / Math.sqrt(3)) as Vec3];
    const fit = threefoldFromDirections(dirs.map((u) => ({ u, inv: threefoldInverseMasses(P, u) })))!;
    assert.ok(Math.abs(fit.L - P.L) < 1e-9 && Math.abs(fit.M - P.M) < 1e-9 && Math.abs(fit.N - P.N) < 1e-9, JSON.stringify(fit));
    const dos = threefoldDosMasses(P);
    // Reference: midpoint rule over the whole sphere, 200 × 400 cells (an independent rule).
    const s = [0, 0, 0];
    let ws = 0;
    for (let i = 0; i < 200; i++) {
      const th = ((i + 0.5) * Math.PI) / 200;
      const w = Math.sin(th);
      for (let j = 0; j < 400; j++) {
        const ph = ((j + 0.5) * 2 * Math.PI) / 400;
        const inv = threefoldInverseMasses(P, [Math.sin(th) * Math.cos(ph), Math.sin(th) * Math.sin(ph), Math.cos(th)]);
        for (let b = 0; b < 3; b++) s[b] = s[b]! + w * Math.abs(inv[b]!) ** -1.5;
        ws += w;
      }
    }
    for (let b = 0; b < 3; b++) {
      const ref = (s[b]! / ws) ** (2 / 3);
      assert.ok(Math.abs(dos[b]! / ref - 1) < 2e-3, `branch ${b + 1}: ${dos[b]} vs ${ref}`);
    }
  });
});

describe('a spinor tensor run at a fourfold maximum (heavy and light pairs)', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('reads the two-shell run back to A, B, C within 1 %, every branch, and the DOS mass of the warped form', () => {
    // Ge cyclotron-resonance parameters (Dresselhaus, Kip & Kittel 1955; physics.md, memory); each branch a
    // Kramers pair, one electron per band (spin-orbit run).
    const a = 5;
    const P = { A: -13.1, B: 8.3, C: 12.5 };
    const lattice = cubicLattice(a);
    const structure = simpleCubicStructure(a);
    const sym = crystalSymmetry(structure);
    const plan = planTensorRun([0, 0, 0], 0.01, lattice, displacementOperations(sym.reciprocalPointGroup, [0, 0, 0]), true);
    const lo = (kc: Vec3): number => warpedEnergies(P, kc).lower;
    const up = (kc: Vec3): number => warpedEnergies(P, kc).upper;
    const bs = pointsModel({ lattice, structure, bands: [lo, lo, up, up, () => 5], electrons: 4, kpoints: plan.points });
    bs.spinorbit = true;
    const vbm = analyzeBandStructure(bs).extrema.find((e) => e.kind === 'vbm')!;
    assert.equal(vbm.degenerateBands, 4);
    assert.ok(vbm.warping, vbm.warnings.join('\n'));
    assert.ok(
      Math.abs(vbm.warping.A / P.A - 1) < 0.01 && Math.abs(vbm.warping.B / P.B - 1) < 0.01 && Math.abs(vbm.warping.C / P.C - 1) < 0.01,
      JSON.stringify(vbm.warping),
    );
    // Four bands, two Kramers pairs (kramersPairs.ts): one branch per pair × [100], [110], [111].
    assert.equal(vbm.masses.length, 6);
    assert.ok(vbm.warnings.some((w) => /2 Kramers pairs/.test(w)));
    // Heavy along [111]: 1/(A + √(B² + C²/3)) (analytic, the form).
    const h111 = vbm.masses.find((m) => m.branch === 1 && m.towards === '[111]')!.mass;
    assert.ok(Math.abs(h111 * (P.A + Math.sqrt(P.B ** 2 + P.C ** 2 / 3)) - 1) < 0.01, String(h111));
    // Two spin-degenerate branches: (m_h^(3/2) + m_l^(3/2))^(2/3) of the form's angular averages.
    const expected = (warpedDosMass(P, 1)! ** 1.5 + warpedDosMass(P, -1)! ** 1.5) ** (2 / 3);
    assert.ok(vbm.dosMass !== null && Math.abs(vbm.dosMass / expected - 1) < 0.01, `${vbm.dosMass} vs ${expected}`);
  });
});
