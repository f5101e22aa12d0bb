/**
 * A structure file given for a run whose own files hold no cell or atoms: a POSCAR-like file or a pw.x XML
 * data file (which also gives the alat its k-points are written in). One function, so `analyze --structure`,
 * `annotate --structure`, `check` and `compare` accept the same files.
 */
import type { Structure } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import { readPoscar } from './vasp/poscar';
import { detectQeXml, readQeXml } from './qe/qeXml';

export interface StructureFileContent {
  structure: Structure;
  /** alat in Å when the file gives it (pw.x XML), else null. */
  alat_angstrom: number | null;
  layout: 'poscar' | 'qe-xml';
  /**
   * Electrons of the whole cell when the file gives them and they apply to the run (pw.x XML, not for one spin
   * channel of a spin-polarised run, where the count would mislead), else null.
   */
  electrons: number | null;
  /** True when the file says the run used spinors (noncollinear or spin-orbit). */
  spinors: boolean;
}

export function readStructureFile(file: InputFile): StructureFileContent {
  if (detectQeXml(file.bytes.subarray(0, 4096), basename(file.path)) > 0) {
    const qe = readQeXml(file);
    return {
      structure: qe.structure,
      alat_angstrom: qe.alat,
      layout: 'qe-xml',
      electrons: qe.electrons !== null && !qe.lsda ? qe.electrons : null,
      spinors: qe.noncolin || qe.spinorbit,
    };
  }
  return { structure: readPoscar(file), alat_angstrom: null, layout: 'poscar', electrons: null, spinors: false };
}
