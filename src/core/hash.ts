/**
 * SHA-256 (FIPS 180-4) of a byte array, as lowercase hex. Node's native hash where the host supplies it (CLI,
 * desktop extension host); elsewhere (web worker, browser) the audited pure implementation of @noble/hashes.
 * Checked against the FIPS 180-4 example vectors in tests.
 */
import { sha256 } from '@noble/hashes/sha256';
import { bytesToHex } from '@noble/hashes/utils';

/** What a SHA-256 implementation offers: feed bytes in chunks, then the hex digest. */
export interface IncrementalHash {
  update(data: Uint8Array): unknown;
  hex(): string;
}

let nativeFactory: (() => IncrementalHash) | null = null;

/**
 * Let a host with a native SHA-256 (node's crypto in the CLI and the desktop extension host) supply it;
 * the pure implementation below serves everywhere else (web worker, webview). Same digests either way.
 */
export function useNativeSha256(factory: (() => IncrementalHash) | null): void {
  nativeFactory = factory;
}

/** A fresh incremental SHA-256: native when a host supplied one, else the pure implementation. */
export function createSha256(): IncrementalHash {
  return nativeFactory ? nativeFactory() : new Sha256();
}

/** Incremental SHA-256 without a native host (@noble/hashes): feed bytes in chunks, a large file need never be whole. */
export class Sha256 implements IncrementalHash {
  private readonly inner = sha256.create();

  update(data: Uint8Array): this {
    this.inner.update(data);
    return this;
  }

  hex(): string {
    return bytesToHex(this.inner.digest());
  }
}

export function sha256Hex(data: Uint8Array): string {
  const h = createSha256();
  h.update(data);
  return h.hex();
}
