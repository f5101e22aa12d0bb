/**
 * How a VASP run computed its energies (bs.method) and whether it is a spinor run (bs.spinorbit), read from
 * an INCAR beside an EIGENVAL and from the <incar>/<parameters> of a vasprun.xml. The tags and their meaning
 * are VASP's (VASP manual: LHFCALC, HFSCREEN, AEXX, ALGO, METAGGA, GGA, LSORBIT, LNONCOLLINEAR; memory);
 * the "model:" SYSTEM prefix is Valleyscope's own convention for model data (DEVELOPERS.md).
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { vaspEigenvalReader } from '../../../../src/core/formats/vasp/eigenval';
import { vasprunReader } from '../../../../src/core/formats/vasp/vasprun';
import { vaspMethod } from '../../../../src/core/formats/vasp/vaspMethod';
import { readIncar } from '../../../../src/core/formats/vasp/incar';
import type { BandStructure } from '../../../../src/core/model';
import { collinearModel } from '../../../support/writers/roundTripModel';
import { modelSystemName, writeEigenval } from '../../../support/writers/vasp';
import { writeVasprun } from '../../../support/writers/vasprun';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const file = (path: string, text: string) => ({ path, bytes: enc(text) });
const model = collinearModel();

function eigenvalText(system: string, bs: BandStructure = model): string {
  return writeEigenval({
    system,
    nIons: 1,
    electrons: bs.electrons ?? 4,
    nBands: bs.nBands,
    kpoints: bs.kpoints,
    energies: bs.energies,
    occupations: bs.occupations as Float64Array[],
    lattice: bs.lattice!,
  });
}

function withIncar(incar: string | null, system = 'Xx bulk'): BandStructure {
  const companions = incar === null ? [] : [file('run/INCAR', incar)];
  return vaspEigenvalReader.read(file('run/EIGENVAL', eigenvalText(system)), companions, {});
}

describe('VASP method from the INCAR beside an EIGENVAL', () => {
  const cases: [string, string, string, string | null][] = [
    // [what, INCAR, family, name]
    [
      'HSE06 (HFSCREEN 0.2, AEXX 0.25: Krukau et al. 2006, memory)',
      'LHFCALC = .TRUE.\nHFSCREEN = 0.2\nAEXX = 0.25\nALGO = All\n',
      'hybrid',
      'HSE06',
    ],
    ['an unscreened hybrid with 25 % exchange', 'LHFCALC = T ; AEXX = 0.25', 'hybrid', 'PBE0-type (25 % exact exchange, unscreened)'],
    [
      'a hybrid with its own fraction',
      'LHFCALC = .TRUE.\nHFSCREEN = 0.2\nAEXX = 0.3 # tuned\n',
      'hybrid',
      'hybrid (30 % exact exchange, screened with 0.2 Å⁻¹)',
    ],
    ['G0W0', 'ALGO = G0W0\nNOMEGA = 50\nLHFCALC = .FALSE.\n', 'gw', 'G0W0'],
    ['partially self-consistent GW0', 'ALGO = EVGW0', 'gw', 'EVGW0'],
    ['QP self-consistent GW', '  algo = qpGW ! comment', 'gw', 'qpGW'],
    ['the low-scaling GW0R', 'ALGO = GW0R', 'gw', 'GW0R'],
    ['a meta-GGA', 'METAGGA = R2SCAN\nLASPH = .TRUE.\n', 'semilocal', 'meta-GGA R2SCAN'],
    ['PBEsol', 'GGA = PS', 'semilocal', 'PBEsol'],
    ['GGA+U', 'GGA = PE\nLDAU = .TRUE.\n', 'semilocal', 'PBE+U'],
    ['no functional tag (VASP default)', 'ISMEAR = 0\nSIGMA = 0.05\n', 'semilocal', null],
    ['ALGO = Exact is not GW', 'ALGO = Exact\nNBANDS = 64\n', 'semilocal', null],
    ['LHFCALC off with a stray HFSCREEN', 'LHFCALC = .FALSE.\nHFSCREEN = 0.2\n', 'semilocal', null],
  ];
  for (const [what, incar, family, name] of cases) {
    it(`${what} -> ${family}`, () => {
      const bs = withIncar(incar);
      assert.equal(bs.method?.family, family);
      assert.equal(bs.method?.name, name);
      assert.match(bs.method.evidence, /INCAR/);
      assert.ok(bs.source.files.some((f) => f.role === 'settings' && f.path === 'run/INCAR'));
    });
  }
  it('the evidence names the tag that decided', () => {
    assert.match(withIncar('LHFCALC = .TRUE.\nHFSCREEN = 0.2\n').method!.evidence, /LHFCALC = \.TRUE\., HFSCREEN = 0\.2/);
    assert.match(withIncar('ALGO = G0W0').method!.evidence, /ALGO = G0W0/);
    assert.match(withIncar('METAGGA = SCAN').method!.evidence, /METAGGA = SCAN/);
  });
  it('without an INCAR nothing says: unknown', () => {
    const bs = withIncar(null);
    assert.equal(bs.method?.family, 'unknown');
    assert.match(bs.method.evidence, /No INCAR/);
  });
  it('a SYSTEM line starting with "model:" marks model data, with or without an INCAR', () => {
    const sys = modelSystemName('cosine bands');
    assert.equal(withIncar(null, sys).method?.family, 'model');
    assert.equal(withIncar('LHFCALC = .TRUE.', sys).method?.family, 'model');
    assert.equal(withIncar(null, sys).method?.name, 'cosine bands');
    // Only a prefix counts: the word elsewhere in the name does not.
    assert.equal(withIncar(null, 'Xx tight-binding model: run 3').method?.family, 'unknown');
  });
  it('LNONCOLLINEAR or LSORBIT makes a spinor run (one electron per band)', () => {
    assert.equal(withIncar('LNONCOLLINEAR = .TRUE.').spinorbit, true);
    assert.equal(withIncar('LSORBIT = T').spinorbit, true);
    assert.equal(withIncar('LNONCOLLINEAR = .FALSE.; LSORBIT = .FALSE.').spinorbit, false);
    assert.equal(readIncar(file('INCAR', 'ISPIN = 2\n')).noncollinear, null);
  });
});

describe('VASP method from a vasprun.xml', () => {
  const read = (text: string): BandStructure => vasprunReader.read(file('vasprun.xml', text), [], {});
  it('reads the parameter list VASP wrote (the values it used)', () => {
    const hse = read(writeVasprun(model, { parameterTags: { GGA: '--', LHFCALC: 'T', HFSCREEN: '0.20000000', AEXX: '0.25000000' } }));
    assert.equal(hse.method?.family, 'hybrid');
    assert.equal(hse.method?.name, 'HSE06');
    assert.match(hse.method.evidence, /vasprun\.xml \(its parameter list\) sets LHFCALC/);
    const pbe = read(
      writeVasprun(model, { parameterTags: { GGA: '--', LHFCALC: 'F', HFSCREEN: '0.00000000', AEXX: '0.00000000', METAGGA: '--' } }),
    );
    assert.equal(pbe.method?.family, 'semilocal');
    assert.equal(pbe.method?.name, null);
    const scan = read(writeVasprun(model, { parameterTags: { GGA: '--', LHFCALC: 'F', METAGGA: 'SCAN' } }));
    assert.equal(scan.method?.name, 'meta-GGA SCAN');
  });
  it('a GW ALGO the user wrote in <incar> decides', () => {
    const gw = read(writeVasprun(model, { incarTags: { ALGO: 'EVGW0' }, parameterTags: { LHFCALC: 'F' } }));
    assert.equal(gw.method?.family, 'gw');
    assert.equal(gw.method?.name, 'EVGW0');
  });
  it('without a parameter list, the <incar> block is used', () => {
    const bs = read(writeVasprun(model, { noParameters: true, incarTags: { LHFCALC: '.TRUE.' } }));
    assert.equal(bs.method?.family, 'hybrid');
    assert.match(bs.method.evidence, /its <incar> block/);
  });
  it('LNONCOLLINEAR without LSORBIT is a spinor run', () => {
    const text = writeVasprun(model).replace('name="LNONCOLLINEAR"> F', 'name="LNONCOLLINEAR"> T');
    assert.equal(read(text).spinorbit, true);
    assert.equal(read(writeVasprun(model)).spinorbit, false);
  });
  it('the "model:" SYSTEM convention holds in vasprun.xml too', () => {
    const bs = read(writeVasprun(model, { system: modelSystemName('cosine bands') }));
    assert.equal(bs.method?.family, 'model');
  });
});

describe('the committed model fixtures are marked as model data', () => {
  const root = resolve(__dirname, '../../../..');
  for (const dir of ['fixtures/epm/si', 'fixtures/epm/si-cbm-grid', 'fixtures/demo/si-bulk']) {
    it(`${dir}/EIGENVAL -> family model`, () => {
      const bytes = new Uint8Array(readFileSync(join(root, dir, 'EIGENVAL')));
      const bs = vaspEigenvalReader.read({ path: `${dir}/EIGENVAL`, bytes }, [], {});
      assert.equal(bs.method?.family, 'model');
    });
  }
  it('fixtures/vasprun/vasprun.xml -> family model', () => {
    const bytes = new Uint8Array(readFileSync(join(root, 'fixtures/vasprun/vasprun.xml')));
    assert.equal(vasprunReader.read({ path: 'vasprun.xml', bytes }, [], {}).method?.family, 'model');
  });
  it('vaspMethod with no tags and no marker is unknown', () => {
    assert.equal(vaspMethod(null, 'x').family, 'unknown');
  });
});
