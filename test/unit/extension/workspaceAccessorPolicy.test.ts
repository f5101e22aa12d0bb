/**
 * The editor applies the same file policy as the CLI: the workspace accessor (over a stand-in for the vscode
 * API, vscodeStub.ts) refuses FIFOs and devices by type without reading them, bounds reads by the size
 * setting, and resolves links so companions and paths from annotations files stay inside the run's folder.
 * Checked on a local (`file`) workspace and on a virtual one (another scheme, where links cannot be resolved
 * and only the lexical rules and the type checks apply).
 */
import { strict as assert } from 'node:assert';
import Module from 'node:module';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { WorkspaceFileAccessor as Accessor } from '../../../src/extension/fileAccessor';
import { loadRun } from '../../../src/core/load';
import { loadAnnotationsRun } from '../../../src/core/compare/loadAnnotationsRun';
import { writeTinyRun } from '../annotations/tinyRun';
import { SENTINEL_TEXT, TOKEN, mkfifo } from '../security/hostileSupport';
import { main } from '../../../src/cli/main';

type Resolver = (request: string, ...rest: unknown[]) => string;
const M = Module as unknown as { _resolveFilename: Resolver };
const original = M._resolveFilename;
const stubPath = resolve(__dirname, 'vscodeStub.ts');
M._resolveFilename = function (this: unknown, request: string, ...rest: unknown[]): string {
  return request === 'vscode' ? stubPath : original.call(this, request, ...rest);
};
// The stub must be in place before these modules load, so they are required here, not imported.
/* eslint-disable @typescript-eslint/no-require-imports */
const { WorkspaceFileAccessor } = require('../../../src/extension/fileAccessor') as { WorkspaceFileAccessor: typeof Accessor };
const stub = require('vscode') as typeof import('./vscodeStub');
const { currentText } = require('../../../src/extension/annotationsWriter') as typeof import('../../../src/extension/annotationsWriter');
/* eslint-enable @typescript-eslint/no-require-imports */
M._resolveFilename = original;

const base = mkdtempSync(join(tmpdir(), 'vs-wsaccess-'));
const sentinel = join(base, 'secret.txt');
const outsideFifo = join(base, 'outside.fifo');
after(() => rmSync(base, { recursive: true, force: true }));
before(() => {
  writeFileSync(sentinel, SENTINEL_TEXT);
  mkfifo(outsideFifo);
});

function accessorFor(path: string, scheme: string, maxBytes = 0): Accessor {
  return new WorkspaceFileAccessor(stub.Uri.from({ scheme, path }) as never, maxBytes);
}

const noQuote = (e: unknown): boolean => e instanceof Error && !e.message.includes(TOKEN);

for (const scheme of ['file', 'vscode-vfs']) {
  describe(`workspace accessor policy (${scheme} scheme)`, function () {
    this.timeout(20000);
    let n = 0;
    const fresh = (): string => {
      const d = join(base, `${scheme}-${n++}`);
      writeTinyRun(d);
      return d;
    };

    it('refuses a FIFO or device companion by type, without reading it', async () => {
      for (const plant of [
        (p: string) => mkfifo(p),
        (p: string) => symlinkSync('/dev/zero', p),
        (p: string) => symlinkSync(outsideFifo, p),
      ]) {
        const d = fresh();
        rmSync(join(d, 'POSCAR'));
        plant(join(d, 'POSCAR'));
        stub.readLog.length = 0;
        await assert.rejects(
          loadRun(accessorFor(d, scheme), d),
          (e: unknown) => noQuote(e) && /POSCAR.*(FIFO|device|not a regular file|outside the run's folder)/.test((e as Error).message),
        );
        assert.ok(!stub.readLog.some((p) => p.endsWith('POSCAR')), 'the companion was never read');
      }
    });

    it('keeps the size setting, and a smaller limit per role', async () => {
      const d = fresh();
      await assert.rejects(loadRun(accessorFor(d, scheme, 100), d), /above the limit of .* MB \(setting valleyscope\.maxFileSizeMB\)/);
      const fs = accessorFor(d, scheme);
      await assert.rejects(fs.readFile(join(d, 'EIGENVAL'), 100), /above the limit/);
    });

    if (scheme === 'file') {
      it('a companion linked outside the run folder is refused; one linked inside is read', async () => {
        const d = fresh();
        rmSync(join(d, 'POSCAR'));
        symlinkSync(sentinel, join(d, 'POSCAR'));
        await assert.rejects(
          loadRun(accessorFor(d, scheme), d),
          (e: unknown) => noQuote(e) && /outside the run's folder/.test((e as Error).message),
        );
        const ok = fresh();
        mkdirSync(join(ok, 'cell'));
        writeFileSync(join(ok, 'cell', 'POSCAR'), readFileSync(join(ok, 'POSCAR')));
        rmSync(join(ok, 'POSCAR'));
        symlinkSync(join('cell', 'POSCAR'), join(ok, 'POSCAR'));
        const bs = await loadRun(accessorFor(ok, scheme), ok);
        assert.ok(bs.structure, 'the linked POSCAR gave the structure');
      });
    }

    it('paths from an annotations file are confined in the compare view as in the CLI', async () => {
      const d = fresh();
      const io = { out: () => undefined, err: () => undefined };
      assert.equal(await main(['annotate', d], io), 0);
      const ann = join(d, 'EIGENVAL.valleys.json');
      const doc = JSON.parse(readFileSync(ann, 'utf8')) as { sources: unknown[] };
      doc.sources.push({ path: '../secret.txt', role: 'structure', sha256: '0'.repeat(64) });
      doc.sources.push({ path: 'pipe', role: 'structure', sha256: '0'.repeat(64) });
      mkfifo(join(d, 'pipe'));
      writeFileSync(ann, JSON.stringify(doc));
      stub.readLog.length = 0;
      const run = await loadAnnotationsRun(accessorFor(ann, scheme), ann);
      const notes = run.notes.join('\n');
      assert.ok(!notes.includes(TOKEN));
      assert.match(notes, /sources\[\d\]\.path in .* climbs out of the run's folder/);
      assert.match(notes, /sources\[\d\]\.path in .*FIFO/);
      assert.ok(!stub.readLog.some((p) => p.endsWith('secret.txt') || p.endsWith('pipe')), 'nothing refused was read');
    });
  });
}

describe('the annotations file the editor merges into', function () {
  this.timeout(20000);
  it('is read only when it is a regular file within the annotations limit', async () => {
    const d = join(base, 'writer');
    mkdirSync(d, { recursive: true });
    const at = (name: string) => ({ uri: stub.Uri.file(join(d, name)) as never, document: undefined });
    mkfifo(join(d, 'fifo.valleys.json'));
    symlinkSync('/dev/zero', join(d, 'zero.valleys.json'));
    writeFileSync(join(d, 'big.valleys.json'), Buffer.alloc(17e6, 32));
    writeFileSync(join(d, 'ok.valleys.json'), '{}\n');
    stub.readLog.length = 0;
    await assert.rejects(currentText(at('fifo.valleys.json')), /not a regular file/);
    await assert.rejects(currentText(at('zero.valleys.json')), /not a regular file/);
    await assert.rejects(currentText(at('big.valleys.json')), /above the limit of 16 MB/);
    assert.deepEqual(stub.readLog, [], 'none of them was read');
    assert.equal((await currentText(at('ok.valleys.json'))).text, '{}\n');
    assert.equal((await currentText(at('missing.valleys.json'))).text, null);
  });
});
