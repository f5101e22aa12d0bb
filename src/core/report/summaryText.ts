/** The readable summary of a Report: what `valleyscope analyze` prints without --json. */
import type { BandPoint, ExtremumReport, MassFit, RejectedCandidate, Report } from '../model';

export function formatK(k: readonly number[]): string {
  return `(${k.map((x) => fmt(x, 4)).join(', ')})`;
}

export function fmt(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return s === `-${(0).toFixed(digits)}` ? s.slice(1) : s;
}

export function describePoint(p: BandPoint): string {
  return `band ${p.band}${p.spin === 1 ? ' (spin down)' : ''} at ${p.label ? `${p.label} ` : ''}${formatK(p.k)}, ${fmt(p.eV, 4)} eV`;
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
  return `      towards ${m.towards}${branch}: m* = ${fmt(m.mass, 3)} ± ${fmt(m.stderr, 3)} m_e${hole}${alpha}  ${provenance}`;
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
  const items = rejected.slice(0, shown).map((x) => `band ${x.band}${x.spin === 1 ? '↓' : ''} at ${formatK(x.k)} (${REASON_WORDS[x.reason]})`);
  const more = rejected.length > shown ? `, and ${rejected.length - shown} more (see --json)` : '';
  return `  Not extrema (set aside): ${items.join(', ')}${more}`;
}

function extremumBlock(e: ExtremumReport): string[] {
  const lines: string[] = [];
  const what = { vbm: 'VBM', cbm: 'CBM', valley: 'conduction valley', peak: 'valence peak' }[e.kind];
  const off = e.kind === 'vbm' || e.kind === 'cbm' ? '' : ` (${fmt(e.offset_eV * 1000, 0)} meV from the edge)`;
  lines.push(`  ${what}${off}: ${describePoint(e)}`);
  if (e.degenerateBands > 1) lines.push(`    ${e.degenerateBands} degenerate bands at this point`);
  if (e.valleyDegeneracy !== null) lines.push(`    valley degeneracy N_v = ${e.valleyDegeneracy}`);
  const atMax = e.kind === 'vbm' || e.kind === 'peak';
  if (e.masses.length) {
    lines.push('    directional masses (signed curvature masses; negative at a maximum):');
    for (const m of e.masses) {
      lines.push(massLine(m, atMax));
      for (const w of m.warnings ?? []) lines.push(`        ! ${w}`);
    }
  }
  if (e.tensor) {
    lines.push(`    mass tensor (${e.tensor.method}): principal ${e.tensor.principal.map((x) => fmt(x, 3)).join(', ')} m_e`);
    e.tensor.axes.forEach((a, i) => lines.push(`      m${i + 1} = ${fmt(e.tensor!.principal[i]!, 3)} m_e along (${a.map((x) => fmt(x, 3)).join(', ')})${atMax && e.tensor!.principal[i]! < 0 ? ` (hole mass ${fmt(-e.tensor!.principal[i]!, 3)})` : ''}`));
  }
  if (e.dosMass !== null) lines.push(`    density-of-states mass ${fmt(e.dosMass, 3)} m_e`);
  if (e.conductivityMass !== null) lines.push(`    conductivity mass ${fmt(e.conductivityMass, 3)} m_e`);
  for (const w of e.warnings) lines.push(`    ! ${w}`);
  return lines;
}

export function summaryText(r: Report): string {
  const out: string[] = [];
  out.push(`${r.file}`);
  out.push(`  ${r.format}: ${r.nk} k-points, ${r.nbands} bands, ${r.nspin === 2 ? 'spin-polarised' : 'spin-degenerate'}${r.electrons !== null ? `, ${r.electrons} electrons` : ''}`);
  if (r.metal) out.push('  Metal: a band crosses the Fermi level, there is no gap.');
  else if (r.gap) {
    const g = r.gap;
    out.push(`  Band gap ${fmt(g.eV, 4)} eV, ${g.direct ? 'direct' : 'indirect'}`);
    out.push(`    VBM: ${describePoint(g.vbm)}`);
    out.push(`    CBM: ${describePoint(g.cbm)}`);
    out.push(`    smallest direct gap ${fmt(g.directGap.eV, 4)} eV at ${formatK(g.directGap.k)}`);
  } else if (r.metal === null) out.push('  Band edges unknown (no occupations, electron count or Fermi energy).');
  if (r.spinGaps) {
    r.spinGaps.forEach((g, s) => {
      out.push(`  spin ${s === 0 ? 'up' : 'down'}: ${g ? `gap ${fmt(g.eV, 4)} eV, ${g.direct ? 'direct' : 'indirect'}` : 'no gap (metallic channel)'}`);
    });
  }
  if (r.extrema.length) {
    out.push('  Extrema:');
    for (const e of r.extrema) out.push(...extremumBlock(e));
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
