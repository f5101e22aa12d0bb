/**
 * Benchmark (not a test): a 24×24×24 Γ-centred mesh of the diamond structure (413 irreducible points) with
 * `nb` bands, generated in memory; the interpolation set up (src/core/interpolation) and the two edge bands
 * analysed (extrema anywhere in the zone with their leave-one-out uncertainty), against JSON.parse of the same
 * energies written as JSON. Prints the ratios (cold: star basis built; warm: cached) beside the goal (< 10).
 * The band energies are smooth periodic functions made up for timing only (not physics).
 * Usage: nice -n 10 npx tsx scripts/bench/meshInterpolation.ts [nb=400] [n=24]
 */
import { crystalSymmetry, ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { reciprocalLattice } from '../../src/core/lattice/reciprocal';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { MeshInterpolation } from '../../src/core/interpolation/meshInterpolation';
import type { Mat3 } from '../../src/core/model';

async function main(): Promise<void> {
  const nb = Number(process.argv[2] ?? 400);
  const n = Number(process.argv[3] ?? 24);
  await ensureSymmetryReady();
  const a = 5.43;
  const h = a / 2;
  const lattice: Mat3 = [
    [0, h, h],
    [h, 0, h],
    [h, h, 0],
  ];
  const sym = crystalSymmetry({ lattice, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
  const { kpoints, weights } = irreducibleMesh([n, n, n], [0, 0, 0], sym.reciprocalPointGroup);
  const nk = kpoints.length / 3;
  const b = reciprocalLattice(lattice);
  const neighbours = [
    [0, 1, 1],
    [0, 1, -1],
    [1, 0, 1],
    [1, 0, -1],
    [1, 1, 0],
    [1, -1, 0],
  ].map((s) => s.map((x) => x * h));
  const bands = Array.from({ length: nb }, (_, band) => {
    const e = new Float64Array(nk);
    for (let i = 0; i < nk; i++) {
      const c = [0, 1, 2].map((x) => kpoints[3 * i]! * b[0][x]! + kpoints[3 * i + 1]! * b[1][x]! + kpoints[3 * i + 2]! * b[2][x]!);
      let s = 0;
      for (const r of neighbours) s += Math.cos(c[0]! * r[0]! + c[1]! * r[1]! + c[2]! * r[2]!);
      e[i] = band * 0.5 + (band % 2 ? 0.3 : -0.3) * s;
    }
    return e;
  });
  const json = JSON.stringify(bands.map((e) => Array.from(e)));
  let parseMs = Infinity;
  for (let r = 0; r < 5; r++) {
    const t = performance.now();
    JSON.parse(json);
    parseMs = Math.min(parseMs, performance.now() - t);
  }
  // The analysis needs only the bands at the edges: the valence top and conduction bottom (and their
  // neighbours, fitted to check for touching bands). Run twice: cold (star basis built) and warm (the star
  // basis of this lattice cached, as for a second run of the same crystal).
  const edge = Math.floor(nb / 2);
  const runs: Record<string, number>[] = [];
  for (const label of ['cold', 'warm']) {
    const t0 = performance.now();
    const made = MeshInterpolation.create({ lattice, kpoints, weights, bands, sym });
    if (!made.run) throw new Error(made.reason);
    const t1 = performance.now();
    const top = made.run.extrema(edge - 1, 'max');
    const bottom = made.run.extrema(edge, 'min');
    const t2 = performance.now();
    runs.push({ setupMs: Math.round(t1 - t0), edgeExtremaMs: Math.round(t2 - t1), found: top.extrema.length + bottom.extrema.length });
    if (label === 'cold') runs[0]!.totalMs = t2 - t0;
    else runs[1]!.totalMs = t2 - t0;
  }
  const [cold, warm] = runs as [Record<string, number>, Record<string, number>];
  console.log(
    JSON.stringify({
      mesh: `${n}×${n}×${n}`,
      irreducible: nk,
      bands: nb,
      jsonParseMs: Number(parseMs.toFixed(1)),
      cold: { ...cold, totalMs: Math.round(cold.totalMs!) },
      warm: { ...warm, totalMs: Math.round(warm.totalMs!) },
      ratioCold: Number((cold.totalMs! / parseMs).toFixed(1)),
      ratioWarm: Number((warm.totalMs! / parseMs).toFixed(1)),
      goal: 'ratio < 10',
    }),
  );
}
void main();
