/** How a pw.x run computed its energies, from the functional its data file names. */
import type { ElectronicMethod } from '../../model';

/** Functionals pw.x names, by family (common practice: the names of the QE input keyword input_dft). */
const SEMILOCAL_FUNCTIONALS =
  /^(PZ|LDA|SLA-PZ|SLA-PW|PW|VWN|PBE|PBESOL|REVPBE|RPBE|PW91|BLYP|BP|PBC|WC|Q2D|OPTBK88|OPTB86B|VDW-DF.*|REV-VDW-DF2|RVV10|SCAN|R2SCAN|TPSS|M06L|SOGGA|HCTH|OLYP|KZK|XC-.*)$/i;
const HYBRID_FUNCTIONALS = /^(PBE0|HSE|GAUPBE|B3LYP.*|X3LYP|HF|B86BPBEX|BHAHLYP|PBE0-.*|SCAN0|VDW-DF-CX0.*|VDW-DF2-0|EXX.*)$/i;

/** The method family of a pw.x run from its functional name and whether exact exchange was used. */
export function qeMethod(functional: string | null, hybrid: boolean): ElectronicMethod {
  const name = functional?.trim() || null;
  if (hybrid || (name && HYBRID_FUNCTIONALS.test(name))) {
    return {
      family: 'hybrid',
      name,
      evidence: hybrid ? 'the data file has a <hybrid> block (exact exchange)' : `the data file names the functional ${name}`,
    };
  }
  if (name && SEMILOCAL_FUNCTIONALS.test(name))
    return { family: 'semilocal', name, evidence: `the data file names the functional ${name}` };
  return {
    family: 'unknown',
    name,
    evidence: name
      ? `the data file names the functional ${name}, not recognised as semilocal or hybrid`
      : 'the data file names no functional',
  };
}
