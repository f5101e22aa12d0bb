import assert from 'node:assert/strict';
import fc from 'fast-check';
import { inShard, normalizeRunPath, parseShard, shardOf } from '../../../../src/cli/batch/shard';
import { comparePaths } from '../../../../src/cli/batch/pathOrder';
import { UsageError } from '../../../../src/cli/args';

const segment = fc.stringMatching(/^[A-Za-z0-9_+.-]{1,12}$/).filter((s) => s !== '.' && s !== '..');
const runPath = fc.array(segment, { minLength: 1, maxLength: 4 }).map((parts) => parts.join('/'));

describe('--shard i/n', () => {
  it('parses i/n with 1 ≤ i ≤ n and refuses anything else with a usage sentence', () => {
    assert.deepEqual(parseShard('3/8'), { index: 3, count: 8 });
    assert.deepEqual(parseShard(' 1 / 1 '), { index: 1, count: 1 });
    for (const bad of ['0/4', '5/4', '1/0', '-1/4', '1.5/4', 'a/b', '1', '1/2/3', '']) {
      assert.throws(() => parseShard(bad), UsageError, bad);
    }
  });

  it('puts every run in exactly one shard, for any set of runs and any n', () => {
    fc.assert(
      fc.property(fc.uniqueArray(runPath, { maxLength: 60 }), fc.integer({ min: 1, max: 17 }), (paths, n) => {
        for (const p of paths) {
          const holders = [];
          for (let i = 1; i <= n; i++) if (inShard(p, { index: i, count: n })) holders.push(i);
          assert.equal(holders.length, 1, p);
          assert.equal(holders[0], shardOf(p, n));
        }
      }),
    );
  });

  it('keeps every run in its shard when other runs are added or removed', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(runPath, { minLength: 1, maxLength: 40 }),
        fc.uniqueArray(runPath, { maxLength: 40 }),
        fc.integer({ min: 2, max: 9 }),
        (before, added, n) => {
          const assign = (all: string[]) => new Map(all.map((p) => [p, shardOf(p, n)]));
          const a = assign(before);
          const b = assign([...added, ...before].reverse());
          for (const p of before) assert.equal(b.get(p), a.get(p), p);
        },
      ),
    );
  });

  it('spreads runs evenly enough to share the work', () => {
    // 2000 run paths into 4 shards: a fair hash gives counts ~ Binomial(2000, 1/4): mean 500, σ ≈ 19.4
    // (common practice: a hash's first bits are close to uniform). ±100 is more than 5σ.
    const counts = [0, 0, 0, 0];
    for (let i = 0; i < 2000; i++) counts[shardOf(`screen/batch-${Math.floor(i / 100)}/run-${i}`, 4) - 1]!++;
    for (const c of counts) assert.ok(c > 400 && c < 600, String(counts));
  });

  it('hashes the normalised path, so ./runs/a/ and runs/a are the same run', () => {
    assert.equal(normalizeRunPath('./runs//a/'), 'runs/a');
    assert.equal(normalizeRunPath('runs/./a'), 'runs/a');
    for (let n = 2; n < 12; n++) assert.equal(shardOf('./runs//a/', n), shardOf('runs/a', n));
  });

  it('orders paths component by component, as a walk of sorted folders visits them', () => {
    const paths = ['a-b/y', 'a/x', 'a/x/z', 'a', 'b'];
    assert.deepEqual([...paths].sort(comparePaths), ['a', 'a/x', 'a/x/z', 'a-b/y', 'b']);
  });
});
