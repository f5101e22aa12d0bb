import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  COMPARE_MAX_OVERLAY,
  CompareHostToViewType,
  CompareViewToHostType,
  HostToViewType,
  MESSAGE_LIMITS,
  ViewToHostType,
  isCompareHostToViewMessage,
  isCompareViewToHostMessage,
  isHostToViewMessage,
  isViewToHostMessage,
} from '../../../src/protocol';

describe('protocol: validation of messages from the compare view', () => {
  it('accepts one well-formed message of every kind', () => {
    const good: unknown[] = [
      { type: 'compareReady' },
      { type: 'compareRescan' },
      { type: 'compareSetReference', rowId: 'r3' },
      { type: 'compareSetAnnotationsAsRuns', value: false },
      { type: 'compareRequestBands', requestId: 2, rowIds: ['r0', 'r12'] },
      { type: 'compareRequestBands', requestId: 0, rowIds: [] },
      { type: 'compareOpenRun', rowId: 'r1', target: 'bandView' },
      { type: 'compareOpenRun', rowId: 'r1', target: 'file' },
      { type: 'compareViewError', message: 'canvas lost' },
    ];
    for (const m of good) assert.equal(isCompareViewToHostMessage(m), true, JSON.stringify(m));
  });

  it('refuses unknown types, wrong field types, extra keys and out-of-range values', () => {
    const bad: unknown[] = [
      null,
      [],
      {},
      { type: 'compareUnknown' },
      { type: 'ready' }, // the band view's message, sent to the compare view's host
      { type: 'compareReady', extra: true },
      { type: 'compareSetReference', rowId: 3 },
      { type: 'compareSetReference', rowId: '../r3' },
      { type: 'compareSetReference', rowId: 'r1234567' },
      { type: 'compareSetAnnotationsAsRuns', value: 'true' },
      { type: 'compareRequestBands', requestId: '2', rowIds: ['r0'] },
      { type: 'compareRequestBands', requestId: 1.5, rowIds: ['r0'] },
      { type: 'compareRequestBands', requestId: 2, rowIds: 'r0' },
      { type: 'compareRequestBands', requestId: 2, rowIds: Array.from({ length: COMPARE_MAX_OVERLAY + 1 }, (_, i) => `r${i}`) },
      { type: 'compareOpenRun', rowId: 'r1', target: 'terminal' },
      { type: 'compareOpenRun', rowId: 'r1' },
      { type: 'compareViewError', message: 7 },
      { type: 'compareViewError', message: 'x'.repeat(MESSAGE_LIMITS.maxErrorChars + 1) },
    ];
    for (const m of bad) assert.equal(isCompareViewToHostMessage(m), false, String(JSON.stringify(m)).slice(0, 120));
  });

  it('keeps the two views apart: neither validator accepts the other view’s message types', () => {
    for (const type of Object.values(CompareViewToHostType)) assert.equal(isViewToHostMessage({ type }), false, type);
    for (const type of Object.values(ViewToHostType)) assert.equal(isCompareViewToHostMessage({ type }), false, type);
    for (const type of Object.values(CompareHostToViewType)) {
      assert.equal(isCompareHostToViewMessage({ type }), true, type);
      assert.equal(isHostToViewMessage({ type }), false, type);
    }
    for (const type of Object.values(HostToViewType)) assert.equal(isCompareHostToViewMessage({ type }), false, type);
  });

  it('never throws on arbitrary input (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.oneof(fc.anything(), fc.record({ type: fc.constantFrom(...Object.values(CompareViewToHostType)) }, { requiredKeys: [] })),
        (x) => assert.equal(typeof isCompareViewToHostMessage(x), 'boolean'),
      ),
      { seed: 20261203, numRuns: 300 },
    );
  });
});

describe('protocol: one naming rule for requests in both directions', () => {
  it('names every request request<Thing> on the wire (compare view: compareRequest<Thing>), keyed RequestThing', () => {
    const requests: [string, string][] = [
      [ViewToHostType.RequestFit, 'RequestFit'],
      [ViewToHostType.RequestWindowScan, 'RequestWindowScan'],
      [HostToViewType.RequestSave, 'RequestSave'],
      [HostToViewType.RequestExport, 'RequestExport'],
      [CompareViewToHostType.RequestBands, 'RequestBands'],
    ];
    for (const [wire, key] of requests) {
      const bare = wire.replace(/^compare/, '');
      assert.equal(bare.charAt(0).toUpperCase() + bare.slice(1), key, wire);
    }
    // Every type name follows the rule (the deprecated aliases below aside).
    const lowerFirst = (k: string): string => k.charAt(0).toLowerCase() + k.slice(1);
    for (const [key, wire] of [...Object.entries(HostToViewType), ...Object.entries(ViewToHostType)]) {
      if (key !== 'ExportRequest' && key !== 'SaveRequest') assert.equal(wire, lowerFirst(key), key);
    }
    for (const [key, wire] of [...Object.entries(CompareHostToViewType), ...Object.entries(CompareViewToHostType)]) {
      assert.equal(wire, `compare${key}`, key);
    }
    assert.equal(ViewToHostType.RequestFit, 'requestFit');
    assert.equal(CompareViewToHostType.RequestBands, 'compareRequestBands');
    // The old keys stay as aliases of the same messages, so code written against them keeps working.
    assert.equal(HostToViewType.SaveRequest, HostToViewType.RequestSave);
    assert.equal(HostToViewType.ExportRequest, HostToViewType.RequestExport);
    assert.equal(isHostToViewMessage({ type: 'requestSave' }), true);
    assert.equal(isHostToViewMessage({ type: 'saveRequest' }), false);
  });
});
