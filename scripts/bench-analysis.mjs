#!/usr/bin/env node
// Benchmark (a script, not a test): the time of a full analysis — edges, all extrema, every fit, symmetry,
// tensors — of each demo run in fixtures/demo/, measured in this run on this machine, beside the time to
// read the same run (the ratio is what to compare between machines). Without the demo runs, a generated
// model band structure is analysed instead, and the script says so.
// Usage: node scripts/bench-analysis.mjs [--repeat N] [--model]   (--model: the generated model even if demo runs exist)
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const self = fileURLToPath(import.meta.url);
if (!process.env.VALLEYSCOPE_BENCH_CHILD) {
  // TypeScript sources are loaded through tsx: re-run this script under it.
  const r = spawnSync(process.execPath, ['--import', 'tsx', self, ...process.argv.slice(2)], {
    stdio: 'inherit',
    env: { ...process.env, VALLEYSCOPE_BENCH_CHILD: '1' },
  });
  process.exit(r.status ?? 1);
}

const root = join(self, '..', '..');
const src = (p) => pathToFileURL(join(root, 'src', p)).href;
const { loadRun } = await import(src('core/load.ts'));
const { nodeFileAccessor } = await import(src('cli/nodeFileAccessor.ts'));
const { analyzeBandStructure } = await import(src('core/analysis/analyze.ts'));
const { ensureSymmetryReady } = await import(src('core/lattice/symmetry.ts'));
const { FIT_METHODS } = await import(src('core/analysis/methods.ts'));

const ri = process.argv.indexOf('--repeat');
const repeat = ri > 0 ? Math.max(1, Number(process.argv[ri + 1]) || 5) : 5;
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const ms = (t0) => Number(process.hrtime.bigint() - t0) / 1e6;

await ensureSymmetryReady();

/** Run folders (holding an EIGENVAL) under a folder. */
function runFolders(dir) {
  const out = [];
  const walk = (d) => {
    const names = readdirSync(d);
    if (names.includes('EIGENVAL')) out.push(d);
    for (const n of names) {
      const p = join(d, n);
      if (statSync(p).isDirectory()) walk(p);
    }
  };
  walk(dir);
  return out.sort();
}

async function measure(label, read, readWord = 'read') {
  // One untimed pass first, so the figures show steady-state speed, not the JIT compiler warming up.
  const warm = await read();
  for (const method of FIT_METHODS) analyzeBandStructure({ ...warm }, { method });
  const readTimes = [];
  const analyseTimes = {};
  let summary = '';
  for (let i = 0; i < repeat; i++) {
    let t0 = process.hrtime.bigint();
    const bs = await read();
    readTimes.push(ms(t0));
    for (const method of FIT_METHODS) {
      // A fresh copy each time: the engine caches per band structure, a new run has no cache.
      const fresh = { ...bs };
      t0 = process.hrtime.bigint();
      const report = analyzeBandStructure(fresh, { method });
      (analyseTimes[method] ??= []).push(ms(t0));
      if (method === 'parabola') {
        const masses = report.extrema.reduce((s, e) => s + e.masses.length, 0);
        summary = `${bs.nk} k × ${bs.nBands} bands: ${report.extrema.length} extrema, ${masses} directional masses, ${report.extrema.filter((e) => e.tensor).length} tensors`;
      }
    }
  }
  const rd = median(readTimes);
  console.log(`${label}  (${summary})`);
  console.log(`  ${readWord} ${rd.toFixed(1)} ms`);
  for (const [method, times] of Object.entries(analyseTimes)) {
    const t = median(times);
    console.log(
      `  full analysis, ${method.padEnd(8)} ${t.toFixed(1).padStart(7)} ms   ratio to ${readWord === 'read' ? 'reading' : 'building'}: ${(t / rd).toFixed(2)}`,
    );
  }
  return median(analyseTimes.parabola);
}

const demo = join(root, 'fixtures', 'demo');
const runs = existsSync(demo) && !process.argv.includes('--model') ? runFolders(demo) : [];
console.log(`Full analysis time, median of ${repeat} runs each after one warm-up pass (node ${process.version}).\n`);
let total = 0;
if (runs.length) {
  for (const dir of runs) total += await measure(relative(root, dir), () => loadRun(nodeFileAccessor, dir));
  console.log(
    `\nAll ${runs.length} demo runs, parabola method: ${total.toFixed(1)} ms in total, ${(total / runs.length).toFixed(1)} ms per run.`,
  );
} else {
  console.log(
    process.argv.includes('--model')
      ? 'A generated model band structure (--model).\n'
      : 'fixtures/demo/ has no runs: analysing a generated model band structure instead.\n',
  );
  const { pathModel, fccLattice, diamondStructure, parabolicBand, cosineBand } = await import(
    pathToFileURL(join(root, 'test', 'support', 'models.ts')).href
  );
  const legs = [
    [
      { label: 'Γ', k: [0, 0, 0] },
      { label: 'X', k: [0.5, 0, 0.5] },
      { label: 'W', k: [0.5, 0.25, 0.75] },
      { label: 'L', k: [0.5, 0.5, 0.5] },
      { label: 'Γ', k: [0, 0, 0] },
    ],
  ];
  const bands = [];
  for (let b = 0; b < 20; b++)
    bands.push(b < 10 ? cosineBand(-10 + b * 0.9, [-0.3 - 0.01 * b, -0.3, -0.3]) : parabolicBand(1 + (b - 10) * 0.7, 0.3 + 0.05 * b));
  await measure(
    'generated model (fcc path, 20 bands)',
    async () =>
      pathModel({ lattice: fccLattice(5.43), structure: diamondStructure(5.43, 'Si'), bands, electrons: 20, legs, pointsPerSegment: 100 }),
    'build',
  );
}
