import assert from 'node:assert/strict';
import { atomicWriterOver, type AtomicFs } from '../../../src/extension/atomicWrite';
import { contentStamp, mergeAndWrite, readStateOf } from '../../../src/core/annotations/atomicWrite';

const bytesOf = (text: string): Uint8Array => new TextEncoder().encode(text);

/** An in-memory file system with injectable faults. */
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
  /** Read by the writer just before the rename: someone else may write the target first (onBeforeRename). */
  async readFile(path: string): Promise<Uint8Array | null> {
    this.onBeforeRename?.();
    const f = this.files.get(path);
    return f ? bytesOf(f.text) : null;
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
    return readStateOf(f ? bytesOf(f.text) : null);
  };
  /** The paths written, in order (a spy on writeFile). */
  spyWrites(): string[] {
    const seen: string[] = [];
    const orig = this.writeFile.bind(this);
    this.writeFile = async (p, b) => {
      seen.push(p);
      return orig(p, b);
    };
    return seen;
  }
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
    const out = await mergeAndWrite(atomicWriterOver(fs), P, () => fs.read(P), merge);
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
    const out = await mergeAndWrite(atomicWriterOver(fs), P, () => fs.read(P), merge);
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
    const out = await mergeAndWrite(atomicWriterOver(fs), P, () => fs.read(P), merge, 3);
    assert.equal(out.status, 'kept-changing');
    assert.doesNotMatch(fs.files.get(P)!.text, /ours/);
    assert.deepEqual(fs.temporaries(), []);
  });

  it('a failed write (disk full) leaves the old file as it was and passes the error on', async () => {
    const fs = new FakeFs();
    fs.put(P, 'old\n');
    fs.failWrite = Object.assign(new Error('ENOSPC: no space left on device'), { code: 'ENOSPC' });
    await assert.rejects(
      mergeAndWrite(atomicWriterOver(fs), P, () => fs.read(P), merge),
      /ENOSPC/,
    );
    assert.equal(fs.files.get(P)!.text, 'old\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('a failed rename leaves the old file and removes the temporary file', async () => {
    const fs = new FakeFs();
    fs.put(P, 'old\n');
    fs.failRename = new Error('EXDEV: cross-device link not permitted');
    await assert.rejects(atomicWriterOver(fs).writeIfUnchanged(P, bytesOf('new\n'), contentStamp(bytesOf('old\n'))), /EXDEV/);
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
      mergeAndWrite(atomicWriterOver(fs), P, () => fs.read(P), refuse),
      /not valid JSON/,
    );
    assert.equal(fs.files.get(P)!.text, '{ broken');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('writes the temporary file beside the target (same folder), never elsewhere', async () => {
    const fs = new FakeFs();
    const seen = fs.spyWrites();
    await atomicWriterOver(fs).writeIfUnchanged(P, bytesOf('x'), null);
    assert.equal(seen.length, 1);
    assert.match(seen[0]!, /^\/run\/\.vs-edit-[0-9a-f]{8}\.tmp$/);
  });

  it('keeps the temporary name short whatever the length of the target name', async () => {
    const fs = new FakeFs();
    const seen = fs.spyWrites();
    const long = `/run/${'x'.repeat(230)}.valleys.json`;
    assert.equal(await atomicWriterOver(fs).writeIfUnchanged(long, bytesOf('x'), null), 'written');
    // 255 bytes is the usual limit of one file name (common practice: ext4, APFS, NTFS).
    assert.ok(seen[0]!.split('/').pop()!.length < 32);
  });

  it('decides "unchanged" by content: a rewrite with the same bytes is no change, a different text is', async () => {
    const fs = new FakeFs();
    fs.put(P, 'old\n');
    const read = contentStamp(bytesOf('old\n'));
    // Someone saves the same text again (a new modification time, the same content): the write goes ahead.
    fs.onBeforeRename = () => fs.put(P, 'old\n');
    assert.equal(await atomicWriterOver(fs).writeIfUnchanged(P, bytesOf('new\n'), read), 'written');
    assert.equal(fs.files.get(P)!.text, 'new\n');
    // Someone changes one byte, whatever the clock says: nothing is written.
    fs.put(P, 'old\n');
    fs.onBeforeRename = () => keepingMtime(fs, 'olD\n');
    assert.equal(await atomicWriterOver(fs).writeIfUnchanged(P, bytesOf('new\n'), read), 'changed-on-disk');
    assert.equal(fs.files.get(P)!.text, 'olD\n');
    assert.deepEqual(fs.temporaries(), []);
  });

  it('a file that appears where there was none counts as changed', async () => {
    const fs = new FakeFs();
    fs.onBeforeRename = () => fs.put(P, '{}');
    assert.equal(await atomicWriterOver(fs).writeIfUnchanged(P, bytesOf('x'), null), 'changed-on-disk');
    assert.equal(fs.files.get(P)!.text, '{}');
  });
});

/** Replace the target's text keeping its modification time (a change a time stamp would not see). */
function keepingMtime(fs: FakeFs, text: string): void {
  const f = fs.files.get(P)!;
  fs.files.set(P, { text, mtime: f.mtime });
}
