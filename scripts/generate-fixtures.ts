/**
 * Writes the fixtures generated from the published model (Cohen & Bergstresser's local empirical
 * pseudopotentials, scripts/epm/) in real VASP layouts:
 *
 *   fixtures/epm/si, ge, gaas       EIGENVAL (with occupations), POSCAR, KPOINTS: the standard fcc path
 *                                   Γ–X–W–K–Γ–L–U–W–L–K|U–X, 40 points per segment, 12 bands
 *   fixtures/epm/si-dense           a fine Γ–X line (301 points) for finite-difference references
 *   fixtures/epm/si-cbm-grid        an explicit 5×5×5 k-list around silicon's conduction minimum (tensor fits)
 *   fixtures/demo/...               the invented demo scenario (fixtures/demo/README.md)
 *
 * Deterministic: the same bytes on every run. Usage: `npm run fixtures` or
 * `tsx scripts/generate-fixtures.ts [--out <root>]` (default: the repository root).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import type { Mat3, Vec3 } from '../src/core/model';
import { cartesianToFractional } from '../src/core/lattice/reciprocal';
import { EpmBandSolver } from './epm/bandSolver';
import { biaxial001Strain, strainedCrystal, unstrainedCrystal, type EpmCrystal } from './epm/crystal';
import { FCC_STANDARD_PATH, STRAIN_DEMO_PATH, linePath, type LinePath, type SegmentList } from './epm/kpath';
import { GALLIUM_ARSENIDE, GERMANIUM, SILICON, type EpmMaterial } from './epm/materials';
import {
  insulatorOccupations,
  modelSystemName,
  writeEigenval,
  writeExplicitKpoints,
  writeLineModeKpoints,
  writePoscar,
} from '../test/support/writers/vasp';
import { demoMeshRunFiles } from './meshModel/demoMeshRun';

/** Si elastic constants C11 = 165.8 GPa, C12 = 63.9 GPa (memory; handbook values at room temperature). */
export const SI_C12_OVER_C11 = 63.9 / 165.8;
/** In-plane (001) biaxial strains of the demo series. */
export const DEMO_STRAINS = [-0.01, -0.005, 0, 0.005, 0.01];

const PATH_BANDS = 12;
const FINE_BANDS = 8;
const POINTS_PER_SEGMENT = 40;

export interface GeneratedFile {
  /** Path relative to the output root, with forward slashes. */
  path: string;
  content: string;
}

/** Band energies along a list of fractional k-points: one Float64Array [k * nBands + band], eV. */
export function solveBands(solver: EpmBandSolver, kpoints: Float64Array, nBands: number): Float64Array {
  const nk = kpoints.length / 3;
  const out = new Float64Array(nk * nBands);
  for (let k = 0; k < nk; k++) {
    out.set(solver.bandsAt([kpoints[3 * k]!, kpoints[3 * k + 1]!, kpoints[3 * k + 2]!], nBands), k * nBands);
  }
  return out;
}

function poscarFor(crystal: EpmCrystal, comment: string): string {
  const [s1, s2] = crystal.material.species;
  const positions: Vec3[] = [
    [0, 0, 0],
    [0.25, 0.25, 0.25],
  ];
  return s1 === s2
    ? writePoscar({ comment, lattice: crystal.lattice, species: [s1], counts: [2], positions })
    : writePoscar({ comment, lattice: crystal.lattice, species: [s1, s2], counts: [1, 1], positions });
}

function strainText(eps: number): string {
  return `${eps >= 0 ? '+' : '-'}${Math.abs(eps * 100).toFixed(2)}%`;
}

interface RunSpec {
  folder: string;
  crystal: EpmCrystal;
  system: string;
  poscarComment: string;
  kpointsComment: string;
  path: LinePath;
  nBands: number;
  structureName?: 'POSCAR' | 'CONTCAR';
}

/** A line-mode run: EIGENVAL with occupations, POSCAR (or CONTCAR), KPOINTS. */
function lineModeRun(spec: RunSpec, energies: Float64Array): GeneratedFile[] {
  const m = spec.crystal.material;
  const nk = spec.path.kpoints.length / 3;
  const eigenval = writeEigenval({
    system: modelSystemName(spec.system),
    nIons: 2,
    electrons: m.electrons,
    nBands: spec.nBands,
    kpoints: spec.path.kpoints,
    energies: [energies],
    occupations: [insulatorOccupations(nk, spec.nBands, m.electrons / 2)],
    lattice: spec.crystal.lattice,
  });
  const kpoints = writeLineModeKpoints({
    comment: spec.kpointsComment,
    pointsPerSegment: spec.path.pointsPerSegment,
    segments: spec.path.segments,
  });
  return [
    { path: `${spec.folder}/EIGENVAL`, content: eigenval },
    { path: `${spec.folder}/${spec.structureName ?? 'POSCAR'}`, content: poscarFor(spec.crystal, spec.poscarComment) },
    { path: `${spec.folder}/KPOINTS`, content: kpoints },
  ];
}

function pathName(segments: SegmentList): string {
  let s = '';
  segments.forEach(([a, b], i) => {
    if (i === 0) s = a;
    else if (segments[i - 1]![1] !== a) s += `|${a}`;
    s += `-${b}`;
  });
  return s.replace(/Γ/g, 'G');
}

/** Position of silicon's conduction minimum along Γ–X (fraction of Γ–X), by golden-section search. */
export function deltaMinimum(solver: EpmBandSolver, band: number): number {
  const X: Vec3 = [0.5, 0, 0.5];
  const e = (t: number): number => solver.bandsAt([X[0] * t, X[1] * t, X[2] * t], band + 1)[band]!;
  let lo = 0.6;
  let hi = 1;
  const r = (Math.sqrt(5) - 1) / 2;
  let x1 = hi - r * (hi - lo);
  let x2 = lo + r * (hi - lo);
  let f1 = e(x1);
  let f2 = e(x2);
  while (hi - lo > 1e-6) {
    if (f1 < f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - r * (hi - lo);
      f1 = e(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + r * (hi - lo);
      f2 = e(x2);
    }
  }
  return (lo + hi) / 2;
}

export function generateFixtures(): GeneratedFile[] {
  const files: GeneratedFile[] = [];
  const standard = linePath(FCC_STANDARD_PATH, POINTS_PER_SEGMENT);
  const standardName = pathName(FCC_STANDARD_PATH);
  const bulk = new Map<string, Float64Array>();
  const solvers = new Map<string, EpmBandSolver>();
  for (const m of [SILICON, GERMANIUM, GALLIUM_ARSENIDE]) {
    const crystal = unstrainedCrystal(m);
    const solver = new EpmBandSolver(crystal);
    solvers.set(m.id, solver);
    const energies = solveBands(solver, standard.kpoints, PATH_BANDS);
    bulk.set(m.id, energies);
    files.push(
      ...lineModeRun(
        {
          folder: `fixtures/epm/${m.id}`,
          crystal,
          system: `${m.name} EPM (Cohen-Bergstresser 1966)`,
          poscarComment: `${m.name} ${m.species[0] === m.species[1] ? 'diamond' : 'zincblende'} a = ${m.latticeConstant.toFixed(2)} A (local EPM model, Cohen & Bergstresser 1966)`,
          kpointsComment: `fcc path ${standardName} (Setyawan-Curtarolo 2010)`,
          path: standard,
          nBands: PATH_BANDS,
        },
        energies,
      ),
    );
  }

  // Silicon: a fine Γ–X line.
  const si = unstrainedCrystal(SILICON);
  const siSolver = solvers.get('si')!;
  const dense = linePath([['Γ', 'X']], 301);
  files.push(
    ...lineModeRun(
      {
        folder: 'fixtures/epm/si-dense',
        crystal: si,
        system: 'Si EPM fine G-X line',
        poscarComment: 'Si diamond a = 5.43 A (local EPM model, Cohen & Bergstresser 1966)',
        kpointsComment: 'fine G-X line, 301 points',
        path: dense,
        nBands: FINE_BANDS,
      },
      solveBands(siSolver, dense.kpoints, FINE_BANDS),
    ),
  );

  // Silicon: an explicit 5×5×5 cartesian grid around the conduction minimum on Γ–X (along +y).
  const unit = (2 * Math.PI) / SILICON.latticeConstant;
  const t0 = Math.round(deltaMinimum(siSolver, SILICON.electrons / 2) * 1000) / 1000;
  const h = 0.01;
  const grid: number[] = [];
  for (let i = -2; i <= 2; i++) {
    for (let j = -2; j <= 2; j++) {
      for (let l = -2; l <= 2; l++) {
        const kc: Vec3 = [i * h * unit, (t0 + j * h) * unit, l * h * unit];
        grid.push(...cartesianToFractional(kc, si.lattice));
      }
    }
  }
  const gridK = Float64Array.from(grid);
  const gridNk = gridK.length / 3;
  files.push({
    path: 'fixtures/epm/si-cbm-grid/EIGENVAL',
    content: writeEigenval({
      system: modelSystemName(`Si EPM grid around (0,${t0.toFixed(3)},0)2pi/a`),
      nIons: 2,
      electrons: 8,
      nBands: FINE_BANDS,
      kpoints: gridK,
      weights: new Float64Array(gridNk).fill(1 / gridNk),
      energies: [solveBands(siSolver, gridK, FINE_BANDS)],
      occupations: [insulatorOccupations(gridNk, FINE_BANDS, 4)],
      lattice: si.lattice,
    }),
  });
  files.push({
    path: 'fixtures/epm/si-cbm-grid/POSCAR',
    content: poscarFor(si, 'Si diamond a = 5.43 A (local EPM model, Cohen & Bergstresser 1966)'),
  });
  files.push({
    path: 'fixtures/epm/si-cbm-grid/KPOINTS',
    content: writeExplicitKpoints(`5x5x5 cartesian grid, step 0.01 2pi/a, centred at (0,${t0.toFixed(3)},0) 2pi/a`, gridK),
  });

  // The demo scenario (invented): bulk runs and a (001) biaxial strain series of silicon.
  const demoBulk: [EpmMaterial, string, 'POSCAR' | 'CONTCAR'][] = [
    [SILICON, 'si-bulk', 'POSCAR'],
    [GALLIUM_ARSENIDE, 'gaas-bulk', 'CONTCAR'],
  ];
  for (const [m, folder, structureName] of demoBulk) {
    files.push(
      ...lineModeRun(
        {
          folder: `fixtures/demo/${folder}`,
          crystal: unstrainedCrystal(m),
          system: `${m.name} bulk, Brightwater model run`,
          poscarComment: `${m.name} bulk (Brightwater Lattice Group demo; model data)`,
          kpointsComment: `fcc path ${standardName}`,
          path: standard,
          nBands: PATH_BANDS,
          structureName,
        },
        bulk.get(m.id)!,
      ),
    );
  }
  const strainPath = linePath(STRAIN_DEMO_PATH, POINTS_PER_SEGMENT);
  DEMO_STRAINS.forEach((eps, i) => {
    const strain: Mat3 = biaxial001Strain(eps, SI_C12_OVER_C11);
    const crystal = strainedCrystal(SILICON, strain);
    const solver = new EpmBandSolver(crystal);
    const label = strainText(eps);
    const folder = `fixtures/demo/si-strain/${String(i + 1).padStart(2, '0')}_biaxial${label.replace('%', 'pct')}`;
    files.push(
      ...lineModeRun(
        {
          folder,
          crystal,
          system: `Si (001) biaxial ${label}`,
          poscarComment: `Si (001) biaxial strain ${label} in plane, ${strainText(strain[2][2])} along z (Brightwater demo; model data)`,
          kpointsComment: `path ${pathName(STRAIN_DEMO_PATH)} (Z: X point along the [001] strain axis)`,
          path: strainPath,
          nBands: PATH_BANDS,
        },
        solveBands(solver, strainPath.kpoints, PATH_BANDS),
      ),
    );
  });
  files.push(...demoMeshRunFiles());
  return files;
}

export function writeFixtures(root: string, files: GeneratedFile[]): void {
  for (const f of files) {
    const p = join(root, f.path);
    mkdirSync(dirname(p), { recursive: true });
    writeFileSync(p, f.content);
  }
}

const isEntry = typeof require !== 'undefined' && typeof module !== 'undefined' && require.main === module;
if (isEntry) {
  const args = process.argv.slice(2);
  const outIndex = args.indexOf('--out');
  const root = resolve(outIndex >= 0 && args[outIndex + 1] ? args[outIndex + 1]! : join(__dirname, '..'));
  const t = performance.now();
  const files = generateFixtures();
  writeFixtures(root, files);
  const kb = files.reduce((a, f) => a + f.content.length, 0) / 1024;
  process.stdout.write(
    `wrote ${files.length} files (${kb.toFixed(0)} KB) under ${root} in ${((performance.now() - t) / 1000).toFixed(1)} s\n`,
  );
}
