/**
 * The SHA-256 of a run's main file, for its SourceFile record, or none when the caller asked for none
 * (ReadOptions.hashSources false: a command that prints no hash, such as `analyze`, need not pay for one).
 */
import { createSha256, sha256Hex, type IncrementalHash } from '../hash';
import type { ReadOptions } from './types';

/** SourceFile.sha256 of a main file whose hash was not asked for (never a valid digest: 64 hex digits are). */
export const NOT_HASHED = '';

/** Whether the caller wants the main file hashed (the default). */
export function hashesSources(options: ReadOptions): boolean {
  return options.hashSources !== false;
}

/** The main file's SHA-256 from its bytes, or NOT_HASHED when not asked for. */
export function mainFileSha256(bytes: Uint8Array, options: ReadOptions): string {
  return hashesSources(options) ? sha256Hex(bytes) : NOT_HASHED;
}

/** An incremental hash for a main file read in pieces, or null when not asked for. */
export function mainFileHasher(options: ReadOptions): IncrementalHash | null {
  return hashesSources(options) ? createSha256() : null;
}
