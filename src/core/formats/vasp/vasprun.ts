/**
 * The vasprun.xml reader: the file read as a byte stream (vasprunStream.ts) in 256 KiB pieces, then turned into
 * a BandStructure with the KPOINTS beside it for path labels.
 */
import type { BandStructure, InputWarning, SourceFile } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { basename } from '../../io/fileAccessor';
import type { FormatReader, ReadOptions } from '../types';
import { mainFileHasher, mainFileSha256 } from '../sourceHash';
import { CancelledError } from '../../errors';
import { VASPRUN_FORMAT, VasprunStream, type VasprunData } from './vasprunStream';
import { placeLineModeLabels, readKpointsCompanion } from './kpointLabels';
import { vaspBandStructure, type VaspFindings } from './vaspBandStructure';
import { chosenEigenvalueSet, isKpointsOptName, KPOINTS_OPT_NAME } from './kpointsOptChoice';

export { VASPRUN_FORMAT, VasprunStream, type VasprunData };

/**
 * Read a vasprun.xml in chunks: from `file.bytes`, or through `file.stream` (a ranged source) when given, so
 * the file is never held whole. Returns what it says and the SHA-256 of its bytes.
 */
export function readVasprun(file: InputFile, options: ReadOptions = {}): VasprunData & { sha256: string } {
  const src = file.stream;
  const size = src ? src.size : file.bytes.length;
  const stream = new VasprunStream(file.path, size);
  // 256 KiB pieces through one reused buffer: nothing but the typed arrays of the result grows with the file. The
  // scanner joins each piece to the unfinished row before it in a second buffer of the same size, so the piece
  // size counts twice in the peak memory (1 MiB pieces: 0.54 of a 30 MiB file, these: 0.48; CPU the same).
  const CHUNK = 1 << 18;
  const hasher = src ? mainFileHasher(options) : null;
  if (size === 0) return { ...stream.finish(false), sha256: '' };
  const buffer = src?.readInto ? new Uint8Array(Math.min(CHUNK, size)) : null;
  for (let start = 0; start < size;) {
    if (options.isCancelled?.()) throw new CancelledError();
    let chunk: Uint8Array;
    if (!src) chunk = file.bytes.subarray(start, Math.min(size, start + CHUNK));
    else if (buffer) chunk = buffer.subarray(0, src.readInto!(start, buffer, 0, Math.min(CHUNK, size - start)));
    else chunk = src.read(start, Math.min(CHUNK, size - start));
    if (chunk.length === 0) break;
    start += chunk.length;
    hasher?.update(chunk);
    stream.write(chunk, start >= size);
    options.onProgress?.(start / size);
  }
  const data = stream.finish(options.allowPartial ?? false);
  return { ...data, sha256: hasher ? hasher.hex() : src ? '' : mainFileSha256(file.bytes, options) };
}

/** Recognise a vasprun.xml: an XML file whose root is <modeling> with a VASP <generator>. */
export function detectVasprun(head: Uint8Array, name: string): number {
  const text = new TextDecoder('latin1').decode(head.subarray(0, 4096));
  const root = /<modeling>/.test(text);
  if (!root) return 0;
  if (/<i name="program" type="string">\s*vasp/i.test(text) || /<generator>/.test(text)) return /vasprun/i.test(name) ? 1 : 0.97;
  return 0.5;
}

/** Turn what the file says into a BandStructure, with warnings for what is missing. */
export function vasprunToBandStructure(
  data: VasprunData & { sha256: string },
  main: InputFile,
  companions: InputFile[],
  options: ReadOptions,
): BandStructure {
  const warnings: InputWarning[] = [];
  const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: data.sha256 }];
  const structure = data.structure ?? options.structure ?? null;
  if (!data.structure)
    warnings.push({ code: 'no-structure', message: 'The file holds no complete structure: valley degeneracy cannot be determined.' });
  if (data.spinorbit === null && options.spinorbit === undefined) {
    warnings.push({
      code: 'spinorbit-unknown',
      message: 'The file does not say whether spin-orbit coupling was on (LSORBIT): read as a collinear run.',
    });
  }
  if (data.electrons === null) warnings.push({ code: 'no-electrons', message: 'The file gives no electron count (NELECT).' });
  if (!data.complete) {
    warnings.push({
      code: 'partial',
      message: `The file ends before the run finished (a running or interrupted job): the eigenvalues are those of the last completed step (${data.steps} written so far); results are provisional.`,
    });
  }
  const source = { format: VASPRUN_FORMAT, file: main.path, files };
  const spinorbit = options.spinorbit ?? data.spinorbit ?? false;
  const lattice = structure?.lattice ?? options.lattice ?? null;
  const found: VaspFindings = {
    lattice,
    structure,
    fermiEnergy: data.fermiEnergy,
    spinorbit,
    method: data.method,
    partial: !data.complete,
    warnings,
  };
  // VASP 6's KPOINTS_OPT set, when present and complete, is what the user asked VASP for (vasprunKpointsOpt.ts).
  const chosen = chosenEigenvalueSet(data, options.scfSet === true, warnings);
  const arrays = chosen.set ? { ...chosen.set, electrons: data.electrons } : data;
  // Its Fermi energy is the self-consistent mesh's: without occupations of its own, the set is classified by its count.
  if (chosen.set && !chosen.set.occupations && data.fermiEnergy !== null) found.fermiFromOtherKPoints = true;
  const { generation, declaredMesh } = chosen.set ?? data;
  return vaspBandStructure(source, arrays, found, ({ kpoints, nk }) => {
    // Labels: a KPOINTS file in line mode beside the run names the ends VASP lists here (KPOINTS_OPT for that
    // set); the positions vasprun.xml lists are fractional, as the path's ends are when given in reciprocal coordinates.
    // The KPOINTS_OPT set is a path also when its <generation> is not written but its KPOINTS_OPT is in line mode.
    const kfile = companions.find((c) => isKpointsOptName(basename(c.path)) === (chosen.set !== null));
    if (!generation && !(chosen.set && kfile)) return { labels: [], sampling: 'points', declaredMesh };
    const content = kfile && readKpointsCompanion(kfile, files, warnings, (c) => c.mode === 'line' && c.path.coordinates === 'reciprocal');
    if (!generation && content?.mode !== 'line') return { labels: [], sampling: 'points', declaredMesh };
    const labels = content?.mode === 'line' ? placeLineModeLabels(content.path, kpoints, nk, null, kfile!.path, warnings) : [];
    return { labels, sampling: 'path' };
  });
}

export const vasprunReader: FormatReader = {
  id: VASPRUN_FORMAT,
  label: 'VASP vasprun.xml',
  streaming: true,
  detect: detectVasprun,
  companions(mainName: string, siblings: string[]): string[] {
    const prefix = /^(.*?)vasprun(.*)\.xml$/i.exec(mainName);
    const out: string[] = [];
    for (const role of ['KPOINTS', KPOINTS_OPT_NAME]) {
      const hit = (prefix ? [`${prefix[1]}${role}${prefix[2]}`, role] : [role]).find((c) => siblings.includes(c));
      if (hit) out.push(hit);
    }
    return out;
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    return vasprunToBandStructure(readVasprun(main, options), main, companions, options);
  },
};
