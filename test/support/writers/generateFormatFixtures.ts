/**
 * Writes the small sample files of fixtures/{qe,vasprun,wannier90,castep,bxsf}/ from published models:
 * silicon from the local empirical pseudopotential fixture (fixtures/epm/si, Cohen & Bergstresser,
 * Phys. Rev. 141, 789 (1966)) in every layout, and an orthorhombic nearest-neighbour tight-binding grid
 * (analytic masses ħ²/(2 t_i a_i²)) as a BXSF file. Deterministic. Run: npx tsx test/support/writers/generateFormatFixtures.ts
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { vaspEigenvalReader } from '../../../src/core/formats/vasp/eigenval';
import type { BandStructure, Vec3 } from '../../../src/core/model';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { writeBandsx, writeQeXml } from './qe';
import { writeVasprun } from './vasprun';
import { modelSystemName } from './vasp';
import { writeWannier90 } from './wannier90';
import { writeCastepBands } from './castep';
import { writeBxsf } from './bxsf';
import { orthorhombicLattice } from '../models';

const root = process.argv[2] ?? '.';
const read = (name: string) => ({
  path: join('fixtures/epm/si', name),
  bytes: new Uint8Array(readFileSync(join(root, 'fixtures/epm/si', name))),
});
const si: BandStructure = vaspEigenvalReader.read(read('EIGENVAL'), [read('POSCAR'), read('KPOINTS')], {});
// Keep eight bands (four valence, four conduction): small files, the same edges.
const nb = 8;
const bs: BandStructure = {
  ...si,
  nBands: nb,
  energies: si.energies.map((e) => {
    const out = new Float64Array(si.nk * nb);
    for (let k = 0; k < si.nk; k++) out.set(e.subarray(k * si.nBands, k * si.nBands + nb), k * nb);
    return out;
  }),
  occupations: si.occupations
    ? si.occupations.map((o) => {
        const out = new Float64Array(si.nk * nb);
        for (let k = 0; k < si.nk; k++) out.set(o.subarray(k * si.nBands, k * si.nBands + nb), k * nb);
        return out;
      })
    : null,
};
let vbm = -Infinity;
let cbm = Infinity;
for (let k = 0; k < bs.nk; k++) {
  vbm = Math.max(vbm, bs.energies[0]![k * nb + 3]!);
  cbm = Math.min(cbm, bs.energies[0]![k * nb + 4]!);
}
bs.fermiEnergy = vbm;
// pw.x with ibrav = 2 takes alat as the cubic constant: |a1|·√2 for the fcc primitive cell.
const alat = Math.hypot(...bs.lattice![0]) * Math.SQRT2;

const out = (dir: string, name: string, text: string): void => {
  mkdirSync(join(root, 'fixtures', dir), { recursive: true });
  writeFileSync(join(root, 'fixtures', dir, name), text);
};
out('qe', 'si.xml', writeQeXml(bs, { alat, homo: true }));
out('qe', 'si.bands.dat', writeBandsx(bs, alat));
// Line mode: 40 points per segment; the generation lists each segment's two ends, as VASP writes them.
const ends: number[][] = [];
for (let s = 0; s * 40 < bs.nk; s++)
  for (const i of [s * 40, s * 40 + 39]) ends.push([bs.kpoints[3 * i]!, bs.kpoints[3 * i + 1]!, bs.kpoints[3 * i + 2]!]);
const gen = { divisions: 40, ends };
out('vasprun', 'vasprun.xml', writeVasprun(bs, { generation: gen, system: modelSystemName('Si EPM (Cohen-Bergstresser 1966), 8 bands') }));
const w = writeWannier90({ ...bs, occupations: null }, { fermiEnergy: Number(((vbm + cbm) / 2).toFixed(4)) });
out('wannier90', 'si_band.dat', w.bandDat);
out('wannier90', 'si_band.kpt', w.kpt);
out('wannier90', 'si_band.labelinfo.dat', w.labelinfo);
out('wannier90', 'si.win', w.win);
out('castep', 'si.bands', writeCastepBands(bs));

// Orthorhombic tight-binding conduction band on a 9×9×9 periodic general grid.
const A: Vec3 = [4, 5, 6];
const T: Vec3 = [0.6, 0.5, 0.4];
const n = 9;
const v = new Float64Array(n * n * n);
const c = new Float64Array(n * n * n);
let p = 0;
for (let i = 0; i < n; i++)
  for (let j = 0; j < n; j++)
    for (let l = 0; l < n; l++) {
      const s = [i, j, l].reduce((acc, x, a) => acc + 2 * T[a]! * (1 - Math.cos((2 * Math.PI * x) / (n - 1))), 0);
      v[p] = -1 - 0.5 * s;
      c[p++] = 1 + s;
    }
out(
  'bxsf',
  'model.bxsf',
  writeBxsf({ fermiEnergy: 0, dims: [n, n, n], reciprocal: reciprocalLattice(orthorhombicLattice(...A)), bands: [v, c] }),
);
console.log(`fixtures written: Si VBM ${vbm.toFixed(4)} eV, CBM ${cbm.toFixed(4)} eV, alat ${alat.toFixed(4)} Å`);
