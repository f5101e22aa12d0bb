/** The FileAccessor over node's file system, for the CLI. */
import { closeSync, fstatSync, openSync, promises as fsp, readSync } from 'node:fs';
import type { ByteRangeSource, DirEntry, FileAccessor } from '../core/io/fileAccessor';

export const nodeFileAccessor: FileAccessor = {
  async readFile(path: string): Promise<Uint8Array> {
    const b = await fsp.readFile(path);
    return new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  },
  async readHead(path: string, bytes: number): Promise<Uint8Array> {
    const fh = await fsp.open(path, 'r');
    try {
      const buf = Buffer.alloc(bytes);
      const { bytesRead } = await fh.read(buf, 0, bytes, 0);
      return new Uint8Array(buf.buffer, buf.byteOffset, bytesRead);
    } finally {
      await fh.close();
    }
  },
  async stat(path: string) {
    try {
      const s = await fsp.stat(path);
      return { type: s.isDirectory() ? 'directory' : 'file', size: s.size } as const;
    } catch {
      return null;
    }
  },
  openRanged(path: string): ByteRangeSource {
    const fd = openSync(path, 'r');
    const size = fstatSync(fd).size;
    return {
      size,
      read(offset: number, length: number): Uint8Array {
        const n = Math.max(0, Math.min(length, size - offset));
        const buf = new Uint8Array(n);
        let got = 0;
        while (got < n) {
          const r = readSync(fd, buf, got, n - got, offset + got);
          if (r === 0) break;
          got += r;
        }
        return got === n ? buf : buf.subarray(0, got);
      },
      readInto(offset: number, target: Uint8Array, targetOffset: number, length: number): number {
        const n = Math.max(0, Math.min(length, size - offset, target.length - targetOffset));
        let got = 0;
        while (got < n) {
          const r = readSync(fd, target, targetOffset + got, n - got, offset + got);
          if (r === 0) break;
          got += r;
        }
        return got;
      },
      close(): void {
        closeSync(fd);
      },
    };
  },
  async list(dir: string): Promise<DirEntry[]> {
    const entries = await fsp.readdir(dir, { withFileTypes: true });
    return entries
      .filter((e) => e.isFile() || e.isDirectory())
      .map((e) => ({ name: e.name, type: e.isDirectory() ? 'directory' : 'file' }));
  },
};
