import { strict as assert } from 'node:assert';
import { spawn } from 'node:child_process';
import { promises as fsp, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, chmodSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { nodeSafeWriteFs, writeAnnotationsBeside, writeFileSafely, WriteConflictError, type SafeWriteFs } from '../../../src/cli/safeWrite';
import { ValleyscopeError } from '../../../src/core/errors';
import { annotateOne } from '../../../src/cli/commands/annotate';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { writeTinyRun } from './tinyRun';

const OLD = '{\n  "valleyscopeAnnotations": 1,\n  "note": "the reviewer\'s words"\n}\n';
const NEW = '{\n  "valleyscopeAnnotations": 1,\n  "note": "rewritten"\n}\n';

describe('safe writes', () => {
  let dir = '';
  let target = '';
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'vs-safe-'));
    target = join(dir, 'EIGENVAL.valleys.json');
    writeFileSync(target, OLD);
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('replaces the file and keeps its permissions', async () => {
    chmodSync(target, 0o640);
    await writeFileSafely(target, NEW);
    assert.equal(readFileSync(target, 'utf8'), NEW);
    assert.equal(statSync(target).mode & 0o777, 0o640);
    assert.deepEqual(readdirSync(dir), ['EIGENVAL.valleys.json'], 'no temporary file left');
  });

  it('leaves the old file intact when the write is interrupted between the temporary file and the rename', async () => {
    let temp = '';
    await assert.rejects(
      writeFileSafely(target, NEW, {
        beforeRename: (t) => {
          temp = t;
          assert.equal(readFileSync(t, 'utf8'), NEW, 'the new content is complete in the temporary file');
          throw new Error('simulated crash');
        },
      }),
      (e: unknown) => e instanceof ValleyscopeError && /previous file, if any, is unchanged/.test(e.message),
    );
    assert.equal(readFileSync(target, 'utf8'), OLD);
    assert.ok(temp.startsWith(join(dir, '.vs-')) && temp.endsWith('.tmp'), 'the temporary file sits beside the target, short and hidden');
    assert.ok(!existsSync(temp), 'the temporary file is removed');
  });

  it('leaves the old file intact when the disk is full, and says so in a sentence', async () => {
    const full: SafeWriteFs = {
      ...nodeSafeWriteFs,
      open: async (p, flags, mode) => {
        const h = await fsp.open(p, flags, mode);
        // Half the bytes reach the disk, then the device is full (ENOSPC), as a real write would fail.
        let calls = 0;
        const write = h.write.bind(h) as (b: Uint8Array, o: number, l: number, p: number) => Promise<{ bytesWritten: number }>;
        (h as unknown as { write: unknown }).write = async (b: Uint8Array, o: number, l: number, pos: number) => {
          if (calls++ === 0) return write(b, o, Math.floor(l / 2), pos);
          throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
        };
        return h;
      },
    };
    await assert.rejects(
      writeFileSafely(target, NEW, { fs: full }),
      (e: unknown) => e instanceof ValleyscopeError && /the disk is full/.test(e.message) && e.message.includes(target),
    );
    assert.equal(readFileSync(target, 'utf8'), OLD);
    assert.deepEqual(readdirSync(dir), ['EIGENVAL.valleys.json']);
  });

  it('writes nothing when the file changed on disk between reading and writing', async () => {
    const before = new Uint8Array(readFileSync(target));
    const theirs = OLD.replace("the reviewer's words", 'typed in the editor meanwhile');
    await assert.rejects(
      writeFileSafely(target, NEW, { expectExisting: before, beforeRename: () => writeFileSync(target, theirs) }),
      (e: unknown) => e instanceof WriteConflictError && /changed on disk/.test(e.message),
    );
    assert.equal(readFileSync(target, 'utf8'), theirs, 'the concurrent edit survives');
    assert.deepEqual(readdirSync(dir), ['EIGENVAL.valleys.json']);
  });

  it('writes nothing when a file appeared where none was expected', async () => {
    const fresh = join(dir, 'other.valleys.json');
    await assert.rejects(
      writeFileSafely(fresh, NEW, { expectExisting: null, beforeRename: () => writeFileSync(fresh, 'someone else') }),
      WriteConflictError,
    );
    assert.equal(readFileSync(fresh, 'utf8'), 'someone else');
  });

  it('reports a folder that cannot be written in one sentence, old file intact', async function () {
    if (process.getuid?.() === 0) {
      // root ignores folder permissions: simulate the refusal instead of skipping the check.
      const denied: SafeWriteFs = {
        ...nodeSafeWriteFs,
        open: async () => {
          throw Object.assign(new Error('EACCES'), { code: 'EACCES' });
        },
      };
      await assert.rejects(writeFileSafely(target, NEW, { fs: denied }), /permission to write in its folder is denied/);
    } else {
      chmodSync(dir, 0o500);
      try {
        await assert.rejects(writeFileSafely(target, NEW), /permission to write in its folder is denied/);
      } finally {
        chmodSync(dir, 0o700);
      }
    }
    assert.equal(readFileSync(target, 'utf8'), OLD);
  });

  it('always writes annotations beside the data file', async () => {
    const data = join(dir, 'run', 'EIGENVAL');
    await fsp.mkdir(join(dir, 'run'));
    const written = await writeAnnotationsBeside(data, NEW);
    assert.equal(written, `${data}.valleys.json`);
    assert.equal(readFileSync(written, 'utf8'), NEW);
  });

  it('leaves the old file intact when the writing process is killed before the rename', async function () {
    this.timeout(30000);
    const child = join(dir, 'writer.ts');
    const safeWrite = resolve('src/cli/safeWrite.ts');
    writeFileSync(
      child,
      `import { writeFileSafely } from ${JSON.stringify(safeWrite)};
writeFileSafely(${JSON.stringify(target)}, 'x'.repeat(1 << 20), {
  beforeRename: () => new Promise(() => { process.stdout.write('ready\\n'); setInterval(() => {}, 1000); }),
});
`,
    );
    const p = spawn(process.execPath, ['--import', 'tsx', child], { cwd: resolve('.'), stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    p.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    await new Promise<void>((ok, fail) => {
      const timer = setTimeout(() => fail(new Error(`the child never got ready: ${stderr}`)), 25000);
      p.stdout.on('data', (d: Buffer) => {
        if (d.toString().includes('ready')) {
          clearTimeout(timer);
          ok();
        }
      });
      p.on('exit', (code) => {
        clearTimeout(timer);
        fail(new Error(`the child ended early (${code}): ${stderr}`));
      });
    });
    p.removeAllListeners('exit');
    const exited = new Promise((ok) => p.on('exit', ok));
    p.kill('SIGKILL');
    await exited;
    assert.equal(readFileSync(target, 'utf8'), OLD, 'the annotations file is whole and unchanged');
    const leftovers = readdirSync(dir).filter((n) => n.endsWith('.tmp'));
    assert.equal(leftovers.length, 1, 'the killed writer left only its hidden temporary file');
    assert.equal(statSync(join(dir, leftovers[0]!)).size, 1 << 20);
  });
});

describe('annotate under faults', () => {
  let dir = '';
  let eig = '';
  const io = { out: () => undefined, err: () => undefined };
  beforeEach(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-annfault-'));
    eig = writeTinyRun(join(dir, 'run'));
    await annotateOne(eig, {}, { soc: false }, io);
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it("keeps an edit saved in the editor between annotate's read and its write, and merges it next time", async () => {
    const target = `${eig}.valleys.json`;
    const theirs = readFileSync(target, 'utf8').replace(
      '"note": "",\n  "entries"',
      '"note": "saved from the editor meanwhile",\n  "entries"',
    );
    writeTinyRun(join(dir, 'run'), { shift: [0, 2, -0.05] });
    await assert.rejects(
      annotateOne(eig, {}, { soc: false }, io, { beforeRename: () => writeFileSync(target, theirs) }),
      WriteConflictError,
    );
    assert.equal(readFileSync(target, 'utf8'), theirs, "the editor's save survives");
    await annotateOne(eig, {}, { soc: false }, io);
    const doc = parseAnnotations(readFileSync(target, 'utf8'), target);
    assert.equal(doc.note, 'saved from the editor meanwhile');
    // E_g − 50 meV (analytic model of tinyRun.ts, shifted by the test).
    assert.equal(doc.gap!.eV, 1.45);
  });

  it('leaves the annotations untouched when the disk fills during annotate', async () => {
    const target = `${eig}.valleys.json`;
    const before = readFileSync(target, 'utf8');
    writeTinyRun(join(dir, 'run'), { shift: [0, 2, -0.05] });
    const full: SafeWriteFs = {
      ...nodeSafeWriteFs,
      rename: async () => {
        throw Object.assign(new Error('ENOSPC'), { code: 'ENOSPC' });
      },
    };
    await assert.rejects(annotateOne(eig, {}, { soc: false }, io, { fs: full }), /the disk is full/);
    assert.equal(readFileSync(target, 'utf8'), before);
    assert.deepEqual(readdirSync(join(dir, 'run')).sort(), ['EIGENVAL', 'EIGENVAL.valleys.json', 'KPOINTS', 'POSCAR']);
  });
});
