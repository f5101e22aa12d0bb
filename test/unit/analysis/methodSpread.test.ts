/**
 * Finite differences have no residual, so their stderr is the rounding error alone; the spread against the
 * least-squares parabola on the same samples says how much the methods disagree (fits/methodSpread.ts).
 */
import assert from 'node:assert/strict';
import { fitCurvature } from '../../../src/core/analysis/fits/index';
import { spreadAgainstParabola } from '../../../src/core/analysis/fits/methodSpread';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';

/** Samples of E(t) at t = 0, h, 2h, ..., even about t = 0 (a time-reversal-invariant k). */
function line(f: (t: number) => number, h: number, n: number): { t: Float64Array; e: Float64Array; even: boolean } {
  const t = Float64Array.from({ length: n }, (_, i) => i * h);
  return { t, e: t.map(f), even: true };
}

const C = HBAR2_OVER_ME_EV_A2 / 2;
const settings = { window_meV: 300, energySigma: 0 };

describe('method spread of finite-difference masses', () => {
  it('on an exact parabola both methods give the analytic mass: no spread', () => {
    // E = ħ²t²/(2·0.3 mₑ): analytic m* = 0.3.
    const s = line((t) => (C / 0.3) * t * t, 0.02, 12);
    const fd = fitCurvature('central-2', s, settings).fit!;
    assert.equal(fd.method, 'central-2');
    assert.ok(Math.abs(fd.mass - 0.3) < 1e-9); // analytic: a 3-point difference is exact on a parabola
    const sp = spreadAgainstParabola(fd, s, settings)!;
    assert.equal(sp.against, 'parabola');
    assert.ok(Math.abs(sp.mass - 0.3) < 1e-9); // analytic m* = 0.3
    assert.ok(sp.spread < 1e-9);
  });

  it('on a non-parabolic band the spread shows what the rounding-only stderr hides', () => {
    // E = ħ²t²/(2m) + b t⁴ with m = 0.3, b = 40 eV·Å⁴. A central 3-point difference of t⁴ at step h gives
    // (h⁴ + h⁴)/h² = 2h² (analytic), so its curvature is ħ²/m + 2 b h²: close to the k → 0 value, while the
    // parabola over a 300 meV window sees the quartic term strongly.
    const b = 40;
    const h = 0.02;
    const s = line((t) => (C / 0.3) * t * t + b * t ** 4, h, 30);
    const fd = fitCurvature('central-2', s, settings).fit!;
    const curvature = (2 * C) / 0.3 + 2 * b * h * h; // analytic, see above
    assert.ok(Math.abs(fd.curvature - curvature) < 1e-9 * curvature);
    assert.equal(fd.stderr, 0, 'full precision: the rounding stderr is zero');
    const sp = spreadAgainstParabola(fd, s, settings)!;
    const parabola = fitCurvature('parabola', s, settings).fit!;
    assert.ok(Math.abs(sp.mass - parabola.mass) < 1e-12);
    // The quartic term stiffens the band away from t = 0: the parabola's mass is lighter than the stencil's.
    assert.ok(sp.mass < fd.mass);
    assert.ok(Math.abs(sp.spread - (fd.mass - sp.mass)) < 1e-12);
    assert.ok(sp.spread > 0.05 * fd.mass, `spread ${sp.spread} against mass ${fd.mass}`);
    assert.equal(sp.window_meV, 300);
  });

  it('a parabola or a polynomial fit gets no spread (it has its own residual)', () => {
    const s = line((t) => (C / 0.3) * t * t + 40 * t ** 4, 0.02, 30);
    for (const m of ['parabola', 'poly4', 'kane']) {
      const fit = fitCurvature(m, s, settings).fit!;
      assert.equal(spreadAgainstParabola(fit, s, settings), null, m);
    }
  });
});
