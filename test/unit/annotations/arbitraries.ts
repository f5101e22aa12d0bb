/**
 * fast-check generators of annotations documents, for property tests of the writer, the reader and the
 * schema. The numbers are arbitrary (they test the file layout, not physics).
 */
import fc from 'fast-check';
import {
  ANNOTATIONS_LAYOUT_VERSION,
  EXTREMUM_KINDS,
  REVIEW_STATUSES,
  emptyExtra,
  entryId,
  type AnnotatedEntry,
  type AnnotatedMass,
  type AnnotatedTensor,
  type AnnotationsDoc,
  type ExtraFields,
  type JsonValue,
} from '../../../src/core/annotations/annotationsModel';
import type { Vec3 } from '../../../src/core/model';
import { ENTRY_KEYS, SETTINGS_KEYS, SOURCE_KEYS, TOP_KEYS } from '../../../src/core/annotations/parseAnnotations';
import { GAP_KEYS, MASS_KEYS, POINT_KEYS, TENSOR_KEYS } from '../../../src/core/annotations/readAnnotatedNumbers';

const finite = (min: number, max: number): fc.Arbitrary<number> => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });
const vec3 = (min: number, max: number): fc.Arbitrary<Vec3> => fc.tuple(finite(min, max), finite(min, max), finite(min, max));
const text = fc.string({ maxLength: 30, unit: 'grapheme' });
const hex64 = fc.stringMatching(/^[0-9a-f]{64}$/);

/** Hand-added fields, with keys the program does not use (including awkward ones). */
const KNOWN = new Set<string>([
  ...TOP_KEYS,
  ...ENTRY_KEYS,
  ...SOURCE_KEYS,
  ...SETTINGS_KEYS,
  ...MASS_KEYS,
  ...POINT_KEYS,
  ...GAP_KEYS,
  ...TENSOR_KEYS,
]);
const extraKey = fc
  .oneof(fc.string({ minLength: 1, maxLength: 12 }), fc.constantFrom('__proto__', 'constructor', 'reviewer', 'x-ticket'))
  .filter((k) => !KNOWN.has(k));
const jsonLeaf: fc.Arbitrary<JsonValue> = fc.oneof(fc.constant(null), fc.boolean(), fc.integer(), finite(-1e6, 1e6), text);
const jsonValue: fc.Arbitrary<JsonValue> = fc.letrec<{ v: JsonValue }>((tie) => ({
  v: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    jsonLeaf,
    fc.array(tie('v'), { maxLength: 3 }),
    fc.uniqueArray(fc.tuple(extraKey, tie('v')), { maxLength: 3, selector: (t) => t[0] }).map((pairs) => {
      const o = emptyExtra();
      for (const [k, v] of pairs) o[k] = v;
      return o;
    }),
  ),
})).v;
export const extraArb: fc.Arbitrary<ExtraFields> = fc
  .uniqueArray(fc.tuple(extraKey, jsonValue), { maxLength: 2, selector: (t) => t[0] })
  .map((pairs) => {
    const o = emptyExtra();
    for (const [k, v] of pairs) o[k] = v;
    return o;
  });

const massArb: fc.Arbitrary<AnnotatedMass> = fc.record({
  towards: fc.constantFrom('X', 'L', 'Γ', 'K', '(0.5, 0.25, 0)'),
  direction: vec3(-1, 1),
  mass: fc.option(fc.oneof(finite(-50, -0.001), finite(0.001, 50)), { nil: null }),
  stderr: fc.option(finite(0, 1), { nil: null }),
  points: fc.integer({ min: 0, max: 40 }),
  window_meV: finite(0, 500),
  method: fc.constantFrom('parabola', 'central-2', 'central-4', 'poly4', 'kane'),
  alpha_per_eV: fc.option(finite(-5, 5), { nil: null }),
  residual_meV: fc.option(finite(0, 20), { nil: null }),
  branch: fc.option(fc.integer({ min: 1, max: 4 }), { nil: null }),
  determined: fc.option(fc.boolean(), { nil: null }),
  warnings: fc.array(text, { maxLength: 2 }),
  extra: extraArb,
});

const tensorArb: fc.Arbitrary<AnnotatedTensor> = fc.record({
  principal: vec3(-20, 20),
  stderr: fc.option(vec3(0, 1), { nil: null }),
  axes: fc.tuple(vec3(-1, 1), vec3(-1, 1), vec3(-1, 1)),
  method: fc.constantFrom('grid fit', 'from directional masses'),
  points: fc.option(fc.integer({ min: 0, max: 200 }), { nil: null }),
  residual_meV: fc.option(finite(0, 20), { nil: null }),
  extra: extraArb,
});

export const entryArb: fc.Arbitrary<AnnotatedEntry> = fc
  .record({
    status: fc.oneof(fc.constantFrom(...REVIEW_STATUSES), text),
    note: text,
    found: fc.boolean(),
    kind: fc.constantFrom(...EXTREMUM_KINDS),
    spin: fc.constantFrom(0 as const, 1 as const),
    spinPolarised: fc.boolean(),
    band: fc.integer({ min: 1, max: 200 }),
    edgeBand: fc.option(fc.integer({ min: 1, max: 8 }), { nil: null }),
    k: vec3(-1, 1),
    valley: vec3(-0.5, 0.5),
    label: fc.option(fc.constantFrom('Γ', 'X', 'L', 'K|U'), { nil: null }),
    energy_eV: finite(-30, 30),
    offset_eV: fc.option(finite(0, 2), { nil: null }),
    degenerateBands: fc.option(fc.integer({ min: 1, max: 6 }), { nil: null }),
    valleyDegeneracy: fc.option(fc.integer({ min: 1, max: 48 }), { nil: null }),
    masses: fc.array(massArb, { maxLength: 3 }),
    tensor: fc.option(tensorArb, { nil: null }),
    dosMass: fc.option(finite(0.001, 50), { nil: null }),
    conductivityMass: fc.option(finite(0.001, 50), { nil: null }),
    fit: fc.option(
      fc.record({ window_meV: finite(1, 500), method: fc.constantFrom('parabola', 'central-2', 'poly4', 'kane'), extra: extraArb }),
      { nil: null },
    ),
    warnings: fc.array(text, { maxLength: 2 }),
    extra: extraArb,
  })
  // A run with one spin channel has only channel 0.
  .map((e) => ({ ...e, spin: e.spinPolarised ? e.spin : (0 as const) }))
  .map((e) => ({ ...e, id: entryId(e) }));

export const docArb: fc.Arbitrary<AnnotationsDoc> = fc
  .record({
    toolVersion: fc.constantFrom('0.1.0', '0.2.0-dev'),
    format: fc.constantFrom('vasp-eigenval', 'qe-xml', 'castep-bands'),
    sources: fc.array(
      fc.record({
        path: fc.constantFrom('EIGENVAL', 'POSCAR', 'KPOINTS', 'sub/x.dat'),
        role: fc.constantFrom('eigenvalues', 'structure', 'kpath'),
        sha256: hex64,
        extra: extraArb,
      }),
      { maxLength: 3 },
    ),
    settings: fc.record({
      window_meV: fc.constantFrom(10, 25, 12.5, 100),
      method: fc.constantFrom('parabola', 'kane'),
      range_eV: fc.constantFrom(0, 0.5, 0.25),
      degeneracy_meV: fc.constantFrom(1, 0.5),
      forceSpinorbit: fc.boolean(),
      alat_angstrom: fc.option(fc.constantFrom(5.431, 10.26), { nil: null }),
      structureFile: fc.option(fc.constantFrom('POSCAR.given', '../shared/si.vasp'), { nil: null }),
      extra: extraArb,
    }),
    metal: fc.option(fc.boolean(), { nil: null }),
    gap: fc.option(
      fc.record({
        eV: finite(0, 10),
        direct: fc.boolean(),
        vbm: fc.record({
          band: fc.integer({ min: 1, max: 50 }),
          spin: fc.constantFrom(0 as const, 1 as const),
          k: vec3(-1, 1),
          energy_eV: finite(-5, 5),
          label: fc.option(fc.constantFrom('Γ', 'X'), { nil: null }),
        }),
        cbm: fc.record({
          band: fc.integer({ min: 1, max: 50 }),
          spin: fc.constantFrom(0 as const, 1 as const),
          k: vec3(-1, 1),
          energy_eV: finite(-5, 5),
          label: fc.option(fc.constantFrom('Γ', 'X'), { nil: null }),
        }),
        directGap: fc.record({ eV: finite(0, 10), k: vec3(-1, 1) }),
        extra: extraArb,
      }),
      { nil: null },
    ),
    note: text,
    spinPolarised: fc.boolean(),
    entries: fc.uniqueArray(entryArb, { maxLength: 4, selector: (e) => e.id }),
    warnings: fc.array(text, { maxLength: 2 }),
    cautions: fc.array(text, { maxLength: 2 }),
    extra: extraArb,
  })
  .map((d) => ({ layoutVersion: ANNOTATIONS_LAYOUT_VERSION, ...d }))
  // The gap's channels are named only in spin-polarised runs.
  .map((d) => {
    const gap =
      d.gap && !d.spinPolarised ? { ...d.gap, vbm: { ...d.gap.vbm, spin: 0 as const }, cbm: { ...d.gap.cbm, spin: 0 as const } } : d.gap;
    return { ...d, gap };
  });

/** Fixed seed and bounded runs in the suite; VALLEYSCOPE_FUZZ_RUNS raises the count for a longer local run. */
export function fuzzParams(defaultRuns: number): { seed: number; numRuns: number } {
  const env = Number(process.env.VALLEYSCOPE_FUZZ_RUNS);
  return { seed: 20261201, numRuns: Number.isFinite(env) && env > 0 ? env : defaultRuns };
}

/** Mocha timeout for suites with property tests: none for a long local run. */
export function fuzzTimeout(): number {
  return process.env.VALLEYSCOPE_FUZZ_RUNS ? 0 : 20000;
}
