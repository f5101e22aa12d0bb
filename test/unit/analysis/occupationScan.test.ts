import assert from 'node:assert/strict';
import { scanOccupations } from '../../../src/core/analysis/occupationScan';
import { TAIL_LIMIT } from '../../../src/core/analysis/conductionClass';

// Model: three cosine bands along a line, occupied by the Fermi–Dirac distribution f = 1/(1 + exp((E − μ)/kT))
// (common practice: the smearing codes write such fractions). Band 0 lies well below μ, band 1 crosses it,
// band 2 lies well above. The expected flags and values are computed from the formula state by state.
const nk = 401;
const nb = 3;
const mu = 0.0;
const kT = 0.01;
const fermiDirac = (e: number): number => 1 / (1 + Math.exp((e - mu) / kT));
const bandEnergy = (b: number, k: number): number => {
  const x = (Math.PI * k) / (nk - 1);
  return [-2 - 0.5 * Math.cos(x), -0.4 * Math.cos(x), 1.5 + 0.3 * Math.cos(x)][b]!;
};

function model(full: 1 | 2): { e: Float64Array; occ: Float32Array } {
  const e = new Float64Array(nk * nb);
  const occ = new Float32Array(nk * nb);
  for (let k = 0; k < nk; k++)
    for (let b = 0; b < nb; b++) {
      e[k * nb + b] = bandEnergy(b, k);
      occ[k * nb + b] = full * fermiDirac(bandEnergy(b, k));
    }
  return { e, occ };
}

describe('occupation scan (Fermi–Dirac occupations on a model)', () => {
  for (const full of [1, 2] as const) {
    it(`finds the band crossing μ, its partly filled states, the tails and the edges (full state = ${full})`, () => {
      const { e, occ } = model(full);
      const scan = scanOccupations(occ, e, full, nk, nb, TAIL_LIMIT);
      assert.deepEqual([...scan.filledSomewhere], [1, 1, 0]);
      assert.deepEqual([...scan.emptySomewhere], [0, 1, 1]);
      // Direct reading of the formula, band by band, as the rule states it.
      let largestTail = 0;
      let maxFilled = -Infinity;
      let minEmpty = Infinity;
      let bestDev = -1;
      let bestValue = NaN;
      let bestBand = -1;
      const partial = [0, 0, 0];
      for (let b = 0; b < nb; b++)
        for (let k = 0; k < nk; k++) {
          const x = occ[k * nb + b]! / full;
          const dev = Math.min(x, 1 - x);
          if (dev > TAIL_LIMIT) {
            partial[b] = 1;
            if (dev > bestDev) [bestDev, bestValue, bestBand] = [dev, x, b];
          } else largestTail = Math.max(largestTail, dev);
          if (x > 0.5) maxFilled = Math.max(maxFilled, e[k * nb + b]!);
          else minEmpty = Math.min(minEmpty, e[k * nb + b]!);
        }
      assert.deepEqual([...scan.partial], partial);
      assert.equal(partial[1], 1, 'the crossing band has states near μ partly filled');
      assert.equal(scan.partlyFilledBand, bestBand);
      assert.equal(scan.partlyFilledValue, bestValue);
      assert.equal(scan.largestTail, largestTail);
      assert.ok(largestTail > 0 && largestTail <= TAIL_LIMIT);
      // The highest filled state lies below μ; the lowest empty one at μ (f = ½ there: not more than half filled).
      assert.equal(scan.maxFilled, maxFilled);
      assert.equal(scan.minEmpty, minEmpty);
      assert.ok(scan.maxFilled < mu && Math.abs(scan.minEmpty - mu) < 1e-12, `${scan.maxFilled} ${scan.minEmpty}`);
    });
  }

  it('reports no partly filled band for whole occupations (an insulator written with 0 and 1)', () => {
    const e = new Float64Array([-1, 1, -1.1, 0.9]);
    const occ = new Float64Array([1, 0, 1, 0]);
    const scan = scanOccupations(occ, e, 1, 2, 2, TAIL_LIMIT);
    assert.deepEqual([...scan.partial], [0, 0]);
    assert.equal(scan.partlyFilledBand, -1);
    assert.equal(scan.largestTail, 0);
    assert.equal(scan.maxFilled, -1);
    assert.equal(scan.minEmpty, 0.9);
  });
});
