#!/usr/bin/env node
// The demo: runs the bundled command-line tool on the invented scenario in fixtures/demo (see its README.md).
//   1. `analyze` on each run, printing the readable summaries (the mesh run's from its interpolated bands);
//   2. `annotate` on each run (writes <file>.valleys.json beside each EIGENVAL; a second run changes nothing),
//      when the command exists;
//      then `check` over fixtures/demo (the annotations must be fresh), as text and as a review comment
//      (`--format md`), when that command exists;
//   3. `compare` over the strain series against the unstrained run, when the command exists;
//   4. a trend plot (gap and conduction-band mass against in-plane strain): fixtures/demo/si-strain/trend.svg.
// Only commands that `dist/cli.js --help` lists are called; anything skipped is said so.
// Usage (after `node esbuild.mjs --cli-only`): node scripts/demo.mjs
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const cli = join(root, 'dist', 'cli.js');
const demo = join(root, 'fixtures', 'demo');
const strainDir = join(demo, 'si-strain');
const rel = (p) => relative(root, p) || '.';

if (!existsSync(cli)) {
  console.error('dist/cli.js is missing: build it first (node esbuild.mjs --cli-only), or use "npm run demo".');
  process.exit(1);
}

let failures = 0;
const skipped = [];

function runCli(args, { quiet = false } = {}) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) {
    failures++;
    console.error(`✗ valleyscope ${args.join(' ')} exited with ${r.status}`);
    if (r.stderr) console.error(r.stderr.trimEnd());
  } else if (!quiet && r.stderr) {
    process.stderr.write(r.stderr);
  }
  return r;
}

function heading(text) {
  console.log(`\n${'='.repeat(text.length)}\n${text}\n${'='.repeat(text.length)}`);
}

const strainRuns = existsSync(strainDir)
  ? readdirSync(strainDir, { withFileTypes: true })
      .filter((d) => d.isDirectory())
      .map((d) => join(strainDir, d.name))
      .sort()
  : [];
// The mesh run (tessellite-mesh): an ordinary self-consistent run on a 12×12×12 mesh, no band path; its
// edges and masses come from the interpolated bands.
const meshRun = join(demo, 'tessellite-mesh');
const runs = [join(demo, 'si-bulk'), join(demo, 'gaas-bulk'), ...strainRuns, meshRun].filter((p) => existsSync(p));
if (runs.length === 0) {
  console.error('fixtures/demo holds no runs: regenerate them with "npm run fixtures".');
  process.exit(1);
}

console.log('Valleyscope demo: the Brightwater Lattice Group reviews its model runs.');
console.log('(An invented scenario: the group does not exist, and the data are bands of the Cohen & Bergstresser');
console.log('empirical pseudopotential model, and of a tight-binding model of our own for the fictitious');
console.log('tessellite mesh run, written in VASP layouts; see fixtures/demo/README.md.)');

// Which commands does this build have?
const help = runCli(['--help'], { quiet: true }).stdout ?? '';
const has = (name) => new RegExp(`^valleyscope ${name}\\b`, 'm').test(help);

// 1. analyze
heading('1. valleyscope analyze: each run');
for (const run of runs) {
  const r = runCli(['analyze', rel(run)]);
  if (r.status === 0) console.log(r.stdout.trimEnd() + '\n');
}

// 2. annotate
if (has('annotate')) {
  heading('2. valleyscope annotate: findings written beside each EIGENVAL');
  const r = runCli(['annotate', ...runs.map(rel)]);
  if (r.status === 0) console.log(r.stdout.trimEnd());
  if (has('check')) {
    console.log('\nvalleyscope check: are the annotations just written fresh against their data files?');
    const c = runCli(['check', rel(demo)]);
    if (c.status === 0) console.log(c.stdout.trimEnd());
    console.log('\nvalleyscope check --format md: the same as a review comment (details collapsed when rendered)');
    const md = runCli(['check', rel(demo), '--format', 'md']);
    if (md.status === 0) console.log(md.stdout.trimEnd());
  } else {
    skipped.push('check (this build has no "check" command)');
  }
} else {
  skipped.push('annotate (this build has no "annotate" command)');
}

// 3. compare
if (has('compare') && strainRuns.length >= 2) {
  heading('3. valleyscope compare: the (001) biaxial strain series against the unstrained run');
  const reference = strainRuns.find((p) => /\+0\.00pct$/.test(p)) ?? strainRuns[0];
  const r = runCli(['compare', ...strainRuns.map(rel), '--reference', rel(reference)]);
  if (r.status === 0) console.log(r.stdout.trimEnd());
} else {
  skipped.push(strainRuns.length < 2 ? 'compare (fewer than two strain runs)' : 'compare (this build has no "compare" command)');
}

// 4. trend plot from analyze --json
heading('4. Trend plot');
if (strainRuns.length >= 2) {
  const points = [];
  const latticeOf = (run) => {
    const f = ['CONTCAR', 'POSCAR'].map((n) => join(run, n)).find((p) => existsSync(p));
    const lines = readFileSync(f, 'utf8').split(/\r?\n/);
    const s = Number(lines[1].trim().split(/\s+/)[0]);
    return [2, 3, 4].map((i) =>
      lines[i]
        .trim()
        .split(/\s+/)
        .map((x) => Number(x) * s),
    );
  };
  const reference = strainRuns.find((p) => /\+0\.00pct$/.test(p)) ?? strainRuns[0];
  const a0 = latticeOf(reference);
  for (const run of strainRuns) {
    const r = runCli(['analyze', rel(run), '--json'], { quiet: true });
    if (r.status !== 0) continue;
    const rep = JSON.parse(r.stdout);
    // In-plane strain from the structures: the x component of a2 = (a/2)(1 + ε_xx, 0, 1 + ε_zz).
    const a = latticeOf(run);
    const exx = a[1][0] / a0[1][0] - 1;
    const ezz = a[1][2] / a0[1][2] - 1;
    const cbm = (rep.extrema ?? []).find((e) => e.kind === 'cbm');
    const masses = (cbm?.masses ?? []).map((m) => m.mass).filter((m) => Number.isFinite(m));
    points.push({
      run: rel(run),
      exx,
      ezz,
      gap: rep.gap?.eV ?? null,
      cbmK: rep.gap?.cbm?.k ?? null,
      nv: cbm?.valleyDegeneracy ?? null,
      mass: masses.length ? masses.reduce((s, x) => s + x, 0) / masses.length : null,
      nMasses: masses.length,
    });
  }
  points.sort((p, q) => p.exx - q.exx);
  console.log(' in-plane ε   ε along z   gap (eV)   CBM valleys (N_v)   CBM mass along the path (m_e)');
  for (const p of points) {
    console.log(
      `${fmtPct(p.exx).padStart(11)} ${fmtPct(p.ezz).padStart(11)} ${p.gap === null ? '       —' : p.gap.toFixed(4).padStart(10)}   ${String(p.nv ?? '—').padStart(17)}   ${p.mass === null ? '—' : p.mass.toFixed(3)}`,
    );
  }
  if (points.every((p) => p.mass === null)) skipped.push('masses in the trend plot (this build reports no conduction-band masses)');
  const svgPath = join(strainDir, 'trend.svg');
  writeFileSync(svgPath, trendSvg(points));
  console.log(`\nwrote ${rel(svgPath)}`);
  console.log("Caution: model bands (no spin-orbit, energies on the model's own scale); the model's silicon gap");
  console.log('(≈ 0.82 eV) is below the measured 1.17 eV (memory), and real semilocal-DFT gaps are too small as well.');
} else {
  skipped.push('trend plot (fewer than two strain runs)');
}

if (skipped.length) {
  heading('Skipped');
  for (const s of skipped) console.log(`- ${s}`);
}
if (failures) {
  console.error(`\n${failures} command(s) failed.`);
  process.exit(1);
}

function fmtPct(x) {
  return `${x >= 0 ? '+' : '−'}${Math.abs(x * 100).toFixed(2)} %`;
}

/** A two-panel SVG: gap against in-plane strain, and the conduction-band mass against in-plane strain. */
function trendSvg(points) {
  const W = 760;
  const H = 340;
  const panels = [
    { key: 'gap', title: 'Band gap (eV)', x0: 70, fmt: (v) => v.toFixed(2) },
    { key: 'mass', title: 'CBM mass along the path, m_e (mean of its fits)', x0: 450, fmt: (v) => v.toFixed(3) },
  ];
  const pw = 270;
  const top = 50;
  const ph = 210;
  const out = [];
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="sans-serif" font-size="12">`,
  );
  out.push(`<rect width="${W}" height="${H}" fill="#ffffff"/>`);
  out.push(
    `<text x="${W / 2}" y="22" text-anchor="middle" font-size="14">Si under (001) biaxial strain: Brightwater demo (invented scenario, EPM model data)</text>`,
  );
  const xs = points.map((p) => p.exx * 100);
  const xmin = Math.min(...xs);
  const xmax = Math.max(...xs);
  const xpad = (xmax - xmin) * 0.08 || 1;
  for (const panel of panels) {
    const vals = points.map((p) => p[panel.key]).filter((v) => v !== null);
    const left = panel.x0;
    out.push(`<rect x="${left}" y="${top}" width="${pw}" height="${ph}" fill="none" stroke="#444"/>`);
    out.push(`<text x="${left + pw / 2}" y="${top - 8}" text-anchor="middle">${esc(panel.title)}</text>`);
    out.push(`<text x="${left + pw / 2}" y="${top + ph + 36}" text-anchor="middle">in-plane strain ε∥ (%)</text>`);
    const sx = (x) => left + ((x - (xmin - xpad)) / (xmax - xmin + 2 * xpad)) * pw;
    for (const x of xs) {
      out.push(`<line x1="${f(sx(x))}" y1="${top + ph}" x2="${f(sx(x))}" y2="${top + ph + 5}" stroke="#444"/>`);
      out.push(`<text x="${f(sx(x))}" y="${top + ph + 18}" text-anchor="middle">${x.toFixed(1)}</text>`);
    }
    if (vals.length === 0) {
      out.push(`<text x="${left + pw / 2}" y="${top + ph / 2}" text-anchor="middle" fill="#888">no values reported</text>`);
      continue;
    }
    let ymin = Math.min(...vals);
    let ymax = Math.max(...vals);
    const ypad = (ymax - ymin) * 0.15 || Math.abs(ymax) * 0.1 || 1;
    ymin -= ypad;
    ymax += ypad;
    const sy = (y) => top + ph - ((y - ymin) / (ymax - ymin)) * ph;
    for (let i = 0; i <= 4; i++) {
      const y = ymin + ((ymax - ymin) * i) / 4;
      out.push(`<line x1="${left - 5}" y1="${f(sy(y))}" x2="${left}" y2="${f(sy(y))}" stroke="#444"/>`);
      out.push(`<text x="${left - 8}" y="${f(sy(y) + 4)}" text-anchor="end">${panel.fmt(y)}</text>`);
    }
    const pts = points.filter((p) => p[panel.key] !== null);
    out.push(
      `<polyline fill="none" stroke="#2b6cb0" stroke-width="2" points="${pts.map((p) => `${f(sx(p.exx * 100))},${f(sy(p[panel.key]))}`).join(' ')}"/>`,
    );
    for (const p of pts) {
      out.push(
        `<circle cx="${f(sx(p.exx * 100))}" cy="${f(sy(p[panel.key]))}" r="4" fill="#2b6cb0"><title>${esc(p.run)}: ${panel.fmt(p[panel.key])}</title></circle>`,
      );
      if (panel.key === 'gap' && p.nv !== null) {
        out.push(`<text x="${f(sx(p.exx * 100))}" y="${f(sy(p.gap) - 9)}" text-anchor="middle" font-size="10">N_v=${p.nv}</text>`);
      }
    }
  }
  out.push(
    `<text x="${W / 2}" y="${H - 12}" text-anchor="middle" font-size="10" fill="#555">Model bands without spin-orbit; gaps are not comparable with experiment. N_v: conduction valleys related by symmetry.</text>`,
  );
  out.push('</svg>');
  return out.join('\n') + '\n';
}

function f(x) {
  return x.toFixed(1);
}

function esc(s) {
  return String(s).replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}
