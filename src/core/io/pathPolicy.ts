/**
 * The one policy for opening a path Valleyscope did not get from the user's own command line: a path written
 * in an annotations file (settings.structureFile, sources[].path), the data file an annotations file belongs
 * to, a companion found beside an eigenvalue file, the eigenvalue file found in a run folder.
 *
 * Such a path is opened only when
 *   - as written, it is relative, without "..", without hidden segments (".git", ".env", ...), without
 *     control characters, and not absurdly long;
 *   - resolved (every symbolic link followed) it stays inside the run's folder, and still names no hidden
 *     file or folder there;
 *   - it is a regular file (not a FIFO, socket or device, also behind a link), no larger than the limit of
 *     its role (readLimits.ts).
 * Otherwise it is refused with one sentence naming the field that held it, and nothing is opened. Sentences
 * never quote the content of a refused file; `redactContent` removes quoted text from reader errors about
 * files the user did not name.
 */
import type { FileAccessor, FileStat } from './fileAccessor';
import { joinPath } from './fileAccessor';
import { ValleyscopeError } from '../errors';
import { READ_LIMITS, ROLE_WORDS, tooLargeSentence, type ReadRole } from './readLimits';

/** A path refused by the policy; nothing was opened. */
export class PathRefusedError extends ValleyscopeError {
  constructor(
    message: string,
    /** The field (or role) that held the path, e.g. "settings.structureFile". */
    readonly field: string,
  ) {
    super(message);
    this.name = 'PathRefusedError';
  }
}

/** Longest path accepted from a file's content (characters). */
export const MAX_RECORDED_PATH = 1024;

/** A value from a file, safe to show in one line: control characters replaced, length bounded. */
export function shown(value: string): string {
  // eslint-disable-next-line no-control-regex -- finding control characters is what this does
  const clean = value.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, '?');
  return JSON.stringify(clean.length > 80 ? `${clean.slice(0, 77)}...` : clean);
}

function isHidden(segment: string): boolean {
  return segment.startsWith('.') && segment !== '.';
}

/**
 * The lexical rules for a path written in a file. Returns it with '/' separators and "." segments removed;
 * throws PathRefusedError otherwise.
 */
export function checkRecordedPath(value: string, field: string, holder: string): string {
  const refuse = (why: string): never => {
    throw new PathRefusedError(`${field} in ${holder} (${shown(value)}) ${why}; it was not opened`, field);
  };
  if (value.length === 0) refuse('is empty');
  if (value.length > MAX_RECORDED_PATH) refuse(`is longer than ${MAX_RECORDED_PATH} characters`);
  // eslint-disable-next-line no-control-regex -- finding control characters is what this does
  if (/[\u0000-\u001f\u007f]/.test(value)) refuse('contains control characters');
  const p = value.replace(/\\/g, '/');
  if (p.startsWith('/') || /^[a-zA-Z]:/.test(p) || p.startsWith('~'))
    refuse("is an absolute path; only paths inside the run's folder are opened");
  const segments = p.split('/').filter((s) => s !== '' && s !== '.');
  if (segments.length === 0) refuse('names no file');
  if (segments.includes('..')) refuse('climbs out of the run\'s folder ("..")');
  if (segments.some(isHidden)) refuse("names a hidden file or folder (such as .git); those are never opened from a file's content");
  return segments.join('/');
}

/** The sentence for something that is not a regular file. */
export function notRegularSentence(path: string, st: FileStat, what = 'it'): string {
  const kind = st.type === 'directory' ? 'a folder' : (st.kind ?? 'not a regular file (a FIFO, socket or device)');
  return `${path}: ${what} is ${kind}; only regular files are read, so it was not opened`;
}

function slashes(p: string): string {
  return p.replace(/\\/g, '/').replace(/\/+$/, '');
}

/**
 * Check that `path` (already inside `root` as written) stays inside `root` once symbolic links are resolved,
 * and is a regular file within the limit of its role. Returns its stat, or null when nothing is there.
 * `what` names the field or role in the sentence ("the companion POSCAR", "settings.structureFile in X").
 */
export async function checkConfined(
  fs: FileAccessor,
  root: string,
  path: string,
  what: string,
  role: ReadRole,
  limit = READ_LIMITS[role],
): Promise<FileStat | null> {
  const st = await fs.stat(path);
  if (!st) return null;
  if (fs.realpath) {
    const [realRoot, realPath] = await Promise.all([fs.realpath(root), fs.realpath(path)]);
    const r = slashes(realRoot);
    const t = slashes(realPath);
    const inside = r === '' ? t.startsWith('/') : t.startsWith(`${r}/`);
    if (!inside) {
      throw new PathRefusedError(`${path}: ${what} leads outside the run's folder (through a symbolic link); it was not opened`, what);
    }
    const below = t.slice(r.length + 1).split('/');
    if (below.some(isHidden)) {
      throw new PathRefusedError(
        `${path}: ${what} leads to a hidden file or folder (such as .git) inside the run's folder; it was not opened`,
        what,
      );
    }
  }
  if (st.type !== 'file') throw new PathRefusedError(notRegularSentence(path, st, what), what);
  if (st.size > limit) throw new PathRefusedError(tooLargeSentence(path, st.size, limit, role), what);
  return st;
}

export interface ConfinedRead {
  /** The path opened (root joined with the recorded path). */
  path: string;
  bytes: Uint8Array;
}

/**
 * Read a path recorded in a file (`value` of `field` in `holder`), confined to `root`. Null when nothing is
 * there; PathRefusedError when the policy refuses it.
 */
export async function readRecordedPath(
  fs: FileAccessor,
  root: string,
  value: string,
  field: string,
  holder: string,
  role: ReadRole,
): Promise<ConfinedRead | null> {
  const rel = checkRecordedPath(value, field, holder);
  const path = joinPath(root, rel);
  const limit = READ_LIMITS[role];
  const st = await checkConfined(fs, root, path, `${field} in ${holder}`, role, limit);
  if (!st) return null;
  return { path, bytes: await fs.readFile(path, limit) };
}

/** Read a file found by listing `root` (a companion), confined to `root`; null when it vanished. */
export async function readListedFile(fs: FileAccessor, root: string, path: string, role: ReadRole): Promise<Uint8Array | null> {
  const limit = READ_LIMITS[role];
  const st = await checkConfined(fs, root, path, `the ${ROLE_WORDS[role]}`, role, limit);
  if (!st) return null;
  return fs.readFile(path, limit);
}

/**
 * A reader's sentence about a file the user did not name, without the text it quotes from that file
 * (quoted spans and what follows "found"), so no content of such a file reaches any output.
 */
export function redactContent(message: string): string {
  return message
    .replace(/"[^"\n]*"?/g, '(text not shown)')
    .replace(/\bfound (?!\(text not shown\))[^,;.)\n]*/g, 'found something else (not shown)');
}
