/**
 * `--shard i/n`: a deterministic share of the runs, chosen by a hash of each run's path, so a scheduler's
 * job array can run the shards on many nodes. A run's shard depends only on its own path and n: adding or
 * removing other runs never moves it to another shard.
 */
import { sha256Hex } from '../../core/hash';
import { UsageError } from '../args';

export interface Shard {
  /** 1-based index of this shard. */
  index: number;
  count: number;
}

/** "i/n" with 1 ≤ i ≤ n ≤ 100000. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d{1,6})\s*\/\s*(\d{1,6})\s*$/.exec(text);
  if (!m) throw new UsageError(`--shard must be i/n (for example 1/4), got "${text}"`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || count > 100000 || index < 1 || index > count) {
    throw new UsageError(`--shard i/n needs 1 ≤ i ≤ n ≤ 100000, got "${text}"`);
  }
  return { index, count };
}

/** The path as it is hashed and printed: '/' separators, no "./" prefix, no repeated or trailing '/'. */
export function normalizeRunPath(path: string): string {
  let p = path.replace(/\\/g, '/').replace(/\/{2,}/g, '/');
  while (p.startsWith('./') && p.length > 2) p = p.slice(2);
  p = p.replace(/\/(\.\/)+/g, '/');
  if (p.length > 1 && p.endsWith('/')) p = p.slice(0, -1);
  return p;
}

/** The 1-based shard (of `count`) a run belongs to: the first 48 bits of SHA-256 of its normalised path, modulo count. */
export function shardOf(path: string, count: number): number {
  const hex = sha256Hex(new TextEncoder().encode(normalizeRunPath(path)));
  return (Number.parseInt(hex.slice(0, 12), 16) % count) + 1;
}

export function inShard(path: string, shard: Shard | null): boolean {
  return shard === null || shardOf(path, shard.count) === shard.index;
}
