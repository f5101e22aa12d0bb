/**
 * SHA-256 (FIPS 180-4) of a byte array, as lowercase hex. Pure TypeScript so it runs unchanged in the
 * extension host, the web worker and the CLI. Checked against the FIPS 180-4 example vectors in tests.
 */

const K = new Uint32Array([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5, 0xd807aa98, 0x12835b01, 0x243185be,
  0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174, 0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa,
  0x5cb0a9dc, 0x76f988da, 0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967, 0x27b70a85,
  0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85, 0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3,
  0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070, 0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f,
  0x682e6ff3, 0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2,
]);

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

/** Incremental SHA-256 in pure TypeScript: feed bytes in chunks (a large file need never be whole in memory). */
export class Sha256 implements IncrementalHash {
  private readonly h = new Uint32Array([0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19]);
  private readonly w = new Uint32Array(64);
  private readonly pending = new Uint8Array(64);
  private pendingLength = 0;
  private length = 0;

  update(data: Uint8Array): this {
    this.length += data.length;
    let off = 0;
    if (this.pendingLength > 0) {
      const take = Math.min(64 - this.pendingLength, data.length);
      this.pending.set(data.subarray(0, take), this.pendingLength);
      this.pendingLength += take;
      off = take;
      if (this.pendingLength < 64) return this;
      this.block(this.pending, 0);
      this.pendingLength = 0;
    }
    for (; off + 64 <= data.length; off += 64) this.block(data, off);
    if (off < data.length) {
      this.pending.set(data.subarray(off));
      this.pendingLength = data.length - off;
    }
    return this;
  }

  hex(): string {
    const rem = this.pendingLength;
    const tail = new Uint8Array(rem < 56 ? 64 : 128);
    tail.set(this.pending.subarray(0, rem));
    tail[rem] = 0x80;
    const bitLen = this.length * 8;
    const hi = Math.floor(bitLen / 0x100000000);
    const lo = bitLen >>> 0;
    const t = tail.length;
    tail[t - 8] = (hi >>> 24) & 0xff;
    tail[t - 7] = (hi >>> 16) & 0xff;
    tail[t - 6] = (hi >>> 8) & 0xff;
    tail[t - 5] = hi & 0xff;
    tail[t - 4] = (lo >>> 24) & 0xff;
    tail[t - 3] = (lo >>> 16) & 0xff;
    tail[t - 2] = (lo >>> 8) & 0xff;
    tail[t - 1] = lo & 0xff;
    for (let off = 0; off < t; off += 64) this.block(tail, off);
    let out = '';
    for (let i = 0; i < 8; i++) out += this.h[i]!.toString(16).padStart(8, '0');
    return out;
  }

  private block(block: Uint8Array, off: number): void {
    const w = this.w;
    const h = this.h;
    for (let i = 0; i < 16; i++) {
      const j = off + 4 * i;
      w[i] = ((block[j]! << 24) | (block[j + 1]! << 16) | (block[j + 2]! << 8) | block[j + 3]!) >>> 0;
    }
    for (let i = 16; i < 64; i++) {
      const x = w[i - 15]!;
      const y = w[i - 2]!;
      const s0 = ((x >>> 7) | (x << 25)) ^ ((x >>> 18) | (x << 14)) ^ (x >>> 3);
      const s1 = ((y >>> 17) | (y << 15)) ^ ((y >>> 19) | (y << 13)) ^ (y >>> 10);
      w[i] = (w[i - 16]! + s0 + w[i - 7]! + s1) >>> 0;
    }
    let a = h[0]!,
      b = h[1]!,
      c = h[2]!,
      d = h[3]!,
      e = h[4]!,
      f = h[5]!,
      g = h[6]!,
      hh = h[7]!;
    for (let i = 0; i < 64; i++) {
      const S1 = ((e >>> 6) | (e << 26)) ^ ((e >>> 11) | (e << 21)) ^ ((e >>> 25) | (e << 7));
      const ch = (e & f) ^ (~e & g);
      const t1 = (hh + S1 + ch + K[i]! + w[i]!) >>> 0;
      const S0 = ((a >>> 2) | (a << 30)) ^ ((a >>> 13) | (a << 19)) ^ ((a >>> 22) | (a << 10));
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const t2 = (S0 + maj) >>> 0;
      hh = g;
      g = f;
      f = e;
      e = (d + t1) >>> 0;
      d = c;
      c = b;
      b = a;
      a = (t1 + t2) >>> 0;
    }
    h[0] = (h[0]! + a) >>> 0;
    h[1] = (h[1]! + b) >>> 0;
    h[2] = (h[2]! + c) >>> 0;
    h[3] = (h[3]! + d) >>> 0;
    h[4] = (h[4]! + e) >>> 0;
    h[5] = (h[5]! + f) >>> 0;
    h[6] = (h[6]! + g) >>> 0;
    h[7] = (h[7]! + hh) >>> 0;
  }
}

export function sha256Hex(data: Uint8Array): string {
  const h = createSha256();
  h.update(data);
  return h.hex();
}
