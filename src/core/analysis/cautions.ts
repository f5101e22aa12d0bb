/**
 * The cautions a careful reviewer states beside the numbers (physics.md, step 10: common practice), fitted
 * to the run: the semilocal-gap caution only when the functional is semilocal or unknown, a model caution for
 * model energies, no spin-orbit caution for spinor runs, and the cautions of metals and semimetals.
 */
import type { BandStructure, MethodFamily, Report } from '../model';

/** The functional family of the run; 'unknown' when the files do not say. */
export function methodFamily(bs: BandStructure): MethodFamily {
  return bs.method?.family ?? 'unknown';
}

export function standardCautions(bs: BandStructure, report: Report): string[] {
  const out: string[] = [];
  const family = methodFamily(bs);
  const named = bs.method?.name ? ` (${bs.method.name})` : '';
  if (family === 'model') {
    out.push(
      'These energies come from a model, not from a first-principles run: gaps and masses are those of the model and say nothing about a real material.',
    );
  }
  if (report.gap) {
    if (family === 'semilocal' || family === 'unknown') {
      const which =
        family === 'semilocal'
          ? `Semilocal DFT (LDA/GGA; this run: ${bs.method?.name ?? 'semilocal'})`
          : 'The files do not say which functional was used. Semilocal DFT (LDA/GGA), if that is what ran,';
      out.push(
        `${which} usually underestimates band gaps, often by 30-50 %; hybrid functionals or GW do better, and a scissor shift is common practice for comparisons with experiment.`,
      );
    } else if (family === 'hybrid') {
      out.push(
        `The run used a hybrid functional${named}: its gap depends on the fraction of exact exchange (and the screening length), which are chosen, not derived; compare gaps only between runs with the same settings.`,
      );
    } else if (family === 'gw') {
      out.push(
        `The energies are quasiparticle (GW) energies${named}: the gap depends on the starting functional, the number of empty bands and the cut-offs; check that they were converged.`,
      );
    }
  }
  if (report.metal) {
    out.push(
      'A metal has no gap. The Fermi level and the bands crossing it come from the sampled k-points: a coarse mesh or a path can miss small pockets, and smearing shifts the Fermi level slightly.',
    );
    if (report.semimetal) {
      out.push(
        'The band overlap of a semimetal is small and sensitive to the functional: semilocal DFT often overstates it, and some semimetals come out as small-gap semiconductors with better methods.',
      );
    }
  }
  if (report.extrema.some((e) => e.masses.length > 0)) {
    out.push('Effective masses depend on the functional, on spin-orbit coupling and on strain; compare them only between runs made alike.');
  }
  if (!bs.spinorbit && report.gap) {
    out.push(
      'Spin-orbit coupling is not included: it splits degenerate valence bands (heavy, light and split-off holes) and changes hole masses.',
    );
  }
  if (bs.sampling === 'path' && report.gap) {
    out.push('A k-path samples only lines: an extremum off the path is missed, and only directional masses along the path are measured.');
  }
  return out;
}
