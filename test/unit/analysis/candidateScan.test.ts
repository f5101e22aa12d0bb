import assert from 'node:assert/strict';
import fc from 'fast-check';
import { scanCandidates } from '../../../src/core/analysis/candidateScan';
import { compareNeighbour, standingOf } from '../../../src/core/analysis/pathLocalExtrema';

// The candidate scan stops counting neighbours once its answer is known: checked against the rule written out
// in full (every neighbour counted, then pathLocalExtrema.ts's standing), on random small neighbour tables with
// ties, for valence and conduction states and with and without the saddle test.

function reference(
  e: Float64Array,
  occupied: Uint8Array,
  nb: number,
  nk: number,
  start: Int32Array,
  list: Int32Array,
  bands: number[],
  saddle: Uint8Array | null,
): string[] {
  const out: string[] = [];
  for (let i = 0; i < nk; i++) {
    const q0 = start[i]!;
    const q1 = start[i + 1]!;
    if (q1 === q0) continue;
    for (const b of bands) {
      const x = e[i * nb + b]!;
      const valence = occupied[i * nb + b] === 1;
      let up = 0;
      let down = 0;
      for (let q = q0; q < q1; q++) {
        const c = compareNeighbour(x, e[list[q]! * nb + b]!);
        if (c > 0) up++;
        else if (c < 0) down++;
      }
      const s = standingOf(up, down);
      if (s === 'level' || s === (valence ? 'maximum' : 'minimum')) out.push(`${i}:${b}:0`);
      else if (s === 'mixed' && q1 - q0 >= 2 && saddle !== null && saddle[i] === 1) out.push(`${i}:${b}:1`);
    }
  }
  return out;
}

/** Random neighbour tables: k-points, bands, the generator's seed, and whether the saddle test is asked. */
const tables = fc.record({
  nk: fc.integer({ min: 2, max: 9 }),
  nb: fc.integer({ min: 1, max: 3 }),
  seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
  withSaddle: fc.boolean(),
});

describe('candidate scan', () => {
  it('lists exactly what counting every neighbour lists', () => {
    fc.assert(
      fc.property(tables, ({ nk, nb, seed, withSaddle }) => {
        let r = seed;
        const rnd = (n: number): number => {
          r = (Math.imul(r, 1103515245) + 12345) >>> 0;
          return r % n;
        };
        // Energies from a few levels, so that ties (equal written values) are common.
        const e = Float64Array.from({ length: nk * nb }, () => rnd(4) * 0.1);
        const occupied = Uint8Array.from({ length: nk * nb }, () => rnd(2));
        const start = new Int32Array(nk + 1);
        const neighbours: number[] = [];
        for (let i = 0; i < nk; i++) {
          const n = rnd(5);
          for (let j = 0; j < n; j++) neighbours.push(rnd(nk));
          start[i + 1] = neighbours.length;
        }
        const list = Int32Array.from(neighbours);
        const firstOf = Int32Array.from({ length: nk }, (_, i) => i);
        const bands = Array.from({ length: nb }, (_, b) => b);
        const saddle = withSaddle ? Uint8Array.from({ length: nk }, () => rnd(2)) : null;
        const got = scanCandidates(e, occupied, nb, nk, firstOf, start, list, Int32Array.from(bands), -Infinity, Infinity, saddle);
        const listed = Array.from({ length: got.count }, (_, t) => `${got.k[t]}:${got.band[t]}:${got.mixed[t]}`);
        assert.deepEqual(listed, reference(e, occupied, nb, nk, start, list, bands, saddle));
      }),
      { numRuns: 400 },
    );
  });
});
