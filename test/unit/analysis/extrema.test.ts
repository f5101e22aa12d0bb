import assert from 'node:assert/strict';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { fitExtremumAt } from '../../../src/core/analysis/massEngine';
import { massWindowScan } from '../../../src/core/analysis/windowScan';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import type { ExtremumReport, Vec3 } from '../../../src/core/model';
import {
  cosineBand,
  cosineMass,
  cubicLattice,
  ellipsoidalValley,
  fccLattice,
  kaneBand,
  lowestOf,
  parabolicBand,
  pathModel,
  type Dispersion,
  type PathLeg,
} from '../../support/models';

const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
const M: PathLeg = { label: 'M', k: [0.5, 0.5, 0] };
const R: PathLeg = { label: 'R', k: [0.5, 0.5, 0.5] };

function byKind(r: { extrema: ExtremumReport[] }, kind: string): ExtremumReport[] {
  return r.extrema.filter((e) => e.kind === kind);
}

describe('extrema and directional masses on analytic paths', () => {
  it('free electron: m* = 1 towards every direction leaving Γ, hole band m* = −0.5', () => {
    const bs = pathModel({
      lattice: cubicLattice(4),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 1)],
      electrons: 2,
      legs: [[G, X, M, G, R]],
      pointsPerSegment: 41,
    });
    const r = analyzeBandStructure(bs);
    const [cbm] = byKind(r, 'cbm');
    const [vbm] = byKind(r, 'vbm');
    assert.ok(cbm && vbm);
    assert.equal(cbm.label, 'Γ');
    assert.deepEqual(cbm.masses.map((m) => m.towards).sort(), ['M', 'R', 'X']);
    for (const m of cbm.masses) assert.ok(Math.abs(m.mass - 1) < 1e-9, `${m.towards} ${m.mass}`); // analytic m* = 1
    for (const m of vbm.masses) assert.ok(Math.abs(m.mass + 0.5) < 1e-9); // analytic −0.5 (a maximum)
    const toR = cbm.masses.find((m) => m.towards === 'R')!;
    const s = 1 / Math.sqrt(3);
    assert.ok(toR.direction.every((x) => Math.abs(x - s) < 1e-12)); // cartesian unit vector along [111]
    // At Γ (time-reversal invariant) symmetry fixes the vertex: E = c0 + c2 t² has two unknowns, so three
    // points in the 25 meV window suffice and the window does not grow.
    assert.ok(cbm.masses.every((m) => m.method === 'parabola' && m.window_meV === 25 && m.points >= 3));
  });

  it('cosine band E = −2t cos(ka): m* = ħ²/(2ta²) at Γ along [100], [110] and [111]', () => {
    const a = 3.2;
    const t = 0.6;
    const bs = pathModel({
      lattice: cubicLattice(a),
      bands: [cosineBand(-2, [-0.4, -0.4, -0.4]), cosineBand(1, [t, t, t])],
      electrons: 2,
      legs: [[G, X, M, G, R]],
      pointsPerSegment: 121,
    });
    const expected = cosineMass(t, a); // analytic: ħ²/(2ta²)
    for (const method of ['poly4', 'fd5']) {
      const [cbm] = byKind(analyzeBandStructure(bs, { method, window_meV: 25 }), 'cbm');
      assert.equal(cbm!.masses.length, 3);
      for (const m of cbm!.masses) assert.ok(Math.abs(m.mass / expected - 1) < 2e-3, `${method} ${m.towards} ${m.mass} vs ${expected}`);
    }
    // The parabola in a small window: quartic terms bias it by (ka)²-order amounts only (analytic Taylor).
    const [cbm] = byKind(analyzeBandStructure(bs, { window_meV: 10 }), 'cbm');
    for (const m of cbm!.masses) assert.ok(Math.abs(m.mass / expected - 1) < 0.01); // analytic ħ²/(2ta²)
  });

  it('finds a valley between sampled points (Si-like Δ minimum at 0.85 Γ–X) with its longitudinal mass', () => {
    const a = 5.43;
    const unit = (2 * Math.PI) / a;
    // fcc: X = (0.5, 0, 0.5) fractional = (2π/a)(0, 1, 0); the valley at 0.85 of Γ–X along y.
    const k0: Vec3 = [0, 0.85 * unit, 0];
    const bs = pathModel({
      lattice: fccLattice(a),
      bands: [parabolicBand(-0.5, -0.3), ellipsoidalValley(0.6, k0, [0, 1, 0], 0.92, 0.19)],
      electrons: 2,
      legs: [[G, { label: 'X', k: [0.5, 0, 0.5] }, { label: 'W', k: [0.5, 0.25, 0.75] }]],
      pointsPerSegment: 40,
    });
    const [cbm] = byKind(analyzeBandStructure(bs), 'cbm');
    assert.ok(cbm);
    // The sampled point nearest 0.85 (steps of 1/39 along Γ–X).
    assert.ok(Math.abs(cbm.k[0] / 0.5 - 0.85) < 1 / 39); // model input 0.85, one step of 1/39
    const ml = cbm.masses.filter((m) => m.towards === 'Γ' || m.towards === 'X');
    assert.equal(ml.length, 2);
    for (const m of ml) assert.ok(Math.abs(m.mass - 0.92) < 1e-6, `${m.towards} ${m.mass}`); // model m_l = 0.92
    assert.ok(Math.abs(Math.abs(ml[0]!.direction[1]) - 1) < 1e-12); // along y
    // The free vertex locates the minimum at 0.85 of Γ–X, i.e. fractional (0.425, 0, 0.425) (model input).
    const note = cbm.warnings.find((w) => /lies between sampled points/.test(w));
    assert.ok(note, JSON.stringify(cbm.warnings));
    const m = /k ≈ \(([-\d.]+), ([-\d.]+), ([-\d.]+)\)/.exec(note)!;
    assert.ok(Math.abs(Number(m[1]) - 0.425) < 2e-4 && Math.abs(Number(m[3]) - 0.425) < 2e-4, note);
  });

  it('treats an extremum at a turn of the path as an extremum of the continued band (valley at X, Γ–X–W)', () => {
    const a = 5.43;
    const unit = (2 * Math.PI) / a;
    const bs = pathModel({
      lattice: fccLattice(a),
      bands: [parabolicBand(-0.5, -0.3), ellipsoidalValley(0.6, [0, unit, 0], [0, 1, 0], 1.3, 0.2)],
      electrons: 2,
      legs: [[G, { label: 'X', k: [0.5, 0, 0.5] }, { label: 'W', k: [0.5, 0.25, 0.75] }]],
      pointsPerSegment: 40,
    });
    const [cbm] = byKind(analyzeBandStructure(bs), 'cbm');
    assert.equal(cbm!.label, 'X');
    const toG = cbm!.masses.find((m) => m.towards === 'Γ')!;
    const toW = cbm!.masses.find((m) => m.towards === 'W')!;
    assert.ok(Math.abs(toG.mass - 1.3) < 1e-6); // model m_l
    assert.ok(Math.abs(toW.mass - 0.2) < 1e-6); // model m_t (X–W is perpendicular to Γ–X)
    assert.ok(!cbm!.warnings.some((w) => /beyond/.test(w)));
  });

  it('does not continue a direction across a jump in the path (X | M)', () => {
    const a = 4;
    const unit = (2 * Math.PI) / a;
    // Valley at X; the path jumps from X to M (two legs): X has one direction only, towards Γ.
    const bs = pathModel({
      lattice: cubicLattice(a),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.7, [0.5 * unit, 0, 0])],
      electrons: 2,
      legs: [
        [G, X],
        [M, G],
      ],
      pointsPerSegment: 30,
    });
    const [cbm] = byKind(analyzeBandStructure(bs), 'cbm');
    assert.equal(cbm!.label, 'X');
    assert.deepEqual(
      cbm!.masses.map((m) => m.towards),
      ['Γ'],
    );
    assert.ok(Math.abs(cbm!.masses[0]!.mass - 0.7) < 1e-9); // model mass
    assert.ok(!cbm!.warnings.some((w) => /beyond/.test(w))); // the band is flat at X: a true extremum
  });

  it('warns when a band edge sits at a path end where the band still falls', () => {
    const a = 4;
    const unit = (2 * Math.PI) / a;
    // Minimum at 1.2 × X: beyond the end of the path Γ–X.
    const bs = pathModel({
      lattice: cubicLattice(a),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 1, [0.6 * unit, 0, 0])],
      electrons: 2,
      legs: [[G, X]],
      pointsPerSegment: 30,
    });
    const [cbm] = byKind(analyzeBandStructure(bs), 'cbm');
    assert.equal(cbm!.label, 'X');
    assert.ok(cbm!.warnings.some((w) => /beyond the sampled path/.test(w)));
  });

  it('reports a secondary valley within the range with its offset, and not beyond it', () => {
    const a = 4;
    const unit = (2 * Math.PI) / a;
    // Conduction band: the lower of a valley at X (1.0 eV) and one at Γ (1.2 eV).
    const cb: Dispersion = lowestOf(parabolicBand(1.2, 0.3), parabolicBand(1.0, 0.8, [0.5 * unit, 0, 0]));
    const bs = pathModel({
      lattice: cubicLattice(a),
      bands: [parabolicBand(-1, -0.5), cb],
      electrons: 2,
      legs: [[G, X, M]],
      pointsPerSegment: 60,
    });
    const r = analyzeBandStructure(bs);
    const [valley] = byKind(r, 'valley');
    assert.ok(valley);
    assert.equal(valley.label, 'Γ');
    assert.ok(Math.abs(valley.offset_eV - 0.2) < 1e-9); // model: 1.2 − 1.0 eV
    assert.ok(Math.abs(valley.masses[0]!.mass - 0.3) < 1e-6); // model mass of the Γ valley
    assert.equal(byKind(analyzeBandStructure(bs, { range_eV: 0.1 }), 'valley').length, 0);
    // The CBM at X: both directions X→Γ and X→M, longitudinal and transverse both 0.8 here (isotropic).
    const [cbm] = byKind(r, 'cbm');
    assert.equal(cbm!.label, 'X');
    assert.deepEqual(cbm!.masses.map((m) => m.towards).sort(), ['M', 'Γ']);
  });

  it('follows crossing branches of a degenerate edge instead of the band index', () => {
    // Two valence branches degenerate at Γ: heavy E = −A1 k² and light E = −A2 k² + B k⁴ that cross at
    // k² = (A2 − A1)/B (analytic). Band index order switches there; the branches do not.
    const A1 = 2;
    const A2 = 8;
    const B = 100;
    const heavy: Dispersion = (kc) => -A1 * (kc[0] ** 2 + kc[1] ** 2 + kc[2] ** 2);
    const light: Dispersion = (kc) => {
      const k2 = kc[0] ** 2 + kc[1] ** 2 + kc[2] ** 2;
      return -A2 * k2 + B * k2 * k2;
    };
    const bs = pathModel({
      // a = 12 Å: X at k = 0.262 Å⁻¹, past the crossing at k = 0.245 Å⁻¹, and the light branch stays below 0.
      lattice: cubicLattice(12),
      bands: [parabolicBand(-3, -1), light, heavy, parabolicBand(1, 0.5)],
      electrons: 6,
      legs: [[G, X]],
      pointsPerSegment: 80,
    });
    const [vbm] = byKind(analyzeBandStructure(bs, { method: 'poly4', window_meV: 150 }), 'vbm');
    assert.equal(vbm!.degenerateBands, 2);
    assert.ok(vbm!.warnings.some((w) => /ill-defined/.test(w)));
    assert.ok(vbm!.warnings.some((w) => /crosses/.test(w)));
    const b1 = vbm!.masses.find((m) => m.branch === 1)!;
    const b2 = vbm!.masses.find((m) => m.branch === 2)!;
    // m = −ħ²/(m_e · 2A): heavy −1.905, light −0.4762 (analytic).
    assert.ok(Math.abs(b1.mass + HBAR2_OVER_ME_EV_A2 / (2 * A1)) < 1e-6, String(b1.mass));
    assert.ok(Math.abs(b2.mass + HBAR2_OVER_ME_EV_A2 / (2 * A2)) < 1e-6, String(b2.mass));
    assert.ok(vbm!.dosMass !== null && vbm!.warnings.some((w) => /branches together/.test(w)));
  });
});

describe('edges per spin channel and missing geometry', () => {
  it('reports the VBM and CBM of each spin channel, offsets from the overall edges', () => {
    // Spin up: bands at −1 / +1 eV; spin down: the same shifted by +0.3 eV (a rigid exchange splitting).
    const up = pathModel({
      lattice: cubicLattice(4),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.4)],
      electrons: 2,
      legs: [[G, X]],
      pointsPerSegment: 40,
    });
    const down = pathModel({
      lattice: cubicLattice(4),
      bands: [parabolicBand(-0.7, -0.6), parabolicBand(1.3, 0.3)],
      electrons: 2,
      legs: [[G, X]],
      pointsPerSegment: 40,
    });
    const bs = { ...up, nSpin: 2 as const, energies: [up.energies[0]!, down.energies[0]!] };
    const r = analyzeBandStructure(bs);
    const vbms = byKind(r, 'vbm');
    const cbms = byKind(r, 'cbm');
    assert.equal(vbms.length, 2);
    assert.equal(cbms.length, 2);
    // Overall VBM −0.7 (down), CBM 1.0 (up): offsets 0.3 eV for the other channel's edges (model input).
    const v0 = vbms.find((e) => e.spin === 0)!;
    const v1 = vbms.find((e) => e.spin === 1)!;
    assert.ok(Math.abs(v0.offset_eV - 0.3) < 1e-9 && v1.offset_eV === 0);
    const c0 = cbms.find((e) => e.spin === 0)!;
    const c1 = cbms.find((e) => e.spin === 1)!;
    assert.ok(c0.offset_eV === 0 && Math.abs(c1.offset_eV - 0.3) < 1e-9);
    assert.ok(Math.abs(c1.masses[0]!.mass - 0.3) < 1e-9 && Math.abs(v1.masses[0]!.mass + 0.6) < 1e-9); // model masses
  });

  it('without a lattice, still places the extrema but gives no masses in m_e, and says so', () => {
    const bs = pathModel({
      lattice: cubicLattice(4),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 1)],
      electrons: 2,
      legs: [[G, X, M]],
      pointsPerSegment: 30,
    });
    bs.lattice = null;
    const [cbm] = byKind(analyzeBandStructure(bs), 'cbm');
    assert.ok(cbm);
    assert.equal(cbm.masses.length, 0);
    assert.ok(cbm.warnings.some((w) => /cannot be given in m_e/.test(w)));
  });
});

describe('fits at a clicked point and the window scan', () => {
  const bs = pathModel({
    lattice: cubicLattice(4),
    bands: [parabolicBand(-1, -0.5), kaneBand(1, 0.067, 0.64)],
    electrons: 2,
    legs: [[G, X, M]],
    pointsPerSegment: 200,
  });

  it('snaps a click near the CBM to it', () => {
    const e = fitExtremumAt(bs, 0, 5, 1, DEFAULT_SETTINGS);
    assert.equal(e.kind, 'cbm');
    assert.equal(e.label, 'Γ');
    assert.ok(e.warnings.some((w) => /Moved from the clicked point/.test(w)));
    assert.ok(Math.abs(e.masses[0]!.mass / 0.067 - 1) < 0.03); // model m* 0.067 near the edge
  });

  it('snaps a click on the valence band to the VBM', () => {
    const e = fitExtremumAt(bs, 0, 30, 0, DEFAULT_SETTINGS);
    assert.equal(e.kind, 'vbm');
    assert.ok(e.masses.every((m) => m.mass < 0));
  });

  it('scans mass against window: a Kane band gets heavier with the window', () => {
    const scan = massWindowScan(bs, 0, 0, 1, DEFAULT_SETTINGS);
    assert.equal(scan[0]!.window_meV, 10);
    assert.equal(scan[scan.length - 1]!.window_meV, 200);
    const first = scan[0]!.masses[0]!.mass;
    const last = scan[scan.length - 1]!.masses[0]!.mass;
    assert.ok(last > first * 1.05, `${first} → ${last}`); // non-parabolicity raises the mass (Kane 1957)
    // The Kane fit over 200 meV returns the model's α = 0.64 /eV.
    const kane = fitExtremumAt(bs, 0, 0, 1, { ...DEFAULT_SETTINGS, method: 'kane', window_meV: 200 });
    assert.ok(Math.abs(kane.masses[0]!.alpha_per_eV! - 0.64) < 1e-4); // model α (Kane 1957 form)
  });
});
