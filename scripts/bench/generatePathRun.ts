/**
 * Writes a line-mode band run for benchmarks (not committed): a folder with EIGENVAL (VASP 6 layout, energies
 * to 6 decimals as VASP writes them), KPOINTS (line mode with labels), POSCAR (diamond-structure cell), and
 * energies.json (the same energies as one JSON array, for the JSON.parse comparison).
 *
 * Bands are smooth, Oh-symmetric and never cross: band b is base_b + w_b·(α_b f_fcc(k) + (1 − α_b) f_sc(k)) with
 * f_fcc the nearest-neighbour fcc tight-binding form cos(πkx)cos(πky) + cos(πky)cos(πkz) + cos(πkz)cos(πkx)
 * and f_sc = cos 2πkx + cos 2πky + cos 2πkz (k cartesian in units of 2π/a); the lower half is filled, with a
 * 1 eV gap above it.
 * With `vasprun` as the fifth argument the same path goes into vasprun.xml instead (VASP's XML layout:
 * structure, k-point list, eigenvalues to 4 decimals as VASP writes them) and energies.json holds those values.
 * Usage: tsx scripts/bench/generatePathRun.ts <folder> <nk> <nb> [segments (1-5, default 4)] [vasprun]
 */
import { createWriteStream, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { close, write, writeEigenvalAndJson } from './eigenvalLayout';

const CORNERS: { label: string; k: [number, number, number] }[] = [
  { label: '\\Gamma', k: [0, 0, 0] },
  { label: 'X', k: [0.5, 0, 0.5] },
  { label: 'W', k: [0.5, 0.25, 0.75] },
  { label: 'L', k: [0.5, 0.5, 0.5] },
  { label: '\\Gamma', k: [0, 0, 0] },
  { label: 'K', k: [0.375, 0.375, 0.75] },
];

/** The path's k-points (fractional) and band energies (eV, full precision) at each, one segment after another. */
function* pathPoints(segments: number, per: number, nb: number): Generator<{ kf: [number, number, number]; e: Float64Array }> {
  const nOcc = Math.floor(nb / 2);
  const spacing = 40 / nb;
  const e = new Float64Array(nb);
  for (let s = 0; s < segments; s++) {
    const p = CORNERS[s]!.k;
    const q = CORNERS[s + 1]!.k;
    for (let i = 0; i < per; i++) {
      const t = i / (per - 1);
      const kf = [0, 1, 2].map((c) => p[c]! + t * (q[c]! - p[c]!)) as [number, number, number];
      // Cartesian k in units of 2π/a for the cell above: b1 = (−1, 1, 1), b2 = (1, −1, 1), b3 = (1, 1, −1).
      const kx = -kf[0] + kf[1] + kf[2];
      const ky = kf[0] - kf[1] + kf[2];
      const kz = kf[0] + kf[1] - kf[2];
      const fcc =
        Math.cos(Math.PI * kx) * Math.cos(Math.PI * ky) +
        Math.cos(Math.PI * ky) * Math.cos(Math.PI * kz) +
        Math.cos(Math.PI * kz) * Math.cos(Math.PI * kx);
      const sc = Math.cos(2 * Math.PI * kx) + Math.cos(2 * Math.PI * ky) + Math.cos(2 * Math.PI * kz);
      for (let b = 0; b < nb; b++) {
        const alpha = (b % 5) / 4;
        const w = 0.08 * spacing * (b % 2 ? 1 : -1);
        e[b] = -20 + spacing * b + (b >= nOcc ? 1 : 0) + w * (alpha * fcc + (1 - alpha) * sc);
      }
      yield { kf, e };
    }
  }
}

const A = 5.43;

/** VASP's XML layout: what the reader takes (structure, k-point list, eigenvalues with occupations). */
async function writeVasprun(dir: string, segments: number, per: number, nb: number): Promise<void> {
  const nk = per * segments;
  const nOcc = Math.floor(nb / 2);
  const ws = createWriteStream(join(dir, 'vasprun.xml'));
  const js = createWriteStream(join(dir, 'energies.json'));
  const basis = `   <varray name="basis" >\n    <v> 0.0 ${A / 2} ${A / 2} </v>\n    <v> ${A / 2} 0.0 ${A / 2} </v>\n    <v> ${A / 2} ${A / 2} 0.0 </v>\n   </varray>\n`;
  const structure = (name: string): string =>
    ` <structure${name}>\n  <crystal>\n${basis}  </crystal>\n  <varray name="positions" >\n   <v> 0.0 0.0 0.0 </v>\n   <v> 0.25 0.25 0.25 </v>\n  </varray>\n </structure>\n`;
  let head = `<?xml version="1.0" encoding="ISO-8859-1"?>\n<modeling>\n <generator>\n  <i name="program" type="string">vasp </i>\n  <i name="version" type="string">6.4.2  </i>\n </generator>\n`;
  head += ` <incar>\n  <i type="string" name="SYSTEM">benchmark</i>\n  <i name="ISPIN">      1</i>\n </incar>\n <kpoints>\n  <varray name="kpointlist" >\n`;
  const kpts: string[] = [];
  for (const { kf } of pathPoints(segments, per, 1)) kpts.push(`   <v> ${kf.map((x) => x.toFixed(8)).join(' ')} </v>\n`);
  head +=
    kpts.join('') +
    `  </varray>\n  <varray name="weights" >\n` +
    `   <v> ${(1 / nk).toFixed(8)} </v>\n`.repeat(nk) +
    `  </varray>\n </kpoints>\n`;
  head += ` <parameters>\n  <separator name="electronic" >\n   <i name="NELECT">      ${(2 * nOcc).toFixed(8)}</i>\n   <i type="int" name="NBANDS">     ${nb}</i>\n   <separator name="electronic spin" >\n    <i type="int" name="ISPIN">     1</i>\n    <i type="logical" name="LNONCOLLINEAR"> F  </i>\n    <i type="logical" name="LSORBIT"> F  </i>\n   </separator>\n  </separator>\n </parameters>\n`;
  head += ` <atominfo>\n  <atoms>       2 </atoms>\n  <types>       1 </types>\n  <array name="atoms" >\n   <dimension dim="1">ion</dimension>\n   <field type="string">element</field>\n   <field type="int">atomtype</field>\n   <set>\n    <rc><c>Si</c><c>   1</c></rc>\n    <rc><c>Si</c><c>   1</c></rc>\n   </set>\n  </array>\n </atominfo>\n`;
  head += structure(' name="initialpos" ') + ' <calculation>\n' + structure('');
  head += `  <eigenvalues>\n   <array>\n    <dimension dim="1">band</dimension>\n    <dimension dim="2">kpoint</dimension>\n    <dimension dim="3">spin</dimension>\n    <field>eigene</field>\n    <field>occ</field>\n    <set>\n     <set comment="spin 1">\n`;
  await write(ws, head);
  await write(js, '[');
  let k = 0;
  for (const { e } of pathPoints(segments, per, nb)) {
    let block = `      <set comment="kpoint ${++k}">\n`;
    let j = '';
    for (let b = 0; b < nb; b++) {
      const es = e[b]!.toFixed(4);
      block += `       <r> ${es.padStart(9)} ${b < nOcc ? '   1.0000' : '   0.0000'} </r>\n`;
      j += (k === 1 && b === 0 ? '' : ',') + es;
    }
    await write(ws, block + '      </set>\n');
    await write(js, j);
  }
  await write(ws, `     </set>\n    </set>\n   </array>\n  </eigenvalues>\n </calculation>\n</modeling>\n`);
  await write(js, ']');
  await close(ws);
  await close(js);
}

async function main(): Promise<void> {
  const [dir, nkArg, nbArg, segArg, layout] = process.argv.slice(2);
  const nb = Number(nbArg);
  const segments = Math.min(5, Math.max(1, Number(segArg ?? 4)));
  const per = Math.floor(Number(nkArg) / segments);
  const nk = per * segments;
  mkdirSync(dir!, { recursive: true });
  if (layout === 'vasprun') return writeVasprun(dir!, segments, per, nb);
  writeFileSync(
    join(dir!, 'POSCAR'),
    `benchmark diamond cell\n   1.0\n  0.0 ${A / 2} ${A / 2}\n  ${A / 2} 0.0 ${A / 2}\n  ${A / 2} ${A / 2} 0.0\n   Si\n     2\nDirect\n  0.0 0.0 0.0\n  0.25 0.25 0.25\n`,
  );
  let kp = `benchmark path\n   ${per}\nLine-mode\nReciprocal\n`;
  for (let s = 0; s < segments; s++) {
    const p = CORNERS[s]!;
    const q = CORNERS[s + 1]!;
    kp += `   ${p.k.map((x) => x.toFixed(10)).join('   ')}   ! ${p.label}\n   ${q.k.map((x) => x.toFixed(10)).join('   ')}   ! ${q.label}\n\n`;
  }
  writeFileSync(join(dir!, 'KPOINTS'), kp);
  const nOcc = Math.floor(nb / 2);
  const points = (function* () {
    for (const { kf, e } of pathPoints(segments, per, nb)) yield { k: kf, weight: 1 / nk, energies: e };
  })();
  await writeEigenvalAndJson(join(dir!, 'EIGENVAL'), join(dir!, 'energies.json'), { electrons: 2 * nOcc, nk, nb, occupied: nOcc, points });
}

void main();
