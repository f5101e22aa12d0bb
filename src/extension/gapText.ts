/** Short texts about the gap for the status bar and the code lens. Pure. */
import type { BandPoint, Report } from '../core/model';

/** Spin named up/down in a spin-polarised run, not mentioned otherwise. */
function where(p: BandPoint, spinPolarised = false): string {
  const spin = spinPolarised ? `, spin ${p.spin === 1 ? 'down' : 'up'}` : '';
  // A mesh run's edge off the mesh has its place on a labelled line from Γ ("0.78 Γ→X"), easier to read than k.
  const at = p.label ?? p.position ?? `k ${p.k.map((x) => x.toFixed(3)).join(' ')}`;
  return `${at} (band ${p.band}${spin})`;
}

/** Status bar text: "Gap 1.12 eV indirect", "Metal", "Gap unknown", with " (partial)" for a running job. */
export function gapStatusText(report: Report, partial: boolean): string {
  const suffix = partial ? ' (partial)' : '';
  if (report.metal) return `${report.semimetal ? 'Semimetal' : 'Metal'}${suffix}`;
  if (report.gapReason) return `No gap (local run)${suffix}`;
  if (report.gap) return `Gap ${report.gap.eV.toFixed(2)} eV ${report.gap.direct ? 'direct' : 'indirect'}${suffix}`;
  return `Gap unknown${suffix}`;
}

/** Tooltip for the status bar item: a few lines with the edges and the usual caution. */
export function gapTooltip(report: Report, partial: boolean): string {
  const lines: string[] = [];
  if (report.metal) {
    lines.push('A band crosses the Fermi level: no gap.');
    if (report.fermi_eV !== null)
      lines.push(
        `Fermi level ${report.fermi_eV.toFixed(4)} eV${report.crossingBands?.length ? `, crossing bands ${report.crossingBands.join(', ')}` : ''}`,
      );
    if (report.classificationReason) lines.push(report.classificationReason);
  } else if (report.gapReason) lines.push(report.gapReason);
  else if (report.gap) {
    const g = report.gap;
    lines.push(`Band gap ${g.eV.toFixed(4)} eV, ${g.direct ? 'direct' : 'indirect'}`);
    lines.push(`VBM ${g.vbm.eV.toFixed(4)} eV at ${where(g.vbm, report.nspin === 2)}`);
    lines.push(`CBM ${g.cbm.eV.toFixed(4)} eV at ${where(g.cbm, report.nspin === 2)}`);
    if (!g.direct) lines.push(`Smallest direct gap ${g.directGap.eV.toFixed(4)} eV`);
  } else lines.push('Band edges unknown: no occupations, electron count or Fermi energy in the files read.');
  if (report.spinors) lines.push('Spinors (noncollinear run): one electron per band.');
  if (partial) lines.push('The file is incomplete (running job?): these numbers are provisional.');
  for (const c of report.cautions) lines.push(c);
  lines.push('Click to open the band view.');
  return lines.join('\n');
}

/** Code lens title at the top of the file. */
export function gapLensText(report: Report, partial: boolean): string {
  const suffix = partial ? ' — partial file, provisional' : '';
  if (report.metal) return `${report.semimetal ? 'Semimetal' : 'Metal'}: bands cross the Fermi level${suffix}`;
  if (report.gapReason) return `No gap: the run covers only the neighbourhood of one point${suffix}`;
  if (report.gap) {
    const g = report.gap;
    return `Gap ${g.eV.toFixed(2)} eV ${g.direct ? 'direct' : 'indirect'}: VBM ${where(g.vbm, report.nspin === 2)} → CBM ${where(g.cbm, report.nspin === 2)}${suffix}`;
  }
  return `Band edges unknown (no occupations, electron count or Fermi energy)${suffix}`;
}
