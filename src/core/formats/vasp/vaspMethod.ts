/**
 * How a VASP run computed its energies, from the tags it was given (an INCAR beside an EIGENVAL, or the
 * <incar>/<parameters> of a vasprun.xml), in this order of precedence:
 *   1. SYSTEM starting with "model:" -> family 'model'. This is Valleyscope's own rule, not VASP's: the files
 *      our fixture generator writes from published model Hamiltonians say so in their SYSTEM name.
 *   2. ALGO naming a GW flavour (G0W0, GW0, GW, EVGW0, EVGW, QPGW0, QPGW, scGW0, scGW, and the *R
 *      low-scaling variants) -> 'gw': the energies are quasiparticle energies.
 *   3. LHFCALC = .TRUE. -> 'hybrid' (HFSCREEN and AEXX name which one).
 *   4. METAGGA set -> 'semilocal' named by it; GGA set -> 'semilocal' named by it; none of these -> 'semilocal',
 *      VASP's default (the functional the POTCAR files were made with).
 * With no tags at all (no INCAR beside an EIGENVAL), the method is 'unknown'.
 */
import type { ElectronicMethod } from '../../model';
import { vaspLogical } from './incar';
import { parseDecimal } from '../numbers';

/** SYSTEM names starting with this (case-insensitive) mark model data (Valleyscope's convention). */
export const MODEL_SYSTEM_PREFIX = 'model:';

const GW_ALGO = /^(EV|QP|SC)?G0?W0?R?$/;

/** Common names of VASP's GGA tag values (VASP manual, GGA tag; common practice). */
const GGA_NAMES: Record<string, string> = {
  PE: 'PBE',
  PS: 'PBEsol',
  '91': 'PW91',
  RP: 'revPBE',
  AM: 'AM05',
  CA: 'LDA',
};

/** Family 'model' when the SYSTEM name says so (our convention), else null. */
export function modelMethodFromSystem(system: string | null | undefined, where: string): ElectronicMethod | null {
  if (!system) return null;
  const t = system.trim();
  if (t.slice(0, MODEL_SYSTEM_PREFIX.length).toLowerCase() !== MODEL_SYSTEM_PREFIX) return null;
  const name = t.slice(MODEL_SYSTEM_PREFIX.length).trim().slice(0, 120) || null;
  return {
    family: 'model',
    name,
    evidence: `${where} names the system "${t.slice(0, 120)}": the "${MODEL_SYSTEM_PREFIX}" prefix marks model data (a Valleyscope convention), not a first-principles run.`,
  };
}

const unset = (v: string | undefined): boolean => v === undefined || /^(--+|none|)$/i.test(v.trim());

function num(v: string | undefined): number | null {
  if (v === undefined) return null;
  const x = Number(v.trim().replace(/[dD]/, 'e'));
  return Number.isFinite(x) ? x : null;
}

function hybridName(hfscreen: number | null, aexx: number | null): string {
  const a = aexx ?? 0.25;
  const screened = hfscreen !== null && hfscreen > 0;
  if (screened && Math.abs(a - 0.25) < 1e-6) {
    // HSE06 and HSE03 screening parameters (Krukau et al., J. Chem. Phys. 125, 224106 (2006); memory).
    if (Math.abs(hfscreen - 0.2) < 1e-6) return 'HSE06';
    if (Math.abs(hfscreen - 0.3) < 1e-6) return 'HSE03';
  }
  if (!screened && Math.abs(a - 0.25) < 1e-6) return 'PBE0-type (25 % exact exchange, unscreened)';
  return `hybrid (${Math.round(a * 1000) / 10} % exact exchange${screened ? `, screened with ${hfscreen} Å⁻¹` : ', unscreened'})`;
}

/**
 * The method a VASP run used. `tags`: upper-case tag -> value (null when no tag source exists); `where`:
 * the file (and block) the tags came from, for the evidence sentence; `system`: the SYSTEM name.
 */
export function vaspMethod(tags: ReadonlyMap<string, string> | null, where: string, system?: string | null): ElectronicMethod {
  const model = modelMethodFromSystem(system ?? tags?.get('SYSTEM') ?? null, where);
  if (model) return model;
  if (tags === null) {
    return { family: 'unknown', name: null, evidence: `No INCAR or parameter list says how the energies were computed (${where}).` };
  }
  const algo = tags.get('ALGO')?.trim();
  if (algo && GW_ALGO.test(algo.toUpperCase())) {
    return { family: 'gw', name: algo, evidence: `${where} sets ALGO = ${algo}: quasiparticle (GW) energies.` };
  }
  const lhf = vaspLogical(tags.get('LHFCALC'));
  if (lhf === true) {
    const hfscreen = num(tags.get('HFSCREEN'));
    const aexx = num(tags.get('AEXX'));
    const said = [`LHFCALC = ${tags.get('LHFCALC')!.trim()}`];
    if (tags.has('HFSCREEN')) said.push(`HFSCREEN = ${tags.get('HFSCREEN')!.trim()}`);
    if (tags.has('AEXX')) said.push(`AEXX = ${tags.get('AEXX')!.trim()}`);
    return { family: 'hybrid', name: hybridName(hfscreen, aexx), evidence: `${where} sets ${said.join(', ')}: a hybrid functional.` };
  }
  const plusU = vaspLogical(tags.get('LDAU')) === true ? '+U' : '';
  const metagga = tags.get('METAGGA');
  if (!unset(metagga)) {
    const m = metagga!.trim();
    return {
      family: 'semilocal',
      name: `meta-GGA ${m}${plusU}`,
      evidence: `${where} sets METAGGA = ${m}: a semilocal (meta-GGA) functional.`,
    };
  }
  const gga = tags.get('GGA');
  if (!unset(gga)) {
    const g = gga!.trim();
    const name = GGA_NAMES[g.toUpperCase()] ?? `GGA = ${g}`;
    return { family: 'semilocal', name: `${name}${plusU}`, evidence: `${where} sets GGA = ${g}: a semilocal functional.` };
  }
  return {
    family: 'semilocal',
    name: plusU ? `DFT${plusU}` : null,
    evidence: `${where} sets none of LHFCALC, METAGGA, GGA or a GW ALGO: VASP's default, the semilocal functional of the POTCAR files.`,
  };
}

/**
 * What a vasprun.xml's tags say: the values VASP used (<parameters>) over what the user wrote (<incar>).
 * Spin-orbit or noncollinear (LSORBIT, LNONCOLLINEAR; null when neither is written), NELECT, and the method;
 * a GW ALGO the user wrote is kept even if the parameter list spells it otherwise.
 */
export function vasprunTagFacts(
  incarTags: ReadonlyMap<string, string>,
  paramTags: ReadonlyMap<string, string>,
  fileName: string,
): { spinorbit: boolean | null; electrons: number | null; method: ElectronicMethod } {
  const tag = (key: string): string | undefined => paramTags.get(key) ?? incarTags.get(key);
  const lsorbit = vaspLogical(tag('LSORBIT'));
  const noncollinear = vaspLogical(tag('LNONCOLLINEAR'));
  const spinorbit = lsorbit === null && noncollinear === null ? null : Boolean(lsorbit) || Boolean(noncollinear);
  const nelect = tag('NELECT');
  const merged = new Map([...incarTags, ...paramTags]);
  const userAlgo = incarTags.get('ALGO');
  if (userAlgo !== undefined) merged.set('ALGO', userAlgo);
  const where = paramTags.size > 0 ? `${fileName} (its parameter list)` : `${fileName} (its <incar> block)`;
  const method = vaspMethod(merged.size > 0 ? merged : null, merged.size > 0 ? where : fileName, tag('SYSTEM') ?? null);
  return { spinorbit, electrons: nelect === undefined ? null : parseDecimal(nelect), method };
}
