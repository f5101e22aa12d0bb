/** Node's file-system errors as one sentence a user can act on (never the raw "EACCES: permission denied, open '…'"). */
import { ValleyscopeError } from '../core/errors';

const REASONS: Record<string, string> = {
  EACCES: 'permission is denied',
  EPERM: 'the operating system does not permit it',
  ENOENT: 'there is no such file or folder',
  ENOTDIR: 'a part of the path is not a folder',
  EISDIR: 'it is a folder, not a file',
  ELOOP: 'its symbolic links form a loop (or are too many to follow)',
  ENAMETOOLONG: 'its name is too long for the file system',
  EMFILE: 'too many files are open; try again with fewer runs',
  ENFILE: 'too many files are open on this system',
  EIO: 'the disk reported an input/output error',
  ENXIO: 'it is a device or pipe with nothing behind it',
  EAGAIN: 'it is not ready to be read (a pipe or device)',
  EBUSY: 'it is busy',
  ETIMEDOUT: 'the file system did not answer in time',
};

export function fsErrorCode(e: unknown): string | undefined {
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  return typeof code === 'string' ? code : undefined;
}

/** "`path` could not be read: permission is denied" for a node file-system error; a ValleyscopeError passes unchanged. */
export function fsErrorSentence(path: string, e: unknown, verb: 'read' | 'listed' | 'looked at' = 'read'): ValleyscopeError {
  if (e instanceof ValleyscopeError) return e;
  const code = fsErrorCode(e);
  const why = (code ? REASONS[code] : undefined) ?? `the system reported ${code ?? 'an unknown error'}`;
  return new ValleyscopeError(`${path} could not be ${verb}: ${why}`);
}
