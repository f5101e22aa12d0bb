/**
 * One measurement in its own process (so peak memory is this task's alone). Prints one JSON line:
 * { ms, rssBeforeMB, maxRssMB, count }.
 * Usage: tsx scripts/bench/measure.ts <task> <file> [args]
 *   read-valleyscope <file>     read through the core loader (streaming where the reader can)
 *   read-only <file>            the reader alone, streamed through a ranged source (no companions, no label
 *                               inference from the lattice, no file hash: as `analyze` reads, which prints none;
 *                               `annotate` adds the SHA-256): what a reader's own speed and memory goals are about
 *   json-parse <file.json>      read the file and JSON.parse it (the runtime's C++ number parser)
 *   newline-count <file>        read in 16 MiB chunks and count newlines (the I/O floor)
 *   analyze-path <nk> <nb>      full analysis of a synthetic path band structure (all extrema, fits, symmetry)
 */
import { openSync, readSync, closeSync, readFileSync } from 'node:fs';
import { loadRun, locateRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { installNativeSha256 } from '../../src/cli/nativeHash';
import type { BandStructure } from '../../src/core/model';
import { oneSpinBands } from '../../test/support/bandStructure';
import { diamondStructure, fccLattice } from '../../test/support/models';

async function main(): Promise<void> {
  const [task, a1, a2] = process.argv.slice(2);
  // As the CLI does: node's native SHA-256 for the source hash.
  installNativeSha256();
  await ensureSymmetryReady();
  const rssBefore = process.memoryUsage().rss;
  const t0 = performance.now();
  // CPU time of this process (user + system, all threads): less disturbed than wall time by other load.
  const cpu0 = process.cpuUsage();
  let count = 0;
  if (task === 'read-valleyscope') {
    const bs = await loadRun(nodeFileAccessor, a1!);
    count = bs.nk * bs.nBands * bs.nSpin;
  } else if (task === 'read-only') {
    const loc = await locateRun(nodeFileAccessor, a1!);
    const stream = nodeFileAccessor.openRanged!(loc.file);
    try {
      const bs = loc.reader.read({ path: loc.file, bytes: new Uint8Array(0), stream }, [], { hashSources: false });
      count = bs.nk * bs.nBands * bs.nSpin;
    } finally {
      stream.close();
    }
  } else if (task === 'json-parse') {
    const arr = JSON.parse(readFileSync(a1!, 'utf8')) as number[];
    count = arr.length;
  } else if (task === 'newline-count') {
    const fd = openSync(a1!, 'r');
    const buf = new Uint8Array(16 * 1024 * 1024);
    for (;;) {
      const n = readSync(fd, buf, 0, buf.length, null);
      if (n === 0) break;
      for (let i = 0; i < n; i++) if (buf[i] === 10) count++;
    }
    closeSync(fd);
  } else if (task === 'analyze-path') {
    const bs = syntheticPath(Number(a1), Number(a2));
    const t1 = performance.now();
    const r = analyzeBandStructure(bs);
    count = r.extrema.length;
    const ms = performance.now() - t1;
    console.log(JSON.stringify({ ms, rssBeforeMB: rssBefore / 2 ** 20, maxRssMB: process.resourceUsage().maxRSS / 1024, count }));
    return;
  } else throw new Error(`unknown task ${task}`);
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  const cpuMs = (cpu.user + cpu.system) / 1000;
  console.log(JSON.stringify({ ms, cpuMs, rssBeforeMB: rssBefore / 2 ** 20, maxRssMB: process.resourceUsage().maxRSS / 1024, count }));
}

/** A diamond-like crystal's path with cosine bands: nk points along Γ–X–W–L–Γ, nb bands, a gap in the middle. */
function syntheticPath(nk: number, nb: number): BandStructure {
  const a = 5.43;
  const ends = [
    [0, 0, 0],
    [0.5, 0, 0.5],
    [0.5, 0.25, 0.75],
    [0.5, 0.5, 0.5],
    [0, 0, 0],
  ];
  const per = Math.floor(nk / (ends.length - 1));
  const kpoints = new Float64Array(per * (ends.length - 1) * 3);
  const n = kpoints.length / 3;
  let i = 0;
  for (let s = 0; s < ends.length - 1; s++) {
    for (let j = 0; j < per; j++) {
      const t = j / (per - 1);
      for (let c = 0; c < 3; c++) kpoints[3 * i + c] = ends[s]![c]! + (ends[s + 1]![c]! - ends[s]![c]!) * t;
      i++;
    }
  }
  const energies = new Float64Array(n * nb);
  for (let k = 0; k < n; k++) {
    const x = kpoints[3 * k]!,
      y = kpoints[3 * k + 1]!,
      z = kpoints[3 * k + 2]!;
    const c = Math.cos(2 * Math.PI * x) + Math.cos(2 * Math.PI * y) + Math.cos(2 * Math.PI * z);
    for (let b = 0; b < nb; b++) {
      const base = b < nb / 2 ? -12 + (10 * b) / (nb / 2) : 1 + (10 * (b - nb / 2)) / (nb / 2);
      energies[k * nb + b] = base + (b < nb / 2 ? 0.3 : -0.3) * c * (1 + (b % 3) * 0.1);
    }
  }
  const labels = ['Γ', 'X', 'W', 'L'].map((label, s) => ({ index: s * per, label }));
  return oneSpinBands({
    source: { format: 'synthetic', file: 'synthetic', files: [] },
    lattice: fccLattice(a),
    structure: diamondStructure(a, 'Si'),
    kpoints,
    nBands: nb,
    energies,
    electrons: nb,
    labels,
    sampling: 'path',
  });
}

void main();
