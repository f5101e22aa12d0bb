/**
 * Ranged reads of a local file through node's file system, reached at run time with
 * `process.getBuiltinModule` so that no bundle (the web build included) imports `node:fs`. Used by the
 * analysis worker to stream very large eigenvalue files instead of holding their bytes.
 */
import type { ByteRangeSource } from '../core/io/fileAccessor';

interface NodeFs {
  openSync(path: string, flags: number): number;
  fstatSync(fd: number): { size: number; isFile(): boolean };
  constants: { O_RDONLY: number; O_NONBLOCK?: number };
  readSync(fd: number, buffer: Uint8Array, offset: number, length: number, position: number): number;
  closeSync(fd: number): void;
}

function nodeFs(): NodeFs | null {
  const proc = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process;
  if (!proc || typeof proc.getBuiltinModule !== 'function') return null;
  return (proc.getBuiltinModule('node:fs') as NodeFs | undefined) ?? null;
}

/** True where local files can be read in ranges (node with process.getBuiltinModule). */
export function canReadLocalRanges(): boolean {
  return nodeFs() !== null;
}

/** Open a local file for ranged reads; throws when node's file system is not available. */
export function openLocalRanged(fsPath: string): ByteRangeSource {
  const fs = nodeFs();
  if (!fs) throw new Error('ranged reads of local files need node');
  // Non-blocking, and only a regular file: a FIFO swapped in after the host checked the path cannot hang the worker.
  const fd = fs.openSync(fsPath, fs.constants.O_RDONLY | (fs.constants.O_NONBLOCK ?? 0));
  const st = fs.fstatSync(fd);
  if (!st.isFile()) {
    fs.closeSync(fd);
    throw new Error(`${fsPath} is not a regular file; only regular files are read`);
  }
  const size = st.size;
  const readInto = (offset: number, target: Uint8Array, targetOffset: number, length: number): number => {
    const n = Math.max(0, Math.min(length, size - offset, target.length - targetOffset));
    let got = 0;
    while (got < n) {
      const r = fs.readSync(fd, target, targetOffset + got, n - got, offset + got);
      if (r === 0) break;
      got += r;
    }
    return got;
  };
  return {
    size,
    read(offset: number, length: number): Uint8Array {
      const buf = new Uint8Array(Math.max(0, Math.min(length, size - offset)));
      const got = readInto(offset, buf, 0, buf.length);
      return got === buf.length ? buf : buf.subarray(0, got);
    },
    readInto,
    close(): void {
      fs.closeSync(fd);
    },
  };
}
