/**
 * Writes a large EIGENVAL-layout file for benchmarks (not committed): nk k-points × nb bands, VASP 6 layout
 * with occupations, plus the same energies as one JSON array (for the JSON.parse comparison).
 * Usage: tsx scripts/bench/generateEigenval.ts <out.EIGENVAL> <out.json> <nk> <nb>
 */
import { writeEigenvalAndJson, type EigenvalPoint } from './eigenvalLayout';

/** k = (t, 0, t/2) for t from 0 to 1, weight 0; made-up cosine bands (timing only, not physics). */
function* points(nk: number, nb: number): Generator<EigenvalPoint> {
  const energies = new Float64Array(nb);
  for (let k = 0; k < nk; k++) {
    const t = k / (nk - 1);
    for (let b = 0; b < nb; b++) energies[b] = -20 + (40 * b) / nb + 0.8 * Math.cos(Math.PI * t * (1 + (b % 7))) * (b % 2 ? 1 : -1);
    yield { k: [t, 0, t / 2], weight: 0, energies };
  }
}

async function main(): Promise<void> {
  const [out, jsonOut, nkArg, nbArg] = process.argv.slice(2);
  const nk = Number(nkArg);
  const nb = Number(nbArg);
  // Bands b < nb/4 occupied (b integer: the first ceil(nb/4)); the header says 2·floor(nb/4) electrons.
  await writeEigenvalAndJson(out!, jsonOut!, {
    electrons: 2 * Math.floor(nb / 4),
    nk,
    nb,
    occupied: Math.ceil(nb / 4),
    points: points(nk, nb),
  });
}

void main();
