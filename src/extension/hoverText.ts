/**
 * What a hover on a k-point line says: where the point is (fractional and cartesian k in Å⁻¹, label, path
 * position), the energies of the bands next to the edges there, and whether it hosts an edge or a reported
 * extremum. Pure: returns Markdown lines.
 */
import type { BandStructure, Report } from '../core/model';
import type { PathGeometry } from '../core/lattice/kpath';

const SAME_K = 1e-6;

function f(x: number, d: number): string {
  const s = x.toFixed(d);
  return s === `-${(0).toFixed(d)}` ? s.slice(1) : s;
}

function sameK(bs: BandStructure, k: number, q: readonly number[]): boolean {
  return (
    Math.abs(bs.kpoints[3 * k]! - q[0]!) < SAME_K &&
    Math.abs(bs.kpoints[3 * k + 1]! - q[1]!) < SAME_K &&
    Math.abs(bs.kpoints[3 * k + 2]! - q[2]!) < SAME_K
  );
}

const KIND_WORDS = { vbm: 'VBM', cbm: 'CBM', valley: 'conduction valley', peak: 'valence peak' } as const;

/** 0-based bands to list around the edges (two on each side), or around the Fermi level for a metal. */
function bandsToShow(bs: BandStructure, report: Report): { bands: number[]; vbm0: number | null; cbm0: number | null } {
  let vbm0: number | null = null;
  let cbm0: number | null = null;
  if (report.gap) {
    vbm0 = report.gap.vbm.band - 1;
    cbm0 = report.gap.cbm.band - 1;
  } else if (bs.fermiEnergy !== null) {
    // Metal (or edges unknown): the highest band whose minimum is below the Fermi level, and the next.
    const e = bs.energies[0]!;
    let below = -1;
    for (let b = 0; b < bs.nBands; b++) {
      let min = Infinity;
      for (let k = 0; k < bs.nk; k++) min = Math.min(min, e[k * bs.nBands + b]!);
      if (min <= bs.fermiEnergy) below = b;
    }
    if (below >= 0) {
      vbm0 = below;
      cbm0 = below + 1 < bs.nBands ? below + 1 : null;
    }
  }
  if (vbm0 === null && cbm0 === null) return { bands: [], vbm0, cbm0 };
  const lo = Math.max(0, (vbm0 ?? cbm0!) - 1);
  const hi = Math.min(bs.nBands - 1, (cbm0 ?? vbm0!) + 1);
  const bands: number[] = [];
  for (let b = lo; b <= hi; b++) bands.push(b);
  return { bands, vbm0, cbm0 };
}

export function hoverLines(bs: BandStructure, report: Report, geometry: PathGeometry, k: number): string[] {
  const out: string[] = [];
  const label = bs.labels.find((l) => l.index === k)?.label ?? null;
  out.push(`**k-point ${k + 1} of ${bs.nk}**${label ? ` — ${label}` : ''}${bs.partial ? ' (partial file)' : ''}`);
  out.push(`fractional (${[0, 1, 2].map((i) => f(bs.kpoints[3 * k + i]!, 4)).join(', ')})`);
  if (geometry.cartesian) {
    const c = [0, 1, 2].map((i) => geometry.cartesian![3 * k + i]!);
    out.push(`cartesian (${c.map((x) => f(x, 4)).join(', ')}) Å⁻¹, |k| = ${f(Math.hypot(c[0]!, c[1]!, c[2]!), 4)} Å⁻¹ (with the 2π)`);
  } else {
    out.push('cartesian k unknown: no lattice was found beside this file');
  }
  const seg = geometry.segments.find((s) => k >= s.start && k <= s.end);
  if (bs.sampling === 'path' || geometry.ticks.length > 0) {
    const unit = geometry.units === 'inverse-angstrom' ? ' Å⁻¹' : geometry.units === 'fractional' ? ' (fractional units)' : '';
    const segText = seg ? `, segment ${seg.startLabel ?? `k ${seg.start + 1}`} → ${seg.endLabel ?? `k ${seg.end + 1}`}` : '';
    out.push(`path distance ${f(geometry.distance[k]!, 4)}${unit}${segText}`);
  }

  const { bands, vbm0, cbm0 } = bandsToShow(bs, report);
  const ref = report.gap ? report.gap.vbm.eV : bs.fermiEnergy;
  const refName = report.gap ? 'VBM' : 'E_F';
  for (let s = 0; s < bs.nSpin; s++) {
    if (!bands.length) break;
    const parts = bands.map((b) => {
      const e = bs.energies[s]![k * bs.nBands + b]!;
      const tag =
        b === vbm0
          ? report.gap
            ? ' (VB top band)'
            : ' (below E_F)'
          : b === cbm0
            ? report.gap
              ? ' (CB bottom band)'
              : ' (above E_F)'
            : '';
      const rel = ref !== null ? ` (${e - ref >= 0 ? '+' : ''}${f(e - ref, 3)} eV from ${refName})` : '';
      return `band ${b + 1}${tag}: ${f(e, 4)} eV${rel}`;
    });
    out.push(`${bs.nSpin === 2 ? (s === 0 ? 'spin up: ' : 'spin down: ') : ''}${parts.join('; ')}`);
  }

  const hosts: string[] = [];
  for (const x of report.extrema) {
    if (sameK(bs, k, x.k)) {
      const n = x.degenerateBands > 1 ? `, ${x.degenerateBands} bands degenerate` : '';
      hosts.push(`${KIND_WORDS[x.kind]} (band ${x.band}${bs.nSpin === 2 ? `, spin ${x.spin === 1 ? 'down' : 'up'}` : ''}${n})`);
    }
  }
  if (report.gap) {
    const g = report.gap;
    if (!hosts.some((h) => h.startsWith('VBM')) && sameK(bs, k, g.vbm.k)) hosts.push(`VBM (band ${g.vbm.band})`);
    if (!hosts.some((h) => h.startsWith('CBM')) && sameK(bs, k, g.cbm.k)) hosts.push(`CBM (band ${g.cbm.band})`);
  }
  out.push(hosts.length ? `hosts: ${hosts.join(', ')}` : 'hosts no band edge or reported extremum');
  // Candidates the analysis set aside here (a crossing, a saddle...): said, so nobody takes them for valleys.
  const aside = (report.rejected ?? [])
    .filter((x) => sameK(bs, k, x.k))
    .map((x) => `band ${x.band}${x.spin === 1 ? ', spin down' : ''} (${x.reason})`);
  if (aside.length) out.push(`not an extremum here: ${aside.join(', ')}`);
  if (bs.partial) out.push('_The file is incomplete: these values are provisional._');
  return out;
}
