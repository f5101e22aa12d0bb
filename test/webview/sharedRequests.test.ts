/**
 * The webviews' request/answer helper (webview/shared/requests.ts): an answer is shown only when it answers
 * the latest request, with the context that request was sent with; a late answer to an older request is
 * "stale", an id never sent "unknown".
 */
import assert from 'node:assert/strict';
import { LatestRequest } from '../../webview/shared/requests';

describe('webview requests: the latest request and its answer', () => {
  it('an answer to the open request brings back its context once, then the request is closed', () => {
    const r = new LatestRequest<{ window_meV: number }>();
    assert.equal(r.waiting, false);
    const id = r.start({ window_meV: 25 });
    assert.equal(r.waiting, true);
    assert.deepEqual(r.settle(id), { state: 'current', context: { window_meV: 25 } });
    assert.equal(r.waiting, false);
    // The same answer again (a duplicate): the request is no longer open.
    assert.deepEqual(r.settle(id), { state: 'stale' });
  });

  it('a newer request drops the open one: the older answer is stale, the newer one current', () => {
    const r = new LatestRequest<string>();
    const first = r.start('first');
    const second = r.start('second');
    assert.notEqual(first, second);
    assert.deepEqual(r.settle(first), { state: 'stale' });
    assert.equal(r.waiting, true, 'the newer request still waits');
    assert.deepEqual(r.settle(second), { state: 'current', context: 'second' });
  });

  it('ids never sent are unknown (zero, negative, fractional, not yet issued)', () => {
    const r = new LatestRequest<number>();
    const id = r.start(1);
    for (const bad of [0, -1, id + 0.5, id + 1, Number.NaN]) assert.deepEqual(r.settle(bad), { state: 'unknown' }, String(bad));
    assert.deepEqual(r.settle(id), { state: 'current', context: 1 }, 'the open request is untouched by unknown answers');
  });

  it('ids increase with each request, so every answer can be told apart', () => {
    const r = new LatestRequest<null>();
    const ids = [r.start(null), r.start(null), r.start(null)];
    assert.deepEqual(ids, [ids[0], ids[0]! + 1, ids[0]! + 2]);
  });
});
