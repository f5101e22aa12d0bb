/**
 * The extension's side of the atomic-write contract (core/annotations/atomicWrite.ts): write a temporary file
 * beside the target, check that the target still holds what was read (by content), rename over it. Over a
 * small file-system interface (vscode.workspace.fs in annotationsWriter.ts, a fake in tests).
 */
import { contentStamp, type AtomicWriter, type ContentStamp } from '../core/annotations/atomicWrite';

export interface AtomicFs {
  writeFile(path: string, bytes: Uint8Array): Promise<void>;
  /** The file's bytes, or null when it does not exist. */
  readFile(path: string): Promise<Uint8Array | null>;
  rename(from: string, to: string): Promise<void>;
  delete(path: string): Promise<void>;
}

function randomSuffix(): string {
  return Array.from(globalThis.crypto.getRandomValues(new Uint8Array(4)), (x) => x.toString(16).padStart(2, '0')).join('');
}

/** Short and hidden, beside the target: a long target name cannot make it too long for the file system. */
export function editTempPathFor(path: string): string {
  const slash = path.lastIndexOf('/');
  return `${slash >= 0 ? path.slice(0, slash + 1) : ''}.vs-edit-${randomSuffix()}.tmp`;
}

/** The contract over `fs`. */
export function atomicWriterOver(fs: AtomicFs): AtomicWriter {
  return {
    async writeIfUnchanged(path: string, bytes: Uint8Array, expected: ContentStamp) {
      const tmp = editTempPathFor(path);
      let renamed = false;
      try {
        await fs.writeFile(tmp, bytes);
        if (contentStamp(await fs.readFile(path)) !== expected) return 'changed-on-disk';
        await fs.rename(tmp, path);
        renamed = true;
        return 'written';
      } finally {
        if (!renamed) {
          try {
            await fs.delete(tmp);
          } catch {
            // Never created (the write failed) or already gone.
          }
        }
      }
    },
  };
}
