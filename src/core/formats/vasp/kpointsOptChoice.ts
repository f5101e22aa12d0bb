/**
 * Which eigenvalue set of a VASP 6 run is analysed. With a KPOINTS_OPT file VASP ≥ 6.3 computes a second set
 * after self-consistency and writes it only to vasprun.xml (vasprunKpointsOpt.ts); EIGENVAL and the ordinary
 * <eigenvalues> hold the self-consistent mesh. The KPOINTS_OPT set is what the user asked for, so it is
 * analysed when complete (ReadOptions.scfSet chooses the self-consistent one), and every choice is said.
 */
import type { InputWarning } from '../../model';
import type { KpointsOptOutcome, KpointsOptSet } from './vasprunKpointsOpt';

/** The name VASP reads the second k-point set from (same format as KPOINTS). */
export const KPOINTS_OPT_NAME = 'KPOINTS_OPT';

/** Whether a file name is a KPOINTS_OPT file (also prefixed or suffixed, e.g. "si.KPOINTS_OPT"). */
export function isKpointsOptName(name: string): boolean {
  return /KPOINTS_OPT/i.test(name);
}

/**
 * The KPOINTS_OPT set to analyse, or null for the self-consistent one; the warning that says which set was
 * analysed and why goes to `warnings`.
 */
export function chosenEigenvalueSet(
  data: { nk: number; kpointsOpt: KpointsOptOutcome | null },
  scfSet: boolean,
  warnings: InputWarning[],
): { set: KpointsOptSet | null } {
  const opt = data.kpointsOpt;
  if (opt === null) return { set: null };
  const scf = `the self-consistent mesh (${data.nk} k-point${data.nk === 1 ? '' : 's'})`;
  if (opt.state === 'unusable') {
    warnings.push({
      code: 'kpoints-opt-incomplete',
      message: `vasprun.xml holds a KPOINTS_OPT eigenvalue set that cannot be used (${opt.reason}); analysed: ${scf}, not the KPOINTS_OPT k-points.`,
    });
    return { set: null };
  }
  const both = `vasprun.xml holds two eigenvalue sets: ${scf} and the KPOINTS_OPT set (${opt.set.nk} k-point${opt.set.nk === 1 ? '' : 's'})`;
  warnings.push({
    code: 'kpoints-opt',
    message: scfSet ? `${both}; analysed: the self-consistent set, as asked.` : `${both}; analysed: the KPOINTS_OPT set.`,
  });
  return { set: scfSet ? null : opt.set };
}

/** The warning for an EIGENVAL read with a KPOINTS_OPT file beside it. */
export function eigenvalBesideKpointsOpt(kpointsOptName: string): InputWarning {
  return {
    code: 'kpoints-opt-elsewhere',
    message: `A ${kpointsOptName} file sits beside this EIGENVAL: VASP writes the eigenvalues of those k-points only to vasprun.xml; EIGENVAL holds the self-consistent mesh. Read vasprun.xml for the KPOINTS_OPT k-points.`,
  };
}
