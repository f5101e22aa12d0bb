/** A report with nothing found (no gap, no extrema), for tests that set only the fields they are about. */
import type { Report } from '../../../src/core/model';

export function emptyReport(fields: Partial<Report> = {}): Report {
  return {
    file: 'x',
    format: 'test',
    nk: 1,
    nbands: 1,
    nspin: 1,
    electrons: null,
    metal: null,
    semimetal: null,
    fermi_eV: null,
    classificationReason: '',
    spinors: false,
    gap: null,
    extrema: [],
    warnings: [],
    cautions: [],
    ...fields,
  };
}
