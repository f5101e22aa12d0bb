import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import fc from 'fast-check';
import { sha256Hex } from '../../../src/core/hash';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);

describe('sha256Hex', () => {
  it('matches the FIPS 180-4 example vectors', () => {
    // FIPS 180-4 / NIST CSRC example values for SHA-256.
    assert.equal(sha256Hex(enc('abc')), 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    assert.equal(sha256Hex(enc('')), 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
    assert.equal(
      sha256Hex(enc('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')),
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
  });

  it('agrees with node:crypto on random inputs of every length around block boundaries', () => {
    // Reference: node's OpenSSL-backed SHA-256 (general-purpose reference library).
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 0, maxLength: 300 }), (bytes) => {
        assert.equal(sha256Hex(bytes), createHash('sha256').update(bytes).digest('hex'));
      }),
      { seed: 42, numRuns: 200 },
    );
  });
});

describe('Sha256 (incremental)', () => {
  it('gives the one-shot digest whatever the chunking', async () => {
    const { Sha256 } = await import('../../../src/core/hash');
    // Reference: node's OpenSSL-backed SHA-256.
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 0, maxLength: 400 }), fc.array(fc.nat(80), { maxLength: 10 }), (bytes, cuts) => {
        const h = new Sha256();
        let off = 0;
        for (const c of cuts) {
          h.update(bytes.subarray(off, Math.min(bytes.length, off + c)));
          off = Math.min(bytes.length, off + c);
        }
        h.update(bytes.subarray(off));
        assert.equal(h.hex(), createHash('sha256').update(bytes).digest('hex'));
      }),
      { seed: 3, numRuns: 200 },
    );
  });
});

describe('native SHA-256 hook', () => {
  it('a host-supplied hash gives the same digest as the pure one', async () => {
    const { useNativeSha256, sha256Hex, Sha256 } = await import('../../../src/core/hash');
    const { installNativeSha256 } = await import('../../../src/cli/nativeHash');
    const bytes = new TextEncoder().encode('valleyscope '.repeat(1000));
    const pure = new Sha256().update(bytes).hex();
    installNativeSha256();
    try {
      assert.equal(sha256Hex(bytes), pure);
      // Reference: FIPS 180-4 example vector, through the native path.
      assert.equal(sha256Hex(enc('abc')), 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    } finally {
      useNativeSha256(null);
    }
  });
});
