/**
 * Per-pixel-column min/max decimation (webview/bandView/decimate.ts), checked against a direct computation
 * over every point (the definition of the envelope) and against analytic bands.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  buildPyramid,
  clearEnvelope,
  columnEnvelope,
  createEnvelope,
  lowerBound,
  type ColumnMapping,
} from '../../webview/bandView/decimate';

/** The definition: for each column, min, max and last value of the points whose x falls in it. */
function bruteForce(x: Float64Array, v: Float64Array, nb: number, i0: number, i1: number, map: ColumnMapping) {
  const W = map.width;
  const min = new Float64Array(W * nb).fill(Infinity);
  const max = new Float64Array(W * nb).fill(-Infinity);
  const last = new Float64Array(W * nb);
  const filled = new Uint8Array(W);
  for (let i = i0; i < i1; i++) {
    const xx = x[i]!;
    if (xx < map.x0 || xx >= map.x0 + map.width / map.scale) continue;
    const c = Math.min(W - 1, Math.max(0, Math.floor((xx - map.x0) * map.scale)));
    filled[c] = 1;
    for (let b = 0; b < nb; b++) {
      const e = v[i * nb + b]!;
      min[c * nb + b] = Math.min(min[c * nb + b]!, e);
      max[c * nb + b] = Math.max(max[c * nb + b]!, e);
      last[c * nb + b] = e;
    }
  }
  return { min, max, last, filled };
}

/** Random nondecreasing x (with repeated points, as paths have) and values, as float32-exact numbers. */
const dataArb = fc
  .record({
    n: fc.integer({ min: 1, max: 400 }),
    nb: fc.integer({ min: 1, max: 5 }),
    seed: fc.integer({ min: 1, max: 1e9 }),
    width: fc.integer({ min: 1, max: 120 }),
    zoom: fc.double({ min: 0.2, max: 30, noNaN: true }),
    shift: fc.double({ min: -0.5, max: 0.9, noNaN: true }),
  })
  .map(({ n, nb, seed, width, zoom, shift }) => {
    let s = seed;
    const rnd = (): number => {
      s = (s * 1103515245 + 12345) % 2147483648;
      return s / 2147483648;
    };
    const x = new Float64Array(n);
    for (let i = 1; i < n; i++) x[i] = x[i - 1]! + (rnd() < 0.1 ? 0 : rnd());
    const v = new Float64Array(n * nb);
    for (let i = 0; i < v.length; i++) v[i] = Math.fround(rnd() * 20 - 10);
    const span = x[n - 1]! - x[0]! || 1;
    const map: ColumnMapping = { x0: x[0]! + shift * span, scale: (width * zoom) / span, width };
    return { x, v, nb, map };
  });

describe('decimate: per-pixel-column min/max envelope', () => {
  it('lowerBound finds the first index at or above a value', () => {
    const x = Float64Array.from([0, 1, 1, 2, 5]);
    assert.equal(lowerBound(x, -1, 0, 5), 0);
    assert.equal(lowerBound(x, 1, 0, 5), 1);
    assert.equal(lowerBound(x, 1.5, 0, 5), 3);
    assert.equal(lowerBound(x, 6, 0, 5), 5);
  });

  it('read from the points, it equals the definition for every column and band (property, fixed seed)', () => {
    fc.assert(
      fc.property(dataArb, ({ x, v, nb, map }) => {
        const env = createEnvelope(map.width, nb);
        clearEnvelope(env);
        columnEnvelope(x, v, nb, 0, x.length, map, env, null);
        const ref = bruteForce(x, v, nb, 0, x.length, map);
        for (let c = 0; c < map.width; c++) {
          assert.equal(env.filled[c], ref.filled[c], `column ${c} filled`);
          if (!ref.filled[c]) continue;
          for (let b = 0; b < nb; b++) {
            const o = c * nb + b;
            assert.equal(env.min[o], ref.min[o]);
            assert.equal(env.max[o], ref.max[o]);
            assert.equal(env.last[o], ref.last[o]);
          }
        }
      }),
      { seed: 20261201, numRuns: 200 },
    );
  });

  it('read from the pyramid, no extreme is lost and none moves by more than one column (property)', () => {
    let usedPyramid = 0;
    fc.assert(
      fc.property(dataArb, ({ x, v, nb, map }) => {
        if (x.length < 64) return;
        const pyr = buildPyramid(x, v, nb, 0, x.length);
        const env = createEnvelope(map.width, nb);
        clearEnvelope(env);
        const read = columnEnvelope(x, v, nb, 0, x.length, map, env, pyr);
        let visible = 0;
        for (let i = 0; i < x.length; i++) if (x[i]! >= map.x0 && x[i]! < map.x0 + map.width / map.scale) visible++;
        if (read < visible * nb) usedPyramid++;
        const ref = bruteForce(x, v, nb, 0, x.length, map);
        for (let c = 0; c < map.width; c++) {
          if (!env.filled[c]) continue;
          for (let b = 0; b < nb; b++) {
            // Every value drawn in column c comes from a point of columns c−1..c+1 (or a bucket straddling the
            // view's edge, whose points lie within one column of it).
            let lo = Infinity;
            let hi = -Infinity;
            for (let cc = Math.max(0, c - 1); cc <= Math.min(map.width - 1, c + 1); cc++) {
              if (!ref.filled[cc]) continue;
              lo = Math.min(lo, ref.min[cc * nb + b]!);
              hi = Math.max(hi, ref.max[cc * nb + b]!);
            }
            if (c === 0 || c === map.width - 1) continue;
            assert.ok(env.min[c * nb + b]! >= lo - 1e-6 || !Number.isFinite(lo), 'min from a neighbouring column');
            assert.ok(env.max[c * nb + b]! <= hi + 1e-6 || !Number.isFinite(hi), 'max from a neighbouring column');
          }
        }
        // Every point's value is covered by the envelope within one column of its own.
        for (let c = 1; c < map.width - 1; c++) {
          if (!ref.filled[c]) continue;
          for (let b = 0; b < nb; b++) {
            let lo = Infinity;
            let hi = -Infinity;
            for (let cc = c - 1; cc <= c + 1; cc++) {
              if (!env.filled[cc]) continue;
              lo = Math.min(lo, env.min[cc * nb + b]!);
              hi = Math.max(hi, env.max[cc * nb + b]!);
            }
            assert.ok(lo <= ref.min[c * nb + b]! + 1e-6 && hi >= ref.max[c * nb + b]! - 1e-6, `column ${c} band ${b} covered`);
          }
        }
      }),
      { seed: 42, numRuns: 200 },
    );
    assert.ok(usedPyramid >= 20, `the pyramid was used in ${usedPyramid} of 200 runs`);
  });

  it('zoomed in past the pyramid, full detail: identical to reading every point', () => {
    const n = 5000;
    const x = Float64Array.from({ length: n }, (_, i) => i * 0.001);
    const v = Float64Array.from({ length: n * 2 }, (_, i) => Math.sin(i * 0.37));
    const pyr = buildPyramid(x, v, 2, 0, n);
    const map: ColumnMapping = { x0: 1.2, scale: 2000, width: 300 }; // 2 columns per point: finer than any bucket
    const a = createEnvelope(300, 2);
    const b = createEnvelope(300, 2);
    clearEnvelope(a);
    clearEnvelope(b);
    columnEnvelope(x, v, 2, 0, n, map, a, pyr);
    columnEnvelope(x, v, 2, 0, n, map, b, null);
    assert.deepEqual(a, b);
  });

  it('zoomed out, reads far fewer values than there are points', () => {
    const n = 20000;
    const nb = 50;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const v = new Float64Array(n * nb);
    const pyr = buildPyramid(x, v, nb, 0, n);
    const env = createEnvelope(1000, nb);
    clearEnvelope(env);
    const read = columnEnvelope(x, v, nb, 0, n, { x0: 0, scale: 1000 / n, width: 1000 }, env, pyr);
    // Buckets no wider than a column: at most two per column (bucket sizes double from level to level).
    assert.ok(read <= 2 * 1000 * nb, `read ${read} values for 1000 columns × ${nb} bands (of ${n * nb})`);
    assert.ok(read < (n * nb) / 8);
  });

  it("cosine band: each column holds the band's exact range over that column (analytic)", () => {
    // E(k) = −2t cos(ka), the nearest-neighbour tight-binding chain (textbook analytic model), t = 1 eV, a = 1.
    const n = 100_001;
    const x = Float64Array.from({ length: n }, (_, i) => (i / (n - 1)) * 2 * Math.PI);
    const v = Float64Array.from(x, (k) => -2 * Math.cos(k));
    const W = 100;
    const map: ColumnMapping = { x0: 0, scale: W / (2 * Math.PI), width: W };
    const env = createEnvelope(W, 1);
    clearEnvelope(env);
    columnEnvelope(x, v, 1, 0, n, map, env, buildPyramid(x, v, 1, 0, n));
    const step = (2 * Math.PI) / W;
    for (let c = 1; c < W - 1; c++) {
      // A bucket may go to the neighbouring column, leaving this one empty (the renderer bridges it), but
      // never two in a row.
      if (!env.filled[c]) {
        assert.ok(env.filled[c - 1] && env.filled[c + 1], `column ${c}: no two empty columns in a row`);
        continue;
      }
      // Exact range of −2cos over [c·step, (c+1)·step], widened by one column for the bucket rule.
      const a = (c - 1) * step;
      const b = (c + 2) * step;
      const vals = [-2 * Math.cos(a), -2 * Math.cos(b)];
      if (a <= Math.PI && Math.PI <= b) vals.push(2);
      const exactLo = Math.min(-2 * Math.cos(c * step), -2 * Math.cos((c + 1) * step));
      assert.ok(env.min[c]! >= Math.min(...vals) - 1e-9 && env.max[c]! <= Math.max(...vals) + 1e-9, `column ${c} within the band's range`);
      assert.ok(env.min[c]! <= exactLo + 2 * (2 * step), `column ${c} reaches the band's low end`);
    }
    // The band maximum 2t at k = π/a survives decimation exactly (a sample falls on it).
    assert.equal(Math.max(...env.max), 2);
    assert.equal(Math.min(...env.min), -2);
  });
});
