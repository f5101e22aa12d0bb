/**
 * The contract every reader fulfils: recognise its layout from content, name the companion files it can
 * use, and turn bytes into a BandStructure. Readers never analyse.
 */
import type { BandStructure, Mat3, Structure } from '../model';
import type { InputFile } from '../io/fileAccessor';

export interface ReadOptions {
  /** Treat the run as non-collinear / spin-orbit (one electron per band) even if the files do not say. */
  spinorbit?: boolean;
  /** Lattice parameter alat in Å (for layouts that give k in 2π/alat without a cell). */
  alatAngstrom?: number;
  /** A structure to use when the run's own files give none. */
  structure?: Structure;
  /** The electron count (e.g. from the pw.x data file given as the structure), when the run's own files give none. */
  electrons?: number;
  /** A lattice (rows, Å) to use when the run's own files give none. */
  lattice?: Mat3;
  /** Polled between blocks; reading stops with CancelledError when it returns true. */
  isCancelled?: () => boolean;
  /** Called with the fraction of the main file read so far. */
  onProgress?: (fraction: number) => void;
  /** vasprun.xml with a VASP 6 KPOINTS_OPT set: analyse the self-consistent set instead (default: the KPOINTS_OPT set). */
  scfSet?: boolean;
  /** Accept a file that ends early (a running job) and mark the result partial instead of failing. */
  allowPartial?: boolean;
  /**
   * false: the main file's SHA-256 is not computed and its SourceFile.sha256 is '' (formats/sourceHash.ts), for
   * callers that print no hash. Anything that records or compares hashes (annotations, checks) keeps the default.
   */
  hashSources?: boolean;
}

export interface FormatReader {
  /** Stable id, e.g. 'vasp-eigenval'. */
  readonly id: string;
  /** Human name of the layout, e.g. 'VASP EIGENVAL'. */
  readonly label: string;
  /** True when `read` can take a main file given as a ranged stream (InputFile.stream) instead of bytes. */
  readonly streaming?: boolean;
  /**
   * Confidence from 0 (not this layout) to 1 (certainly this layout), from the first bytes of the file and
   * its name. Content decides; the name only breaks ties.
   */
  detect(head: Uint8Array, name: string): number;
  /** Names of sibling files (from `siblings`) that this reader can use as companions of `mainName`. */
  companions(mainName: string, siblings: string[]): string[];
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure;
}

/** Structure-only layouts (POSCAR, ...), usable by any reader as a companion. */
export interface StructureReader {
  readonly id: string;
  detect(head: Uint8Array, name: string): number;
  read(file: InputFile): Structure;
}
