/** The cautions a careful reviewer states beside the numbers (physics.md, step 10: common practice). */
import type { BandStructure, Report } from '../model';

export function standardCautions(bs: BandStructure, report: Report): string[] {
  const out: string[] = [];
  if (report.gap) {
    out.push(
      'Semilocal DFT (LDA/GGA) usually underestimates band gaps, often by 30-50 %; hybrid functionals or GW do better, and a scissor shift is common practice for comparisons with experiment.',
    );
  }
  if (report.extrema.some((e) => e.masses.length > 0)) {
    out.push('Effective masses depend on the functional, on spin-orbit coupling and on strain; compare them only between runs made alike.');
  }
  if (!bs.spinorbit && report.gap) {
    out.push('Spin-orbit coupling is not included: it splits degenerate valence bands (heavy, light and split-off holes) and changes hole masses.');
  }
  if (bs.sampling === 'path' && report.gap) {
    out.push('A k-path samples only lines: an extremum off the path is missed, and only directional masses along the path are measured.');
  }
  return out;
}
