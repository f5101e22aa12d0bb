/**
 * How many bytes Valleyscope reads of a file, by the role the file plays. Every whole-file read is bounded:
 * a file above its limit is refused with a sentence before it is read (SECURITY.md lists these numbers).
 */

export type ReadRole = 'data' | 'companion' | 'annotations' | 'structure';

const MB = 1e6;

export const READ_LIMITS: Readonly<Record<ReadRole, number>> = {
  /** Eigenvalue files; the editor replaces it by the valleyscope.maxFileSizeMB setting (same default). */
  data: 1024 * MB,
  /** POSCAR, CONTCAR, KPOINTS, INCAR, Wannier90 _band.kpt, _band.labelinfo.dat, .win. */
  companion: 16 * MB,
  /** `*.valleys.json`. */
  annotations: 16 * MB,
  /** A structure file given with --structure or recorded in an annotations file (POSCAR or pw.x XML). */
  structure: 256 * MB,
};

/** Words for the role in sentences. */
export const ROLE_WORDS: Readonly<Record<ReadRole, string>> = {
  data: 'eigenvalue file',
  companion: 'companion file',
  annotations: 'annotations file',
  structure: 'structure file',
};

export function megabytes(bytes: number): string {
  const mb = bytes / MB;
  return mb >= 10 ? mb.toFixed(0) : mb.toFixed(1);
}

/** The sentence for a file above its limit. */
export function tooLargeSentence(path: string, size: number, limit: number, role?: ReadRole, setting?: string): string {
  return `${path}: the ${role ? ROLE_WORDS[role] : 'file'} is ${megabytes(size)} MB, above the limit of ${megabytes(limit)} MB${setting ? ` (${setting})` : ' for this role'}; it was not read`;
}
