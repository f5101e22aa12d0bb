/**
 * Writes a line-mode band run for benchmarks (not committed): a folder with EIGENVAL (VASP 6 layout, energies
 * to 6 decimals as VASP writes them), KPOINTS (line mode with labels), POSCAR (diamond-structure cell), and
 * energies.json (the same energies as one JSON array, for the JSON.parse comparison).
 *
 * Bands are smooth, Oh-symmetric and never cross: band b is base_b + w_b·(α_b f_fcc(k) + (1 − α_b) f_sc(k)) with
 * f_fcc the nearest-neighbour fcc tight-binding form cos(πkx)cos(πky) + cos(πky)cos(πkz) + cos(πkz)cos(πkx)
 * and f_sc = cos 2πkx + cos 2πky + cos 2πkz (k cartesian in units of 2π/a); the lower half is filled, with a
 * 1 eV gap above it.
 * Usage: tsx scripts/bench/generatePathRun.ts <folder> <nk> <nb> [segments (1-5, default 4)]
 */
import { createWriteStream, mkdirSync, writeFileSync, type WriteStream } from 'node:fs';
import { join } from 'node:path';

async function write(ws: WriteStream, s: string): Promise<void> {
  if (!ws.write(s)) await new Promise<void>((r) => ws.once('drain', () => r()));
}

function fortranE(x: number): string {
  if (x === 0) return '0.0000000E+00';
  const e = Math.floor(Math.log10(Math.abs(x))) + 1;
  const m = x / 10 ** e;
  return `${m < 0 ? '-' : ''}${Math.abs(m).toFixed(7)}E${e < 0 ? '-' : '+'}${String(Math.abs(e)).padStart(2, '0')}`;
}

const CORNERS: { label: string; k: [number, number, number] }[] = [
  { label: '\\Gamma', k: [0, 0, 0] },
  { label: 'X', k: [0.5, 0, 0.5] },
  { label: 'W', k: [0.5, 0.25, 0.75] },
  { label: 'L', k: [0.5, 0.5, 0.5] },
  { label: '\\Gamma', k: [0, 0, 0] },
  { label: 'K', k: [0.375, 0.375, 0.75] },
];

async function main(): Promise<void> {
  const [dir, nkArg, nbArg, segArg] = process.argv.slice(2);
  const nb = Number(nbArg);
  const segments = Math.min(5, Math.max(1, Number(segArg ?? 4)));
  const per = Math.floor(Number(nkArg) / segments);
  const nk = per * segments;
  mkdirSync(dir!, { recursive: true });
  const a = 5.43;
  writeFileSync(
    join(dir!, 'POSCAR'),
    `benchmark diamond cell\n   1.0\n  0.0 ${a / 2} ${a / 2}\n  ${a / 2} 0.0 ${a / 2}\n  ${a / 2} ${a / 2} 0.0\n   Si\n     2\nDirect\n  0.0 0.0 0.0\n  0.25 0.25 0.25\n`,
  );
  let kp = `benchmark path\n   ${per}\nLine-mode\nReciprocal\n`;
  for (let s = 0; s < segments; s++) {
    const p = CORNERS[s]!;
    const q = CORNERS[s + 1]!;
    kp += `   ${p.k.map((x) => x.toFixed(10)).join('   ')}   ! ${p.label}\n   ${q.k.map((x) => x.toFixed(10)).join('   ')}   ! ${q.label}\n\n`;
  }
  writeFileSync(join(dir!, 'KPOINTS'), kp);
  const ws = createWriteStream(join(dir!, 'EIGENVAL'));
  const js = createWriteStream(join(dir!, 'energies.json'));
  const nOcc = Math.floor(nb / 2);
  await write(
    ws,
    `       2       2       1       1\n  0.4002443E+02  0.3840000E-09  0.3840000E-09  0.3840000E-09  0.5000000E-15\n  1.000000000000000E-004\n  CAR \n  benchmark\n     ${2 * nOcc}  ${nk}  ${nb}\n`,
  );
  await write(js, '[');
  const spacing = 40 / nb;
  let first = true;
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
      let line = `\n  ${kf.map(fortranE).join('  ')}  ${fortranE(1 / nk)}\n`;
      let j = '';
      for (let b = 0; b < nb; b++) {
        const alpha = (b % 5) / 4;
        const w = 0.08 * spacing * (b % 2 ? 1 : -1);
        const e = -20 + spacing * b + (b >= nOcc ? 1 : 0) + w * (alpha * fcc + (1 - alpha) * sc);
        const es = e.toFixed(6);
        line += `  ${String(b + 1).padStart(4)}  ${es.padStart(12)}  ${b < nOcc ? '1.000000' : '0.000000'}\n`;
        j += (first ? '' : ',') + es;
        first = false;
      }
      await write(ws, line);
      await write(js, j);
    }
  }
  await write(js, ']');
  await new Promise<void>((r) => ws.end(() => r()));
  await new Promise<void>((r) => js.end(() => r()));
}

void main();
