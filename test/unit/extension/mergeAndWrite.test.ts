import assert from 'node:assert/strict';
import { writeAtomically, type AtomicFs } from '../../../src/extension/atomicWrite';
import { mergeAndWrite } from '../../../src/extension/mergeAndWrite';

/** An in-memory file system with modification times and injectable faults. */
class FakeFs implements AtomicFs {
  files = new Map<string, { text: string; mtime: number }>();
  clock = 1000;
  failWrite: Error | null = null;
  failRename: Error | null = null;
  /** Called between the temporary write and the rename (someone else writes the target then). */
  onBeforeRename: (() => void) | null = null;

  put(path: string, text: string): void {
    this.files.set(path, { text, mtime: ++this.clock });
  }
  async writeFile(path: string, bytes: Uint8Array): Promise<void> {
    if (this.failWrite) throw this.failWrite;
    this.put(path, new TextDecoder().decode(bytes));
  }
  async mtime(path: string): Promise<number | null> {
    this.onBeforeRename?.();
    return this.files.get(path)?.mtime ?? null;
  }
  async rename(from: string, to: string): Promise<void> {
    if (this.failRename) throw this.failRename;
    const f = this.files.get(from);
    if (!f) throw new Error(`${from}: no such file`);
    this.files.delete(from);
    this.files.set(to, f);
  }
  async delete(path: string): Promise<void> {
    if (!this.files.delete(path)) throw new Error(`${path}: no such file`);
  }
  read = async (path: string) => {
    const f = this.files.get(path);
    return { text: f?.text ?? null, mtime: f?.mtime ?? null };
  };
  temporaries(): string[] {
    return [...this.files.keys()].filter((k) => k.endsWith('.tmp'));
  }
}

const P = '/run/EIGENVAL.valleys.json';
/** A stand-in for the merge: keeps every line already there and adds ours. */
const merge = (existing: string | null) => ({ text: `${existing ?? ''}ours\n` });

describe('extension: safe writing of the annotations file (faults)', () => {
  it('writes a new file through a temporary file and leaves no temporary behind', async () => {
    const fs = new FakeFs();
    const out = await mergeAndWrite(fs, P, () => fs.read(P), merge);
    assert.equal(out.status, 'written');
    assert.equal(fs.files.get(P)!.text, 'ours\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('merges again when the file changed on disk between read and write, keeping the other change', async () => {
    const fs = new FakeFs();
    fs.put(P, 'first\n');
    let once = true;
    fs.onBeforeRename = () => {
      if (once) {
        once = false;
        fs.put(P, 'first\nhand edit made meanwhile\n');
      }
    };
    const out = await mergeAndWrite(fs, P, () => fs.read(P), merge);
    assert.equal(out.status, 'written');
    assert.equal(out.status === 'written' && out.attempts, 2);
    assert.equal(fs.files.get(P)!.text, 'first\nhand edit made meanwhile\nours\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('gives up, writing nothing of its own, when the file keeps changing', async () => {
    const fs = new FakeFs();
    fs.put(P, 'v0\n');
    let n = 0;
    fs.onBeforeRename = () => fs.put(P, `v${++n}\n`);
    const out = await mergeAndWrite(fs, P, () => fs.read(P), merge, 3);
    assert.equal(out.status, 'kept-changing');
    assert.doesNotMatch(fs.files.get(P)!.text, /ours/);
    assert.deepEqual(fs.temporaries(), []);
  });

  it('a failed write (disk full) leaves the old file as it was and passes the error on', async () => {
    const fs = new FakeFs();
    fs.put(P, 'old\n');
    fs.failWrite = Object.assign(new Error('ENOSPC: no space left on device'), { code: 'ENOSPC' });
    await assert.rejects(
      mergeAndWrite(fs, P, () => fs.read(P), merge),
      /ENOSPC/,
    );
    assert.equal(fs.files.get(P)!.text, 'old\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('a failed rename leaves the old file and removes the temporary file', async () => {
    const fs = new FakeFs();
    fs.put(P, 'old\n');
    fs.failRename = new Error('EXDEV: cross-device link not permitted');
    await assert.rejects(writeAtomically(fs, P, 'new\n', fs.files.get(P)!.mtime), /EXDEV/);
    assert.equal(fs.files.get(P)!.text, 'old\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('writes nothing when the existing file cannot be read (compose throws)', async () => {
    const fs = new FakeFs();
    fs.put(P, '{ broken');
    const refuse = () => {
      throw new Error('not valid JSON');
    };
    await assert.rejects(
      mergeAndWrite(fs, P, () => fs.read(P), refuse),
      /not valid JSON/,
    );
    assert.equal(fs.files.get(P)!.text, '{ broken');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('writes the temporary file beside the target (same folder), never elsewhere', async () => {
    const fs = new FakeFs();
    const seen: string[] = [];
    const orig = fs.writeFile.bind(fs);
    fs.writeFile = async (p, b) => {
      seen.push(p);
      return orig(p, b);
    };
    await writeAtomically(fs, P, 'x', null);
    assert.equal(seen.length, 1);
    assert.match(seen[0]!, /^\/run\/\.vs-edit-[0-9a-f]{8}\.tmp$/);
  });

  it('keeps the temporary name short whatever the length of the target name', async () => {
    const fs = new FakeFs();
    const seen: string[] = [];
    const orig = fs.writeFile.bind(fs);
    fs.writeFile = async (p, b) => {
      seen.push(p);
      return orig(p, b);
    };
    const long = `/run/${'x'.repeat(230)}.valleys.json`;
    assert.equal(await writeAtomically(fs, long, 'x', null), 'written');
    // 255 bytes is the usual limit of one file name (common practice: ext4, APFS, NTFS).
    assert.ok(seen[0]!.split('/').pop()!.length < 32);
  });
});
