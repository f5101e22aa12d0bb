/** node's OpenSSL SHA-256 for the core's hashing (several times faster than the pure implementation). */
import { createHash } from 'node:crypto';
import { useNativeSha256, type IncrementalHash } from '../core/hash';

export function installNativeSha256(): void {
  useNativeSha256((): IncrementalHash => {
    const h = createHash('sha256');
    return {
      update: (data: Uint8Array) => h.update(data),
      hex: () => h.digest('hex'),
    };
  });
}
