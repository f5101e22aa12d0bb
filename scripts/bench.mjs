#!/usr/bin/env node
// Benchmarks (a script, not a test): every figure is measured in this run on this machine and printed beside
// the figure it is compared against. Inputs are generated under bench-data/ (not committed).
// Every figure printed with a goal is gathered at the end under its heading, so the goals can be read in one place.
// Usage: npm run bench [-- --small]   (--small: a 30 MB file instead of 300 MB, for a quick look)
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { createInterface } from 'node:readline';

// Every line printed goes through `say`, which remembers the lines that carry a goal under the last heading.
const withGoal = [];
let heading = '';
const print = console.log;
function say(...parts) {
  const text = parts.join(' ');
  for (const line of text.split('\n')) {
    if (line.trim() && !line.startsWith(' ')) heading = line.trim();
    if (/\(goal|goal ≤|beside the goal/.test(line)) withGoal.push([heading, line.trim()]);
  }
  print(text);
}
console.log = say;

/** A benchmark script in its own process, its output passed on line by line as it comes (and scanned for goals). */
function section(args) {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, args, { stdio: ['ignore', 'pipe', 'inherit'] });
    createInterface({ input: child.stdout }).on('line', (l) => say(l));
    child.on('close', (code) => resolve(code));
  });
}

const small = process.argv.includes('--small');
const dir = 'bench-data';
mkdirSync(dir, { recursive: true });
const tsx = ['--import', 'tsx'];

function run(args, label) {
  const r = spawnSync(process.execPath, [...tsx, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) {
    console.log(`  ${label}: failed (${(r.stderr || '').trim().split('\n').slice(-1)[0]})`);
    return null;
  }
  const line = r.stdout.trim().split('\n').pop();
  return JSON.parse(line);
}

const fmt = (x, d = 2) => x.toFixed(d);
const MB = 2 ** 20;

// 1. EIGENVAL-layout reader.
const nk = small ? 2000 : 20000;
const nb = 500;
const eig = `${dir}/EIGENVAL-${nk}x${nb}`;
const json = `${eig}.json`;
if (!existsSync(eig) || !existsSync(json)) {
  console.log(`generating ${eig} (${nk} k-points × ${nb} bands) ...`);
  spawnSync(process.execPath, [...tsx, 'scripts/bench/generateEigenval.ts', eig, json, String(nk), String(nb)], { stdio: 'inherit' });
}
const size = statSync(eig).size;
console.log(`\nEIGENVAL layout, ${fmt(size / MB, 0)} MiB, ${nk * nb} energies`);
const ours = run(['scripts/bench/measure.ts', 'read-valleyscope', eig], 'valleyscope reader');
const jp = run(['scripts/bench/measure.ts', 'json-parse', json], 'JSON.parse');
const nl = run(['scripts/bench/measure.ts', 'newline-count', eig], 'newline count');
if (ours && jp && nl) {
  console.log(
    `  valleyscope reader      ${fmt(ours.ms, 0)} ms  (${fmt(size / MB / (ours.ms / 1000), 0)} MiB/s, ${fmt((ours.ms * 1e6) / ours.count, 1)} ns per energy)`,
  );
  console.log(
    `  JSON.parse, same energies as one array (${fmt(statSync(json).size / MB, 0)} MiB)  ${fmt(jp.ms, 0)} ms  (${fmt((jp.ms * 1e6) / jp.count, 1)} ns per energy)`,
  );
  console.log(`  newline count over the same file (I/O floor)  ${fmt(nl.ms, 0)} ms`);
  console.log(`  ratio reader / JSON.parse (time per energy): ${fmt(ours.ms / ours.count / (jp.ms / jp.count))}   (goal ≤ 1.0)`);
  console.log(`  ratio reader / newline count (same file):    ${fmt(ours.ms / nl.ms)}`);
  const peak = ours.maxRssMB - ours.rssBeforeMB;
  console.log(
    `  peak memory while reading ${fmt(peak, 0)} MiB over a baseline of ${fmt(ours.rssBeforeMB, 0)} MiB; ratio to the file size: ${fmt((peak * MB) / size)}   (goal ≤ 0.5)`,
  );
  console.log(
    `  (the energies alone, as 8-byte doubles, are ${fmt((ours.count * 8) / MB, 0)} MiB: ${fmt((ours.count * 8) / size)} of the file size)`,
  );
  const jpPeak = jp.maxRssMB - jp.rssBeforeMB;
  console.log(`  JSON.parse's peak memory for comparison: ${fmt(jpPeak, 0)} MiB (${fmt((jpPeak * MB) / size)} of the EIGENVAL size)`);
}

// 2. vasprun.xml through the byte scanner (two shapes: many bands, many k-points).
if (existsSync('scripts/bench/vasprun.ts')) {
  if ((await section([...tsx, 'scripts/bench/vasprun.ts', ...(small ? ['--small'] : [])])) !== 0) console.log('  vasprun benchmark failed');
} else console.log('\nvasprun.xml: benchmark not available (scripts/bench/vasprun.ts missing)');

// 3. Full analysis of a 100-band, 2000-point path.
console.log('\nFull analysis (all extrema, all fits, symmetry) of a 100-band, 2 000-point path');
const an = run(['scripts/bench/measure.ts', 'analyze-path', '2000', '100'], 'analysis');
if (an) console.log(`  ${fmt(an.ms, 0)} ms for ${an.count} extrema   (compared with a 16.7 ms frame: ${fmt(an.ms / 16.7)} frames)`);

// 4. Band view redraw in headless Chromium.
if (existsSync('scripts/bench-bandview.mjs')) {
  console.log('\nBand view redraw, 500 bands × 20 000 k-points, headless Chromium');
  await section(['scripts/bench-bandview.mjs']);
} else console.log('\nband view: benchmark not available (scripts/bench-bandview.mjs missing)');

// 5. Batch: analyze --jsonl over 200 small runs, --jobs 2 against --jobs 1 (its own script).
if (existsSync('scripts/bench-batch.mjs')) {
  if ((await section(['scripts/bench-batch.mjs'])) !== 0) console.log('  batch benchmark failed');
} else console.log('\nbatch: benchmark not available (scripts/bench-batch.mjs missing)');

// 6. A mesh run (EPM silicon, 24³ mesh, 400 bands) analysed as a whole process against JSON.parse (issue 18).
if ((await section(['scripts/bench/meshRunProcess.mjs'])) !== 0) console.log('  mesh run benchmark failed');

// 7. Analysis against the size of the data (issue goals: analyze --json ≤ 2.5× JSON.parse; memory and the other
// commands on a 50 MB path), in its own script.
if (existsSync('scripts/bench-scaling.mjs')) {
  console.log('');
  await section(['scripts/bench-scaling.mjs', ...(small ? ['--quick'] : [])]);
}

print('\nEvery figure with a goal, from this run (under the heading it was measured for):');
let last = '';
for (const [h, line] of withGoal) {
  if (h !== last) print(`  ${h}`);
  last = h;
  print(`    ${line}`);
}
