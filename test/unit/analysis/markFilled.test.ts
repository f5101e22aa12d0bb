import assert from 'node:assert/strict';
import fc from 'fast-check';
import { fullOccupation, markFilled } from '../../../src/core/analysis/bandFilling';

// Files write occupations as fractions of a full state (0..1) or as electrons (0..2) (common practice): half of
// the full value separates filled from empty states. markFilled does it in one pass with a guess from the first
// k-point; checked against the rule written out (the full value from all values, then every state compared),
// including files whose first k-point points to the wrong full value.

/** Bands, k-points, channels and the values written (fractions, electrons, values between, NaN). */
const files = fc.tuple(
  fc.integer({ min: 1, max: 4 }),
  fc.integer({ min: 1, max: 5 }),
  fc.integer({ min: 1, max: 2 }),
  fc.array(fc.constantFrom(0, 0.25, 0.5, 0.75, 1, 1.2, 1.5, 1.75, 2, Number.NaN), { minLength: 40, maxLength: 40 }),
);

describe('filled states in one pass', () => {
  it('the same marks, full value and answer as the rule written out', () => {
    fc.assert(
      fc.property(files, ([nb, nk, nSpin, pool]) => {
        const occupations = Array.from({ length: nSpin }, (_, s) =>
          Float32Array.from({ length: nk * nb }, (_, i) => pool[(i * 7 + s * 13) % pool.length]!),
        );
        const out = occupations.map((o) => new Uint8Array(o.length));
        const got = markFilled(occupations, nb, out);
        // Fresh copies for the rule written out (fullOccupation keeps answers per array).
        const copies = occupations.map((o) => Float32Array.from(o));
        const full = fullOccupation(copies);
        const expected = copies.map((o) => Uint8Array.from(o, (v) => (v > 0.5 * full ? 1 : 0)));
        assert.equal(got.full, full);
        assert.deepEqual(out, expected);
        assert.equal(
          got.any,
          expected.some((m) => m.some((x) => x === 1)),
        );
      }),
      { numRuns: 300 },
    );
  });

  it('a first k-point of fractions, electrons later: the states are marked again against 2', () => {
    const o = Float32Array.from([1, 0, 2, 1.2]);
    const out = [new Uint8Array(4)];
    const r = markFilled([o], 2, out);
    assert.equal(r.full, 2);
    assert.deepEqual([...out[0]!], [0, 0, 1, 1]);
  });
});
