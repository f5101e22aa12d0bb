/**
 * The symmetry module inside bundles: the WebAssembly bytes are inlined by esbuild's binary loader (as
 * esbuild.mjs configures every bundle), and load in Node without node_modules, on a browser page's main
 * thread and in a web worker (Debian's Chromium, as the webview suite uses).
 */
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as esbuild from 'esbuild';
import { chromium } from 'playwright-core';

const CHROMIUM_PATH = '/usr/bin/chromium';

// A tiny program: diamond Si → space group, operation count, valley degeneracy at L, labels of Γ and L.
const ENTRY = `
import { ensureSymmetryReady, crystalSymmetry, valleyDegeneracy } from './symmetry';
import { recogniseLabels } from './specialPoints';
const done = (r) => {
  if (typeof document === 'undefined' && typeof postMessage === 'function' && typeof process === 'undefined') postMessage(r);
  else if (typeof process !== 'undefined' && typeof document === 'undefined') console.log(JSON.stringify(r));
  else globalThis.__symmetryResult = r;
};
(async () => {
  try {
    await ensureSymmetryReady();
    const a = 5.431;
    const lattice = [[0, a / 2, a / 2], [a / 2, 0, a / 2], [a / 2, a / 2, 0]];
    const s = crystalSymmetry({ lattice, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const bs = { lattice, structure: null, nk: 2, kpoints: new Float64Array([0, 0, 0, 0.5, 0.5, 0.5]), labels: [] };
    done({ spaceGroup: s.spaceGroup, operations: s.rotations.length, nvL: valleyDegeneracy(s, [0.5, 0.5, 0.5]), labels: recogniseLabels(bs).map((l) => l.label) });
  } catch (e) {
    done({ error: String(e && e.message ? e.message : e) });
  }
})();
`;
// International Tables Vol. A: diamond Fd-3m (227), 48 operations; L valleys: 8 half-valleys → 4 (physics.md §8).
const EXPECTED = { spaceGroup: 227, operations: 48, nvL: 4, labels: ['Γ', 'L'] };

async function bundle(platform: 'node' | 'browser', format: 'cjs' | 'iife'): Promise<string> {
  const r = await esbuild.build({
    stdin: { contents: ENTRY, resolveDir: join(process.cwd(), 'src/core/lattice'), loader: 'ts', sourcefile: 'entry.ts' },
    bundle: true,
    write: false,
    platform,
    format,
    target: 'es2022',
    logLevel: 'silent',
    loader: { '.wasm': 'binary' },
  });
  return r.outputFiles[0]!.text;
}

describe('symmetry module in bundles (node, browser page, web worker)', function () {
  this.timeout(120000);

  it('is configured in esbuild.mjs: .wasm files are bundled as bytes', () => {
    assert.match(readFileSync('esbuild.mjs', 'utf8'), /loader:\s*\{\s*'\.wasm':\s*'binary'\s*\}/);
  });

  it('loads from the inlined bytes in Node, away from node_modules', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-bundle-'));
    const file = join(dir, 'entry.cjs');
    writeFileSync(file, await bundle('node', 'cjs'));
    // Run from a folder without node_modules and with the code piped in, so no installed package can be found.
    const r = spawnSync(process.execPath, ['-'], { cwd: dir, input: readFileSync(file), encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr);
    assert.deepEqual(JSON.parse(r.stdout), EXPECTED);
  });

  it('loads on a browser page and in a web worker', async () => {
    const code = await bundle('browser', 'iife');
    const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: ['--no-sandbox', '--headless=new'] });
    try {
      const page = await browser.newPage();
      await page.setContent('<!doctype html><html><body></body></html>');
      await page.addScriptTag({ content: code });
      await page.waitForFunction(() => (globalThis as { __symmetryResult?: unknown }).__symmetryResult !== undefined, null, {
        timeout: 30000,
      });
      assert.deepEqual(await page.evaluate(() => (globalThis as { __symmetryResult?: unknown }).__symmetryResult), EXPECTED);
      const inWorker = await page.evaluate(
        (src: string) =>
          new Promise((resolve) => {
            const w = new Worker(URL.createObjectURL(new Blob([src], { type: 'text/javascript' })));
            w.onmessage = (e: MessageEvent) => resolve(e.data);
            w.onerror = (e: ErrorEvent) => resolve({ error: e.message });
          }),
        code,
      );
      assert.deepEqual(inWorker, EXPECTED);
    } finally {
      await browser.close();
    }
  });
});
