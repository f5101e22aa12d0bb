#!/usr/bin/env node
// Benchmark (a script, not a test): `valleyscope analyze --json` of a mesh run as a whole process, against a
// process doing JSON.parse of the run's energies. The run: EPM silicon (Cohen & Bergstresser 1966) on the
// irreducible points of a Γ-centred 24×24×24 mesh, 400 bands, as VASP files (EIGENVAL, KPOINTS, POSCAR), written
// under bench-data/ by scripts/bench/meshRunFiles.ts the first time (not committed; about a minute). Both
// commands under /usr/bin/time (wall) with their CPU time (user + system, every thread) from the process itself
// (scripts/bench/meshRunCpu.cjs), run alternately, medians printed
// with their ratios beside the goal (< 10, issue 18). CPU time is the fairer measure when other work loads the machine.
// Usage: node scripts/bench/meshRunProcess.mjs [--repeat 3] [--bands 400] [--mesh 24] [--cli dist/cli.js]
//          [--against other/cli.js]   (--against: a second build timed alternately with the first, e.g. a base)
import { spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';

const arg = (name, fallback) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
};
const repeat = Number(arg('repeat', 3));
const bands = Number(arg('bands', 400));
const n = Number(arg('mesh', 24));
const clis = [arg('cli', 'dist/cli.js'), ...(arg('against', null) ? [arg('against', null)] : [])];
for (const cli of clis) {
  if (!existsSync(cli)) {
    console.log(`${cli} is missing: build it first (node esbuild.mjs --cli-only).`);
    process.exit(1);
  }
}
const folder = join('bench-data', `mesh-si-${n}-${bands}`);
const eigenval = join(folder, 'EIGENVAL');
const energies = join(folder, 'energies.json');
if (!existsSync(eigenval) || !existsSync(energies)) {
  console.log(`generating ${folder} (EPM silicon, ${n}×${n}×${n} mesh, ${bands} bands) ...`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/bench/meshRunFiles.ts', folder, String(bands), String(n)], {
    stdio: 'inherit',
  });
  if (r.status !== 0) {
    console.log('  the generator failed');
    process.exit(1);
  }
}

/**
 * One node process under /usr/bin/time (wall seconds) with scripts/bench/meshRunCpu.cjs preloaded (CPU seconds of
 * every thread to the microsecond, as it exits; /usr/bin/time's own CPU figure is used if that is missing), or null.
 */
function timed(args) {
  const [node, ...rest] = args;
  const r = spawnSync('/usr/bin/time', ['-f', 'time %e %U %S', node, '-r', './scripts/bench/meshRunCpu.cjs', ...rest], {
    encoding: 'utf8',
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  const lines = (r.stderr || '').trim().split('\n');
  const m = /^time ([\d.]+) ([\d.]+) ([\d.]+)$/.exec(lines.pop() ?? '');
  const own = /^cpu-us (\d+)$/.exec(lines.pop() ?? '');
  if (r.status !== 0 || !m) {
    console.log(`  ${rest.join(' ')}: no measurement (${(r.stderr || '').trim().split('\n').pop()})`);
    return null;
  }
  return { wall: Number(m[1]), cpu: own ? Number(own[1]) / 1e6 : Number(m[2]) + Number(m[3]) };
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const jsonParse = [process.execPath, '-e', `JSON.parse(require('fs').readFileSync(${JSON.stringify(energies)}, 'utf8'))`];
const runs = { parse: [], ...Object.fromEntries(clis.map((c) => [c, []])) };
for (let i = 0; i < repeat; i++) {
  const p = timed(jsonParse);
  if (p) runs.parse.push(p);
  for (const cli of clis) {
    const a = timed([process.execPath, cli, 'analyze', eigenval, '--json']);
    if (a) runs[cli].push(a);
  }
}
if (!runs.parse.length) process.exit(1);
const parse = { wall: median(runs.parse.map((r) => r.wall)), cpu: median(runs.parse.map((r) => r.cpu)) };
const mib = (f) => (statSync(f).size / 2 ** 20).toFixed(1);
console.log(
  `\nMesh run, EPM silicon ${n}×${n}×${n} (irreducible points) × ${bands} bands, EIGENVAL ${mib(eigenval)} MiB: analyze --json as a whole process (medians of ${repeat})`,
);
console.log(
  `  JSON.parse of its energies (${mib(energies)} MiB) as a process: ${parse.wall.toFixed(2)} s wall, ${parse.cpu.toFixed(3)} s CPU`,
);
for (const cli of clis) {
  if (!runs[cli].length) continue;
  const wall = median(runs[cli].map((r) => r.wall));
  const cpu = median(runs[cli].map((r) => r.cpu));
  console.log(
    `  ${cli}: ${wall.toFixed(2)} s wall, ${cpu.toFixed(3)} s CPU; ratio to JSON.parse wall ${(wall / parse.wall).toFixed(1)}, CPU ${(cpu / parse.cpu).toFixed(1)}   (goal < 10)`,
  );
}
if (clis.length === 2 && runs[clis[0]].length && runs[clis[1]].length) {
  const cpu = (c) => median(runs[c].map((r) => r.cpu));
  const wall = (c) => median(runs[c].map((r) => r.wall));
  console.log(
    `  ${clis[0]} against ${clis[1]} (alternated): CPU ${(cpu(clis[0]) / cpu(clis[1])).toFixed(2)}, wall ${(wall(clis[0]) / wall(clis[1])).toFixed(2)}`,
  );
}
