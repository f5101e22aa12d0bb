import assert from 'node:assert/strict';
import { KeptByKey } from '../../../src/core/keptByKey';

// A bounded cache kept by exact key, the oldest dropped first (first in, first out: common practice for a small
// bounded memo). Checked: the bound is never passed, the order of dropping, hits do not renew, each key made once.
describe('KeptByKey: answers kept by exact input, bounded, oldest first out', () => {
  it('keeps at most `bound` answers and drops them in the order they were kept', () => {
    const c = new KeptByKey<number>(3);
    for (const [i, k] of ['a', 'b', 'c'].entries()) c.set(k, i);
    assert.equal(c.size, 3);
    c.set('d', 3);
    assert.equal(c.size, 3);
    assert.equal(c.get('a'), undefined, 'the oldest went first');
    assert.deepEqual(
      ['b', 'c', 'd'].map((k) => c.get(k)),
      [1, 2, 3],
    );
    c.set('e', 4);
    assert.equal(c.get('b'), undefined, 'then the next oldest');
    assert.deepEqual(
      ['c', 'd', 'e'].map((k) => c.get(k)),
      [2, 3, 4],
    );
  });

  it('a hit does not renew an answer; setting a kept key replaces it without dropping another', () => {
    const c = new KeptByKey<string>(2);
    c.set('x', 'first');
    c.set('y', 'second');
    assert.equal(c.get('x'), 'first');
    c.set('y', 'again');
    assert.equal(c.size, 2);
    assert.equal(c.get('x'), 'first');
    c.set('z', 'third');
    assert.equal(c.get('x'), undefined, 'x was kept first, and the hit did not change that');
    assert.deepEqual([c.get('y'), c.get('z')], ['again', 'third']);
  });

  it('answer(): made once per key while kept, made again after it was dropped', () => {
    const c = new KeptByKey<{ n: number }>(2);
    let made = 0;
    const make = (): { n: number } => ({ n: ++made });
    const a = c.answer('a', make);
    assert.equal(c.answer('a', make), a, 'the same object the second time');
    c.answer('b', make);
    c.answer('c', make);
    assert.equal(made, 3);
    assert.notEqual(c.answer('a', make), a, 'dropped, so made again');
    assert.equal(made, 4);
  });

  it('refuses a bound below one', () => {
    assert.throws(() => new KeptByKey(0), RangeError);
    assert.throws(() => new KeptByKey(1.5), RangeError);
  });
});
