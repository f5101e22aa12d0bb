/**
 * A structure file given for a run whose own files hold no cell or atoms: a POSCAR-like file, a pw.x XML
 * data file (which also gives the alat its k-points are written in) or a CASTEP .cell. One function, so `analyze --structure`,
 * `annotate --structure`, `check` and `compare` accept the same files.
 */
import type { Structure } from '../model';
import type { InputFile } from '../io/fileAccessor';
import { basename } from '../io/fileAccessor';
import { readPoscar } from './vasp/poscar';
import { detectQeXml, readQeXml } from './qe/qeXml';
import { CASTEP_CELL_FORMAT, detectCastepCell, readCastepCell } from './castepCell';
import { ReaderError } from '../errors';

export interface StructureFileContent {
  structure: Structure;
  /** alat in Å when the file gives it (pw.x XML), else null. */
  alat_angstrom: number | null;
  layout: 'poscar' | 'qe-xml' | 'castep-cell';
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
  if (detectCastepCell(file.bytes.subarray(0, 65536))) {
    const cell = readCastepCell(file);
    if (!cell.lattice)
      throw new ReaderError(
        CASTEP_CELL_FORMAT,
        file.path,
        { line: 1, column: 1 },
        'the .cell gives no LATTICE_CART or LATTICE_ABC block: the cell is unknown',
      );
    return {
      structure: { lattice: cell.lattice, species: cell.species, positions: cell.positions },
      alat_angstrom: null,
      layout: 'castep-cell',
      electrons: null,
      spinors: false,
    };
  }
  return { structure: readPoscar(file), alat_angstrom: null, layout: 'poscar', electrons: null, spinors: false };
}
