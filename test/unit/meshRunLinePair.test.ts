import assert from 'node:assert/strict';
import { linePairExtremum } from '../../src/core/interpolation/linePairModel';

// A two-band k·p block along a line through a touching point P (standard k·p reasoning, e.g. the pair of bands
// at a zone-face centre): H(q) = [[E0 + a q², v q], [v q, E0 + b q²]], eigenvalues s ∓ √d with s = E0 + (a+b)q²/2
// and d = ((b − a)q²/2)² + v²q², even in q. The lower band has a minimum off P; the truth is found here by a
// bisection on the closed-form slope and central differences (step 1e-4 Å⁻¹).
const [E0, a, b, v] = [1.5, 1.6, 2.4, 0.8]; // eV, eV·Å², eV·Å², eV·Å (a model of our own)
const lower = (q: number): number => E0 + ((a + b) / 2) * q * q - Math.sqrt((((b - a) / 2) * q * q) ** 2 + v * v * q * q);
const upper = (q: number): number => E0 + ((a + b) / 2) * q * q + Math.sqrt((((b - a) / 2) * q * q) ** 2 + v * v * q * q);

/** The minimum where the closed-form slope changes sign (bisection), its energy and curvature. */
function truth(): { q: number; e: number; curvature: number } {
  const slope = (q: number): number =>
    (a + b) * q - (2 * ((b - a) / 2) ** 2 * q ** 3 + v * v * q) / Math.sqrt((((b - a) / 2) * q * q) ** 2 + v * v * q * q);
  const bracket = [1e-6, 0.6];
  while (bracket[1]! - bracket[0]! > 1e-13) {
    const mid = (bracket[0]! + bracket[1]!) / 2;
    bracket[slope(mid) < 0 ? 0 : 1] = mid;
  }
  const q = bracket[0]!;
  const h = 1e-4;
  return { q, e: lower(q), curvature: (lower(q + h) - 2 * lower(q) + lower(q - h)) / (h * h) };
}

describe('the pair model on a line through a touching point (linePairModel)', () => {
  const qs = [0, 0.1, 0.2, 0.3, 0.4, 0.5];
  const data = { q: qs, lower: qs.map(lower), upper: qs.map(upper), branch: -1 as const, kind: 'min' as const };

  it('recovers the minimum, its energy and curvature of an exact two-band block from six line points', () => {
    const t = truth();
    assert.ok(t.q > 0.05 && t.q < 0.45, String(t.q)); // an interior minimum, as the model is built to have
    const r = linePairExtremum(data);
    assert.ok(r);
    assert.ok(Math.abs(r.q - t.q) < 1e-6, `${r.q} vs ${t.q}`);
    assert.ok(Math.abs(r.energy_eV - t.e) < 1e-9, `${r.energy_eV} vs ${t.e}`);
    assert.ok(Math.abs(r.curvature / t.curvature - 1) < 1e-5, `${r.curvature} vs ${t.curvature}`);
    // The data are exactly of the fitted form: leaving a point out or raising the order changes nothing.
    assert.ok(r.uncertainty.curvature < 1e-6 * Math.abs(t.curvature), JSON.stringify(r.uncertainty));
    assert.equal(r.points, 6);
  });

  it('a band that is not of the pair form gets a non-zero uncertainty', () => {
    const bent = { ...data, lower: qs.map((q) => lower(q) + 0.02 * Math.sin(9 * q) ** 2) };
    const r = linePairExtremum(bent);
    assert.ok(r);
    assert.ok(r.uncertainty.curvature > 1e-3 * Math.abs(r.curvature), JSON.stringify(r.uncertainty));
  });

  it('too few points, or no interior extremum, gives nothing', () => {
    assert.equal(linePairExtremum({ ...data, q: qs.slice(0, 3), lower: data.lower.slice(0, 3), upper: data.upper.slice(0, 3) }), null);
    // A maximum sought on a band that only has a minimum.
    assert.equal(linePairExtremum({ ...data, kind: 'max' }), null);
  });
});
