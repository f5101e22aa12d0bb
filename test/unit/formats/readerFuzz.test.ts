/**
 * Property tests: every reader of this set fed mutated and truncated versions of a valid file (fixed seed,
 * bounded runs). Each read ends in a typed error (ReaderError / ValleyscopeError) or a band structure whose
 * arrays agree with its counts and hold finite numbers, within a time bound; nothing else, never a hang.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { ValleyscopeError } from '../../../src/core/errors';
import type { BandStructure } from '../../../src/core/model';
import type { FormatReader } from '../../../src/core/formats/types';
import type { InputFile } from '../../../src/core/io/fileAccessor';
import { qeXmlReader } from '../../../src/core/formats/qe/qeXml';
import { bandsxReader } from '../../../src/core/formats/qe/bandsx';
import { vasprunReader } from '../../../src/core/formats/vasp/vasprun';
import { wannier90BandReader } from '../../../src/core/formats/wannier90';
import { bxsfReader } from '../../../src/core/formats/bxsf';
import { castepBandsReader } from '../../../src/core/formats/castep';
import { collinearModel, spinPolarisedModel } from '../../support/writers/roundTripModel';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { writeVasprun } from '../../support/writers/vasprun';
import { kpointsOptBlock, withKpointsOpt } from '../../support/writers/vasprunKpointsOpt';
import { writeWannier90 } from '../../support/writers/wannier90';
import { writeBxsf } from '../../support/writers/bxsf';
import { writeCastepBands } from '../../support/writers/castep';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';

const SEED = Number(process.env.VS_FUZZ_SEED ?? 20261201);
const RUNS = Number(process.env.VS_FUZZ_RUNS ?? 60);
/** Generous bound for one small file (the samples are a few kB): a hang or a runaway loop exceeds it. */
const TIME_BOUND_MS = 2000;

function small(): BandStructure {
  const m = collinearModel();
  // Keep the first 12 k-points: small files keep the fuzzing fast.
  const nk = 12;
  return {
    ...m,
    nk,
    kpoints: m.kpoints.slice(0, 3 * nk),
    energies: m.energies.map((e) => e.slice(0, nk * m.nBands)),
    occupations: m.occupations!.map((e) => e.slice(0, nk * m.nBands)),
    labels: m.labels.filter((l) => l.index < nk),
  };
}

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const model = small();
const sp = spinPolarisedModel();
const w90 = writeWannier90(model, { fermiEnergy: 0.6 });
const grid = (() => {
  const n = 3;
  const bands = [new Float64Array(27).map((_, i) => -1 - (i % 5) * 0.1), new Float64Array(27).map((_, i) => 1 + (i % 7) * 0.1)];
  return writeBxsf({ fermiEnergy: 0, dims: [n, n, n], reciprocal: reciprocalLattice(model.lattice!), bands });
})();

const SAMPLES: { reader: FormatReader; name: string; text: string; companions?: InputFile[] }[] = [
  { reader: qeXmlReader, name: 'data-file-schema.xml', text: writeQeXml(model, { alat: 4 }) },
  {
    reader: qeXmlReader,
    name: 'sp.xml',
    text: writeQeXml(
      { ...sp, nk: 4, kpoints: sp.kpoints.slice(0, 12), energies: sp.energies.map((e) => e.slice(0, 12)), occupations: null },
      { alat: 4 },
    ),
  },
  { reader: bandsxReader, name: 'bands.out', text: writeBandsx(model, 4) },
  { reader: vasprunReader, name: 'vasprun.xml', text: writeVasprun(model) },
  {
    // VASP 6: a KPOINTS_OPT set (energy-only rows) after the ordinary eigenvalues, with its <dos_kpoints_opt>.
    reader: vasprunReader,
    name: 'opt.vasprun.xml',
    text: withKpointsOpt(
      writeVasprun(model),
      kpointsOptBlock({
        kpoints: [0, 1, 2, 3].map((k) => Array.from(model.kpoints.subarray(3 * k, 3 * k + 3))),
        nSpin: 1,
        energies: (_, k) => Array.from(model.energies[0]!.subarray(k * model.nBands, (k + 1) * model.nBands)),
        dosEfermi: 0.5,
      }),
      'after',
    ),
  },
  {
    reader: wannier90BandReader,
    name: 'm_band.dat',
    text: w90.bandDat,
    companions: [
      { path: 'm_band.kpt', bytes: enc(w90.kpt) },
      { path: 'm.win', bytes: enc(w90.win) },
    ],
  },
  { reader: bxsfReader, name: 'g.bxsf', text: grid },
  { reader: castepBandsReader, name: 'm.bands', text: writeCastepBands(model) },
];

/** The shape a band structure must have, whatever the input. */
function checkValid(bs: BandStructure): void {
  assert.ok(bs.nk >= 1 && bs.nBands >= 1);
  assert.equal(bs.kpoints.length, 3 * bs.nk);
  assert.equal(bs.energies.length, bs.nSpin);
  for (const e of bs.energies) {
    assert.equal(e.length, bs.nk * bs.nBands);
    for (let i = 0; i < e.length; i++) assert.ok(Number.isFinite(e[i]!), 'finite energies');
  }
  for (let i = 0; i < bs.kpoints.length; i++) assert.ok(Number.isFinite(bs.kpoints[i]!), 'finite k');
  if (bs.occupations) for (const o of bs.occupations) assert.equal(o.length, bs.nk * bs.nBands);
  if (bs.lattice) for (const r of bs.lattice) for (const x of r) assert.ok(Number.isFinite(x));
}

type Mutation =
  | { kind: 'truncate'; at: number }
  | { kind: 'replace'; at: number; len: number; junk: string }
  | { kind: 'insert'; at: number; junk: string }
  | { kind: 'dropLine'; line: number }
  | { kind: 'duplicateLine'; line: number }
  | { kind: 'crlf' }
  | { kind: 'bom' };

const junkText = fc.oneof(
  fc.constantFrom(
    '*******',
    'NaN',
    '-Infinity',
    '1e999',
    '<',
    '>',
    '&amp;',
    '&foo;',
    '<!DOCTYPE x [<!ENTITY a "b">]>',
    '</',
    '\u0000\u0001',
    '\n\n',
    ' ',
    '-',
    '.',
    'e',
    '0',
    '99999999',
    '-1',
    '<r>1 2 3</r>',
    'K-point',
    'BAND: 9',
  ),
  fc.string({ maxLength: 12 }),
);

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('replace' as const), at: fc.nat(), len: fc.integer({ min: 1, max: 8 }), junk: junkText }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), junk: junkText }),
  fc.record({ kind: fc.constant('dropLine' as const), line: fc.nat() }),
  fc.record({ kind: fc.constant('duplicateLine' as const), line: fc.nat() }),
  fc.constant({ kind: 'crlf' as const }),
  fc.constant({ kind: 'bom' as const }),
);

function apply(text: string, m: Mutation): string {
  const at = (n: number): number => n % (text.length + 1);
  switch (m.kind) {
    case 'truncate':
      return text.slice(0, at(m.at));
    case 'replace':
      return text.slice(0, at(m.at)) + m.junk + text.slice(at(m.at) + m.len);
    case 'insert':
      return text.slice(0, at(m.at)) + m.junk + text.slice(at(m.at));
    case 'dropLine': {
      const lines = text.split('\n');
      lines.splice(m.line % lines.length, 1);
      return lines.join('\n');
    }
    case 'duplicateLine': {
      const lines = text.split('\n');
      const i = m.line % lines.length;
      lines.splice(i, 0, lines[i]!);
      return lines.join('\n');
    }
    case 'crlf':
      return text.replace(/\n/g, '\r\n');
    case 'bom':
      return '\uFEFF' + text;
  }
}

describe('reader property tests: mutated and truncated inputs end in a typed error or a valid structure', () => {
  for (const s of SAMPLES) {
    it(`${s.reader.id} (${s.name}): the unmutated sample reads`, () => {
      checkValid(s.reader.read({ path: s.name, bytes: enc(s.text) }, s.companions ?? [], {}));
    });
    for (const allowPartial of [false, true]) {
      it(`${s.reader.id} (${s.name})${allowPartial ? ' with allowPartial' : ''}: ${RUNS} mutated inputs`, () => {
        let errors = 0;
        let valid = 0;
        fc.assert(
          fc.property(fc.array(mutation, { minLength: 1, maxLength: 3 }), (ms) => {
            const text = ms.reduce(apply, s.text);
            const t0 = performance.now();
            try {
              checkValid(s.reader.read({ path: s.name, bytes: enc(text) }, s.companions ?? [], { allowPartial }));
              valid++;
            } catch (e) {
              if (!(e instanceof ValleyscopeError))
                throw new Error(`not a typed error: ${String(e)} (${(e as Error)?.stack?.split('\n')[1] ?? ''})`);
              assert.ok(e.message.length > 10 && !/\n\s+at /.test(e.message), 'one sentence, no stack trace');
              errors++;
            }
            const dt = performance.now() - t0;
            assert.ok(dt < TIME_BOUND_MS, `read took ${dt.toFixed(0)} ms`);
          }),
          { seed: SEED, numRuns: RUNS },
        );
        assert.ok(errors + valid === RUNS);
      });
    }
  }
});
