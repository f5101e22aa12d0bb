import assert from 'node:assert/strict';
import { evenLineCurvature } from '../../../src/core/interpolation/evenLineFit';

// A band even about a point P along a line, sampled at equal steps from P: the curvature at P from a polynomial
// in q². Checks against analytic models.

describe('the curvature at an even point from line points (evenLineFit)', () => {
  it('recovers the curvature of a one-dimensional tight-binding band at its minimum, the error inside twice the uncertainty', () => {
    // E = −2t cos(q a): E'' at q = 0 is 2 t a² (nearest-neighbour tight binding, common practice).
    const t = 1.3;
    const a = 2.7;
    const step = 0.12;
    const q = Array.from({ length: 6 }, (_, i) => i * step);
    const r = evenLineCurvature(
      q,
      q.map((x) => -2 * t * Math.cos(x * a)),
    )!;
    const exact = 2 * t * a * a;
    assert.ok(Math.abs(r.curvature / exact - 1) < 0.01, `${r.curvature} vs ${exact}`);
    // The uncertainty is a spread of refits, not a bound: the error lies within twice it (as for the pair-line model).
    assert.ok(Math.abs(r.curvature - exact) <= 2 * r.uncertainty, `${r.curvature} vs ${exact} ± ${r.uncertainty}`);
    assert.equal(r.points, 4);
    assert.equal(r.order, 2);
  });

  it('is exact, with no spread, for a band that is a polynomial of order 2 in q²', () => {
    const q = [0, 0.1, 0.2, 0.3, 0.4];
    const r = evenLineCurvature(
      q,
      q.map((x) => 0.5 + 3 * x * x - 7 * x ** 4),
    )!;
    assert.ok(Math.abs(r.curvature - 6) < 1e-9, String(r.curvature));
    assert.ok(r.uncertainty < 1e-8, String(r.uncertainty));
  });

  it('a Kane band, far from parabolic over the points, gets a large uncertainty', () => {
    // E(1 + αE) = ħ²q²/2m (Kane 1957) with α = 1/eV and ħ²/2m = 50 eV·Å²: E = (√(1 + 4α·50 q²) − 1)/2α.
    const q = [0, 0.15, 0.3, 0.45, 0.6];
    const r = evenLineCurvature(
      q,
      q.map((x) => (Math.sqrt(1 + 4 * 50 * x * x) - 1) / 2),
    )!;
    assert.ok(r.uncertainty > 0.1 * Math.abs(r.curvature), `${r.curvature} ± ${r.uncertainty}`);
  });

  it('too few points, or a first point that is not P, gives nothing', () => {
    assert.equal(evenLineCurvature([0, 0.1, 0.2], [0, 1, 4]), null);
    assert.equal(evenLineCurvature([0.1, 0.2, 0.3, 0.4], [1, 4, 9, 16]), null);
  });
});
