/**
 * The annotations file: what a reviewer concluded about a run, kept beside the data as
 * `<data file name>.valleys.json`. These are the in-memory types; the byte layout is fixed by
 * serializeAnnotations.ts and described for editors by schema/valleys.schema.json.
 *
 * Every object keeps the fields the program does not know in `extra` (hand-added fields survive every
 * rewrite and merge). `extra` objects have no prototype, so a key such as "__proto__" is an ordinary key.
 */
import type { ExtremumKind, Mat3, Vec3 } from '../model';
import { ValleyscopeError } from '../errors';

export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };
/** Fields found in the file that this version does not know, in the order they were written. */
export type ExtraFields = Record<string, JsonValue>;

/**
 * The value of the top-level key `valleyscopeAnnotations`: the layout version of the file.
 * 1: entries identified by kind, spin, absolute band and k. 2: by kind, spin channel (named only in
 * spin-polarised runs), valley (the star of k) and band counted from the edge; layout 1 migrates on read.
 */
export const ANNOTATIONS_LAYOUT_VERSION = 2;
/** The file name ending that marks an annotations file. */
export const ANNOTATIONS_SUFFIX = '.valleys.json';

/** Review states offered to the reviewer; the reader keeps any other word a person typed. */
export const REVIEW_STATUSES = ['unreviewed', 'accepted', 'questioned', 'rejected'] as const;
export type KnownReviewStatus = (typeof REVIEW_STATUSES)[number];

export const EXTREMUM_KINDS: readonly ExtremumKind[] = ['vbm', 'cbm', 'valley', 'peak'];

export function emptyExtra(): ExtraFields {
  return Object.create(null) as ExtraFields;
}

/** A file the results came from, with the SHA-256 of its bytes when the annotations were written. */
export interface AnnotatedSource {
  /** Path relative to the folder holding the annotations file, '/' separators. */
  path: string;
  role: string;
  sha256: string;
  extra: ExtraFields;
}

/** The analysis settings the numbers were obtained with (re-used by `check`). */
export interface AnnotatedSettings {
  window_meV: number;
  method: string;
  range_eV: number;
  degeneracy_meV: number;
  /** The run was read as spin-orbit (one electron per band) because the user said so. */
  forceSpinorbit: boolean;
  /** alat in Å given by the user, for layouts that give k in 2π/alat without a cell; null when not needed. */
  alat_angstrom: number | null;
  /**
   * A structure file given by the user (for runs whose files hold no cell or atoms), relative to the folder
   * of the annotations file; it is also listed in `sources` with its hash. Null when not used.
   */
  structureFile: string | null;
  extra: ExtraFields;
}

export interface AnnotatedPoint {
  /** 1-based band index. */
  band: number;
  /** Spin channel, 0 (up) or 1 (down); written as "up"/"down" only in spin-polarised runs. */
  spin: 0 | 1;
  /** Fractional reciprocal coordinates. */
  k: Vec3;
  energy_eV: number;
  label: string | null;
}

export interface AnnotatedGap {
  eV: number;
  direct: boolean;
  vbm: AnnotatedPoint;
  cbm: AnnotatedPoint;
  directGap: { eV: number; k: Vec3 };
  extra: ExtraFields;
}

/** A directional mass with the whole story of its fit. */
export interface AnnotatedMass {
  towards: string;
  /** Cartesian unit vector. */
  direction: Vec3;
  /** Signed curvature mass in m_e (negative at a maximum); null when the fit gave no finite mass. */
  mass: number | null;
  stderr: number | null;
  points: number;
  window_meV: number;
  method: string;
  alpha_per_eV: number | null;
  residual_meV: number | null;
  /** At a degenerate edge: the branch (1-based) followed by smooth continuation, when the fit followed one. */
  branch: number | null;
  /** Whether the mass can be quoted (false: undetermined, the reason among the warnings); null in files written before it was recorded. */
  determined: boolean | null;
  warnings: string[];
  extra: ExtraFields;
}

export interface AnnotatedTensor {
  principal: Vec3;
  /** Standard errors of the principal masses, m_e, when known. */
  stderr: Vec3 | null;
  axes: Mat3;
  method: string;
  points: number | null;
  residual_meV: number | null;
  extra: ExtraFields;
}

export interface AnnotatedEntry {
  /** Stable identity: kind, spin channel, band counted from the edge and valley (see entryId). */
  id: string;
  /** Review state: 'unreviewed', 'accepted', 'questioned', 'rejected', or a word the reviewer typed. */
  status: string;
  note: string;
  /** False when the latest analysis no longer finds this extremum (the entry is kept, never deleted). */
  found: boolean;
  kind: ExtremumKind;
  spin: 0 | 1;
  /** True when the run is spin-polarised (the spin channel is then part of the identity, named up/down). */
  spinPolarised: boolean;
  /** 1-based absolute band index in this run (information only: it shifts when bands are added below). */
  band: number;
  /**
   * Band counted from the edge on its side: valence 1 = the band of the VBM, 2 the one below; conduction
   * 1 = the band of the CBM, 2 the one above. Null when the run has no gap to count from.
   */
  edgeBand: number | null;
  k: Vec3;
  /**
   * The valley: one chosen member of the star of k (the images of k under the crystal's point group and time
   * reversal, modulo G; see valleyIdentity.ts). Equivalent k-points give the same member.
   */
  valley: Vec3;
  label: string | null;
  energy_eV: number;
  /** Energy below the VBM (valence) or above the CBM (conduction), eV. */
  offset_eV: number | null;
  degenerateBands: number | null;
  valleyDegeneracy: number | null;
  masses: AnnotatedMass[];
  tensor: AnnotatedTensor | null;
  dosMass: number | null;
  conductivityMass: number | null;
  warnings: string[];
  /**
   * The window and method a reviewer chose for this extremum (in the band view), when its numbers come from
   * that fit rather than from the run's settings; every re-analysis (check, annotate, the next save) redoes
   * it at this band and k (chosenFits.ts). Null for the analysis's own fits.
   */
  fit: { window_meV: number; method: string; extra: ExtraFields } | null;
  extra: ExtraFields;
}

export interface AnnotationsDoc {
  /** Layout version as read (the writer always writes ANNOTATIONS_LAYOUT_VERSION). */
  layoutVersion: number;
  /** The run has two spin channels (entries then name theirs up/down). */
  spinPolarised: boolean;
  toolVersion: string;
  /** Format id of the eigenvalue file (e.g. 'vasp-eigenval'). */
  format: string;
  sources: AnnotatedSource[];
  settings: AnnotatedSettings;
  metal: boolean | null;
  gap: AnnotatedGap | null;
  /** The reviewer's note on the run as a whole. */
  note: string;
  entries: AnnotatedEntry[];
  warnings: string[];
  cautions: string[];
  extra: ExtraFields;
}

/** The annotations file that belongs to a data file: always beside it, never a path taken from content. */
export function annotationsPathFor(dataFile: string): string {
  return dataFile.replace(/[\\/]+$/, '') + ANNOTATIONS_SUFFIX;
}

export function isAnnotationsPath(path: string): boolean {
  return path.toLowerCase().endsWith(ANNOTATIONS_SUFFIX) && path.length > ANNOTATIONS_SUFFIX.length;
}

/** The data file an annotations file describes (its name without the suffix). */
export function dataPathFor(annotationsFile: string): string {
  if (!isAnnotationsPath(annotationsFile))
    throw new ValleyscopeError(`${annotationsFile} is not an annotations file name (*${ANNOTATIONS_SUFFIX})`);
  return annotationsFile.slice(0, annotationsFile.length - ANNOTATIONS_SUFFIX.length);
}

/**
 * A number in an id: at most 4 decimals, trailing zeros dropped, no "-0". Rounded from the 6 decimals the
 * file keeps, so an id computed before writing and after reading back is the same.
 */
export function idNumber(x: number): string {
  let s = Number(x.toFixed(6)).toFixed(4);
  if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
  return s === '-0' ? '0' : s;
}

/** "up" / "down" for a spin-polarised run's channel; null when the run has one channel. */
export function spinName(spin: number, spinPolarised: boolean): 'up' | 'down' | null {
  return spinPolarised ? (spin === 1 ? 'down' : 'up') : null;
}

export interface EntryIdentity {
  kind: string;
  spin: number;
  spinPolarised: boolean;
  band: number;
  edgeBand: number | null;
  valley: readonly number[];
}

/**
 * Stable identity of an extremum: kind, spin channel (only in spin-polarised runs), band counted from the
 * edge ("e1"; the absolute band "b5" only when there is no edge to count from) and valley, e.g.
 * "cbm/e1/v=0.425,0,0.425" or "vbm/down/e2/v=0,0,0". Never the absolute band when an edge is known: a
 * deep band added to the run does not change it.
 */
export function entryId(e: EntryIdentity): string {
  const spin = spinName(e.spin, e.spinPolarised);
  const band = e.edgeBand !== null ? `e${e.edgeBand}` : `b${e.band}`;
  return `${e.kind}/${spin ? `${spin}/` : ''}${band}/v=${e.valley.map(idNumber).join(',')}`;
}

/** Identity of a place in the bands, without kind or valley: spin, 1-based band as reported, k (6 decimals). */
export function placeKey(x: { spin: number; band: number; k: readonly number[] }): string {
  return `${x.spin}/${x.band}/${x.k.map((v) => Number(v.toFixed(6))).join(',')}`;
}

/** Layout-1 identity (kind, spin number, absolute band, k): only to recognise ids written by older files. */
export function layout1EntryId(e: { kind: string; spin: number; band: number; k: readonly number[] }): string {
  return `${e.kind}/s${e.spin}/b${e.band}/k=${e.k.map(idNumber).join(',')}`;
}

const ORDINAL = (n: number): string => (n === 1 ? '1st' : n === 2 ? '2nd' : n === 3 ? '3rd' : `${n}th`);

/** A short human name for messages: "CBM, band 5 (1st from the edge), at X (0.5, 0, 0.5)"; spin named only when polarised. */
export function entryTitle(e: {
  kind: string;
  spin: number;
  band: number;
  k: readonly number[];
  label: string | null;
  spinPolarised?: boolean;
  edgeBand?: number | null;
}): string {
  const kind = e.kind === 'vbm' || e.kind === 'cbm' ? e.kind.toUpperCase() : e.kind;
  const at = `(${e.k.map(idNumber).join(', ')})`;
  const spin = spinName(e.spin, e.spinPolarised ?? false);
  const edge = e.edgeBand !== undefined && e.edgeBand !== null ? ` (${ORDINAL(e.edgeBand)} from the edge)` : '';
  return `${kind}, band ${e.band}${edge}${spin ? `, spin ${spin}` : ''}, at ${e.label ? `${e.label} ${at}` : `k = ${at}`}`;
}
