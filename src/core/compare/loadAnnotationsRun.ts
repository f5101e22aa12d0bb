/**
 * Read an annotations file as a comparison input through a FileAccessor (the CLI's node one, the editor's
 * workspace one): parse it, hash the recorded sources as they are now (staleness), and find the run's
 * structure for the trend descriptors and the symmetry matching: the recorded structure file (POSCAR /
 * CONTCAR, or a pw.x XML) when there is one, else the structure the data file itself carries (vasprun.xml,
 * QE XML). Paths recorded in the file are opened only inside its folder (io/pathPolicy.ts); a refused one is
 * reported in `notes` and counts as missing.
 */
import type { FileAccessor } from '../io/fileAccessor';
import { dirname } from '../io/fileAccessor';
import type { Mat3, Structure } from '../model';
import { sha256Hex } from '../hash';
import { parseAnnotations } from '../annotations/parseAnnotations';
import { dataPathFor, type AnnotationsDoc } from '../annotations/annotationsModel';
import type { CurrentSource } from '../annotations/checkAnnotations';
import { readStructureFile } from '../formats/structureFile';
import { READ_LIMITS } from '../io/readLimits';
import { checkConfined, PathRefusedError, readRecordedPath, redactContent } from '../io/pathPolicy';
import { locateRun, readLocated } from '../load';
import { runCrystal } from './dataRunInput';
import { runFromAnnotations, type AnnotationsRun } from './runFromAnnotations';

export interface LoadedAnnotationsRun extends AnnotationsRun {
  doc: AnnotationsDoc;
  /** Sentences about what could not be found (no structure: no descriptors for this run). */
  notes: string[];
}

/** Roles of recorded sources that hold a crystal structure in POSCAR layout. */
const STRUCTURE_ROLES = new Set(['structure']);

export async function loadAnnotationsRun(fs: FileAccessor, file: string, name: string = file): Promise<LoadedAnnotationsRun> {
  const doc = parseAnnotations(new TextDecoder().decode(await fs.readFile(file, READ_LIMITS.annotations)), file);
  const dir = dirname(file);
  const current: CurrentSource[] = [];
  const notes: string[] = [];
  let structure: Structure | null = null;
  for (const [i, s] of doc.sources.entries()) {
    const role = STRUCTURE_ROLES.has(s.role) ? 'structure' : 'data';
    let read;
    try {
      read = await readRecordedPath(fs, dir, s.path, `sources[${i}].path`, file, role);
    } catch (e) {
      if (!(e instanceof PathRefusedError)) throw e;
      notes.push(e.message);
      continue; // counts as missing: compareSources says so
    }
    if (!read) continue; // missing: compareSources says so
    current.push({ path: s.path, sha256: sha256Hex(read.bytes), role: s.role });
    if (!structure && STRUCTURE_ROLES.has(s.role)) {
      try {
        structure = readStructureFile(read).structure;
      } catch (e) {
        // Not a file the user named: the reason is given without quoting its content.
        notes.push(`the structure file ${read.path} could not be read: ${redactContent(e instanceof Error ? e.message : String(e))}`);
      }
    }
  }
  let lattice: Mat3 | null = structure?.lattice ?? null;
  if (!structure) {
    // The data file may carry the structure itself (XML layouts); read it only for that.
    try {
      const data = dataPathFor(file);
      if (await checkConfined(fs, dir, data, 'the data file it describes', 'data', Number.MAX_SAFE_INTEGER)) {
        const bs = await readLocated(fs, await locateRun(fs, data), doc.settings.forceSpinorbit ? { spinorbit: true } : {});
        structure = bs.structure;
        lattice = bs.lattice;
      }
    } catch {
      // No structure: the run has no descriptors; the note below says so.
    }
  }
  if (!lattice) notes.push('no crystal structure found for this run: it has no lattice parameters or strain');
  const crystal = runCrystal(structure);
  const out = runFromAnnotations(doc, { name, currentSources: current, lattice, rotations: crystal.rotations });
  out.run.latticeType = crystal.latticeType;
  out.run.latticePointsPerCell = crystal.latticePointsPerCell;
  out.run.composition = crystal.composition;
  return { ...out, doc, notes };
}
