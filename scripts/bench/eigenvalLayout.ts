/**
 * Streams an EIGENVAL-layout file (VASP 6 layout, one spin, occupations, energies to 6 decimals as VASP writes
 * them) and the same energies as one JSON array, for the benchmark generators (files are not committed).
 */
import { createWriteStream, type WriteStream } from 'node:fs';

/** Write with back-pressure: wait for 'drain' when the stream's buffer is full. */
export async function write(ws: WriteStream, s: string): Promise<void> {
  if (!ws.write(s)) await new Promise<void>((r) => ws.once('drain', () => r()));
}

/** Close a stream and wait until its data is flushed. */
export function close(ws: WriteStream): Promise<void> {
  return new Promise<void>((r) => ws.end(() => r()));
}

/** VASP's k-point number format, e.g. 0.5000000E+00. */
export function fortranE(x: number): string {
  if (x === 0) return '0.0000000E+00';
  const e = Math.floor(Math.log10(Math.abs(x))) + 1;
  const m = x / 10 ** e;
  return `${m < 0 ? '-' : ''}${Math.abs(m).toFixed(7)}E${e < 0 ? '-' : '+'}${String(Math.abs(e)).padStart(2, '0')}`;
}

export interface EigenvalPoint {
  /** Fractional k. */
  k: readonly number[];
  weight: number;
  /** Band energies, eV. */
  energies: ArrayLike<number>;
}

export interface EigenvalRun {
  electrons: number;
  nk: number;
  nb: number;
  /** Bands 0 … occupied − 1 are written with occupation 1, the others with 0. */
  occupied: number;
  points: Iterable<EigenvalPoint>;
}

/** Write `run` to `eigenvalPath` (EIGENVAL layout) and its energies to `jsonPath` (one JSON array). */
export async function writeEigenvalAndJson(eigenvalPath: string, jsonPath: string, run: EigenvalRun): Promise<void> {
  const ws = createWriteStream(eigenvalPath);
  const js = createWriteStream(jsonPath);
  await write(
    ws,
    `       2       2       1       1\n  0.4002443E+02  0.3840000E-09  0.3840000E-09  0.3840000E-09  0.5000000E-15\n  1.000000000000000E-004\n  CAR \n  benchmark\n     ${run.electrons}  ${run.nk}  ${run.nb}\n`,
  );
  await write(js, '[');
  let first = true;
  for (const { k, weight, energies } of run.points) {
    let s = `\n  ${k.map(fortranE).join('  ')}  ${fortranE(weight)}\n`;
    let j = '';
    for (let b = 0; b < run.nb; b++) {
      const es = energies[b]!.toFixed(6);
      s += `  ${String(b + 1).padStart(4)}  ${es.padStart(12)}  ${b < run.occupied ? '1.000000' : '0.000000'}\n`;
      j += (first ? '' : ',') + es;
      first = false;
    }
    await write(ws, s);
    await write(js, j);
  }
  await write(js, ']');
  await close(ws);
  await close(js);
}
