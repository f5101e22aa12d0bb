/**
 * The tolerant reader of annotations files. Tolerant of what people do by hand: a byte-order mark, Windows
 * line endings, keys in any order, fields left out (they take their defaults), fields the program does not
 * know (kept in `extra`), a review status of their own wording. Strict where guessing would lose work: bad
 * JSON, a key written twice, conflict markers, a wrong type in a known field, or a file from a newer layout
 * are refused with a ReaderError that names the line and column and says what is wrong.
 */
import type { ExtremumKind } from '../model';
import { ReaderError } from '../errors';
import {
  ANNOTATIONS_LAYOUT_VERSION,
  EXTREMUM_KINDS,
  REVIEW_STATUSES,
  emptyExtra,
  entryId,
  layout1EntryId,
  type AnnotatedEntry,
  type AnnotatedGap,
  type AnnotatedSettings,
  type AnnotatedSource,
  type AnnotationsDoc,
} from './annotationsModel';
import { JsonSyntaxError, parseJsonWithPositions, positionOf, type JsonNode } from './jsonWithPositions';
import { DEFAULT_SETTINGS } from '../analysis/analyze';
import { valleyRepresentative } from '../lattice/valleyIdentity';
import { bandFromEdge } from './buildAnnotations';
import { ANNOTATIONS_FORMAT, Walker, need, nonNegative, positiveWhole, typeName } from './jsonFieldReader';
import { readFit, readGap, readMass, readSpin, readTensor, saysSecondChannel } from './readAnnotatedNumbers';

export { ANNOTATIONS_FORMAT };

/** The members of a recorded source and of the settings the reader knows. */
export const SOURCE_KEYS = ['path', 'role', 'sha256'] as const;
export const SETTINGS_KEYS = [
  'window_meV',
  'method',
  'range_eV',
  'degeneracy_meV',
  'forceSpinorbit',
  'alat_angstrom',
  'structureFile',
] as const;

function readSource(w: Walker, n: JsonNode, what: string): AnnotatedSource {
  const o = w.obj(n, what);
  const f = w.fields(o, SOURCE_KEYS);
  const sha = w.str(need(w, o, f.get('sha256'), `${what}.sha256`), `${what}.sha256`);
  const shaNode = f.get('sha256')!;
  if (!/^[0-9a-f]{64}$/.test(sha)) throw w.error(shaNode.at, `${what}.sha256 must be 64 lowercase hexadecimal digits (a SHA-256)`);
  return {
    path: w.str(need(w, o, f.get('path'), `${what}.path`), `${what}.path`),
    role: w.str(f.get('role'), `${what}.role`, 'unknown'),
    sha256: sha,
    extra: f.extra,
  };
}

function readSettings(w: Walker, n: JsonNode | undefined): AnnotatedSettings {
  if (n === undefined || n.type === 'null') {
    w.warnings.push('The file records no analysis settings: the defaults are assumed.');
    return { ...DEFAULT_SETTINGS, forceSpinorbit: false, alat_angstrom: null, structureFile: null, extra: emptyExtra() };
  }
  const o = w.obj(n, 'settings');
  const f = w.fields(o, SETTINGS_KEYS);
  const pos = (x: number): boolean => x > 0;
  const get = (k: 'window_meV' | 'range_eV' | 'degeneracy_meV', check: (x: number) => boolean, rule: string): number =>
    f.get(k) === undefined ? DEFAULT_SETTINGS[k] : w.num(f.get(k), `settings.${k}`, check, rule);
  return {
    window_meV: get('window_meV', pos, 'a positive number of meV'),
    method: w.str(f.get('method'), 'settings.method', DEFAULT_SETTINGS.method),
    range_eV: get('range_eV', nonNegative, 'zero or a positive number of eV'),
    degeneracy_meV: get('degeneracy_meV', nonNegative, 'zero or a positive number of meV'),
    forceSpinorbit: w.bool(f.get('forceSpinorbit'), 'settings.forceSpinorbit', false),
    alat_angstrom: w.numOrNull(f.get('alat_angstrom'), 'settings.alat_angstrom', pos, 'a positive length in Å'),
    structureFile: w.strOrNull(f.get('structureFile'), 'settings.structureFile'),
    extra: f.extra,
  };
}

/** The members of an entry the reader knows (others are kept as the entry's extra fields). */
export const ENTRY_KEYS = [
  'id',
  'status',
  'note',
  'found',
  'kind',
  'spin',
  'edgeBand',
  'band',
  'valley',
  'k',
  'label',
  'energy_eV',
  'offset_eV',
  'degenerateBands',
  'valleyDegeneracy',
  'masses',
  'tensor',
  'dosMass',
  'conductivityMass',
  'warnings',
  'fit',
];

/** What an entry's identity needs from the rest of the file. */
interface EntryContext {
  layout: number;
  spinPolarised: boolean;
  gap: AnnotatedGap | null;
}

function readEntry(w: Walker, n: JsonNode, what: string, ctx: EntryContext): AnnotatedEntry {
  const o = w.obj(n, what);
  const f = w.fields(o, ENTRY_KEYS);
  const kindNode = need(w, o, f.get('kind'), `${what}.kind`);
  const kind = w.str(kindNode, `${what}.kind`);
  if (!(EXTREMUM_KINDS as readonly string[]).includes(kind)) {
    throw w.error(kindNode.at, `${what}.kind must be one of ${EXTREMUM_KINDS.join(', ')}, found "${kind}"`);
  }
  const statusNode = f.get('status');
  const status = w.str(statusNode, `${what}.status`, 'unreviewed');
  const e: AnnotatedEntry = {
    id: '',
    status,
    note: w.str(f.get('note'), `${what}.note`, ''),
    found: w.bool(f.get('found'), `${what}.found`, true),
    kind: kind as ExtremumKind,
    spin: f.get('spin') === undefined ? 0 : readSpin(w, f.get('spin'), `${what}.spin`),
    // Layout 2 names the channel ("up"/"down") exactly when the entry belongs to a spin-polarised run.
    spinPolarised: ctx.layout < 2 ? ctx.spinPolarised : f.get('spin')?.type === 'string',
    band: w.num(need(w, o, f.get('band'), `${what}.band`), `${what}.band`, positiveWhole, 'a whole number of 1 or more'),
    edgeBand: null,
    k: w.vec3(need(w, o, f.get('k'), `${what}.k`), `${what}.k`),
    valley: [0, 0, 0],
    label: w.strOrNull(f.get('label'), `${what}.label`),
    energy_eV: w.num(need(w, o, f.get('energy_eV'), `${what}.energy_eV`), `${what}.energy_eV`),
    offset_eV: w.numOrNull(f.get('offset_eV'), `${what}.offset_eV`),
    degenerateBands: w.numOrNull(f.get('degenerateBands'), `${what}.degenerateBands`, positiveWhole, 'a whole number of 1 or more'),
    valleyDegeneracy: w.numOrNull(f.get('valleyDegeneracy'), `${what}.valleyDegeneracy`, positiveWhole, 'a whole number of 1 or more'),
    masses: w.list(f.get('masses'), `${what}.masses`).map((m, i) => readMass(w, m, `${what}.masses[${i}]`)),
    tensor: readTensor(w, f.get('tensor'), `${what}.tensor`),
    dosMass: w.numOrNull(f.get('dosMass'), `${what}.dosMass`),
    conductivityMass: w.numOrNull(f.get('conductivityMass'), `${what}.conductivityMass`),
    warnings: w.strings(f.get('warnings'), `${what}.warnings`),
    fit: readFit(w, f.get('fit'), `${what}.fit`),
    extra: f.extra,
  };
  // Layout 2 writes the band counted from the edge and the valley; layout 1 did not: derive them (from the
  // gap's edge bands, and the star of k under time reversal only, since the file keeps no symmetry).
  const edgeNode = f.get('edgeBand');
  e.edgeBand =
    edgeNode !== undefined
      ? w.numOrNull(edgeNode, `${what}.edgeBand`, positiveWhole, 'a whole number of 1 or more')
      : bandFromEdge(e.kind, e.band, ctx.gap ? ctx.gap.vbm.band : null, ctx.gap ? ctx.gap.cbm.band : null);
  const valleyNode = f.get('valley');
  e.valley = valleyNode !== undefined ? w.vec3(valleyNode, `${what}.valley`) : valleyRepresentative(e.k, null);
  // The id is derived from kind, spin, band from the edge and valley; a hand-edited id is replaced by the
  // derived one. A layout-1 id is recognised as such (it is migrated, not "hand-edited").
  e.id = entryId(e);
  const idNode = f.get('id');
  if (idNode !== undefined) {
    const written = w.str(idNode, `${what}.id`);
    const expected = ctx.layout < 2 ? layout1EntryId(e) : e.id;
    if (written !== expected)
      w.warnings.push(`${what}: the id "${written}" does not match the entry's other fields; it will be written as "${e.id}".`);
  }
  if (!(REVIEW_STATUSES as readonly string[]).includes(status)) {
    w.warnings.push(`${e.id}: the review status "${status}" is not one of ${REVIEW_STATUSES.join(', ')}; it is kept as written.`);
  }
  return e;
}

/** The top-level members the reader knows (others are kept as extra fields). */
export const TOP_KEYS = [
  'valleyscopeAnnotations',
  'toolVersion',
  'format',
  'spinPolarised',
  'sources',
  'settings',
  'metal',
  'gap',
  'note',
  'entries',
  'warnings',
  'cautions',
];

/**
 * Read an annotations file. `file` is used in messages only. Remarks that do not stop reading (an unknown
 * status, missing settings) are pushed to `warnings` when given.
 */
export function parseAnnotations(text: string, file: string, warnings: string[] = []): AnnotationsDoc {
  let root: JsonNode;
  try {
    root = parseJsonWithPositions(text);
  } catch (e) {
    if (e instanceof JsonSyntaxError) {
      throw new ReaderError(ANNOTATIONS_FORMAT, file, positionOf(text, e.offset), `not valid JSON: ${e.reason}`);
    }
    throw e;
  }
  const w = new Walker(text, file, warnings);
  if (root.type !== 'object') throw w.error(root.at, `an annotations file holds one JSON object, found ${typeName(root)}`);
  const f = w.fields(root, TOP_KEYS);
  const versionNode = f.get('valleyscopeAnnotations');
  if (versionNode === undefined) {
    throw w.error(root.at, 'this is not a Valleyscope annotations file (the key "valleyscopeAnnotations" is missing)');
  }
  const version = w.num(versionNode, 'valleyscopeAnnotations', positiveWhole, 'a whole number of 1 or more');
  if (version > ANNOTATIONS_LAYOUT_VERSION) {
    throw w.error(
      versionNode.at,
      `the file uses annotations layout ${version}, newer than layout ${ANNOTATIONS_LAYOUT_VERSION} that this version of Valleyscope reads; update Valleyscope rather than overwrite it`,
    );
  }
  const entryNodes = w.list(f.get('entries'), 'entries');
  const gap = readGap(w, f.get('gap'));
  const polarisedNode = f.get('spinPolarised');
  // Layout 1 did not say; a second spin channel anywhere in the file says it.
  const spinPolarised =
    polarisedNode !== undefined
      ? w.bool(polarisedNode, 'spinPolarised', false)
      : entryNodes.some((n) => n.type === 'object' && saysSecondChannel(n.members.find((m) => m.key === 'spin')?.value)) ||
        gap?.vbm.spin === 1 ||
        gap?.cbm.spin === 1;
  if (version < ANNOTATIONS_LAYOUT_VERSION) {
    w.warnings.push(
      `The file is in annotations layout ${version}: its entries are now identified by spin channel, valley and band counted from the edge (not the absolute band), and it will be written in layout ${ANNOTATIONS_LAYOUT_VERSION}.`,
    );
  }
  const entries = entryNodes.map((n, i) => readEntry(w, n, `entries[${i}]`, { layout: version, spinPolarised, gap }));
  const seen = new Map<string, number>();
  entries.forEach((e, i) => {
    const first = seen.get(e.id);
    if (first !== undefined) {
      const node = w.list(f.get('entries'), 'entries')[i]!;
      throw w.error(node.at, `entries[${i}] describes the same extremum as entries[${first}] (${e.id}); merge the two by hand`);
    }
    seen.set(e.id, i);
  });
  const metalNode = f.get('metal');
  return {
    layoutVersion: version,
    spinPolarised,
    toolVersion: w.str(f.get('toolVersion'), 'toolVersion', ''),
    format: w.str(f.get('format'), 'format', ''),
    sources: w.list(f.get('sources'), 'sources').map((n, i) => readSource(w, n, `sources[${i}]`)),
    settings: readSettings(w, f.get('settings')),
    metal: metalNode === undefined || metalNode.type === 'null' ? null : w.bool(metalNode, 'metal', false),
    gap,
    note: w.str(f.get('note'), 'note', ''),
    entries,
    warnings: w.strings(f.get('warnings'), 'warnings'),
    cautions: w.strings(f.get('cautions'), 'cautions'),
    extra: f.extra,
  };
}
