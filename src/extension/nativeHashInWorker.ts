/**
 * node's OpenSSL SHA-256 for the core's source hashes, where the worker runs on node (desktop and remote
 * extension hosts). Looked up at run time, so the web build (which never starts this worker) bundles no
 * node module; without it the core's pure SHA-256 serves, with the same digests.
 */
import { useNativeSha256 } from '../core/hash';

interface NodeHash {
  update(data: Uint8Array): unknown;
  digest(encoding: 'hex'): string;
}

export function installNativeSha256IfAvailable(): boolean {
  const proc = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process;
  const crypto = proc?.getBuiltinModule?.('node:crypto') as { createHash?: (alg: string) => NodeHash } | undefined;
  if (!crypto?.createHash) return false;
  const createHash = crypto.createHash;
  useNativeSha256(() => {
    const h = createHash('sha256');
    return { update: (d: Uint8Array) => h.update(d), hex: () => h.digest('hex') };
  });
  return true;
}
