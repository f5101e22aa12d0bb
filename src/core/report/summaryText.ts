/** The readable summary of a Report: what `valleyscope analyze` prints without --json. */
import type { BandPoint, ExtremumReport, MassFit, RejectedCandidate, Report } from '../model';
import { energyZeroName, type EnergyZero } from './energyZero';
import { gapUncertaintyText, interpolatedMassLines, interpolationLine } from './meshRunText';

/** How the summary shows energies and positions (both optional: raw energies, fractional k only). */
export interface SummaryOptions {
  /** Energies are printed relative to this zero. */
  zero?: EnergyZero;
  /** A point's place on a labelled line of the path ("0.85 Γ→X"), when it lies on one. */
  positionOf?: (k: readonly number[]) => string | null;
  /** The run is spin-polarised: channels are named "spin up" / "spin down" (never otherwise). */
  spinPolarised?: boolean;
}

export function formatK(k: readonly number[]): string {
  return `(${k.map((x) => fmt(x, 4)).join(', ')})`;
}

export function fmt(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return s === `-${(0).toFixed(digits)}` ? s.slice(1) : s;
}

export function describePoint(p: BandPoint, o: SummaryOptions = {}): string {
  const spin = o.spinPolarised ? ` (spin ${p.spin === 1 ? 'down' : 'up'})` : p.spin === 1 ? ' (spin down)' : '';
  const place = p.label ? `${p.label} ` : ((o.positionOf?.(p.k) ?? p.position ?? '') || '').replace(/(.+)/, '$1 ');
  return `band ${p.band}${spin} at ${place}${formatK(p.k)}, ${fmt(p.eV - (o.zero?.eV ?? 0), 4)} eV`;
}

function massLine(m: MassFit, atMaximum: boolean): string {
  const alpha = m.alpha_per_eV !== undefined ? `, α = ${fmt(m.alpha_per_eV, 3)} /eV` : '';
  const branch = m.branch !== undefined ? ` (branch ${m.branch})` : '';
  const provenance = `[${m.method}, ${m.points} points, ${fmt(m.window_meV, 0)} meV window]`;
  // A mass that cannot be quoted is not printed as a bare number: the word comes first, the fit's value
  // only as what the fit gave.
  if (m.determined === false) {
    return `      towards ${m.towards}${branch}: m* undetermined (the fit gave ${fmt(m.mass, 3)} ± ${fmt(m.stderr, 3)} m_e: ${m.undeterminedReason ?? 'not quotable'})  ${provenance}`;
  }
  const hole = atMaximum && m.mass < 0 ? ` (hole mass ${fmt(-m.mass, 3)})` : '';
  // A finite difference passes through its points: its stderr is the rounding alone, and the uncertainty to
  // quote is its spread against the parabola fit on the same samples (as the editor's fit panel says).
  const s = m.methodSpread;
  const error = s ? Math.max(s.spread, m.stderr) : m.stderr;
  const why = s ? `; ± is the spread against the ${s.against} fit at the same window (rounding alone ± ${m.stderr.toPrecision(2)})` : '';
  return `      towards ${m.towards}${branch}: m* = ${fmt(m.mass, 3)} ± ${fmt(error, 3)} m_e${hole}${alpha}${why}  ${provenance}`;
}

const REASON_WORDS: Record<RejectedCandidate['reason'], string> = {
  saddle: 'saddle',
  crossing: 'crossing',
  boundary: 'path end',
  rounding: 'rounding',
  shallow: 'too shallow',
};

/** One line naming the candidates that are not extrema (the details are in the JSON output). */
export function rejectedLine(rejected: RejectedCandidate[], shown = 6): string | null {
  if (!rejected.length) return null;
  const items = rejected
    .slice(0, shown)
    .map((x) => `band ${x.band}${x.spin === 1 ? '↓' : ''} at ${formatK(x.k)} (${REASON_WORDS[x.reason]})`);
  const more = rejected.length > shown ? `, and ${rejected.length - shown} more (see --json)` : '';
  return `  Not extrema (set aside): ${items.join(', ')}${more}`;
}

function extremumBlock(e: ExtremumReport, o: SummaryOptions, metal = false): string[] {
  const lines: string[] = [];
  const what = metal
    ? { vbm: 'VBM', cbm: 'CBM', valley: 'electron pocket bottom', peak: 'hole pocket top' }[e.kind]
    : { vbm: 'VBM', cbm: 'CBM', valley: 'conduction valley', peak: 'valence peak' }[e.kind];
  const off = e.kind === 'vbm' || e.kind === 'cbm' ? '' : ` (${fmt(e.offset_eV * 1000, 0)} meV from the ${metal ? 'Fermi level' : 'edge'})`;
  lines.push(`  ${what}${off}: ${describePoint(e, o)}`);
  if (e.degenerateBands > 1) lines.push(`    ${e.degenerateBands} degenerate bands at this point`);
  if (e.valleyDegeneracy !== null) lines.push(`    valley degeneracy N_v = ${e.valleyDegeneracy}`);
  const atMax = e.kind === 'vbm' || e.kind === 'peak';
  const interpolated = interpolatedMassLines(e);
  if (interpolated) lines.push(...interpolated);
  else if (e.masses.length) {
    lines.push('    directional masses (signed curvature masses; negative at a maximum):');
    for (const m of e.masses) {
      lines.push(massLine(m, atMax));
      for (const w of m.warnings ?? []) lines.push(`        ! ${w}`);
    }
  }
  if (e.tensor && !interpolated) {
    lines.push(`    mass tensor (${e.tensor.method}): principal ${e.tensor.principal.map((x) => fmt(x, 3)).join(', ')} m_e`);
    e.tensor.axes.forEach((a, i) =>
      lines.push(
        `      m${i + 1} = ${fmt(e.tensor!.principal[i]!, 3)} m_e along (${a.map((x) => fmt(x, 3)).join(', ')})${atMax && e.tensor!.principal[i]! < 0 ? ` (hole mass ${fmt(-e.tensor!.principal[i]!, 3)})` : ''}`,
      ),
    );
  }
  if (e.warping) {
    const w = e.warping;
    lines.push(
      `    warped-band fit: A = ${fmt(w.A, 2)}, |B| = ${fmt(w.B, 2)}, |C| = ${fmt(w.C, 2)} (${w.unit}), residual ${fmt(w.residual_meV, 2)} meV`,
    );
    for (const [name, b] of [
      ['heavy', w.heavy],
      ['light', w.light],
    ] as const) {
      lines.push(
        `      ${name}: ${fmt(b.m100, 3)} [100], ${fmt(b.m110, 3)} [110], ${fmt(b.m111, 3)} [111] m_e; DOS mass ${b.dos === null ? 'undetermined' : `${fmt(b.dos, 3)} m_e`}`,
      );
    }
  }
  if (e.dosMass !== null)
    lines.push(
      `    density-of-states mass ${fmt(e.dosMass, 3)}${e.dosMassPathLimited ? ` ± ${fmt(e.dosMassPathLimited.error, 3)} m_e (path-limited: three directions stand for the whole sphere)` : ' m_e'}`,
    );
  if (e.conductivityMass !== null) lines.push(`    conductivity mass ${fmt(e.conductivityMass, 3)} m_e`);
  for (const w of e.warnings) lines.push(`    ! ${w}`);
  return lines;
}

export function summaryText(r: Report, options: SummaryOptions = {}): string {
  const o: SummaryOptions = { ...options, spinPolarised: options.spinPolarised ?? r.nspin === 2 };
  const out: string[] = [];
  out.push(`${r.file}`);
  const spinState = r.spinors ? 'spinors (noncollinear: one electron per band)' : r.nspin === 2 ? 'spin-polarised' : 'spin-degenerate';
  out.push(
    `  ${r.format}: ${r.nk} k-points, ${r.nbands} bands, ${spinState}${r.electrons !== null ? `, ${r.electrons} electron${r.electrons === 1 ? '' : 's'}` : ''}`,
  );
  if (o.zero) {
    const z = o.zero;
    out.push(
      `  Energies relative to the ${energyZeroName(z)}${z.used === 'raw' ? '' : ` (raw ${fmt(z.eV, 4)} eV)`}${z.reason ? `; the ${z.requested === 'fermi' ? 'Fermi energy' : z.requested.toUpperCase()} zero asked for cannot be used: ${z.reason}` : ''}`,
    );
  }
  if (r.metal) {
    const crossing = r.crossingBands?.length
      ? `; crossing it: band${r.crossingBands.length > 1 ? 's' : ''} ${r.crossingBands.join(', ')}`
      : '';
    out.push(
      `  ${r.semimetal ? 'Semimetal' : 'Metal'}: no gap. Fermi level ${r.fermi_eV !== null ? `${fmt(r.fermi_eV, 4)} eV` : 'unknown'}${crossing}.`,
    );
    if (r.classificationReason) out.push(`    ${r.classificationReason}`);
  } else if (r.gap) {
    const g = r.gap;
    out.push(`  Band gap ${fmt(g.eV, 4)} eV${gapUncertaintyText(g)}, ${g.direct ? 'direct' : 'indirect'}`);
    out.push(`    VBM: ${describePoint(g.vbm, o)}`);
    out.push(`    CBM: ${describePoint(g.cbm, o)}`);
    out.push(`    smallest direct gap ${fmt(g.directGap.eV, 4)} eV at ${formatK(g.directGap.k)}`);
    if (r.classificationReason) out.push(`    ${r.classificationReason}`);
  } else if (r.metal === null) out.push('  Band edges unknown (no occupations, electron count or Fermi energy).');
  else if (r.gapReason) out.push(`  No gap: ${r.gapReason}`);
  if (r.spinGaps) {
    r.spinGaps.forEach((g, s) => {
      const ch = r.spinChannels?.[s];
      const what = g
        ? `gap ${fmt(g.eV, 4)} eV, ${g.direct ? 'direct' : 'indirect'}`
        : ch?.metal
          ? `no gap (${ch.semimetal ? 'semimetallic' : 'metallic'} channel${ch.crossingBands.length ? `; band${ch.crossingBands.length > 1 ? 's' : ''} ${ch.crossingBands.join(', ')} ${ch.crossingBands.length > 1 ? 'cross' : 'crosses'} the Fermi level` : ''})`
          : r.gapReason
            ? 'no gap (local run)'
            : 'no gap';
      out.push(`  spin ${s === 0 ? 'up' : 'down'}: ${what}`);
    });
  }
  const mesh = interpolationLine(r);
  if (mesh) out.push(mesh);
  if (r.extrema.length) {
    out.push('  Extrema:');
    for (const e of r.extrema) out.push(...extremumBlock(e, o, r.metal === true));
  }
  const rejected = rejectedLine(r.rejected ?? []);
  if (rejected) out.push(rejected);
  if (r.warnings.length) {
    out.push('  Warnings:');
    for (const w of r.warnings) out.push(`    - ${w}`);
  }
  if (r.cautions.length) {
    out.push('  Cautions:');
    for (const c of r.cautions) out.push(`    - ${c}`);
  }
  return out.join('\n');
}
