/**
 * The energy zero of the plot: the valence-band maximum, the Fermi level, or the energies as written.
 * Pure. Axis titles use "E − E_VBM (eV)" style wording (common practice for band plots).
 */
import type { EnergyReference } from '../../src/protocol';

export interface ReferenceChoice {
  reference: EnergyReference;
  /** Energy subtracted from every raw energy, eV. */
  offset: number;
  /** Plain-text axis title, e.g. "E − E_VBM (eV)". */
  axisTitle: string;
  /** The subscript part of the title ("VBM", "F") or null for raw energies. */
  subscript: string | null;
  /** Set when the requested reference is not available and another one was used. */
  fallbackNote: string | null;
}

export interface ReferenceLevels {
  vbm_eV: number | null;
  fermiEnergy: number | null;
}

/** Which references the data supports, in menu order. */
export function availableReferences(levels: ReferenceLevels): EnergyReference[] {
  const out: EnergyReference[] = [];
  if (levels.vbm_eV !== null && Number.isFinite(levels.vbm_eV)) out.push('vbm');
  if (levels.fermiEnergy !== null && Number.isFinite(levels.fermiEnergy)) out.push('fermi');
  out.push('raw');
  return out;
}

export function chooseReference(wanted: EnergyReference, levels: ReferenceLevels): ReferenceChoice {
  const avail = availableReferences(levels);
  let ref = wanted;
  let fallbackNote: string | null = null;
  if (!avail.includes(ref)) {
    ref = avail[0]!;
    fallbackNote =
      wanted === 'vbm'
        ? 'No valence-band maximum is known (a metal, or no electron count): energies are shown ' +
          (ref === 'fermi' ? 'from the Fermi level.' : 'as written in the file.')
        : 'The file gives no Fermi level: energies are shown ' +
          (ref === 'vbm' ? 'from the valence-band maximum.' : 'as written in the file.');
  }
  if (ref === 'vbm') return { reference: ref, offset: levels.vbm_eV!, axisTitle: 'E − E_VBM (eV)', subscript: 'VBM', fallbackNote };
  if (ref === 'fermi') return { reference: ref, offset: levels.fermiEnergy!, axisTitle: 'E − E_F (eV)', subscript: 'F', fallbackNote };
  return { reference: 'raw', offset: 0, axisTitle: 'E (eV)', subscript: null, fallbackNote };
}

/** Menu text for each reference. */
export const REFERENCE_NAMES: Record<EnergyReference, string> = {
  vbm: 'Valence-band maximum = 0',
  fermi: 'Fermi level = 0',
  raw: 'As written in the file',
};
