#!/usr/bin/env node
// Benchmark (a script, not a test): `analyze --jsonl` over 200 small runs with --jobs 2 against --jobs 1,
// both through the built CLI (dist/cli.js), in this run on this machine. The figure is the ratio of the
// times (goal ≤ 0.65 on a 2-core machine); absolute times are printed for context only.
// The runs are generated under bench-data/batch-200/ (not committed): each a simple cubic cell (a = 4 Å)
// with 8 nearest-neighbour tight-binding bands (E = c ± 2t(3 − cos k_x a − cos k_y a − cos k_z a)) along
// Γ–X–M–Γ–R, 200 k-points, in VASP's EIGENVAL/POSCAR/KPOINTS layouts. Invented numbers: input only.
// On a shared machine the wall times say little about what a second core gives, so each run's CPU time is
// also sampled per thread (Linux /proc, scripts/bench/threadCpu.mjs) and printed beside them.
// Usage: node scripts/bench-batch.mjs [--runs N] [--repeat R] [--per-segment P]
// --per-segment: k-points per path segment (default 50: 200 k-points a run). Larger runs show how the pool
// scales once each run's work outweighs what every thread pays once (compiling the code it runs).
import { runWithThreadCpu } from './bench/threadCpu.mjs';
import { spawn } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const arg = (name, dflt) => {
  const i = process.argv.indexOf(name);
  return i > 0 ? Math.max(1, Number(process.argv[i + 1]) || dflt) : dflt;
};
const nRuns = arg('--runs', 200);
const repeat = arg('--repeat', 3);
const PER_SEGMENT = arg('--per-segment', 50);
const N_BANDS = Math.max(8, arg('--bands', 8));
const cli = join('dist', 'cli.js');
if (!existsSync(cli) || !existsSync(join('dist', 'batchWorker.js'))) {
  console.log('batch: dist/cli.js or dist/batchWorker.js missing; run "node esbuild.mjs" first');
  process.exit(1);
}

const dir = join('bench-data', `batch-${nRuns}${PER_SEGMENT === 50 ? '' : `-k${4 * PER_SEGMENT}`}${N_BANDS === 8 ? '' : `-b${N_BANDS}`}`);
const f = (x, w, d) => x.toFixed(d).padStart(w);
const SEGMENTS = [
  ['Γ', [0, 0, 0], 'X', [0.5, 0, 0]],
  ['X', [0.5, 0, 0], 'M', [0.5, 0.5, 0]],
  ['M', [0.5, 0.5, 0], 'Γ', [0, 0, 0]],
  ['Γ', [0, 0, 0], 'R', [0.5, 0.5, 0.5]],
];

function writeRun(runDir, seed) {
  mkdirSync(runDir, { recursive: true });
  const nb = N_BANDS;
  const bands = [];
  for (let b = 0; b < nb; b++) {
    const valence = b < nb / 2;
    const t = 0.4 + 0.1 * (b % 8) + 0.003 * seed;
    bands.push(valence ? { c: -1.5 * (nb / 2 - 1 - b), s: -1, t } : { c: 0.8 + 0.002 * seed + 1.1 * (b - nb / 2), s: 1, t });
  }
  const ks = [];
  for (const [, a, , z] of SEGMENTS)
    for (let i = 0; i < PER_SEGMENT; i++) ks.push(a.map((x, j) => x + ((z[j] - x) * i) / (PER_SEGMENT - 1)));
  const lines = [
    '    1    1   200    1',
    '  0.6400000E+02  0.4000000E-09  0.4000000E-09  0.4000000E-09  0.5000000E-15',
    '  1.0000000000000E-004',
    '  CAR',
    ` batch benchmark run ${seed}`,
    `      ${nb}     ${ks.length}      ${nb}`,
  ];
  for (const k of ks) {
    lines.push('', `  ${f(k[0], 12, 7)}  ${f(k[1], 12, 7)}  ${f(k[2], 12, 7)}  ${f(1 / ks.length, 12, 7)}`);
    const s = 3 - k.reduce((acc, x) => acc + Math.cos(2 * Math.PI * x), 0);
    bands.forEach((bd, b) => {
      const e = bd.s < 0 ? bd.c - 2 * bd.t * s : bd.c + 2 * bd.t * s;
      lines.push(`    ${b + 1}   ${f(e, 12, 6)}   ${f(b < nb / 2 ? 1 : 0, 8, 6)}`);
    });
  }
  writeFileSync(join(runDir, 'EIGENVAL'), lines.join('\n') + '\n');
  writeFileSync(
    join(runDir, 'POSCAR'),
    'simple cubic model\n1.0\n  4.0 0.0 0.0\n  0.0 4.0 0.0\n  0.0 0.0 4.0\nH\n1\nDirect\n  0.0 0.0 0.0\n',
  );
  const kp = ['k-path of the batch benchmark', String(PER_SEGMENT), 'Line-mode', 'reciprocal'];
  for (const [la, a, lz, z] of SEGMENTS)
    kp.push(`  ${a.join(' ')} ! ${la === 'Γ' ? 'G' : la}`, `  ${z.join(' ')} ! ${lz === 'Γ' ? 'G' : lz}`, '');
  writeFileSync(join(runDir, 'KPOINTS'), kp.join('\n'));
}

const stamp = join(dir, '.complete');
if (!existsSync(stamp)) {
  console.log(`generating ${nRuns} runs under ${dir} ...`);
  for (let i = 0; i < nRuns; i++) writeRun(join(dir, `run-${String(i).padStart(4, '0')}`), i);
  writeFileSync(stamp, 'generated\n');
}

async function timeOnce(jobs) {
  const out = join('bench-data', `batch-k${4 * PER_SEGMENT}-b${N_BANDS}-jobs${jobs}.jsonl`);
  const r = await runWithThreadCpu(process.execPath, [cli, 'analyze', dir, '--jsonl', '--jobs', String(jobs)], out);
  if (r.status !== 0) throw new Error(`--jobs ${jobs} failed: ${(r.stderr || '').trim().split('\n').pop()}`);
  return { ...r, out };
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const load0 = loadavg()[0];
console.log(
  `\nBatch: analyze --jsonl over ${nRuns} runs (${4 * PER_SEGMENT} k × ${N_BANDS} bands each), ${availableParallelism()} cores, median of ${repeat}, alternating`,
);
const r1 = [];
const r2 = [];
let outs;
try {
  for (let i = 0; i < repeat; i++) {
    const a = await timeOnce(1);
    const b = await timeOnce(2);
    r1.push(a);
    r2.push(b);
    outs = [a.out, b.out];
  }
} catch (e) {
  console.log(`  batch benchmark failed: ${e.message}`);
  process.exit(1);
}
const same = readFileSync(outs[0], 'utf8') === readFileSync(outs[1], 'utf8');
const m1 = median(r1.map((r) => r.ms));
const m2 = median(r2.map((r) => r.ms));
console.log(`  --jobs 1  ${m1.toFixed(0)} ms   (${(m1 / nRuns).toFixed(1)} ms per run, one process start included)`);
console.log(`  --jobs 2  ${m2.toFixed(0)} ms`);
console.log(
  `  ratio --jobs 2 / --jobs 1 (wall): ${(m2 / m1).toFixed(2)}   (goal ≤ 0.65 on 2 cores)${availableParallelism() < 2 ? '  [this machine has fewer than 2 cores: the goal cannot be met here]' : ''}`,
);
console.log(`  the two outputs are ${same ? 'identical' : 'DIFFERENT (a bug: the output must not depend on --jobs)'}`);
if (r1[0].cpu !== null) {
  // Per thread: the main thread, the busiest other thread (with --jobs 2 usually the worker running runs, but
  // threads carry no names to tell), the rest (the runtime's own threads: optimising compiler, garbage collector).
  const split = (rs) => {
    const cpu = median(rs.map((r) => r.cpu));
    const main = median(rs.map((r) => r.main ?? 0));
    const busiest = median(rs.map((r) => r.others[0] ?? 0));
    const rest = median(rs.map((r) => r.cpu - (r.main ?? 0) - (r.others[0] ?? 0)));
    // Neither thread can finish before its own CPU time, nor all of them on two cores before half the total.
    const bound = Math.max(cpu / 2, main, busiest);
    return { cpu, main, busiest, rest, bound };
  };
  const s1 = split(r1);
  const s2 = split(r2);
  const f2 = (x) => x.toFixed(2);
  console.log(
    `  CPU time, s: --jobs 1 ${f2(s1.cpu)} (main thread ${f2(s1.main)}, the runtime's other threads ${f2(s1.busiest + s1.rest)}); --jobs 2 ${f2(s2.cpu)} (main ${f2(s2.main)}, busiest other thread ${f2(s2.busiest)}, the rest ${f2(s2.rest)}); ratio ${f2(s2.cpu / s1.cpu)}`,
  );
  console.log(
    `  shortest possible wall time with both cores free (max of each thread's CPU time and half the total): --jobs 1 ${f2(s1.bound)} s, --jobs 2 ${f2(s2.bound)} s; ratio ${f2(s2.bound / s1.bound)}   (an estimate beside the goal, not the goal's measurement)`,
  );
}
// Each thread starts with cold code: the runtime compiles and then optimises it as the runs go by, so a thread's
// first runs are slower than its later ones. With one job the lines come out as the runs finish: the time at
// which half of them are out is what two perfect threads (starting at once, costing nothing more, each as fast
// as this one) would take for all of them, and that over the whole time is the best ratio two threads can give.
function halfwayTimes() {
  return new Promise((resolve, reject) => {
    const t0 = process.hrtime.bigint();
    const child = spawn(process.execPath, [cli, 'analyze', dir, '--jsonl', '--jobs', '1'], { stdio: ['ignore', 'pipe', 'ignore'] });
    let lines = 0;
    let half = null;
    child.stdout.on('data', (d) => {
      for (let i = 0; i < d.length; i++) if (d[i] === 10) lines++;
      if (half === null && lines >= nRuns / 2) half = Number(process.hrtime.bigint() - t0) / 1e6;
    });
    child.on('error', reject);
    child.on('exit', () => resolve({ half, all: Number(process.hrtime.bigint() - t0) / 1e6 }));
  });
}
const lc = [];
for (let i = 0; i < repeat; i++) lc.push(await halfwayTimes());
const lcHalf = median(lc.map((x) => x.half ?? NaN));
const lcAll = median(lc.map((x) => x.all));
console.log(
  `  one job, the first half of the runs out after ${lcHalf.toFixed(0)} ms of ${lcAll.toFixed(0)} ms (process start included): the best two threads can do, each starting cold, is ${(lcHalf / lcAll).toFixed(2)} of one   (a bound beside the goal)`,
);
// What this machine's two cores give this work with no pool at all: two separate processes, each given half
// of the runs by name and started at once, against one process given all of them by name. Nothing is shared
// between the two (each starts, searches its half and warms its own code), so this is what a perfect split of
// the runs between two jobs would take here; --jobs 2 is set beside it.
function wallOf(argsList) {
  return new Promise((resolve, reject) => {
    const t0 = process.hrtime.bigint();
    let left = argsList.length;
    for (const args of argsList) {
      const child = spawn(process.execPath, [cli, 'analyze', ...args, '--jsonl', '--jobs', '1'], { stdio: 'ignore' });
      child.on('error', reject);
      child.on('exit', () => {
        if (--left === 0) resolve(Number(process.hrtime.bigint() - t0) / 1e6);
      });
    }
  });
}
const runDirs = readdirSync(dir)
  .filter((n) => n.startsWith('run-'))
  .sort()
  .map((n) => join(dir, n));
const halves = [runDirs.slice(0, runDirs.length >> 1), runDirs.slice(runDirs.length >> 1)];
const oneAll = [];
const twoHalves = [];
for (let i = 0; i < repeat; i++) {
  oneAll.push(await wallOf([runDirs]));
  twoHalves.push(await wallOf(halves));
}
const mOne = median(oneAll);
const mTwo = median(twoHalves);
console.log(
  `  two separate processes, each given half of the runs, at once: ${mTwo.toFixed(0)} ms against ${mOne.toFixed(0)} ms for one given all: ${(mTwo / mOne).toFixed(2)}   (what a perfect split gives on this machine; --jobs 2 / --jobs 1 above: ${(m2 / m1).toFixed(2)})`,
);
const load1 = loadavg()[0];
const busy = Math.max(load0, load1) > availableParallelism();
console.log(
  `  load average (1 min) ${load0.toFixed(1)} before, ${load1.toFixed(1)} after, on ${availableParallelism()} cores${busy ? ': other work shared the cores, so the wall-time ratio says little about what a second core gives' : ''}`,
);
