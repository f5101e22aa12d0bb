/**
 * The energy zero a reader wants the energies shown against: the VBM (the usual choice for semiconductors),
 * the CBM, mid-gap, the Fermi energy the files give, or the raw energies as the code wrote them (their zero
 * is the code's own, e.g. the average electrostatic potential, and differs between codes and runs).
 * JSON output always keeps the raw energies and says which zero the text used.
 */
import type { Report } from '../model';

export const ENERGY_ZEROS = ['vbm', 'cbm', 'midgap', 'fermi', 'raw'] as const;
export type EnergyZeroMode = (typeof ENERGY_ZEROS)[number];

export interface EnergyZero {
  /** The zero asked for. */
  requested: EnergyZeroMode;
  /** The zero used ('raw' when the one asked for cannot be placed). */
  used: EnergyZeroMode;
  /** Raw energy of the zero, eV (0 for raw). */
  eV: number;
  /** Why the zero asked for was not used; null when it was. */
  reason: string | null;
}

export function isEnergyZeroMode(s: string): s is EnergyZeroMode {
  return (ENERGY_ZEROS as readonly string[]).includes(s);
}

/** Where the zero lies for this report; falls back to raw energies, saying why, when it cannot be placed. */
export function energyZeroOf(report: Report, requested: EnergyZeroMode, fermi_eV: number | null = null): EnergyZero {
  const g = report.gap;
  const fallback = (reason: string): EnergyZero => ({ requested, used: 'raw', eV: 0, reason });
  switch (requested) {
    case 'raw':
      return { requested, used: 'raw', eV: 0, reason: null };
    case 'fermi':
      return fermi_eV !== null && Number.isFinite(fermi_eV)
        ? { requested, used: 'fermi', eV: fermi_eV, reason: null }
        : fallback('the files give no Fermi energy');
    default: {
      if (!g) return fallback(report.metal ? 'the run is metallic: there is no gap' : 'the band edges are not known');
      const eV = requested === 'vbm' ? g.vbm.eV : requested === 'cbm' ? g.cbm.eV : (g.vbm.eV + g.cbm.eV) / 2;
      return { requested, used: requested, eV, reason: null };
    }
  }
}

/** How the zero is named in text: "VBM", "CBM", "mid-gap", "Fermi energy", "raw". */
export function energyZeroName(z: EnergyZero): string {
  return { vbm: 'VBM', cbm: 'CBM', midgap: 'mid-gap', fermi: 'Fermi energy', raw: 'raw (as written by the code)' }[z.used];
}
