import assert from 'node:assert/strict';
import { makeFitService, scanSeries } from '../../../src/extension/fitService';
import { fitOnPath, fittedEnergy } from '../../../src/core/analysis/fitCurves';
import { fitExtremumAt } from '../../../src/core/analysis/massEngine';
import { composeAnnotations } from '../../../src/core/annotations/composeAnnotations';
import { kpointAt } from '../../../src/core/model';
import { buildBandData } from '../../../src/extension/bandData';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import type { LoadedRun } from '../../../src/extension/runLoader';
import type { BandStructure, Mat3 } from '../../../src/core/model';
import { makeBands, line } from '../../support/bandStructure';
import { composeInputOf, loadSi } from './demoRun';

// ħ²/m_e = 7.6199642 eV·Å² (CODATA 2018, twice 3.80998212 eV·Å²; physics.md item 4), written out here so the
// check does not reuse the code's own constant.
const HBAR2_ME = 7.6199642;

function asRun(bs: BandStructure): LoadedRun {
  const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
  return { uri: null as never, fileUri: null as never, bs, report, geometry: pathGeometry(bs), size: 0 };
}

/** Simple cubic, a = 4 Å: Γ–X along b1, a free-electron-like conduction band of mass m above a flat valence band. */
function parabolicRun(mass: number): LoadedRun {
  const a = 4;
  const lattice: Mat3 = [
    [a, 0, 0],
    [0, a, 0],
    [0, 0, a],
  ];
  const kpts = line([0, 0, 0], [0.5, 0, 0], 41);
  const energies = kpts.map((k) => {
    const kc = (2 * Math.PI * k[0]!) / a; // Å⁻¹ with the 2π
    return [-2, 1 + (HBAR2_ME * kc * kc) / (2 * mass)];
  });
  const bs = makeBands({
    kpoints: kpts,
    energies: [energies],
    electrons: 2,
    lattice,
    labels: [
      { index: 0, label: 'Γ' },
      { index: 40, label: 'X' },
    ],
  });
  return asRun(bs);
}

describe('extension: fits for the band view', () => {
  before(async () => {
    await ensureSymmetryReady();
  });
  const service = makeFitService(() => DEFAULT_SETTINGS);

  it('fits a free-electron-like band (analytic model, m* = 0.5) and draws the model parabola over it', () => {
    const run = parabolicRun(0.5);
    const out = service.fit(run, { spin: 0, kIndex: 3, band0: 1 }, 25, 'parabola', false);
    assert.equal(out.extremum.kind, 'cbm');
    assert.equal(out.extremum.band, 2);
    assert.deepEqual(out.extremum.k, [0, 0, 0], 'snapped from the clicked k-point 4 to the minimum at Γ');
    assert.equal(out.extremum.masses.length, 1);
    assert.ok(Math.abs(out.extremum.masses[0]!.mass - 0.5) < 1e-3, String(out.extremum.masses[0]!.mass));
    assert.equal(out.curves.length, 1);
    const c = out.curves[0]!;
    assert.equal(c.towards, 'X');
    assert.ok(c.distance.length >= 2);
    for (let i = 0; i < c.distance.length; i++) {
      const t = c.distance[i]!; // path distance from Γ, Å⁻¹ (Γ is at distance 0)
      const model = 1 + (HBAR2_ME * t * t) / (2 * 0.5);
      assert.ok(Math.abs(c.energy[i]! - model) < 1e-5, `sample ${i}: ${c.energy[i]} vs ${model}`);
    }
    // The curve stops within about 1.5 fit windows (the window used, which grows when too few points fall in it).
    const used = out.extremum.masses[0]!.window_meV / 1000;
    assert.ok(c.energy[c.energy.length - 1]! - 1 <= 1.5 * used * 1.5 + 1e-9);
    assert.equal(out.scan, null);
  });

  it('returns a flat mass-versus-window scan for an exactly parabolic band', () => {
    const run = parabolicRun(0.5);
    const series = service.scan(run, { spin: 0, kIndex: 0, band0: 1 }, 'parabola', [10, 25, 50, 100]);
    assert.equal(series.length, 1);
    assert.deepEqual(
      series[0]!.points.map((p) => p.window_meV),
      [10, 25, 50, 100],
    );
    for (const p of series[0]!.points) assert.ok(Math.abs(p.mass - 0.5) < 2e-3, `${p.window_meV} meV: ${p.mass}`);
    const withScan = service.fit(run, { spin: 0, kIndex: 0, band0: 1 }, 25, 'parabola', true);
    assert.ok(withScan.scan && withScan.scan.length === 1);
  });

  it('Kane curves follow ε(1 + αε) = ħ²k²/2m* (E. O. Kane, J. Phys. Chem. Solids 1, 249 (1957))', () => {
    const m = {
      towards: 'X',
      direction: [1, 0, 0] as [number, number, number],
      mass: 0.2,
      stderr: 0,
      points: 9,
      window_meV: 50,
      method: 'kane',
      alpha_per_eV: 0.6,
      determined: true,
    };
    for (const t of [0, 0.05, 0.1, 0.2]) {
      const e = fittedEnergy(1, m, t) - 1;
      const rhs = (HBAR2_ME * t * t) / (2 * 0.2);
      assert.ok(Math.abs(e * (1 + 0.6 * e) - rhs) <= 1e-7 * rhs, `t = ${t}`);
    }
    // At a maximum (negative mass) the curve bends down.
    assert.ok(fittedEnergy(0, { ...m, mass: -0.2, alpha_per_eV: undefined }, 0.1) < 0);
  });

  it('on the demo silicon CBM, the drawn curve (from the fitted vertex) stays within 2 meV of the band inside the fit window', async () => {
    const { bs, report, geometry } = await loadSi();
    const run: LoadedRun = { uri: null as never, fileUri: null as never, bs, report, geometry, size: 0 };
    const cbm = buildBandData(bs, report, geometry, 'x', DEFAULT_SETTINGS, 'vbm').marks.find((m) => m.kind === 'cbm')!;
    const out = service.fit(run, cbm, 25, 'parabola', false);
    assert.equal(out.extremum.kind, 'cbm');
    assert.deepEqual(out.extremum.k, report.gap!.cbm.k);
    // Same numbers as the analysis (the CLI's `analyze`) at the same settings.
    const fromReport = report.extrema.find((x) => x.kind === 'cbm')!;
    assert.deepEqual(
      out.extremum.masses.map((m) => m.mass),
      fromReport.masses.map((m) => m.mass),
    );
    assert.ok(out.curves.length >= 2, 'both sides of an interior minimum');
    const d = geometry.distance;
    const e = bs.energies[0]!;
    let maxDev = 0;
    for (const c of out.curves) {
      for (let i = 0; i < c.distance.length; i++) {
        if (c.energy[i]! - out.extremum.eV > 0.025) continue;
        // Linear interpolation of band 5 between the two nearest k-points on the curve's side.
        let j = cbm.kIndex;
        const step = c.distance[c.distance.length - 1]! > d[cbm.kIndex]! ? 1 : -1;
        while (j + step >= 0 && j + step < bs.nk && (d[j + step]! - c.distance[i]!) * step < 0) j += step;
        const j2 = j + step;
        const f = d[j2]! === d[j]! ? 0 : (c.distance[i]! - d[j]!) / (d[j2]! - d[j]!);
        const data = e[j * bs.nBands + 4]! * (1 - f) + e[j2 * bs.nBands + 4]! * f;
        maxDev = Math.max(maxDev, Math.abs(c.energy[i]! - data));
        // 2 meV: the fit's own residual plus the error of interpolating the data linearly between k-points.
        assert.ok(Math.abs(c.energy[i]! - data) < 0.002, `${c.towards} sample ${i}: fit ${c.energy[i]} data ${data}`);
      }
    }
    assert.ok(maxDev > 0, 'compared at least one sample');
  });

  it('groups a window scan into one series per direction', () => {
    const mk = (towards: string, mass: number, branch?: number) => ({
      towards,
      direction: [0, 0, 0] as [number, number, number],
      mass,
      stderr: 0.01,
      points: 5,
      window_meV: 10,
      method: 'parabola',
      determined: true,
      ...(branch ? { branch } : {}),
    });
    const s = scanSeries([
      { window_meV: 10, masses: [mk('X', 0.9), mk('Γ', 0.2, 1)] },
      { window_meV: 20, masses: [mk('X', 0.95), mk('Γ', 0.21, 1)] },
    ]);
    assert.deepEqual(
      s.map((x) => x.towards),
      ['X', 'Γ (branch 1)'],
    );
    assert.deepEqual(
      s[0]!.points.map((p) => p.mass),
      [0.9, 0.95],
    );
  });

  it('refuses an unknown method', () => {
    const run = parabolicRun(0.5);
    assert.throws(() => service.fit(run, { spin: 0, kIndex: 0, band0: 1 }, 25, 'spline', false), /unknown fit method/);
  });

  it('a fit carries the k index it landed on and one vertex per directional mass (nothing looked up or fitted again)', () => {
    const run = parabolicRun(0.5);
    const f = fitOnPath(run.bs, run.geometry, 0, 3, 1, DEFAULT_SETTINGS);
    // The analytic band's minimum is at Γ, k index 0 (the click was at index 3).
    assert.equal(f.kIndex, 0);
    assert.deepEqual(kpointAt(run.bs, f.kIndex), f.extremum.k);
    assert.equal(f.vertices.length, f.extremum.masses.length);
    // A parabola centred on a sampled point has its vertex there (t = 0, E = 1 eV in the model) when one is given.
    for (const v of f.vertices) if (v) assert.ok(Math.abs(v.t) < 1e-6 && Math.abs(v.e - 1) < 1e-6, JSON.stringify(v));
    assert.deepEqual(f.extremum, fitExtremumAt(run.bs, 0, 3, 1, DEFAULT_SETTINGS));
  });

  it('a save after a fit answers from the fit already made, with the same numbers as fitting again', async () => {
    const si = await loadSi();
    const { bs, report, geometry } = si;
    const run: LoadedRun = { uri: null as never, fileUri: null as never, bs, report, geometry, size: 0 };
    const svc = makeFitService(() => DEFAULT_SETTINGS);
    const cbm = buildBandData(bs, report, geometry, 'x', DEFAULT_SETTINGS, 'vbm').marks.find((m) => m.kind === 'cbm')!;
    const target = { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0, maximum: false };
    svc.fit(run, target, 40, 'parabola', false);
    const input = { ...composeInputOf(si), fits: [{ ...target, window_meV: 40, method: 'parabola' }] };
    // Byte-identical file whether the chosen fit is redone or taken from the fit the view asked for.
    assert.equal(composeAnnotations({ ...input, fit: svc.cachedFitter(run) }).text, composeAnnotations(input).text);
    // Taken, not redone: the kept fit survives a change of the arrays it was made from (runs are never changed in
    // place; a reloaded file is a new band structure), while a fit made now sees the change.
    const fitter = svc.cachedFitter(run);
    const before = fitter(bs, target.spin, target.kIndex, target.band0, { ...DEFAULT_SETTINGS, window_meV: 40 }, { maximum: false });
    const e = bs.energies[0]!;
    const saved = Float64Array.from(e);
    try {
      for (let i = 0; i < e.length; i++) e[i] = e[i]! * 1.1;
      const kept = fitter(bs, target.spin, target.kIndex, target.band0, { ...DEFAULT_SETTINGS, window_meV: 40 }, { maximum: false });
      const fresh = fitExtremumAt(
        bs,
        target.spin,
        target.kIndex,
        target.band0,
        { ...DEFAULT_SETTINGS, window_meV: 40 },
        { maximum: false },
      );
      assert.deepEqual(kept, before);
      assert.notEqual(fresh.masses[0]!.mass, before.masses[0]!.mass);
    } finally {
      e.set(saved);
    }
  });
});
