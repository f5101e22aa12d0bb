/**
 * From a path (a file or a run folder) to a BandStructure: find the eigenvalue file by content, gather the
 * companions its reader asks for, read. Uses only the FileAccessor, so it runs in the CLI and the editor.
 */
import type { BandStructure } from './model';
import type { FileAccessor, InputFile } from './io/fileAccessor';
import { basename, dirname, joinPath } from './io/fileAccessor';
import { DETECT_HEAD_BYTES, READERS, detectFormat } from './formats/index';
import type { FormatReader, ReadOptions } from './formats/types';
import { ReaderError, ValleyscopeError } from './errors';
import { withInferredLabels } from './lattice/inferLabels';
import { checkConfined, notRegularSentence, PathRefusedError, readListedFile, redactContent } from './io/pathPolicy';
import { refuseAbsurdKpoints } from './formats/kpointSanity';
import { crossCheckListedSymmetry } from './lattice/listedSymmetry';
import { isKpointsOptName } from './formats/vasp/kpointsOptChoice';
import { VASPRUN_FORMAT } from './formats/vasp/vasprunStream';

/** Files larger than this are streamed by readers that can (bytes); also the largest two candidates compared whole. */
export const STREAM_ABOVE_BYTES = 32 * 1024 * 1024;

/**
 * readLocated streams files larger than this (bytes) when the reader and the file system can: a few pieces read
 * into one reused buffer cost less than one buffer the size of the file, whose fresh pages the system must map
 * (25 MiB: about 5 ms of CPU instead of 15 on this machine, besides the memory).
 */
export const STREAM_READ_ABOVE_BYTES = 4 * 1024 * 1024;

export interface LoadOptions extends ReadOptions {
  /** Refuse files larger than this many bytes (0: no limit). */
  maxBytes?: number;
}

export interface OtherCandidate {
  /** Name relative to the run folder. */
  name: string;
  /** Layout label. */
  label: string;
  /** Byte-identical to the file read (pw.x writes <prefix>.xml and <prefix>.save/data-file-schema.xml alike). */
  identical: boolean;
}

export interface RunLocation {
  /** The eigenvalue file. */
  file: string;
  reader: FormatReader;
  /** Other files of the folder that hold eigenvalues too (none when a file was given). */
  others?: OtherCandidate[];
  /** Why the file read was preferred to the others, when a rule other than the general one decided. */
  preferredBecause?: string;
}

/** Files never worth opening when looking for eigenvalues in a run folder. */
const SKIP =
  /^(WAVECAR|CHGCAR|CHG|WAVEDER|PROCAR|DOSCAR|LOCPOT|ELFCAR|AECCAR\d|vaspout\.h5|.*\.valleys\.json|.*\.(wfc\d*|save|hdf5|h5|npy|png|svg|pdf|gz|xz|zip|tar))$/i;

/**
 * Find the eigenvalue file in a folder (by content), or confirm a file's format.
 *
 * A folder is searched for every layout Valleyscope reads: its own files and, one level down, the pw.x data
 * file `<prefix>.save/data-file-schema.xml`. When several files qualify, the rule is: the file whose content
 * is recognised most surely; among equals, files in the folder before those inside `*.save/`, then by name.
 * The others are named in a notice (RunLocation.others), identical copies said to be so.
 */
export async function locateRun(fs: FileAccessor, path: string): Promise<RunLocation> {
  const st = await fs.stat(path);
  if (!st) throw new ValleyscopeError(`${path}: no such file or folder`);
  if (st.type === 'other') throw new ValleyscopeError(notRegularSentence(path, st));
  if (st.type === 'file') {
    if (st.size === 0) throw new ValleyscopeError(`${path}: the file is empty`);
    const head = await fs.readHead(path, DETECT_HEAD_BYTES);
    const d = detectFormat(head, basename(path));
    if (!d)
      throw new ValleyscopeError(
        `${path}: not an eigenvalue file of a layout Valleyscope reads (${READERS.map((r) => r.label).join(', ')})`,
      );
    return { file: path, reader: d.reader, others: [] };
  }
  const listing = await fs.list(path);
  const refused: string[] = [];
  /** A symbolic link in a run folder is followed only when it stays inside the folder (io/pathPolicy.ts). */
  const followable = async (file: string, name: string): Promise<boolean> => {
    try {
      await checkConfined(fs, path, file, `the link ${name}`, 'data', Number.MAX_SAFE_INTEGER);
      return true;
    } catch (err) {
      if (!(err instanceof PathRefusedError)) throw err;
      refused.push(err.message);
      return false;
    }
  };
  const names: { file: string; name: string; depth: number }[] = [];
  for (const e of listing.filter((x) => x.type === 'file' && !SKIP.test(x.name))) {
    const file = joinPath(path, e.name);
    if (e.link && !(await followable(file, e.name))) continue;
    names.push({ file, name: e.name, depth: 0 });
  }
  for (const d of listing.filter((e) => e.type === 'directory' && /\.save$/i.test(e.name))) {
    const inner = joinPath(joinPath(path, d.name), 'data-file-schema.xml');
    const ist = await fs.stat(inner).catch(() => null);
    if (!ist || ist.type !== 'file' || ist.size === 0) continue;
    // The .save folder or the file in it may be links: the file read must stay inside the run folder.
    if (!(await followable(inner, `${d.name}/data-file-schema.xml`))) continue;
    names.push({ file: inner, name: `${d.name}/data-file-schema.xml`, depth: 1 });
  }
  const found: { file: string; name: string; depth: number; reader: FormatReader; confidence: number }[] = [];
  for (const e of names) {
    const head = await fs.readHead(e.file, DETECT_HEAD_BYTES);
    const d = detectFormat(head, basename(e.file));
    if (d) found.push({ ...e, reader: d.reader, confidence: d.confidence });
  }
  if (found.length === 0) {
    throw new ValleyscopeError(
      `${path}: no eigenvalue file found in this folder or in a <prefix>.save/ inside it (looked for ${READERS.map((r) => r.label).join(', ')})${refused.length ? `; not followed: ${refused.join('; ')}` : ''}`,
    );
  }
  // A KPOINTS_OPT file: its eigenvalues are only in vasprun.xml (EIGENVAL holds the self-consistent mesh).
  const optFile = listing.find((e) => e.type === 'file' && isKpointsOptName(e.name));
  const first = (c: { reader: FormatReader }): number => (optFile && c.reader.id === VASPRUN_FORMAT ? 0 : 1);
  found.sort((a, b) => first(a) - first(b) || b.confidence - a.confidence || a.depth - b.depth || a.name.localeCompare(b.name));
  const best = found[0]!;
  const preferredBecause =
    optFile && first(best) === 0 && found.length > 1
      ? `the folder holds ${optFile.name}, whose eigenvalues VASP writes only to vasprun.xml (EIGENVAL holds the self-consistent mesh only)`
      : undefined;
  const others: OtherCandidate[] = [];
  for (const o of found.slice(1)) {
    let identical = false;
    if (o.reader === best.reader) {
      const [sa, sb] = await Promise.all([fs.stat(best.file), fs.stat(o.file)]);
      if (sa && sb && sa.size === sb.size && sa.size <= STREAM_ABOVE_BYTES) {
        const [ba, bb] = await Promise.all([fs.readFile(best.file, STREAM_ABOVE_BYTES), fs.readFile(o.file, STREAM_ABOVE_BYTES)]);
        identical = ba.length === bb.length && ba.every((x, i) => x === bb[i]);
      }
    }
    others.push({ name: o.name, label: o.reader.label, identical });
  }
  return { file: best.file, reader: best.reader, others, ...(preferredBecause ? { preferredBecause } : {}) };
}

/** A notice naming the other candidate files of a run folder, or null when there were none. */
export function otherCandidatesNotice(loc: RunLocation): string | null {
  if (!loc.others || loc.others.length === 0) return null;
  const list = loc.others.map((o) => `${o.name} (${o.label}${o.identical ? ', an identical copy' : ''})`).join(', ');
  const why = loc.preferredBecause ?? 'recognised most surely, then files in the folder before those in <prefix>.save/, then by name';
  return `The folder holds more than one eigenvalue file: ${basename(loc.file)} was read (${why}); also found: ${list}. Give the file itself to read another one.`;
}

/** Read a run: the eigenvalue file plus the companions its reader wants from the same folder. */
export async function loadRun(fs: FileAccessor, path: string, options: LoadOptions = {}): Promise<BandStructure> {
  const loc = await locateRun(fs, path);
  return readLocated(fs, loc, options);
}

export async function readLocated(fs: FileAccessor, loc: RunLocation, options: LoadOptions = {}): Promise<BandStructure> {
  const st = await fs.stat(loc.file);
  if (options.maxBytes && st && st.size > options.maxBytes) {
    throw new ValleyscopeError(
      `${loc.file}: the file is ${(st.size / 1e6).toFixed(0)} MB, above the limit of ${(options.maxBytes / 1e6).toFixed(0)} MB set for this session`,
    );
  }
  const companions = await readCompanions(fs, loc);
  // Large files are streamed when both the reader and the file system can: memory then holds the typed
  // arrays, not the text.
  if (loc.reader.streaming && fs.openRanged && st && st.size > STREAM_READ_ABOVE_BYTES) {
    const stream = fs.openRanged(loc.file);
    try {
      return withCandidateNotice(
        await readFromBytes(loc.reader, { path: loc.file, bytes: new Uint8Array(0), stream }, companions, options),
        loc,
      );
    } finally {
      stream.close();
    }
  }
  const main: InputFile = { path: loc.file, bytes: await fs.readFile(loc.file, options.maxBytes || undefined) };
  return withCandidateNotice(await readFromBytes(loc.reader, main, companions, options), loc);
}

function withCandidateNotice(bs: BandStructure, loc: RunLocation): BandStructure {
  const notice = otherCandidatesNotice(loc);
  if (notice) bs.warnings.push({ code: 'other-candidates', message: notice });
  return bs;
}

/**
 * The reading step once the bytes are in memory (the CLI after readLocated's reads, the editor's analysis
 * worker, which receives bytes): one place, so both give the same band structure.
 */
export async function readFromBytes(
  reader: FormatReader,
  main: InputFile,
  companions: InputFile[],
  options: ReadOptions = {},
): Promise<BandStructure> {
  // Without a path file, label the high-symmetry points recognised from the lattice (with a warning).
  let bs: BandStructure;
  try {
    bs = reader.read(main, companions, options);
  } catch (e) {
    // A companion's error never quotes its content (the user named the run, not that file).
    if (e instanceof ReaderError && e.file !== main.path) throw new ReaderError(e.format, e.file, e, redactContent(e.reason));
    throw e;
  }
  bs.warnings = bs.warnings.map((w) => (w.file !== undefined && w.file !== main.path ? { ...w, message: redactContent(w.message) } : w));
  // The symmetry the file lists, checked against its structure: analysis, so here and not in the reader.
  const symmetry = crossCheckListedSymmetry(bs);
  if (symmetry) bs.warnings.push(symmetry);
  if (bs.electrons === null && options.electrons !== undefined && options.electrons > 0) {
    bs.electrons = options.electrons;
    bs.warnings.push({
      code: 'electrons-given',
      message: `The run's files give no electron count: ${options.electrons} electrons were taken from the structure file given.`,
    });
  }
  return withInferredLabels(refuseAbsurdKpoints(bs));
}

export async function readCompanions(fs: FileAccessor, loc: RunLocation): Promise<InputFile[]> {
  const dir = dirname(loc.file);
  let siblings: string[] = [];
  try {
    siblings = (await fs.list(dir)).filter((e) => e.type !== 'directory').map((e) => e.name);
  } catch {
    siblings = [];
  }
  const names = loc.reader.companions(
    basename(loc.file),
    siblings.filter((n) => n !== basename(loc.file)),
  );
  const out: InputFile[] = [];
  for (const n of names) {
    const p = joinPath(dir, n);
    // Confined to the run's folder, regular files only, bounded (io/pathPolicy.ts); a pw.x XML beside bands.x
    // output is itself a data file. A companion that vanished between listing and reading is simply absent.
    const bytes = await readListedFile(fs, dir, p, /\.xml$/i.test(n) ? 'data' : 'companion');
    if (bytes) out.push({ path: p, bytes });
  }
  return out;
}
