/**
 * What a file-system entry is, from a node-style stat (node's fs.Stats, in the CLI and the desktop editor):
 * a regular file, a folder, or something else named in words (a FIFO would block a read, a device never ends).
 */
import type { EntryType } from './fileAccessor';

/** The predicates of node's fs.Stats this needs (core imports no node module). */
export interface StatKinds {
  isFile(): boolean;
  isDirectory(): boolean;
  isFIFO(): boolean;
  isCharacterDevice(): boolean;
  isBlockDevice(): boolean;
  isSocket(): boolean;
}

export function entryKindOf(s: StatKinds): { type: EntryType; kind?: string } {
  if (s.isFile()) return { type: 'file' };
  if (s.isDirectory()) return { type: 'directory' };
  const kind = s.isFIFO()
    ? 'a FIFO (named pipe)'
    : s.isCharacterDevice()
      ? 'a character device'
      : s.isBlockDevice()
        ? 'a block device'
        : s.isSocket()
          ? 'a socket'
          : 'not a regular file';
  return { type: 'other', kind };
}
