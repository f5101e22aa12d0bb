import assert from 'node:assert/strict';
import fc from 'fast-check';
import { scanOccupations } from '../../../src/core/analysis/occupationScan';
import { markFilled } from '../../../src/core/analysis/bandFilling';

// The occupation scan also finds, per k-point, the highest filled and the lowest empty state (VBM and CBM
// candidates: common practice). Checked against the definition written out: filled = above half of a full state
// (as the occupation rule marks it), highest filled = the largest energy, the higher band among equal ones;
// lowest empty = the smallest energy, the lower band among equal ones; band -1 where there is none.

const occupationValues = fc.array(fc.constantFrom(0, 0.02, 0.4, 0.5, 0.6, 0.98, 1, 2), { minLength: 30, maxLength: 30 });
const energyValues = fc.array(fc.constantFrom(-1, -0.5, 0, 0.5, 1, Number.NaN), { minLength: 30, maxLength: 30 });

describe('occupation scan: per-k edges', () => {
  it('the edges of the states the occupation rule marks filled', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 5 }),
        fc.integer({ min: 1, max: 6 }),
        occupationValues,
        energyValues,
        (nb, nk, occPool, ePool) => {
          const occ = Float32Array.from({ length: nk * nb }, (_, i) => occPool[(i * 7) % occPool.length]!);
          const e = Float64Array.from({ length: nk * nb }, (_, i) => ePool[(i * 11) % ePool.length]!);
          const filled = [new Uint8Array(nk * nb)];
          const { full } = markFilled([occ], nb, filled);
          const scan = scanOccupations(occ, e, full, nk, nb, 0.05);
          for (let k = 0; k < nk; k++) {
            let h = -Infinity;
            let hb = -1;
            let l = Infinity;
            let lb = -1;
            for (let b = 0; b < nb; b++) {
              const x = e[k * nb + b]!;
              if (filled[0]![k * nb + b] === 1) {
                if (x >= h) [h, hb] = [x, b];
              } else if (x < l) [l, lb] = [x, b];
            }
            assert.deepEqual([scan.kEdges.hi[k], scan.kEdges.hb[k], scan.kEdges.lo[k], scan.kEdges.lb[k]], [h, hb, l, lb], `k-point ${k}`);
          }
        },
      ),
      { numRuns: 300 },
    );
  });
});
