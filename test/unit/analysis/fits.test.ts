import assert from 'node:assert/strict';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { leastSquares } from '../../../src/core/analysis/fits/leastSquares';
import { fitCurvature } from '../../../src/core/analysis/fits/index';
import { parabolaCurvature } from '../../../src/core/analysis/fits/parabolaFit';
import { quarticCurvature } from '../../../src/core/analysis/fits/polynomialFit';
import { finiteDifferenceCurvature } from '../../../src/core/analysis/fits/finiteDifference';
import { kaneCurvature, kaneEnergy } from '../../../src/core/analysis/fits/kaneFit';
import type { LineSamples } from '../../../src/core/analysis/fits/types';

/** Samples of f at t = 0, h, 2h, ... (n points), and optionally the mirror side for centred stencils. */
function line(f: (t: number) => number, h: number, n: number, back = false): LineSamples {
  const t = Float64Array.from({ length: n }, (_, i) => i * h);
  const s: LineSamples = { t, e: t.map(f) };
  if (back) s.back = { t: Float64Array.from(t), e: t.map((x) => f(-x)) };
  return s;
}

const exact = { window_meV: 25, energySigma: 0 };

describe('least squares', () => {
  it('recovers the coefficients of an exact polynomial and the textbook straight-line errors', () => {
    // y = 1 + 2x − 3x² sampled exactly (analytic).
    const xs = [0, 0.5, 1, 1.5, 2, 2.5];
    const a = new Float64Array(xs.flatMap((x) => [1, x, x * x]));
    const y = Float64Array.from(xs, (x) => 1 + 2 * x - 3 * x * x);
    const r = leastSquares(a, y, xs.length, 3)!;
    assert.ok(Math.abs(r.coef[0]! - 1) < 1e-12 && Math.abs(r.coef[1]! - 2) < 1e-12 && Math.abs(r.coef[2]! + 3) < 1e-12);
    // Straight line through (0,0), (1,1), (2,1): slope 0.5, intercept 1/6, RSS 1/6 and var(slope) =
    // σ²/Σ(x−x̄)² = (1/6)/1 / 2 = 1/12 (closed-form simple regression, common practice).
    const l = leastSquares(new Float64Array([1, 0, 1, 1, 1, 2]), new Float64Array([0, 1, 1]), 3, 2)!;
    assert.ok(Math.abs(l.coef[1]! - 0.5) < 1e-12);
    assert.ok(Math.abs(l.coef[0]! - 1 / 6) < 1e-12);
    assert.ok(Math.abs(l.rss - 1 / 6) < 1e-12);
    assert.ok(Math.abs(l.cov[3]! - 1 / 12) < 1e-12);
  });

  it('refuses dependent columns', () => {
    assert.equal(leastSquares(new Float64Array([1, 2, 2, 4, 3, 6]), new Float64Array([1, 2, 3]), 3, 2), null);
  });
});

describe('curvature fits on analytic lines', () => {
  // Free electron E = ħ²k²/2m_e: m* = 1 exactly (analytic).
  const free = (t: number): number => (HBAR2_OVER_ME_EV_A2 / 2) * t * t;

  for (const method of ['parabola', 'central-2', 'central-4', 'poly4', 'kane']) {
    it(`${method}: free electron gives m* = 1`, () => {
      const out = fitCurvature(method, line(free, 0.01, 30, true), { window_meV: 100, energySigma: 0 });
      assert.ok(out.fit);
      assert.ok(Math.abs(out.fit.mass - 1) < 1e-8, `${method}: ${out.fit.mass}`); // analytic: m* = 1
      assert.equal(out.fit.method, method);
      assert.ok(out.fit.points >= 3);
    });
  }

  it('locates a vertex between sampled points (free vertex) and fits its curvature', () => {
    // Parabola with m = 0.9 and vertex 0.4 of a step before the first sample (like Si's Δ minimum falling
    // between points): curvature exact (analytic), vertex recovered.
    const h = 0.02;
    const t0 = -0.4 * h;
    const f = (t: number): number => 1 + (HBAR2_OVER_ME_EV_A2 / (2 * 0.9)) * (t - t0) ** 2;
    const fit = parabolaCurvature(line(f, h, 20), exact)!;
    assert.ok(Math.abs(fit.mass - 0.9) < 1e-9); // analytic
    assert.ok(Math.abs(fit.vertexT! - t0) < 1e-9); // analytic vertex
    assert.ok(Math.abs(fit.vertexE! - 1) < 1e-12); // analytic vertex energy
  });

  it('grows the window to the minimum number of points and says so', () => {
    const f = (t: number): number => (HBAR2_OVER_ME_EV_A2 / 2) * t * t;
    // Step 0.05 Å⁻¹: E(0.05) = 9.5 meV, E(0.1) = 38 meV, so only 2 points lie within 25 meV.
    const fit = parabolaCurvature(line(f, 0.05, 10), exact)!;
    assert.equal(fit.points, 4);
    assert.ok(fit.window_meV > 25);
    assert.ok(fit.warnings.some((w) => /window grew/.test(w)));
  });

  it('reports a residual for a non-parabolic band and a smaller one in a smaller window', () => {
    // Cosine band E = 2t(1 − cos ka), t = 1 eV, a = 3 Å: quartic terms (analytic Taylor series).
    const f = (x: number): number => 2 * (1 - Math.cos(3 * x));
    const wide = parabolaCurvature(line(f, 0.005, 200), { window_meV: 200, energySigma: 0 })!;
    const narrow = parabolaCurvature(line(f, 0.005, 200), { window_meV: 20, energySigma: 0 })!;
    assert.ok(wide.residual_meV > narrow.residual_meV);
    // ħ²/(2ta²) = 7.6199642/(2·9) = 0.42333 m_e (analytic); the narrow window is within 1 %.
    assert.ok(Math.abs(narrow.mass / (HBAR2_OVER_ME_EV_A2 / 18) - 1) < 0.01);
    // The quartic fit separates the quartic term: in the wide window it is within 1e-3 (only sixth-order
    // terms remain) and ten times closer than the parabola there.
    const q = quarticCurvature(line(f, 0.005, 200), { window_meV: 200, energySigma: 0 })!;
    const exactMass = HBAR2_OVER_ME_EV_A2 / 18;
    assert.ok(Math.abs(q.mass / exactMass - 1) < 1e-3, String(q.mass));
    assert.ok(Math.abs(q.mass - exactMass) * 10 < Math.abs(wide.mass - exactMass));
  });

  it('refuses finite differences on non-uniform spacing and falls back to the parabola', () => {
    const f = (t: number): number => (HBAR2_OVER_ME_EV_A2 / 2) * t * t;
    const s: LineSamples = { t: new Float64Array([0, 0.01, 0.025, 0.04, 0.06, 0.08]), e: new Float64Array(0) };
    s.e = s.t.map(f);
    const fd = finiteDifferenceCurvature(s, exact, 3);
    assert.equal(fd.fit, null);
    assert.match(fd.refusal!, /uniform/);
    const out = fitCurvature('fd3', s, { window_meV: 100, energySigma: 0 });
    assert.equal(out.fit!.method, 'parabola');
    assert.ok(out.fallback);
    assert.ok(Math.abs(out.fit!.mass - 1) < 1e-9); // analytic
  });

  it('gives the rounding error of the energies as the error of a finite difference', () => {
    // σ = q/√12 for rounding step q (uniform rounding error, common practice); fd3 weights (1,−2,1)/h².
    const q = 1e-4;
    const sigma = q / Math.sqrt(12);
    const f = (t: number): number => Math.round(((HBAR2_OVER_ME_EV_A2 / 2) * t * t) / q) * q;
    const fd = finiteDifferenceCurvature(line(f, 0.02, 5, true), { window_meV: 25, energySigma: sigma }, 3).fit!;
    assert.ok(Math.abs(fd.curvatureStderr - (sigma * Math.sqrt(6)) / 0.0004) < 1e-12);
  });
});

describe('Kane fit', () => {
  // ε(1 + αε) = ħ²k²/2m* (Kane 1957): data built with m* = 0.067, α = 0.64 /eV (a GaAs-like pair,
  // common practice); the fit must return both.
  const m = 0.067;
  const alpha = 0.64;
  const f = (t: number): number => 1.5 + kaneEnergy(HBAR2_OVER_ME_EV_A2 / (2 * m), alpha, t * t);

  it('returns the α and m* it was built with', () => {
    const fit = kaneCurvature(line(f, 0.004, 60), { window_meV: 200, energySigma: 0 })!;
    assert.ok(Math.abs(fit.alpha_per_eV! - alpha) < 1e-5, String(fit.alpha_per_eV)); // built-in α
    assert.ok(Math.abs(fit.mass - m) < 1e-7, String(fit.mass)); // built-in m*
  });

  it('returns them for a hole band too (maximum, negative mass)', () => {
    const g = (t: number): number => -f(t);
    const fit = kaneCurvature(line(g, 0.004, 60), { window_meV: 200, energySigma: 0 })!;
    assert.ok(Math.abs(fit.alpha_per_eV! - alpha) < 1e-5); // built-in α
    assert.ok(Math.abs(fit.mass + m) < 1e-7); // built-in m*, negative at a maximum
  });

  it('shows the mass of a parabola fit rising with the window on a Kane band', () => {
    const small = parabolaCurvature(line(f, 0.002, 120), { window_meV: 10, energySigma: 0 })!;
    const large = parabolaCurvature(line(f, 0.002, 120), { window_meV: 200, energySigma: 0 })!;
    // Non-parabolicity raises the apparent mass with energy (Kane 1957).
    assert.ok(large.mass > small.mass * 1.05);
    assert.ok(Math.abs(small.mass / m - 1) < 0.02); // built-in m* near the edge
  });
});

describe('parabola with the vertex fixed by symmetry', () => {
  it('at a time-reversal-invariant point a light band is fitted within a small window on a coarse path', async () => {
    const { parabolaCurvature } = await import('../../../src/core/analysis/fits/parabolaFit');
    const { HBAR2_OVER_ME_EV_A2: H } = await import('../../../src/core/units');
    // Kane band E(1 + αE) = ħ²k²/2m with m = 0.067, α = 0.64 /eV (GaAs-like; Kane 1957 form, values common
    // practice), sampled every 0.029 Å⁻¹ (40 points over Γ–X of a 5.65 Å fcc cell).
    const m = 0.067;
    const alpha = 0.64;
    const t = Float64Array.from({ length: 10 }, (_, i) => 0.029 * i);
    const e = t.map((k) => {
      const x = (H * k * k) / (2 * m);
      return (-1 + Math.sqrt(1 + 4 * alpha * x)) / (2 * alpha);
    });
    const free = parabolaCurvature({ t, e }, { window_meV: 25, energySigma: 0 })!;
    const even = parabolaCurvature({ t, e, even: true }, { window_meV: 25, energySigma: 0 })!;
    // The symmetric fit needs fewer points, so its window grows less and non-parabolicity biases it less.
    assert.ok(even.window_meV < free.window_meV);
    assert.ok(Math.abs(even.mass - m) < Math.abs(free.mass - m), `${even.mass} vs ${free.mass}`);
    assert.equal(even.vertexT, 0);
  });
});
