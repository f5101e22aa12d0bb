/**
 * The numbers of an annotated extremum as the annotations file writes them: its point (spin, band, k, energy),
 * the gap, each directional mass with its fit, the mass tensor and the fit a reviewer chose. Each read checks
 * type and range and refuses with the line and column (jsonFieldReader.ts).
 */
import type { Mat3 } from '../model';
import type { AnnotatedEntry, AnnotatedGap, AnnotatedMass, AnnotatedPoint, AnnotatedTensor } from './annotationsModel';
import type { JsonNode } from './jsonWithPositions';
import { isWhole, need, nonNegative, positiveWhole, type Walker } from './jsonFieldReader';

/** The members of a point, the gap and a tensor the reader knows. */
export const POINT_KEYS = ['band', 'spin', 'k', 'label', 'energy_eV'] as const;
export const GAP_KEYS = ['eV', 'direct', 'vbm', 'cbm', 'directGap'] as const;
export const TENSOR_KEYS = ['principal', 'stderr', 'axes', 'method', 'points', 'residual_meV'] as const;

/** A spin channel: "up"/"down" (layout 2, spin-polarised runs) or 0/1 (layout 1). */
export function readSpin(w: Walker, n: JsonNode | undefined, what: string): 0 | 1 {
  if (n !== undefined && n.type === 'string') {
    if (n.value === 'up') return 0;
    if (n.value === 'down') return 1;
    throw w.error(n.at, `${what} must be "up" or "down", found "${n.value}"`);
  }
  if (n !== undefined && n.type === 'null') return 0;
  return w.num(n, what, (x) => x === 0 || x === 1, '"up", "down", 0 or 1') as 0 | 1;
}

/** Whether a spin field was written at all, and as a layout-1 number 1 (a second channel). */
export const saysSecondChannel = (n: JsonNode | undefined): boolean =>
  n !== undefined && ((n.type === 'number' && n.value === 1) || (n.type === 'string' && n.value === 'down'));

function readPoint(w: Walker, n: JsonNode, what: string): AnnotatedPoint {
  const o = w.obj(n, what);
  const f = w.fields(o, POINT_KEYS);
  return {
    band: w.num(need(w, o, f.get('band'), `${what}.band`), `${what}.band`, positiveWhole, 'a whole number of 1 or more'),
    spin: f.get('spin') === undefined ? 0 : readSpin(w, f.get('spin'), `${what}.spin`),
    k: w.vec3(need(w, o, f.get('k'), `${what}.k`), `${what}.k`),
    label: w.strOrNull(f.get('label'), `${what}.label`),
    energy_eV: w.num(need(w, o, f.get('energy_eV'), `${what}.energy_eV`), `${what}.energy_eV`),
  };
}

export function readGap(w: Walker, n: JsonNode | undefined): AnnotatedGap | null {
  if (n === undefined || n.type === 'null') return null;
  const o = w.obj(n, 'gap');
  const f = w.fields(o, GAP_KEYS);
  const dgNode = need(w, o, f.get('directGap'), 'gap.directGap');
  const dg = w.obj(dgNode, 'gap.directGap');
  const dgf = w.fields(dg, ['eV', 'k']);
  return {
    eV: w.num(need(w, o, f.get('eV'), 'gap.eV'), 'gap.eV'),
    direct: w.bool(f.get('direct'), 'gap.direct', false),
    vbm: readPoint(w, need(w, o, f.get('vbm'), 'gap.vbm'), 'gap.vbm'),
    cbm: readPoint(w, need(w, o, f.get('cbm'), 'gap.cbm'), 'gap.cbm'),
    directGap: {
      eV: w.num(need(w, dg, dgf.get('eV'), 'gap.directGap.eV'), 'gap.directGap.eV'),
      k: w.vec3(need(w, dg, dgf.get('k'), 'gap.directGap.k'), 'gap.directGap.k'),
    },
    extra: f.extra,
  };
}

/** The members of a directional mass the reader knows. */
export const MASS_KEYS = [
  'towards',
  'direction',
  'mass',
  'stderr',
  'points',
  'window_meV',
  'method',
  'alpha_per_eV',
  'residual_meV',
  'branch',
  'determined',
  'warnings',
];

export function readMass(w: Walker, n: JsonNode, what: string): AnnotatedMass {
  const o = w.obj(n, what);
  const f = w.fields(o, MASS_KEYS);
  return {
    towards: w.str(f.get('towards'), `${what}.towards`, ''),
    direction: w.vec3(need(w, o, f.get('direction'), `${what}.direction`), `${what}.direction`),
    mass: w.numOrNull(f.get('mass'), `${what}.mass`),
    stderr: w.numOrNull(f.get('stderr'), `${what}.stderr`, nonNegative, 'zero or positive'),
    points: w.num(need(w, o, f.get('points'), `${what}.points`), `${what}.points`, (x) => isWhole(x) && x >= 0, 'a whole number'),
    window_meV: w.num(need(w, o, f.get('window_meV'), `${what}.window_meV`), `${what}.window_meV`, nonNegative, 'zero or positive'),
    method: w.str(need(w, o, f.get('method'), `${what}.method`), `${what}.method`),
    alpha_per_eV: w.numOrNull(f.get('alpha_per_eV'), `${what}.alpha_per_eV`),
    residual_meV: w.numOrNull(f.get('residual_meV'), `${what}.residual_meV`, nonNegative, 'zero or positive'),
    branch: w.numOrNull(f.get('branch'), `${what}.branch`, positiveWhole, 'a whole number of 1 or more'),
    determined:
      f.get('determined') === undefined || f.get('determined')!.type === 'null'
        ? null
        : w.bool(f.get('determined'), `${what}.determined`, true),
    warnings: w.strings(f.get('warnings'), `${what}.warnings`),
    extra: f.extra,
  };
}

export function readTensor(w: Walker, n: JsonNode | undefined, what: string): AnnotatedTensor | null {
  if (n === undefined || n.type === 'null') return null;
  const o = w.obj(n, what);
  const f = w.fields(o, TENSOR_KEYS);
  const axesNode = need(w, o, f.get('axes'), `${what}.axes`);
  const rows = w.list(axesNode, `${what}.axes`);
  if (rows.length !== 3) throw w.error(axesNode.at, `${what}.axes must hold three rows, found ${rows.length}`);
  return {
    principal: w.vec3(need(w, o, f.get('principal'), `${what}.principal`), `${what}.principal`),
    stderr: f.get('stderr') === undefined || f.get('stderr')!.type === 'null' ? null : w.vec3(f.get('stderr'), `${what}.stderr`),
    axes: rows.map((r, i) => w.vec3(r, `${what}.axes[${i}]`)) as Mat3,
    method: w.str(need(w, o, f.get('method'), `${what}.method`), `${what}.method`),
    points: w.numOrNull(f.get('points'), `${what}.points`, (x) => isWhole(x) && x >= 0, 'a whole number'),
    residual_meV: w.numOrNull(f.get('residual_meV'), `${what}.residual_meV`, nonNegative, 'zero or positive'),
    extra: f.extra,
  };
}

/** A reviewer's fit settings for one entry; null when absent. The window must be a positive number of meV. */
export function readFit(w: Walker, n: JsonNode | undefined, what: string): AnnotatedEntry['fit'] {
  if (n === undefined || n.type === 'null') return null;
  const o = w.obj(n, what);
  const f = w.fields(o, ['window_meV', 'method']);
  return {
    window_meV: w.num(
      need(w, o, f.get('window_meV'), `${what}.window_meV`),
      `${what}.window_meV`,
      (x) => x > 0 && x <= 1e5,
      'a positive number of meV',
    ),
    method: w.str(need(w, o, f.get('method'), `${what}.method`), `${what}.method`),
    extra: f.extra,
  };
}
