/**
 * The run's one-line summary in the toolbar (gap, or metal with its Fermi energy and crossing bands, with the
 * spinor note), the gap caution shown beside it, and the banner of data warnings. Pure (text only).
 */
import type { BandData } from '../../src/protocol';
import { fixed } from '../shared/format';

/** The gap summary: "gap 1.12 eV, indirect (smallest direct …)", "metal (no gap) …", or why none is known. */
export function gapSummary(data: BandData): string {
  const r = data.report;
  const spinors = r.spinors ? ' · spinors (one electron per band)' : '';
  if (r.metal) {
    const n = r.crossingBands?.length ?? 0;
    const crossing = n ? `, band${n > 1 ? 's' : ''} ${r.crossingBands!.join(', ')} crossing` : '';
    const fermi = data.fermiEnergy !== null ? `, E_F ${fixed(data.fermiEnergy, 3)} eV` : '';
    return `${r.semimetal ? 'semimetal' : 'metal'} (no gap)${fermi}${crossing}${spinors}`;
  }
  if (r.gap) {
    const direct = r.gap.direct ? '' : ` (smallest direct ${fixed(r.gap.directGap.eV, 3)} eV)`;
    return `gap ${fixed(r.gap.eV, 3)} eV, ${r.gap.direct ? 'direct' : 'indirect'}${direct}${spinors}`;
  }
  if (r.metal === false && r.gapReason) return `no gap: local run around one point${spinors}`;
  return `gap unknown (no electron count or occupations)${spinors}`;
}

/**
 * The caution shown beside the summary: for bands drawn from an interpolant (a mesh run's view), the one saying
 * so, since every number in that view inherits it; otherwise the first of the report's cautions that names the
 * gap; or null.
 */
export function gapCaution(data: BandData): string | null {
  const cautions = data.report.cautions;
  return cautions.find((c) => /^Interpolated from\b/.test(c)) ?? cautions.find((c) => /gap/i.test(c)) ?? null;
}

/** The banner: partial data first, then the report's warnings, each once. */
export function bannerLines(data: BandData): string[] {
  const banners: string[] = [];
  if (data.partial) banners.push('Partial data: the file is still being written or was cut short; everything shown is provisional.');
  banners.push(...data.report.warnings.filter((w) => !/^Partial data/.test(w)));
  return [...new Set(banners)];
}
