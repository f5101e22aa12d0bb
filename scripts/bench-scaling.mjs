#!/usr/bin/env node
// Benchmark (a script, not a test): does the analysis scale with the data? Every figure is measured in this
// run on this machine and printed beside its goal. Inputs are generated under bench-data/ (not committed).
//   1. `valleyscope analyze --json` of a 20 000-point × 40-band path and of a 4 000 × 400 path (EIGENVAL),
//      and of a 2 000 × 400 path in vasprun.xml, end to end (one process each, output to /dev/null), against
//      a process doing JSON.parse of the same energies: wall and CPU time, whole process to whole process (both
//      pay the runtime's start), medians of 5, alternating. Goal: ≤ 2.5×. The in-process phases are a second line.
//   2. A 50 MB EIGENVAL path (≈30 400 k-points × 48 bands, 4 segments): peak memory of `analyze` against
//      0.5 × file + 150 MB, and `annotate` and `check` on it against 1.5 × the time of `analyze`.
// Usage: node esbuild.mjs --cli-only && node scripts/bench-scaling.mjs [--quick]
//   --quick: paths a tenth as long (a quick look; the goals are for the full sizes)
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';

const quick = process.argv.includes('--quick');
const cli = 'dist/cli.js';
if (!existsSync(cli)) {
  console.log(`${cli} is missing: build it first (node esbuild.mjs --cli-only).`);
  process.exit(1);
}
const dir = 'bench-data';
mkdirSync(dir, { recursive: true });
const MB = 2 ** 20;
const scale = quick ? 0.1 : 1;

function generate(name, nk, nb, layout = 'EIGENVAL') {
  const folder = join(dir, name);
  if (!existsSync(join(folder, layout === 'vasprun' ? 'vasprun.xml' : 'EIGENVAL')) || !existsSync(join(folder, 'energies.json'))) {
    console.log(`generating ${folder} (${nk} k-points × ${nb} bands, ${layout}) ...`);
    const args = ['--import', 'tsx', 'scripts/bench/generatePathRun.ts', folder, String(nk), String(nb), '4'];
    const r = spawnSync(process.execPath, layout === 'vasprun' ? [...args, 'vasprun'] : args, { stdio: 'inherit' });
    if (r.status !== 0) throw new Error('generator failed');
  }
  return folder;
}

/**
 * One command in its own process under /usr/bin/time: wall seconds, CPU seconds (user + system: steadier
 * than wall time on a shared machine) and peak resident memory (MiB).
 */
function timed(args, label) {
  const r = spawnSync('/usr/bin/time', ['-f', '%e %M %U %S', ...args], {
    encoding: 'utf8',
    stdio: ['ignore', 'ignore', 'pipe'],
    maxBuffer: 1 << 26,
  });
  const last = (r.stderr || '').trim().split('\n').pop() ?? '';
  const m = /^([\d.]+) (\d+) ([\d.]+) ([\d.]+)$/.exec(last);
  if (!m) {
    console.log(`  ${label}: no measurement (${last})`);
    return null;
  }
  return { s: Number(m[1]), peakMB: Number(m[2]) / 1024, cpu: Number(m[3]) + Number(m[4]), status: r.status };
}

/** JSON.parse of a file as a whole process (startup included, like the command it is compared with). */
function jsonParseProcess(file) {
  return timed([process.execPath, '-e', `JSON.parse(require('fs').readFileSync(${JSON.stringify(file)}, 'utf8'))`], 'JSON.parse process');
}

/** JSON.parse of the energies, in its own process (the runtime's C++ number parser: the floor to compare with). */
function jsonParse(file) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/bench/measure.ts', 'json-parse', file], { encoding: 'utf8' });
  if (r.status !== 0) return null;
  return JSON.parse(r.stdout.trim().split('\n').pop());
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const repeat = 3;
/** Runs of each single-run case (a process doing JSON.parse and `analyze`, alternately). */
const repeatAnalyze = 5;

function analyzeCase(name, nk, nb, layout = 'EIGENVAL') {
  const folder = generate(name, nk, nb, layout);
  const eig = join(folder, layout === 'vasprun' ? 'vasprun.xml' : 'EIGENVAL');
  const size = statSync(eig).size;
  const jp = [];
  const jpp = [];
  const an = [];
  for (let i = 0; i < repeatAnalyze; i++) {
    const j = jsonParse(join(folder, 'energies.json'));
    if (j) jp.push(j.ms / 1000);
    const jproc = jsonParseProcess(join(folder, 'energies.json'));
    if (jproc) jpp.push(jproc);
    const a = timed([process.execPath, cli, 'analyze', eig, '--json'], 'analyze --json');
    if (a && a.status === 0) an.push(a);
  }
  console.log(`\n${nk} k-points × ${nb} bands, ${layout === 'vasprun' ? 'vasprun.xml' : 'EIGENVAL'} ${(size / MB).toFixed(1)} MiB`);
  if (!jp.length || !an.length) {
    console.log('  failed to measure');
    return null;
  }
  if (!jpp.length) {
    console.log('  failed to measure JSON.parse as a process');
    return null;
  }
  // Fair: both are whole processes, so both pay the runtime's start (and nothing else is compared).
  const wj = median(jpp.map((x) => x.s));
  const cj = median(jpp.map((x) => x.cpu));
  const ta = median(an.map((x) => x.s));
  const ca = median(an.map((x) => x.cpu));
  console.log(`  a process doing JSON.parse of the same energies   wall ${(wj * 1000).toFixed(0)} ms, CPU ${(cj * 1000).toFixed(0)} ms`);
  console.log(
    `  valleyscope analyze --json (process)              wall ${(ta * 1000).toFixed(0)} ms, CPU ${(ca * 1000).toFixed(0)} ms, peak ${median(an.map((x) => x.peakMB)).toFixed(0)} MiB`,
  );
  console.log(`  ratio, whole process to whole process: wall ${(ta / wj).toFixed(2)}, CPU ${(ca / cj).toFixed(2)}   (goal ≤ 2.5)`);
  console.log(
    `  (JSON.parse alone inside a process, without its start: ${(median(jp) * 1000).toFixed(0)} ms; analyze / that: ${(ta / median(jp)).toFixed(2)})`,
  );
  // Where the time goes, in one process (CPU time per phase; process start-up and module loading excluded).
  const ph = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/bench/measurePhases.ts', layout === 'vasprun' ? eig : folder], {
    encoding: 'utf8',
  });
  if (ph.status === 0) {
    const p = JSON.parse(ph.stdout.trim().split('\n').pop());
    const total = p.readMs + p.analyzeMs + p.jsonMs;
    console.log(
      `  phases (CPU ms, one process): read ${p.readMs.toFixed(0)}, analysis ${p.analyzeMs.toFixed(0)} (${p.extrema} extrema, ${p.rejected} set aside), JSON output ${p.jsonMs.toFixed(0)}; JSON.parse ${p.parseMs.toFixed(0)}`,
    );
    console.log(
      `  in-process phase ratio (secondary): read + analysis + output / JSON.parse ${(total / p.parseMs).toFixed(2)}; analysis alone / JSON.parse ${(p.analyzeMs / p.parseMs).toFixed(2)}`,
    );
  } else console.log(`  phases: failed (${(ph.stderr || '').trim().split('\n').pop()})`);
  return { folder, eig, size, ta };
}

console.log(
  `Analysis scaling${quick ? ' (--quick: a tenth of the sizes; goals are for the full sizes)' : ''}; medians of ${repeatAnalyze} runs (single runs), ${repeat} (the 50 MB path)`,
);
analyzeCase(`path-${20000 * scale}x40`, 20000 * scale, 40);
analyzeCase(`path-${4000 * scale}x400`, 4000 * scale, 400);
analyzeCase(`vasprun-${2000 * scale}x400`, 2000 * scale, 400, 'vasprun');

// The 50 MB path: memory and the other commands.
const big = generate(`path-${30400 * scale}x48`, 30400 * scale, 48);
const eig = join(big, 'EIGENVAL');
const size = statSync(eig).size;
console.log(`\n${30400 * scale} k-points × 48 bands, 4 segments, EIGENVAL ${(size / MB).toFixed(1)} MiB`);
const runs = { analyze: [], annotate: [], check: [] };
for (let i = 0; i < repeat; i++) {
  rmSync(`${eig}.valleys.json`, { force: true });
  const a = timed([process.execPath, cli, 'analyze', eig, '--json'], 'analyze');
  const n = timed([process.execPath, cli, 'annotate', eig], 'annotate');
  const c = timed([process.execPath, cli, 'check', big], 'check');
  if (a) runs.analyze.push(a);
  if (n) runs.annotate.push(n);
  if (c) runs.check.push(c);
}
rmSync(`${eig}.valleys.json`, { force: true });
if (runs.analyze.length) {
  const ta = median(runs.analyze.map((x) => x.s));
  const peak = median(runs.analyze.map((x) => x.peakMB));
  const goal = (0.5 * size) / MB + 150;
  console.log(
    `  analyze --json   ${(ta * 1000).toFixed(0)} ms (CPU ${(median(runs.analyze.map((x) => x.cpu)) * 1000).toFixed(0)} ms), peak memory ${peak.toFixed(0)} MiB   (goal ≤ 0.5 × file + 150 MiB = ${goal.toFixed(0)} MiB: ratio ${(peak / goal).toFixed(2)})`,
  );
  for (const cmd of ['annotate', 'check']) {
    const xs = runs[cmd];
    if (!xs.length) continue;
    const t = median(xs.map((x) => x.s));
    const ok = xs.every((x) => x.status === 0) ? '' : ` (exit status ${xs.map((x) => x.status).join(', ')})`;
    const cpuRatio = median(xs.map((x) => x.cpu)) / median(runs.analyze.map((x) => x.cpu));
    console.log(
      `  ${cmd.padEnd(16)} ${(t * 1000).toFixed(0)} ms, peak ${median(xs.map((x) => x.peakMB)).toFixed(0)} MiB; ratio to analyze ${(t / ta).toFixed(2)} (CPU time: ${cpuRatio.toFixed(2)})   (goal ≤ 1.5)${ok}`,
    );
  }
}
