/**
 * The stable writer: the same document always gives the same bytes.
 * - keys in a fixed order (known keys first, in the order below; hand-added keys after them, as found);
 * - numbers with a fixed number of digits per quantity (numberFormat.ts);
 * - entries in a fixed order (kind, spin, band, k), whatever order they arrived in;
 * - two-space indent, short lists of numbers on one line, a newline at the end.
 * So re-writing unchanged results gives a byte-identical file and one changed mass a one-line diff.
 */
import type {
  AnnotatedEntry,
  AnnotatedGap,
  AnnotatedMass,
  AnnotatedPoint,
  AnnotatedSettings,
  AnnotatedSource,
  AnnotatedTensor,
  AnnotationsDoc,
  ExtraFields,
  JsonValue,
} from './annotationsModel';
import { EXTREMUM_KINDS, entryId, spinName } from './annotationsModel';
import { formatNumber, type NumberStyle } from './numberFormat';

/** A value on its way to text: numbers already formatted, objects as ordered key lists. */
type Out = { t: 'raw'; text: string } | { t: 'list'; items: Out[] } | { t: 'obj'; fields: [string, Out][] };

const raw = (text: string): Out => ({ t: 'raw', text });
const str = (s: string): Out => raw(JSON.stringify(s));
const bool = (b: boolean): Out => raw(b ? 'true' : 'false');
const NULL: Out = raw('null');
const num = (x: number, style: NumberStyle): Out => raw(formatNumber(x, style));
const numOrNull = (x: number | null, style: NumberStyle): Out => (x === null || !Number.isFinite(x) ? NULL : num(x, style));
const nums = (xs: readonly number[], style: NumberStyle): Out => ({ t: 'list', items: xs.map((x) => num(x, style)) });
const strs = (xs: readonly string[]): Out => ({ t: 'list', items: xs.map(str) });

function json(v: JsonValue): Out {
  if (v === null) return NULL;
  if (typeof v === 'boolean') return bool(v);
  if (typeof v === 'number') return Number.isFinite(v) ? num(v, 'plain') : NULL;
  if (typeof v === 'string') return str(v);
  if (Array.isArray(v)) return { t: 'list', items: v.map(json) };
  return { t: 'obj', fields: Object.keys(v).map((k) => [k, json(v[k]!)] as [string, Out]) };
}

function withExtra(fields: [string, Out][], extra: ExtraFields): Out {
  const known = new Set(fields.map((f) => f[0]));
  for (const k of Object.keys(extra)) if (!known.has(k)) fields.push([k, json(extra[k]!)]);
  return { t: 'obj', fields };
}

function sourceOut(s: AnnotatedSource): Out {
  return withExtra(
    [
      ['path', str(s.path)],
      ['role', str(s.role)],
      ['sha256', str(s.sha256)],
    ],
    s.extra,
  );
}

function settingsOut(s: AnnotatedSettings): Out {
  const fields: [string, Out][] = [
    ['window_meV', num(s.window_meV, 'plain')],
    ['method', str(s.method)],
    ['range_eV', num(s.range_eV, 'plain')],
    ['degeneracy_meV', num(s.degeneracy_meV, 'plain')],
    ['forceSpinorbit', bool(s.forceSpinorbit)],
  ];
  // Written only when used, so most files do not carry them.
  if (s.alat_angstrom !== null) fields.push(['alat_angstrom', num(s.alat_angstrom, 'plain')]);
  if (s.structureFile !== null) fields.push(['structureFile', str(s.structureFile)]);
  return withExtra(fields, s.extra);
}

/** The spin channel by name in a spin-polarised run; left out otherwise. */
function spinField(spin: number, spinPolarised: boolean): [string, Out][] {
  const name = spinName(spin, spinPolarised);
  return name ? [['spin', str(name)]] : [];
}

function pointOut(p: AnnotatedPoint, spinPolarised: boolean): Out {
  return {
    t: 'obj',
    fields: [
      ['band', num(p.band, 'plain')],
      ...spinField(p.spin, spinPolarised),
      ['k', nums(p.k, 'k')],
      ['label', p.label === null ? NULL : str(p.label)],
      ['energy_eV', num(p.energy_eV, 'energy')],
    ],
  };
}

function gapOut(g: AnnotatedGap | null, spinPolarised: boolean): Out {
  if (!g) return NULL;
  return withExtra(
    [
      ['eV', num(g.eV, 'energy')],
      ['direct', bool(g.direct)],
      ['vbm', pointOut(g.vbm, spinPolarised)],
      ['cbm', pointOut(g.cbm, spinPolarised)],
      [
        'directGap',
        {
          t: 'obj',
          fields: [
            ['eV', num(g.directGap.eV, 'energy')],
            ['k', nums(g.directGap.k, 'k')],
          ],
        },
      ],
    ],
    g.extra,
  );
}

function massOut(m: AnnotatedMass): Out {
  return withExtra(
    [
      ['towards', str(m.towards)],
      ['direction', nums(m.direction, 'unit')],
      ['mass', numOrNull(m.mass, 'mass')],
      ['stderr', numOrNull(m.stderr, 'stderr')],
      ['points', num(m.points, 'plain')],
      ['window_meV', num(m.window_meV, 'meV')],
      ['method', str(m.method)],
      ['alpha_per_eV', numOrNull(m.alpha_per_eV, 'mass')],
      ['residual_meV', numOrNull(m.residual_meV, 'residual')],
      ['branch', numOrNull(m.branch, 'plain')],
      ...(m.determined === null ? [] : [['determined', bool(m.determined)] as [string, Out]]),
      ['warnings', strs(m.warnings)],
    ],
    m.extra,
  );
}

function tensorOut(t: AnnotatedTensor | null): Out {
  if (!t) return NULL;
  return withExtra(
    [
      ['principal', nums(t.principal, 'mass')],
      ['stderr', t.stderr ? nums(t.stderr, 'stderr') : NULL],
      ['axes', { t: 'list', items: t.axes.map((row) => nums(row, 'unit')) }],
      ['method', str(t.method)],
      ['points', numOrNull(t.points, 'plain')],
      ['residual_meV', numOrNull(t.residual_meV, 'residual')],
    ],
    t.extra,
  );
}

function fitOut(f: NonNullable<AnnotatedEntry['fit']>): Out {
  return withExtra(
    [
      ['window_meV', num(f.window_meV, 'meV')],
      ['method', str(f.method)],
    ],
    f.extra,
  );
}

function entryOut(e: AnnotatedEntry): Out {
  return withExtra(
    [
      ['id', str(entryId(e))],
      ['status', str(e.status)],
      ['note', str(e.note)],
      ['found', bool(e.found)],
      ['kind', str(e.kind)],
      ...spinField(e.spin, e.spinPolarised),
      ['edgeBand', numOrNull(e.edgeBand, 'plain')],
      ['band', num(e.band, 'plain')],
      ['valley', nums(e.valley, 'k')],
      ['k', nums(e.k, 'k')],
      ['label', e.label === null ? NULL : str(e.label)],
      ['energy_eV', num(e.energy_eV, 'energy')],
      ['offset_eV', numOrNull(e.offset_eV, 'energy')],
      ['degenerateBands', numOrNull(e.degenerateBands, 'plain')],
      ['valleyDegeneracy', numOrNull(e.valleyDegeneracy, 'plain')],
      ['masses', { t: 'list', items: e.masses.map(massOut) }],
      ['tensor', tensorOut(e.tensor)],
      ['dosMass', numOrNull(e.dosMass, 'mass')],
      ['conductivityMass', numOrNull(e.conductivityMass, 'mass')],
      ['warnings', strs(e.warnings)],
      ...(e.fit === null ? [] : [['fit', fitOut(e.fit)] as [string, Out]]),
    ],
    e.extra,
  );
}

/**
 * Entry order: kind (vbm, cbm, valley, peak), spin, band counted from the edge (entries without one last),
 * then the valley and k component by component (as written).
 */
export function compareEntries(a: AnnotatedEntry, b: AnnotatedEntry): number {
  const ka = EXTREMUM_KINDS.indexOf(a.kind);
  const kb = EXTREMUM_KINDS.indexOf(b.kind);
  if (ka !== kb) return ka - kb;
  if (a.spin !== b.spin) return a.spin - b.spin;
  const ea = a.edgeBand ?? Number.MAX_SAFE_INTEGER;
  const eb = b.edgeBand ?? Number.MAX_SAFE_INTEGER;
  if (ea !== eb) return ea - eb;
  if (a.band !== b.band) return a.band - b.band;
  for (const key of ['valley', 'k'] as const) {
    for (let i = 0; i < 3; i++) {
      const x = Number(formatNumber(a[key][i]!, 'k'));
      const y = Number(formatNumber(b[key][i]!, 'k'));
      if (x !== y) return x - y;
    }
  }
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

export function sortEntries(entries: readonly AnnotatedEntry[]): AnnotatedEntry[] {
  return [...entries].sort(compareEntries);
}

function docOut(doc: AnnotationsDoc): Out {
  return withExtra(
    [
      ['valleyscopeAnnotations', num(doc.layoutVersion, 'plain')],
      ['toolVersion', str(doc.toolVersion)],
      ['format', str(doc.format)],
      ['spinPolarised', bool(doc.spinPolarised)],
      ['sources', { t: 'list', items: doc.sources.map(sourceOut) }],
      ['settings', settingsOut(doc.settings)],
      ['metal', doc.metal === null ? NULL : bool(doc.metal)],
      ['gap', gapOut(doc.gap, doc.spinPolarised)],
      ['note', str(doc.note)],
      ['entries', { t: 'list', items: sortEntries(doc.entries).map(entryOut) }],
      ['warnings', strs(doc.warnings)],
      ['cautions', strs(doc.cautions)],
    ],
    doc.extra,
  );
}

const isFlat = (o: Out): boolean => o.t === 'list' && o.items.every((x) => x.t === 'raw') && o.items.length <= 8;

function write(o: Out, indent: string, out: string[]): void {
  if (o.t === 'raw') {
    out.push(o.text);
    return;
  }
  if (o.t === 'list') {
    if (o.items.length === 0) {
      out.push('[]');
      return;
    }
    // A list of numbers (a k-point, a direction) stays on one line; a list of rows of numbers puts each
    // row on its own line.
    if (isFlat(o) && o.items.every((x) => x.t === 'raw' && !x.text.startsWith('"'))) {
      out.push(`[${o.items.map((x) => (x as { text: string }).text).join(', ')}]`);
      return;
    }
    const inner = indent + '  ';
    out.push('[\n');
    o.items.forEach((item, i) => {
      out.push(inner);
      write(item, inner, out);
      out.push(i < o.items.length - 1 ? ',\n' : '\n');
    });
    out.push(indent, ']');
    return;
  }
  if (o.fields.length === 0) {
    out.push('{}');
    return;
  }
  const inner = indent + '  ';
  out.push('{\n');
  o.fields.forEach(([key, value], i) => {
    out.push(inner, JSON.stringify(key), ': ');
    write(value, inner, out);
    out.push(i < o.fields.length - 1 ? ',\n' : '\n');
  });
  out.push(indent, '}');
}

/** The file's text: stable, two-space indented, ending with a newline. */
export function serializeAnnotations(doc: AnnotationsDoc): string {
  const out: string[] = [];
  write(docOut(doc), '', out);
  out.push('\n');
  return out.join('');
}
