/**
 * vasprun.xml benchmark (a script, not a test): generates vasprun.xml files under bench-data/ (not committed),
 * with the same energies as one JSON array beside each, then measures in separate processes
 * (scripts/bench/measure.ts): the reader through the core loader, JSON.parse of the energies, and a bare
 * newline count of the XML. Prints each figure with the one it is compared against and the goal.
 * Two shapes: many bands (11 200 k × 520 bands, ~200 MB, streamed) and many k-points (20 000 k × 40 bands,
 * ~30 MB). With --small: 1 000 × 520 and 4 000 × 40; with --shape 20000x40 only that shape.
 * For files up to 64 MiB it also reads the file twice in this process and prints the second pass: the
 * reader's steady cost, apart from what a fresh process pays once (compiling the scanner, hashing, I/O).
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, statSync, writeSync } from 'node:fs';
import { VasprunStream } from '../../src/core/formats/vasp/vasprunStream';

const small = process.argv.includes('--small');
const shapeArg = process.argv[process.argv.indexOf('--shape') + 1] ?? '';
const onlyShape = process.argv.includes('--shape') ? shapeArg.split('x').map(Number) : null;
const dir = 'bench-data';
mkdirSync(dir, { recursive: true });
const MB = 2 ** 20;
/** Goals (issue on throughput): reader ≤ 1.5 × JSON.parse of the same energies; peak memory ≤ 0.5 × the file. */
const TIME_GOAL = 1.5;
const MEMORY_GOAL = 0.5;
let nk = 0;
let nb = 0;
let xml = '';
let json = '';

/** Deterministic smooth bands: half valence below 0 eV, half conduction above 1 eV. */
function energy(k: number, b: number): number {
  const x = k / nk;
  const c = Math.cos(2 * Math.PI * x);
  return b < nb / 2 ? -12 + (12 * b) / (nb / 2) + 0.3 * c : 1 + (12 * (b - nb / 2)) / (nb / 2) - 0.3 * c;
}

function generate(): void {
  console.log(`generating ${xml} (${nk} k-points × ${nb} bands) ...`);
  const fx = openSync(xml, 'w');
  const fj = openSync(json, 'w');
  let buf = '';
  let jbuf = '[';
  let first = true;
  const flush = (force = false): void => {
    if (force || buf.length > 1 << 22) {
      writeSync(fx, buf);
      buf = '';
    }
    if (force || jbuf.length > 1 << 22) {
      writeSync(fj, jbuf);
      jbuf = '';
    }
  };
  const f = (v: number, w: number, d: number): string => v.toFixed(d).padStart(w);
  buf +=
    '<?xml version="1.0" encoding="ISO-8859-1"?>\n<modeling>\n <generator>\n  <i name="program" type="string">vasp </i>\n </generator>\n';
  buf += ' <kpoints>\n  <generation param="listgenerated">\n   <i name="divisions" type="int">' + f(nk, 8, 0) + ' </i>\n';
  buf += `   <v>${f(0, 16, 8)}${f(0, 16, 8)}${f(0, 16, 8)} </v>\n   <v>${f(0.5, 16, 8)}${f(0, 16, 8)}${f(0, 16, 8)} </v>\n  </generation>\n`;
  buf += '  <varray name="kpointlist" >\n';
  for (let k = 0; k < nk; k++) buf += `   <v>${f((0.5 * k) / (nk - 1), 16, 8)}${f(0, 16, 8)}${f(0, 16, 8)} </v>\n`;
  buf += '  </varray>\n  <varray name="weights" >\n';
  for (let k = 0; k < nk; k++) buf += `   <v>${f(1 / nk, 16, 8)} </v>\n`;
  buf += '  </varray>\n </kpoints>\n <parameters>\n  <separator name="electronic" >\n';
  buf += `   <i type="int" name="NBANDS">${f(nb, 6, 0)}</i>\n   <i name="NELECT">${f(nb, 16, 8)}</i>\n`;
  buf +=
    '   <separator name="electronic spin" >\n    <i type="int" name="ISPIN">     1</i>\n    <i type="logical" name="LSORBIT"> F  </i>\n   </separator>\n  </separator>\n </parameters>\n';
  buf +=
    ' <atominfo>\n  <array name="atoms" >\n   <set>\n    <rc><c>Si</c><c>   1</c></rc>\n    <rc><c>Si</c><c>   1</c></rc>\n   </set>\n  </array>\n </atominfo>\n';
  const structure = (name: string): string =>
    ` <structure name="${name}" >\n  <crystal>\n   <varray name="basis" >\n    <v>${f(0, 16, 8)}${f(2.715, 16, 8)}${f(2.715, 16, 8)} </v>\n    <v>${f(2.715, 16, 8)}${f(0, 16, 8)}${f(2.715, 16, 8)} </v>\n    <v>${f(2.715, 16, 8)}${f(2.715, 16, 8)}${f(0, 16, 8)} </v>\n   </varray>\n  </crystal>\n  <varray name="positions" >\n   <v>${f(0, 16, 8)}${f(0, 16, 8)}${f(0, 16, 8)} </v>\n   <v>${f(0.25, 16, 8)}${f(0.25, 16, 8)}${f(0.25, 16, 8)} </v>\n  </varray>\n </structure>\n`;
  buf += structure('initialpos');
  buf +=
    ' <calculation>\n  <eigenvalues>\n   <array>\n    <dimension dim="1">band</dimension>\n    <dimension dim="2">kpoint</dimension>\n    <dimension dim="3">spin</dimension>\n    <field>eigene</field>\n    <field>occ</field>\n    <set>\n     <set comment="spin 1">\n';
  for (let k = 0; k < nk; k++) {
    buf += `      <set comment="kpoint ${k + 1}">\n`;
    for (let b = 0; b < nb; b++) {
      const e = energy(k, b);
      buf += `       <r>${f(e, 10, 4)}${f(b < nb / 2 ? 1 : 0, 10, 4)} </r>\n`;
      jbuf += (first ? '' : ',') + e.toFixed(4);
      first = false;
    }
    buf += '      </set>\n';
    flush();
  }
  buf +=
    '     </set>\n    </set>\n   </array>\n  </eigenvalues>\n  <dos>\n   <i name="efermi">      0.50000000 </i>\n  </dos>\n </calculation>\n';
  buf += structure('finalpos') + '</modeling>\n';
  jbuf += ']';
  flush(true);
  closeSync(fx);
  closeSync(fj);
}

function measure(task: string, file: string): { ms: number; cpuMs: number; rssBeforeMB: number; maxRssMB: number; count: number } | null {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/bench/measure.ts', task, file], {
    encoding: 'utf8',
    maxBuffer: 1 << 26,
  });
  if (r.status !== 0) {
    console.log(`  ${task}: failed (${(r.stderr || '').trim().split('\n').slice(-1)[0]})`);
    return null;
  }
  return JSON.parse(r.stdout.trim().split('\n').pop()!);
}
const fmt = (x: number, d = 2): string => x.toFixed(d);
const STREAM_ABOVE_MB = 32;

const shapes = onlyShape
  ? [onlyShape]
  : small
    ? [
        [1000, 520],
        [4000, 40],
      ]
    : [
        [11200, 520],
        [20000, 40],
      ];

/** CPU milliseconds of the second of two in-process reads of `file` (no hashing, bytes already in memory). */
function warmReadCpuMs(file: string): number {
  const bytes = readFileSync(file);
  let cpu = 0;
  for (let pass = 0; pass < 2; pass++) {
    const c0 = process.cpuUsage();
    const stream = new VasprunStream(file, bytes.length);
    for (let i = 0; i < bytes.length; i += 1 << 20)
      stream.write(bytes.subarray(i, Math.min(bytes.length, i + (1 << 20))), i + (1 << 20) >= bytes.length);
    stream.finish(false);
    const c = process.cpuUsage(c0);
    cpu = (c.user + c.system) / 1000;
  }
  return cpu;
}

for (const [k, b] of shapes) {
  nk = k!;
  nb = b!;
  xml = `${dir}/vasprun-${nk}x${nb}.xml`;
  json = `${xml}.json`;
  if (!existsSync(xml) || !existsSync(json)) generate();
  const size = statSync(xml).size;
  console.log(`\nvasprun.xml, ${fmt(size / MB, 0)} MiB, ${nk} k-points × ${nb} bands = ${nk * nb} energies (byte scanner)`);
  const ours = measure('read-only', xml);
  const loader = measure('read-valleyscope', xml);
  const jp = measure('json-parse', json);
  const nl = measure('newline-count', xml);
  if (!ours || !loader || !jp || !nl) continue;
  const ratio = ours.ms / ours.count / (jp.ms / jp.count);
  console.log(
    `  vasprun reader alone, streamed (no file hash, as analyze reads)   ${fmt(ours.ms, 0)} ms  (${fmt(size / MB / (ours.ms / 1000), 0)} MiB/s, ${fmt((ours.ms * 1e6) / ours.count, 1)} ns per energy)`,
  );
  console.log(
    `  JSON.parse, same energies as one array (${fmt(statSync(json).size / MB, 0)} MiB)  ${fmt(jp.ms, 0)} ms  (${fmt((jp.ms * 1e6) / jp.count, 1)} ns per energy)`,
  );
  console.log(`  newline count over the same XML (I/O floor)  ${fmt(nl.ms, 0)} ms`);
  console.log(
    `  ratio reader / JSON.parse (time per energy): ${fmt(ratio)}   (goal ≤ ${TIME_GOAL}: ${ratio <= TIME_GOAL ? 'met' : 'NOT met'})`,
  );
  const cpuRatio = ours.cpuMs / ours.count / (jp.cpuMs / jp.count);
  console.log(
    `  the same ratio in CPU time (less disturbed by other load): ${fmt(cpuRatio)}   (reader ${fmt(ours.cpuMs, 0)} ms, JSON.parse ${fmt(jp.cpuMs, 0)} ms)`,
  );
  console.log(`  ratio reader / newline count (same file):    ${fmt(ours.ms / nl.ms)}`);
  const peak = ours.maxRssMB - ours.rssBeforeMB;
  const mem = (peak * MB) / size;
  console.log(
    `  peak memory while reading ${fmt(peak, 0)} MiB over a baseline of ${fmt(ours.rssBeforeMB, 0)} MiB; ratio to the file size: ${fmt(mem)}   (goal ≤ ${MEMORY_GOAL}: ${mem <= MEMORY_GOAL ? 'met' : 'NOT met'})`,
  );
  console.log(
    `  (energies as doubles and occupations as floats: ${fmt((ours.count * 12) / MB, 0)} MiB, ${fmt((ours.count * 12) / size)} of the file size)`,
  );
  if (size <= 64 * MB) {
    const warm = warmReadCpuMs(xml);
    console.log(
      `  steady reader (second read in one process, bytes in memory, no hashing): ${fmt(warm, 0)} ms CPU, ${fmt((warm * 1e6) / ours.count, 1)} ns per energy; ratio to JSON.parse CPU ${fmt(warm / ours.count / (jp.cpuMs / jp.count))}`,
    );
  }
  const lpeak = loader.maxRssMB - loader.rssBeforeMB;
  const streamed = size > STREAM_ABOVE_MB * MB;
  console.log(
    `  through the core loader (adds label inference from the lattice${streamed ? '' : `; files under ${STREAM_ABOVE_MB} MiB are read whole`}): ${fmt(loader.ms, 0)} ms, ratio ${fmt(loader.ms / loader.count / (jp.ms / jp.count))}; peak memory ${fmt(lpeak, 0)} MiB, ${fmt((lpeak * MB) / size)} of the file`,
  );
}
