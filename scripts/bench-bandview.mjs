#!/usr/bin/env node
// Band view redraw benchmark: 500 bands × 20 000 k-points in headless Chromium (Debian's chromium through
// playwright-core). Prints milliseconds per redraw while zooming and panning, as a ratio to one 60 Hz frame
// (16.7 ms), and the same redraw at full detail (every point stroked) for comparison.
// The data is a textbook model built inside the page (test/webview/support/foldedChain.mjs): the
// nearest-neighbour tight-binding chain folded into a 500-site supercell. Nothing is written to disk.
// Usage: node scripts/bench-bandview.mjs [--bands 500] [--kpoints 20000] [--redraws 60] [--width 1600 --height 900]
// Builds dist/webview/bandView.js first when it is missing (npm run bench builds it anyway).
import { createServer } from 'node:http';
import { existsSync, readFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { loadavg, cpus } from 'node:os';
import { chromium } from 'playwright-core';
import { FOLDED_CHAIN_SOURCE } from '../test/webview/support/foldedChain.mjs';
import { BROWSER_ARGS, BROWSER_PATH } from './browserCheck.mjs';

const arg = (name, dflt) => {
  const i = process.argv.indexOf(`--${name}`);
  if (i < 0) return dflt;
  const v = Number(process.argv[i + 1]);
  if (!Number.isFinite(v) || v <= 0) {
    console.error(`--${name} needs a positive number`);
    process.exit(2);
  }
  return v;
};
const nBands = arg('bands', 500);
const nk = arg('kpoints', 20000);
const redraws = arg('redraws', 60);
const width = arg('width', 1600);
const height = arg('height', 900);
const FRAME_MS = 1000 / 60;
/** A count in millions, readable for small and large runs. */
const millions = (x) => String(Number((x / 1e6).toPrecision(3)));
const CHROMIUM = BROWSER_PATH;
const BUNDLE = 'dist/webview/bandView.js';

if (!existsSync(CHROMIUM)) {
  console.error(`${CHROMIUM} is missing: run scripts/install-test-deps.sh`);
  process.exit(1);
}
if (!existsSync(BUNDLE)) {
  const r = spawnSync(process.execPath, ['esbuild.mjs'], { stdio: 'inherit' });
  if (r.status !== 0 || !existsSync(BUNDLE)) {
    console.error('could not build the band view bundle');
    process.exit(1);
  }
}
const bundle = readFileSync(BUNDLE);
const nonce = randomBytes(16).toString('hex');
const STUB = `window.__posted = []; window.acquireVsCodeApi = function () { return { postMessage: function (m) { window.__posted.push(m); }, getState: function () {}, setState: function () {} }; }; window.__hostPost = function (m) { window.postMessage(m, '*'); }; document.body.className = 'vscode-dark';`;
const PAGE = `<!DOCTYPE html><html><head><meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'nonce-${nonce}'; style-src 'nonce-${nonce}'; img-src data: blob:">
<style nonce="${nonce}">html { --vscode-editor-background: #1f1f1f; --vscode-foreground: #cccccc; --vscode-charts-blue: #3794ff; --vscode-charts-orange: #d18616; --vscode-charts-green: #89d185; }</style>
</head><body><div id="app"></div><script nonce="${nonce}" src="/stub.js"></script><script nonce="${nonce}" src="/bandView.js"></script></body></html>`;

const server = createServer((req, res) => {
  if (req.url === '/bandView.js') {
    res.writeHead(200, { 'content-type': 'text/javascript' });
    res.end(bundle);
  } else if (req.url === '/stub.js') {
    res.writeHead(200, { 'content-type': 'text/javascript' });
    res.end(STUB);
  } else if (req.url === '/') {
    res.writeHead(200, { 'content-type': 'text/html' });
    res.end(PAGE);
  } else {
    res.writeHead(404);
    res.end();
  }
});
await new Promise((r) => server.listen(0, '127.0.0.1', r));
const port = server.address().port;
const browser = await chromium.launch({
  executablePath: CHROMIUM,
  args: BROWSER_ARGS,
});
try {
  const page = await browser.newPage({ viewport: { width, height }, deviceScaleFactor: 1 });
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(`http://127.0.0.1:${port}/`);
  for (let i = 0; i < 200 && !(await page.evaluate('!!window.valleyscopeBandView')); i++) await new Promise((r) => setTimeout(r, 25));
  // Build the model in the page, post it as the host would, and time until the first draw.
  const load = await page.evaluate(`(function () {
    var t0 = performance.now();
    var msg = (${FOLDED_CHAIN_SOURCE})(${nBands}, ${nk});
    var t1 = performance.now();
    window.__loadStart = t1;
    window.__hostPost(msg);
    return { generateMs: t1 - t0 };
  })()`);
  for (let i = 0; i < 2400 && !(await page.evaluate('!!(window.valleyscopeBandView && window.valleyscopeBandView.lastDraw)')); i++)
    await new Promise((r) => setTimeout(r, 25));
  const firstDraw = await page.evaluate('performance.now() - window.__loadStart');
  if (errors.length) throw new Error(errors.join('; '));
  // One redraw = the view's render() (canvas and SVG overlay) plus a 1-pixel read that forces the canvas to
  // finish rasterising, so deferred drawing is counted. Zoom steps from the whole path to 50× and pans.
  const result = await page.evaluate(`(function () {
    var app = window.valleyscopeBandView;
    var canvas = document.querySelector('canvas.vs-bands');
    var ctx = canvas.getContext('2d');
    function timed(mode) {
      var t0 = performance.now();
      app.render(mode);
      ctx.getImageData(0, 0, 1, 1);
      return performance.now() - t0;
    }
    function stats(xs) {
      var s = xs.slice().sort(function (a, b) { return a - b; });
      return { median: s[Math.floor(s.length / 2)], p95: s[Math.min(s.length - 1, Math.floor(s.length * 0.95))], max: s[s.length - 1] };
    }
    var n = ${redraws};
    var plot = document.querySelector('.vs-plot').getBoundingClientRect();
    var cx = plot.width / 2, cy = plot.height / 2;
    var times = [], modes = {}, reads = 0, dec = 0, ras = 0;
    for (var i = 0; i < n; i++) {
      var k = Math.pow(50, i / (n - 1));
      var panX = Math.sin(i * 0.7) * 200;
      app.setZoom(k, cx - k * cx + panX, cy - k * cy);
      var ms = timed();
      times.push(ms);
      var d = app.lastDraw;
      modes[d.mode] = (modes[d.mode] || 0) + 1;
      reads += d.valuesRead; dec += d.decimateMs || 0; ras += d.rasterMs || 0;
    }
    // Reference: one bare pass over every energy (sum), the least any redraw reading all data would cost.
    var E = app.vm.energies[0];
    var bare = [];
    for (var q = 0; q < 5; q++) { var tb = performance.now(); var acc = 0; for (var ii = 0; ii < E.length; ii++) acc += E[ii]; bare.push(performance.now() - tb); window.__acc = acc; }
    app.setZoom(1, 0, 0);
    var full = [];
    for (var j = 0; j < 3; j++) full.push(timed('lines'));
    var zoomedOut = [], zdec = 0, zras = 0;
    for (var j2 = 0; j2 < 10; j2++) { zoomedOut.push(timed()); zdec += app.lastDraw.decimateMs || 0; zras += app.lastDraw.rasterMs || 0; }
    return { redraw: stats(times), zoomedOut: stats(zoomedOut), full: stats(full), bare: stats(bare), modes: modes, valuesPerRedraw: reads / n,
      decimateMs: dec / n, rasterMs: ras / n, zDecimateMs: zdec / 10, zRasterMs: zras / 10, canvas: [canvas.width, canvas.height] };
  })()`);
  const f = (x) => x.toFixed(1);
  const load1 = loadavg()[0];
  console.log(
    `Machine: ${cpus().length} cores, load average ${load1.toFixed(1)} during the run${load1 > cpus().length ? ' (busy: other work shares the cores, so times are inflated)' : ''}`,
  );
  console.log(
    `Band view redraw, ${nBands} bands × ${nk} k-points (${millions(nBands * nk)} million energies), headless Chromium, canvas ${result.canvas[0]}×${result.canvas[1]} px`,
  );
  console.log(
    `  model built in the page: ${f(load.generateMs)} ms; from message to first draw (decode, pyramid, extrema): ${f(firstDraw)} ms`,
  );
  console.log(`  redraw while zooming 1×→50× and panning (${redraws} redraws; modes ${JSON.stringify(result.modes)}):`);
  console.log(`    median ${f(result.redraw.median)} ms, 95th percentile ${f(result.redraw.p95)} ms, max ${f(result.redraw.max)} ms`);
  console.log(
    `    vs one 60 Hz frame (16.7 ms): median ${(result.redraw.median / FRAME_MS).toFixed(2)}×, 95th percentile ${(result.redraw.p95 / FRAME_MS).toFixed(2)}× (goal: 1.0 or less)`,
  );
  console.log(
    `    per redraw: ${millions(result.valuesPerRedraw)} million values read (of ${millions(nBands * nk)} million); decimation ${f(result.decimateMs)} ms, rasterising ${f(result.rasterMs)} ms`,
  );
  console.log(
    `  whole path (zoomed out): median ${f(result.zoomedOut.median)} ms = ${(result.zoomedOut.median / FRAME_MS).toFixed(2)}× a frame (decimation ${f(result.zDecimateMs)} ms, rasterising ${f(result.zRasterMs)} ms, the rest: clearing, image upload, axes)`,
  );
  console.log(
    `  vs one bare pass summing all ${millions(nBands * nk)} million energies (${f(result.bare.median)} ms): median redraw ${(result.redraw.median / result.bare.median).toFixed(2)}×`,
  );
  console.log(
    `  for comparison, every point stroked (no decimation), whole path: median ${f(result.full.median)} ms = ${(result.full.median / FRAME_MS).toFixed(1)}× a frame; decimation is ${(result.full.median / result.zoomedOut.median).toFixed(0)}× faster`,
  );
} finally {
  await browser.close();
  server.close();
}
