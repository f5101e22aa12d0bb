/**
 * The phases of `analyze --json` in one process, each timed by the CPU time it used (user + system: steadier
 * than wall time on a shared machine), beside JSON.parse of the same energies in the same process.
 * Prints one JSON line: { parseMs, readMs, analyzeMs, jsonMs, extrema, rejected }.
 * Usage: tsx scripts/bench/measurePhases.ts <run folder holding EIGENVAL and energies.json | eigenvalue file with energies.json beside it>
 */
import { readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { installNativeSha256 } from '../../src/cli/nativeHash';
import { reportToJson } from '../../src/core/report/reportJson';

const cpuMs = (u: NodeJS.CpuUsage): number => (u.user + u.system) / 1000;

async function main(): Promise<void> {
  const arg = process.argv[2]!;
  const dir = statSync(arg).isDirectory() ? arg : dirname(arg);
  const file = dir === arg ? join(dir, 'EIGENVAL') : arg;
  installNativeSha256();
  await ensureSymmetryReady();
  let u = process.cpuUsage();
  const arr = JSON.parse(readFileSync(join(dir, 'energies.json'), 'utf8')) as number[];
  const parseMs = cpuMs(process.cpuUsage(u));
  if (!arr.length) throw new Error('no energies');
  u = process.cpuUsage();
  const bs = await loadRun(nodeFileAccessor, file);
  const readMs = cpuMs(process.cpuUsage(u));
  u = process.cpuUsage();
  const report = analyzeBandStructure(bs);
  const analyzeMs = cpuMs(process.cpuUsage(u));
  u = process.cpuUsage();
  const text = JSON.stringify(reportToJson(report), null, 2);
  const jsonMs = cpuMs(process.cpuUsage(u));
  console.log(
    JSON.stringify({
      parseMs,
      readMs,
      analyzeMs,
      jsonMs,
      bytes: text.length,
      extrema: report.extrema.length,
      rejected: (report.rejected ?? []).length,
    }),
  );
}

void main();
