/**
 * The one local-extremum rule (src/core/analysis/pathLocalExtrema.ts) and its two users: the analysis's
 * candidate scan and the band view's snapping candidates (webview/bandView/localExtrema.ts).
 */
import assert from 'node:assert/strict';
import { pieceExtrema, plateauMiddle } from '../../../src/core/analysis/pathLocalExtrema';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { findLocalExtrema } from '../../../webview/bandView/localExtrema';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { cubicLattice, lowestOf, parabolicBand, pathModel, type PathLeg } from '../../support/models';

const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
const M: PathLeg = { label: 'M', k: [0.5, 0.5, 0] };

describe('one local-extremum rule along a path (pathLocalExtrema.ts)', () => {
  it('a free-electron band written to 3 decimals has one minimum, at the middle of its plateau of equal values', () => {
    // E = ħ²k²/2m with m = m_e (free electron, analytic), k from −0.03 to 0.05 Å⁻¹ in steps of 0.001 Å⁻¹,
    // rounded to 1 meV as a file writes it (common practice).
    const ks = Array.from({ length: 81 }, (_, i) => -0.03 + 0.001 * i);
    const e = ks.map((k) => Math.round(((HBAR2_OVER_ME_EV_A2 / 2) * k * k) / 1e-3) * 1e-3);
    const found = pieceExtrema((i) => e[i]!, 0, e.length);
    // The two ends (with their runs of equal rounded values) stand above their one neighbour: maxima by the
    // rule (whether the band's maximum really lies there is judged later, by the slope beyond the end).
    assert.deepEqual(
      found.filter((f) => f.sign === 1).map((f) => [f.first, f.last === 80]),
      [
        [0, false],
        [found.find((f) => f.last === 80)!.first, true],
      ],
    );
    const minima = found.filter((f) => f.sign === -1);
    assert.equal(minima.length, 1);
    const [x] = minima;
    // The plateau is every k with ħ²k²/2m < 0.5 meV (analytic: |k| < sqrt(0.0005 / 3.81) ≈ 0.01146 Å⁻¹),
    // symmetric about k = 0, so its middle is the Γ point (index 30).
    const kMax = Math.sqrt(0.0005 / (HBAR2_OVER_ME_EV_A2 / 2));
    assert.equal(
      x!.first,
      ks.findIndex((k) => Math.abs(k) < kMax),
    );
    assert.equal(x!.last, ks.length - 1 - [...ks].reverse().findIndex((k) => Math.abs(k) < kMax));
    assert.equal(x!.k, 30);
  });

  it('a plateau stands at a time-reversal-invariant point on it when it is longer than two points', () => {
    assert.equal(plateauMiddle([3, 4, 5, 6, 7]), 5);
    assert.equal(plateauMiddle([3, 4, 5, 6]), 4, 'the lower middle of an even run');
    assert.equal(
      plateauMiddle([3, 4, 5, 6, 7], (k) => k === 7),
      7,
    );
    assert.equal(
      plateauMiddle([3, 4], (k) => k === 4),
      3,
      'two points: the first',
    );
  });

  it('a level band has no extremum; a monotonic one has extrema only at its ends', () => {
    assert.equal(pieceExtrema(() => 1.5, 0, 10).length, 0);
    const rising = pieceExtrema((i) => 0.1 * i, 0, 10);
    assert.deepEqual(
      rising.map((x) => [x.k, x.sign]),
      [
        [0, -1],
        [9, 1],
      ],
    );
  });

  it("the band view's snapping candidates include every valley the analysis reports, at the same k", () => {
    // Conduction band: the lower of a parabolic valley at Γ (1.0 eV, m* = 0.4) and one at M (1.15 eV, m* = 0.6),
    // written to 4 decimals (common practice for eigenvalue files); the valence band a free-hole parabola.
    const atM: [number, number, number] = [Math.PI / 4, Math.PI / 4, 0]; // M = (π/a, π/a, 0), a = 4 Å
    const bs = pathModel({
      legs: [[X, G, M, X]],
      bands: [lowestOf(parabolicBand(1.0, 0.4), parabolicBand(1.15, 0.6, atM)), parabolicBand(-1, -0.5)],
      lattice: cubicLattice(4),
      pointsPerSegment: 61,
      electrons: 2,
      roundTo: 1e-4,
    });
    const r = analyzeBandStructure(bs);
    const minima = r.extrema.filter((x) => x.kind === 'cbm' || x.kind === 'valley');
    assert.deepEqual(minima.map((x) => x.label).sort(), ['M', 'Γ']);
    const labelled = new Set(bs.labels.map((l) => l.index));
    const snap = findLocalExtrema(bs.energies, bs.nBands, [{ i0: 0, i1: bs.nk }], (k) => labelled.has(k));
    for (const m of minima) {
      const hit = Array.from({ length: snap.count }, (_, i) => i).some(
        (i) =>
          snap.band0[i] === m.band - 1 &&
          snap.sign[i] === -1 &&
          [0, 1, 2].every((c) => Math.abs(bs.kpoints[3 * snap.kIndex[i]! + c]! - m.k[c]!) < 1e-12),
      );
      assert.ok(hit, `${m.kind} at ${m.label} offered by the band view`);
    }
  });
});
