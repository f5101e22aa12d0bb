/**
 * Benchmark (not a test): a 24×24×24 Γ-centred mesh of the diamond structure (413 irreducible points) with
 * `nb` bands, interpolated band by band (src/core/interpolation) and the two edge bands analysed (extrema,
 * leave-one-out), against JSON.parse of the same energies written as JSON. Prints the ratio.
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
  const t0 = performance.now();
  const made = MeshInterpolation.create({ lattice, kpoints, weights, bands, sym });
  if (!made.run) throw new Error(made.reason);
  const t1 = performance.now();
  for (let band = 0; band < nb; band++) made.run.band(band);
  const t2 = performance.now();
  const edge = Math.floor(nb / 2);
  made.run.extrema(edge - 1, 'max');
  made.run.extrema(edge, 'min');
  const t3 = performance.now();
  console.log(
    JSON.stringify({
      mesh: `${n}×${n}×${n}`,
      irreducible: nk,
      bands: nb,
      stars: made.run.fit.basis.count,
      setupMs: Math.round(t1 - t0),
      fitAllBandsMs: Math.round(t2 - t1),
      edgeExtremaMs: Math.round(t3 - t2),
      jsonParseMs: Number(parseMs.toFixed(1)),
      ratio: Number(((t3 - t0) / parseMs).toFixed(1)),
    }),
  );
}
void main();
