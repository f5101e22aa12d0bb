import assert from 'node:assert/strict';
import { installNativeSha256IfAvailable } from '../../../src/extension/nativeHashInWorker';
import { sha256Hex, useNativeSha256 } from '../../../src/core/hash';

describe('native SHA-256 in the analysis worker', () => {
  it('is found on node and gives the FIPS 180-4 digest', () => {
    try {
      assert.equal(installNativeSha256IfAvailable(), true);
      // FIPS 180-4 example vector for "abc".
      assert.equal(sha256Hex(new TextEncoder().encode('abc')), 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    } finally {
      useNativeSha256(null);
    }
  });
});
