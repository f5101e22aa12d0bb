import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  MESSAGE_LIMITS,
  base64ToBytes,
  bytesToBase64,
  decodeArray,
  encodeArray,
  encodeArrayBase64,
  isHostToViewMessage,
  isViewToHostMessage,
} from '../../../src/protocol';

const fit = { type: 'requestFit', requestId: 7, spin: 0, kIndex: 12, band0: 4, window_meV: 25, method: 'parabola' };

describe('protocol: validation of messages from the webview', () => {
  it('accepts one well-formed message of every kind', () => {
    const good: unknown[] = [
      { type: 'ready' },
      fit,
      { ...fit, withScan: true },
      { ...fit, maximum: false },
      { type: 'save', entries: [{ spin: 0, kIndex: 3, band0: 4, maximum: true, window_meV: 30, method: 'poly4' }] },
      { type: 'requestWindowScan', requestId: 1, spin: 1, kIndex: 0, band0: 0, method: 'kane' },
      { type: 'requestWindowScan', requestId: 1, spin: 0, kIndex: 0, band0: 0, method: 'fd5', windows_meV: [10, 20, 40] },
      { type: 'save', entries: [] },
      {
        type: 'save',
        entries: [{ spin: 0, kIndex: 3, band0: 4, window_meV: 30, method: 'poly4', note: 'heavy along L' }],
        notes: 'run looks fine',
      },
      { type: 'export', format: 'svg', data: '<svg xmlns="http://www.w3.org/2000/svg"></svg>', width: 800, height: 600 },
      { type: 'export', format: 'png', data: new Uint8Array([0x89, 0x50]), width: 2400, height: 1800 },
      { type: 'export', format: 'png', data: new ArrayBuffer(8), width: 10, height: 10 },
      { type: 'export', format: 'png', data: 'iVBORw0KGgo=', width: 10, height: 10 },
      { type: 'openFile' },
      { type: 'openFile', kIndex: 99 },
      { type: 'viewError', message: 'canvas lost' },
    ];
    for (const m of good) assert.equal(isViewToHostMessage(m), true, JSON.stringify(m));
  });

  it('refuses anything else: unknown types, extra keys, wrong types, out-of-range values', () => {
    const bad: unknown[] = [
      null,
      undefined,
      42,
      'ready',
      [],
      [{ type: 'ready' }],
      {},
      { type: 'Ready' },
      { type: 'ready', extra: 1 },
      { type: 'bandData' }, // a host-to-view type sent the wrong way
      { ...fit, spin: 2 },
      { ...fit, maximum: 'yes' },
      { ...fit, spin: '0' },
      { ...fit, kIndex: -1 },
      { ...fit, kIndex: 1.5 },
      { ...fit, kIndex: MESSAGE_LIMITS.maxIndex + 1 },
      { ...fit, band0: Number.NaN },
      { ...fit, window_meV: 0 },
      { ...fit, window_meV: Number.POSITIVE_INFINITY },
      { ...fit, window_meV: MESSAGE_LIMITS.maxWindow_meV + 1 },
      { ...fit, method: '' },
      { ...fit, method: 'parabola; rm -rf /' },
      { ...fit, method: 'x'.repeat(MESSAGE_LIMITS.maxMethodChars + 1) },
      { ...fit, requestId: -3 },
      { ...fit, withScan: 'yes' },
      { ...fit, __proto__: { polluted: true }, extra: 1 },
      { type: 'requestWindowScan', requestId: 1, spin: 0, kIndex: 0, band0: 0, method: 'kane', windows_meV: [] },
      { type: 'requestWindowScan', requestId: 1, spin: 0, kIndex: 0, band0: 0, method: 'kane', windows_meV: [10, -1] },
      {
        type: 'requestWindowScan',
        requestId: 1,
        spin: 0,
        kIndex: 0,
        band0: 0,
        method: 'kane',
        windows_meV: new Array(MESSAGE_LIMITS.maxScanWindows + 1).fill(10),
      },
      { type: 'save' },
      { type: 'save', entries: {} },
      { type: 'save', entries: [{ spin: 0, kIndex: 3, band0: 4, window_meV: 30, method: 'poly4', path: '/etc/passwd' }] },
      { type: 'save', entries: [{ spin: 0, kIndex: 3, band0: 4, window_meV: 30, method: 'poly4', note: 5 }] },
      { type: 'save', entries: [], notes: 'x'.repeat(MESSAGE_LIMITS.maxNoteChars + 1) },
      { type: 'save', entries: [], target: 'elsewhere.json' },
      { type: 'export', format: 'pdf', data: 'x', width: 1, height: 1 },
      { type: 'export', format: 'svg', data: new Uint8Array(3), width: 1, height: 1 },
      { type: 'export', format: 'png', data: 'not base64 !', width: 1, height: 1 },
      { type: 'export', format: 'png', data: [1, 2, 3], width: 1, height: 1 },
      { type: 'export', format: 'svg', data: '<svg/>', width: 0, height: 1 },
      { type: 'export', format: 'svg', data: '<svg/>', width: 1, height: MESSAGE_LIMITS.maxExportPixels + 1 },
      { type: 'export', format: 'svg', data: '<svg/>', width: 1, height: 1, path: '/tmp/x.svg' },
      { type: 'openFile', kIndex: -1 },
      { type: 'openFile', path: '/etc/passwd' },
      { type: 'viewError', message: 'x'.repeat(MESSAGE_LIMITS.maxErrorChars + 1) },
      { type: 'viewError', message: 404 },
      { type: 'openFile', kIndex: '3' },
      { type: 'save', entries: [{ spin: 0, kIndex: 3, band0: '4', window_meV: 30, method: 'poly4' }] },
      { type: 'export', format: 'svg', data: '<svg/>', width: '1', height: 1 },
      { type: 'requestSave' }, // a host-to-view request sent the wrong way
      { type: 'fitRequest' }, // no such message
    ];
    for (const m of bad) assert.equal(isViewToHostMessage(m), false, String(JSON.stringify(m)).slice(0, 120));
  });

  it('never throws on arbitrary JSON-like input (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.anything(),
          fc.record(
            { type: fc.constantFrom('ready', 'requestFit', 'save', 'export', 'openFile', 'viewError', 'requestWindowScan') },
            { requiredKeys: [] },
          ),
        ),
        (x) => {
          const r = isViewToHostMessage(x);
          assert.equal(typeof r, 'boolean');
        },
      ),
      { seed: 20261201, numRuns: 500 },
    );
  });

  it('recognises host-to-view types on the view side', () => {
    assert.equal(isHostToViewMessage({ type: 'fitResult' }), true);
    assert.equal(isHostToViewMessage({ type: 'requestFit' }), false);
    assert.equal(isHostToViewMessage(null), false);
  });
});

describe('protocol: compact arrays', () => {
  it("base64 agrees with Node's Buffer encoder (a general-purpose reference) on random bytes", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 200 }), (bytes) => {
        const ref = Buffer.from(bytes).toString('base64');
        assert.equal(bytesToBase64(bytes), ref);
        assert.deepEqual(Array.from(base64ToBytes(ref)), Array.from(bytes));
      }),
      { seed: 7, numRuns: 300 },
    );
  });

  it('round-trips Float64 and Float32 arrays through ArrayBuffer, typed array and base64 forms', () => {
    const v = Float64Array.from([-5.123456789012, 0, 1e-300, 12.5, Number.MAX_VALUE]);
    assert.deepEqual(Array.from(decodeArray(encodeArray(v))), Array.from(v));
    assert.deepEqual(Array.from(decodeArray(encodeArrayBase64(v))), Array.from(v));
    assert.deepEqual(Array.from(decodeArray({ dtype: 'f64', length: v.length, data: v })), Array.from(v));
    const f = decodeArray(encodeArray(v, 'f32'));
    assert.ok(f instanceof Float32Array);
    // 32-bit floats keep about 7 significant digits (IEEE 754 binary32).
    assert.ok(Math.abs(f[0]! - v[0]!) < 1e-6 * Math.abs(v[0]!));
  });

  it('decodes a view at an unaligned offset of a larger buffer', () => {
    const v = Float64Array.from([1.5, -2.25, 3.125]);
    const big = new Uint8Array(1 + v.byteLength);
    big.set(new Uint8Array(v.buffer), 1);
    const view = big.subarray(1);
    const d = decodeArray({ dtype: 'f64', length: 3, data: bytesToBase64(view) });
    assert.deepEqual(Array.from(d), [1.5, -2.25, 3.125]);
  });

  it('refuses a length that does not match the bytes', () => {
    assert.throws(() => decodeArray({ dtype: 'f64', length: 4, data: new ArrayBuffer(24) }), /do not hold 4 values/);
    assert.throws(() => decodeArray({ dtype: 'f32', length: 1, data: '*not*' }), /not base64/);
    // RFC 4648 §4: base64 text is whole groups of 4 characters; one character left over cannot be decoded.
    assert.throws(() => base64ToBytes('QUJDR'), /not base64/);
  });

  it('encodeArray copies: later changes to the source do not reach the message', () => {
    const v = Float64Array.from([1, 2, 3]);
    const e = encodeArray(v);
    v[0] = 99;
    assert.equal(decodeArray(e)[0], 1);
  });
});
