/**
 * Writing a file so that a failure never leaves half of it: write a temporary file beside the target, check
 * that the target did not change since it was read, rename over it. Pure over a small file-system interface
 * (vscode.workspace.fs in the extension, a fake in tests).
 */

export interface AtomicFs {
  writeFile(path: string, bytes: Uint8Array): Promise<void>;
  /** Modification time, or null when the file does not exist. */
  mtime(path: string): Promise<number | null>;
  rename(from: string, to: string): Promise<void>;
  delete(path: string): Promise<void>;
}

export type AtomicWriteResult = 'written' | 'changed-on-disk';

function randomSuffix(): string {
  return Array.from(globalThis.crypto.getRandomValues(new Uint8Array(4)), (x) => x.toString(16).padStart(2, '0')).join('');
}

/**
 * Write `text` to `path` unless the file's modification time is no longer `expectedMtime` (null: the file
 * did not exist when read). A failure at any step leaves the old file as it was and no temporary file behind
 * (as far as the file system lets us delete it); the error is passed on.
 */
export async function writeAtomically(fs: AtomicFs, path: string, text: string, expectedMtime: number | null): Promise<AtomicWriteResult> {
  // Short and hidden, beside the target: a long target name cannot make it too long for the file system.
  const slash = path.lastIndexOf('/');
  const tmp = `${slash >= 0 ? path.slice(0, slash + 1) : ''}.vs-edit-${randomSuffix()}.tmp`;
  let renamed = false;
  try {
    await fs.writeFile(tmp, new TextEncoder().encode(text));
    if ((await fs.mtime(path)) !== expectedMtime) return 'changed-on-disk';
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
}
