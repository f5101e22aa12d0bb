// Bundles: the CLI (node), the extension host (node and web), and the webview scripts (browser).
// Usage: node esbuild.mjs [--production] [--cli-only] [--watch]
import * as esbuild from 'esbuild';
import { existsSync, mkdirSync } from 'node:fs';

const production = process.argv.includes('--production');
const cliOnly = process.argv.includes('--cli-only');
// '.wasm' as bytes: the crystal-symmetry library's WebAssembly is inlined, so every bundle (node, web, worker) carries it.
const common = {
  bundle: true,
  sourcemap: !production,
  minify: production,
  logLevel: 'warning',
  target: 'es2022',
  loader: { '.wasm': 'binary' },
};

/** Entry points that exist (features land one by one; a missing entry is not built). */
const present = (entries) => entries.filter((e) => existsSync(e.in));

const builds = [];
const cli = present([{ in: 'src/cli/main.ts', out: 'cli' }]);
if (cli.length) {
  builds.push({
    ...common,
    entryPoints: cli,
    outdir: 'dist',
    platform: 'node',
    format: 'cjs',
    banner: { js: '#!/usr/bin/env node' },
  });
}
// The worker threads of the CLI's batch commands (analyze/check/annotate --jobs), beside dist/cli.js.
const cliWorker = present([{ in: 'src/cli/batch/worker.ts', out: 'batchWorker' }]);
if (cliWorker.length) builds.push({ ...common, entryPoints: cliWorker, outdir: 'dist', platform: 'node', format: 'cjs' });
if (!cliOnly) {
  const nodeEntries = present([
    { in: 'src/extension/extension.ts', out: 'extension' },
    { in: 'src/extension/analysisWorker.ts', out: 'analysisWorker' },
  ]);
  if (nodeEntries.length) {
    builds.push({ ...common, entryPoints: nodeEntries, outdir: 'dist', platform: 'node', format: 'cjs', external: ['vscode'] });
  }
  const webEntries = present([
    { in: 'src/extension/extension.ts', out: 'extension' },
    { in: 'src/extension/analysisWorker.ts', out: 'analysisWorker' },
  ]);
  if (webEntries.length) {
    builds.push({
      ...common,
      entryPoints: webEntries,
      outdir: 'dist/web',
      platform: 'browser',
      format: 'cjs',
      external: ['vscode'],
      define: { 'process.env.VALLEYSCOPE_WEB': '"1"' },
      alias: { 'node:worker_threads': './src/extension/web/noWorkerThreads.ts', 'node:fs/promises': './src/extension/web/noFsPromises.ts' },
    });
  }
  const views = present([
    { in: 'webview/bandView/main.ts', out: 'bandView' },
    { in: 'webview/compareView/main.ts', out: 'compareView' },
  ]);
  if (views.length) {
    builds.push({ ...common, entryPoints: views, outdir: 'dist/webview', platform: 'browser', format: 'iife' });
  }
}
mkdirSync('dist', { recursive: true });
const watch = process.argv.includes('--watch');
for (const b of builds) {
  if (watch) await (await esbuild.context(b)).watch();
  else await esbuild.build(b);
}
