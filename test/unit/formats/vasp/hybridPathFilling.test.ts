/**
 * The classic hybrid-functional band run in VASP: the weighted self-consistent mesh first, the band path after it
 * as zero-weight k-points (common practice). VASP fixes E_F on the mesh and writes the path's occupations from it,
 * so a mesh that misses the valence-band maximum makes the path's valence band look partly empty. The path is then
 * filled by the electron count, not by those occupations, and a warning says where the written E_F lies.
 * Model: nearest-neighbour tight binding on a simple cubic lattice (a = 4 Å),
 * E = E0 − 2t (cos 2πf_x + cos 2πf_y + cos 2πf_z) per band, f fractional (the standard s-band form).
 */
import assert from 'node:assert/strict';
import { vaspEigenvalReader } from '../../../../src/core/formats/vasp/eigenval';
import { analyzeBandStructure } from '../../../../src/core/analysis/analyze';
import { writeEigenval } from '../../../support/writers/vasp';
import { writeVasprun } from '../../../support/writers/vasprun';
import { vasprunReader } from '../../../../src/core/formats/vasp/vasprun';
import { cubicLattice } from '../../../support/models';
import type { BandStructure } from '../../../../src/core/model';

const BANDS: [number, number][] = [
  [-9, 0.1],
  [-1, 0.5],
  [7, 0.75],
];
const model = (k: readonly number[]): number[] => BANDS.map(([e0, t]) => e0 - 2 * t * k.reduce((s, f) => s + Math.cos(2 * Math.PI * f), 0));
const DIV = 21;
const SEGMENTS = [
  [
    [0, 0, 0],
    [0.5, 0, 0],
  ],
  [
    [0.5, 0, 0],
    [0.5, 0.5, 0.5],
  ],
];
const PATH = SEGMENTS.flatMap(([p, q]) => Array.from({ length: DIV }, (_, i) => p!.map((x, j) => x + ((q![j]! - x) * i) / (DIV - 1))));
// A 2×2×2 Monkhorst–Pack mesh: the valence band is −1 eV at every point (Σ cos = 0 at (±¼, ±¼, ±¼)), its maximum on
// the path is 2.0 eV at R (model).
const MESH: number[][] = [];
for (const x of [-0.25, 0.25]) for (const y of [-0.25, 0.25]) for (const z of [-0.25, 0.25]) MESH.push([x, y, z]);

function run(fermi: number): string {
  const points = [...MESH, ...PATH];
  const energies = Float64Array.from(points.flatMap(model));
  // Occupations as VASP writes them with a small smearing: 1 below E_F, 0 above (spin-degenerate: fractions).
  const occupations = Float64Array.from(energies, (e) => (e < fermi ? 1 : 0));
  return writeEigenval({
    system: 'hybrid model',
    nIons: 1,
    electrons: 4,
    nBands: BANDS.length,
    kpoints: Float64Array.from(points.flat()),
    weights: Float64Array.from(points, (_, i) => (i < MESH.length ? 1 / MESH.length : 0)),
    energies: [energies],
    occupations: [occupations],
  });
}

const read = (text: string) => vaspEigenvalReader.read({ path: 'run/EIGENVAL', bytes: new TextEncoder().encode(text) }, [], {});

describe('hybrid-functional path after its weighted mesh: filling by the electron count', () => {
  it('a path reaching above the mesh-fixed E_F is still an insulator with the model gap, and a warning says why', () => {
    const bs = read(run(-0.9));
    assert.equal(bs.nk, PATH.length);
    assert.equal(bs.fermiFromOtherKPoints, true);
    const report = analyzeBandStructure(bs);
    assert.equal(report.metal, false, report.classificationReason);
    assert.ok(report.gap);
    // VBM 2.0 eV at R (valence band −1 + 3), CBM 2.5 eV at Γ (conduction band 7 − 4.5), model; f-format rounding.
    assert.ok(Math.abs(report.gap.eV - 0.5) < 2e-4, `${report.gap.eV}`);
    assert.deepEqual([report.gap.vbm.band, report.gap.cbm.band], [2, 3]);
    assert.ok(
      report.warnings.some((w) =>
        /follow from a Fermi energy fixed on the self-consistent mesh and differ from whole bands for band 2/.test(w),
      ),
      JSON.stringify(report.warnings),
    );
  });

  it('a path below the written E_F everywhere gives the same verdict, without that warning', () => {
    const report = analyzeBandStructure(read(run(2.3)));
    assert.equal(report.metal, false);
    assert.ok(Math.abs(report.gap!.eV - 0.5) < 2e-4);
    assert.ok(!report.warnings.some((w) => /fixed on the self-consistent mesh/.test(w)));
  });

  it('a plain path (no weighted mesh before it) keeps its own occupations as the first evidence', () => {
    const text = writeEigenval({
      system: 'plain path',
      nIons: 1,
      electrons: 4,
      nBands: BANDS.length,
      kpoints: Float64Array.from(PATH.flat()),
      weights: Float64Array.from(PATH, () => 1 / PATH.length),
      energies: [Float64Array.from(PATH.flatMap(model))],
      occupations: [Float64Array.from(PATH.flatMap(model), (e) => (e < 2.3 ? 1 : 0))],
    });
    const bs = read(text);
    assert.equal(bs.fermiFromOtherKPoints, undefined);
    assert.match(analyzeBandStructure(bs).classificationReason, /occupations/i);
  });

  it('a metal stays a metal, with the Fermi level the self-consistent run wrote (vasprun.xml)', () => {
    // The conduction band lowered to E0 = 4 eV: its minimum at Γ (4 − 4.5 = −0.5 eV) lies below the valence band's
    // maximum at R (2.0 eV), so the two overlap (model): a semimetal/metal whatever the filling.
    const bands: [number, number][] = [BANDS[0]!, BANDS[1]!, [4, 0.75]];
    const energyOf = (k: readonly number[]): number[] =>
      bands.map(([e0, t]) => e0 - 2 * t * k.reduce((a, f) => a + Math.cos(2 * Math.PI * f), 0));
    const points = [...MESH, ...PATH];
    const energies = Float64Array.from(points.flatMap(energyOf));
    const fermi = 0.8;
    const bs: BandStructure = {
      source: { format: 'model', file: 'model', files: [] },
      lattice: cubicLattice(4),
      structure: { lattice: cubicLattice(4), species: ['Si'], positions: new Float64Array([0, 0, 0]) },
      nk: points.length,
      nBands: bands.length,
      nSpin: 1,
      kpoints: Float64Array.from(points.flat()),
      weights: Float64Array.from(points, (_, i) => (i < MESH.length ? 1 / MESH.length : 0)),
      energies: [energies],
      occupations: [Float64Array.from(energies, (e) => (e < fermi ? 2 : 0))],
      fermiEnergy: fermi,
      electrons: 4,
      spinorbit: false,
      labels: [],
      sampling: 'points',
      grid: null,
      writtenDistance: null,
      partial: false,
      warnings: [],
    };
    const text = writeVasprun(bs);
    const read = vasprunReader.read({ path: 'vasprun.xml', bytes: new TextEncoder().encode(text) }, [], {});
    assert.equal(read.nk, PATH.length);
    assert.equal(read.fermiFromOtherKPoints, true);
    const report = analyzeBandStructure(read);
    assert.equal(report.metal, true, report.classificationReason);
    assert.equal(report.fermi_eV, fermi);
  });
});
