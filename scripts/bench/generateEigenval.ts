/**
 * Writes a large EIGENVAL-layout file for benchmarks (not committed): nk k-points × nb bands, VASP 6 layout
 * with occupations, plus the same energies as one JSON array (for the JSON.parse comparison).
 * Usage: tsx scripts/bench/generateEigenval.ts <out.EIGENVAL> <out.json> <nk> <nb>
 */
import { createWriteStream, type WriteStream } from 'node:fs';

async function write(ws: WriteStream, s: string): Promise<void> {
  if (!ws.write(s)) await new Promise<void>((r) => ws.once('drain', () => r()));
}

/** VASP's k-point number format, e.g. 0.5000000E+00. */
function fortranE(x: number): string {
  if (x === 0) return '0.0000000E+00';
  const e = Math.floor(Math.log10(Math.abs(x))) + 1;
  const m = x / 10 ** e;
  return `${m < 0 ? '-' : ''}${Math.abs(m).toFixed(7)}E${e < 0 ? '-' : '+'}${String(Math.abs(e)).padStart(2, '0')}`;
}

async function main(): Promise<void> {
  const [out, jsonOut, nkArg, nbArg] = process.argv.slice(2);
  const nk = Number(nkArg);
  const nb = Number(nbArg);
  const ws = createWriteStream(out!);
  const js = createWriteStream(jsonOut!);
  await write(
    ws,
    `       2       2       1       1\n  0.4002443E+02  0.3840000E-09  0.3840000E-09  0.3840000E-09  0.5000000E-15\n  1.000000000000000E-004\n  CAR \n  benchmark\n     ${2 * Math.floor(nb / 4)}  ${nk}  ${nb}\n`,
  );
  await write(js, '[');
  let first = true;
  for (let k = 0; k < nk; k++) {
    const t = k / (nk - 1);
    let s = `\n  ${fortranE(t)}  ${fortranE(0)}  ${fortranE(t / 2)}  ${fortranE(0)}\n`;
    let j = '';
    for (let b = 0; b < nb; b++) {
      const e = -20 + (40 * b) / nb + 0.8 * Math.cos(Math.PI * t * (1 + (b % 7))) * (b % 2 ? 1 : -1);
      const es = e.toFixed(6);
      s += `  ${String(b + 1).padStart(4)}  ${es.padStart(12)}  ${b < nb / 4 ? '1.000000' : '0.000000'}\n`;
      j += (first ? '' : ',') + es;
      first = false;
    }
    await write(ws, s);
    await write(js, j);
  }
  await write(js, ']');
  await new Promise<void>((r) => ws.end(() => r()));
  await new Promise<void>((r) => js.end(() => r()));
}

void main();
