/**
 * The readers for pw.x XML, bands.x, vasprun.xml, Wannier90, CASTEP: detection by content, hostile XML,
 * files cut short (running jobs), layout details (ionic steps, projected blocks, k-point order), located
 * sentences for bad values.
 */
import assert from 'node:assert/strict';
import { ReaderError } from '../../../src/core/errors';
import { detectFormat } from '../../../src/core/formats/index';
import { readFromBytes } from '../../../src/core/load';
import { qeXmlReader, readQeXml } from '../../../src/core/formats/qe/qeXml';
import { bandsxReader } from '../../../src/core/formats/qe/bandsx';
import { vasprunReader, VasprunStream } from '../../../src/core/formats/vasp/vasprun';
import { wannier90BandReader } from '../../../src/core/formats/wannier90';
import { castepBandsReader } from '../../../src/core/formats/castep';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import type { Mat3 } from '../../../src/core/model';
import { BOHR_ANGSTROM, HARTREE_EV } from '../../../src/core/units';
import { collinearModel, spinPolarisedModel } from '../../support/writers/roundTripModel';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { writeVasprun } from '../../support/writers/vasprun';
import { writeWannier90 } from '../../support/writers/wannier90';
import { writeCastepBands } from '../../support/writers/castep';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const f = (path: string, text: string) => ({ path, bytes: enc(text) });
const model = collinearModel();

function throwsReader(fn: () => unknown, reason: RegExp, minLine = 0): void {
  assert.throws(fn, (e: unknown) => {
    assert.ok(e instanceof ReaderError, `a ReaderError, got ${String(e)}`);
    assert.match(e.reason, reason);
    assert.ok(e.line >= minLine, `line ${e.line} >= ${minLine}`);
    return true;
  });
}

describe('detection by content', () => {
  const w = writeWannier90(model, { fermiEnergy: 0.6 });
  const samples: [string, string, string][] = [
    ['qe-xml', 'anything.txt', writeQeXml(model, { alat: 4 })],
    ['qe-bands', 'anything.txt', writeBandsx(model, 4)],
    ['vasprun-xml', 'anything.txt', writeVasprun(model)],
    ['castep-bands', 'anything.txt', writeCastepBands(model)],
    ['wannier90-band', 'seed_band.dat', w.bandDat],
  ];
  for (const [id, name, text] of samples) {
    it(`${id} is recognised from its content`, () => {
      assert.equal(detectFormat(enc(text).subarray(0, 8192), name)?.reader.id, id);
    });
  }
});

describe('XML safety (vasprun.xml and pw.x XML)', () => {
  it('refuses a DOCTYPE with an entity expansion bomb, naming the line', () => {
    throwsReader(() => vasprunReader.read(f('vasprun.xml', writeVasprun(model, { doctype: true })), [], {}), /document type/, 2);
    const qe = writeQeXml(model, { alat: 4 }).replace(
      '<qes:espresso',
      '<!DOCTYPE q [<!ENTITY x SYSTEM "file:///etc/passwd">]>\n<qes:espresso',
    );
    throwsReader(() => qeXmlReader.read(f('pw.xml', qe), [], {}), /document type/, 2);
  });
  it('refuses undefined entities and deep nesting', () => {
    const ent = writeVasprun(model).replace('<i name="NELECT">', '<i name="NELECT">&x;');
    throwsReader(() => vasprunReader.read(f('vasprun.xml', ent), [], {}), /malformed/);
    const deep = `<?xml version="1.0"?>\n<modeling>${'<a>'.repeat(200)}${'</a>'.repeat(200)}</modeling>\n`;
    throwsReader(() => vasprunReader.read(f('vasprun.xml', deep), [], {}), /nests elements/);
  });
});

describe('vasprun.xml', () => {
  it('keeps the eigenvalues of the last ionic step, ignores <projected>, reads NELECT, efermi, final structure', () => {
    const text = writeVasprun(model, { earlierStepShift: 3, projected: true });
    const bs = vasprunReader.read(f('vasprun.xml', text), [], {});
    assert.equal(bs.electrons, 4);
    assert.equal(bs.fermiEnergy, 0.6);
    // f10.4 in the file: 0.1 meV rounding (the layout's).
    for (let i = 0; i < bs.energies[0]!.length; i++) assert.ok(Math.abs(bs.energies[0]![i]! - model.energies[0]![i]!) <= 5.1e-5);
    assert.deepEqual(bs.structure?.species, ['Xx']);
  });
  it('a file cut inside the eigenvalues: an error naming the end, or with allowPartial the last complete step marked partial', () => {
    const text = writeVasprun(model, { earlierStepShift: 3, truncateInEigenvaluesAfterK: 10 });
    throwsReader(() => vasprunReader.read(f('vasprun.xml', text), [], {}), /truncated, or the run is still writing it/, 10);
    const bs = vasprunReader.read(f('vasprun.xml', text), [], { allowPartial: true });
    assert.equal(bs.partial, true);
    assert.ok(Math.abs(bs.energies[0]![0]! - (model.energies[0]![0]! + 3)) < 1e-4, 'the earlier, complete step');
    const first = writeVasprun(model, { truncateInEigenvaluesAfterK: 10 });
    throwsReader(() => vasprunReader.read(f('vasprun.xml', first), [], { allowPartial: true }), /before the first eigenvalues/);
  });
  it('streams: fed in 7-byte pieces, the result equals the one-piece read', () => {
    const bytes = enc(writeVasprun(spinPolarisedModel()));
    const s = new VasprunStream('vasprun.xml');
    for (let i = 0; i < bytes.length; i += 7) s.write(bytes.subarray(i, Math.min(bytes.length, i + 7)), i + 7 >= bytes.length);
    const d = s.finish(false);
    const whole = vasprunReader.read({ path: 'vasprun.xml', bytes }, [], {});
    assert.equal(d.nSpin, 2);
    assert.deepEqual(d.energies[1], whole.energies[1]);
  });
  it('names an overflow field', () => {
    const text = writeVasprun(model).replace(/<r>\s*\S+/, '<r>**********');
    throwsReader(() => vasprunReader.read(f('vasprun.xml', text), [], {}), /overflowed/, 20);
  });
});

describe('pw.x XML data file', () => {
  it('converts units once: cell Bohr → Å, energies Hartree → eV, k cartesian 2π/alat → fractional', () => {
    const d = readQeXml(f('pw.xml', writeQeXml(model, { alat: 4, homo: true })));
    assert.ok(Math.abs(d.alat - 4) < 1e-12);
    assert.ok(Math.abs(d.lattice[1][1] - 5) < 1e-12);
    assert.ok(Math.abs(d.energies[0]![5]! - model.energies[0]![5]!) < 1e-12);
    assert.ok(Math.abs(d.kpoints[3 * 10]! - model.kpoints[3 * 10]!) < 1e-12);
    assert.equal(d.fermiSource, 'highestOccupiedLevel');
    // CODATA 2018 constants (units.ts): 1 Bohr = 0.529177210903 Å, 1 Ha = 27.211386245988 eV.
    assert.equal(BOHR_ANGSTROM, 0.529177210903);
    assert.equal(HARTREE_EV, 27.211386245988);
  });
  it('lists the symmetry operations and cross-checks them against the symmetry library', async () => {
    await ensureSymmetryReady();
    const id: Mat3 = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    const mirrors: Mat3[] = [
      id,
      [
        [-1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
      [
        [1, 0, 0],
        [0, -1, 0],
        [0, 0, 1],
      ],
      [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, -1],
      ],
    ];
    // One atom in an orthorhombic cell: point group mmm, 8 operations (International Tables, Vol. A).
    const all = readQeXml(f('pw.xml', writeQeXml(model, { alat: 4, symmetries: mirrors })));
    assert.equal(all.symmetries.length, 4);
    assert.deepEqual(all.symmetries[1]!.rotation, mirrors[1]);
    // The reader reports what pw.x lists; the check against the structure runs after reading (load.ts).
    const listed = qeXmlReader.read(f('pw.xml', writeQeXml(model, { alat: 4, symmetries: mirrors })), [], {});
    assert.equal(listed.listedRotations?.length, 4);
    assert.ok(!listed.warnings.some((w) => w.code.startsWith('symmetry-')), 'the reader itself does not analyse');
    const sub = await readFromBytes(qeXmlReader, f('pw.xml', writeQeXml(model, { alat: 4, symmetries: mirrors })), [], {});
    assert.ok(
      sub.warnings.some((w) => w.code === 'symmetry-subgroup'),
      'four of eight: a subgroup',
    );
    const wrong: Mat3 = [
      [0, 1, 0],
      [1, 0, 0],
      [0, 0, 1],
    ]; // swaps a and b: not a symmetry of a 4 × 5 × 6 cell
    const bad = await readFromBytes(qeXmlReader, f('pw.xml', writeQeXml(model, { alat: 4, symmetries: [id, wrong] })), [], {});
    assert.ok(bad.warnings.some((w) => w.code === 'symmetry-mismatch'));
  });
  it('a cut file: error with the line, or partial with allowPartial', () => {
    const text = writeQeXml(model, { alat: 4, truncateAfterK: 30 });
    throwsReader(() => qeXmlReader.read(f('pw.xml', text), [], {}), /truncated/, 50);
    const bs = qeXmlReader.read(f('pw.xml', text), [], { allowPartial: true });
    assert.equal(bs.partial, true);
    assert.equal(bs.nk, 30);
  });
  it('a <ks_energies> block with two <k_point> or without eigenvalues is named', () => {
    const text = writeQeXml(model, { alat: 4 });
    const twice = text.replace(/(<k_point weight="[^"]*">[^<]*<\/k_point>)/, '$1$1');
    throwsReader(() => qeXmlReader.read(f('pw.xml', twice), [], {}), /exactly one <k_point>/, 30);
    const noEig = text.replace(/<eigenvalues size="3">[^<]*<\/eigenvalues>/, '');
    throwsReader(() => qeXmlReader.read(f('pw.xml', noEig), [], {}), /has no eigenvalues/, 30);
  });
  it('refuses files of the layout before 6.2 with a sentence', () => {
    throwsReader(() => qeXmlReader.read(f('old.xml', '<?xml version="1.0"?>\n<Root>\n</Root>\n'), [], {}), /versions before 6.2/, 1);
  });
});

describe('bands.x output', () => {
  it('names an overflow field and a wrong count', () => {
    const text = writeBandsx(model, 4).replace(/\n(\s+-?\d+\.\d{3})/, '\n*********');
    throwsReader(() => bandsxReader.read(f('b.out', text), [], {}), /overflowed/, 2);
    const more = writeBandsx(model, 4).replace('nbnd=   3', 'nbnd=   4');
    throwsReader(() => bandsxReader.read(f('b.out', more), [], {}), /k-point|energy/, 2);
  });
});

describe('Wannier90 band.dat', () => {
  it('without .kpt: written distances are the path; k-points placed between labelled points', () => {
    const w = writeWannier90(model, { fermiEnergy: 0.6, bohr: true });
    const bs = wannier90BandReader.read(f('m_band.dat', w.bandDat), [f('m_band.labelinfo.dat', w.labelinfo), f('m.win', w.win)], {});
    assert.ok(bs.writtenDistance);
    assert.ok(bs.warnings.some((x) => x.code === 'no-kpt'));
    for (let i = 0; i < bs.nk * 3; i++) assert.ok(Math.abs(bs.kpoints[i]! - model.kpoints[i]!) < 1e-6);
    // unit_cell_cart in Bohr converted to Å (CODATA 2018 Bohr radius).
    assert.ok(Math.abs(bs.lattice![2][2] - 6) < 1e-7);
    assert.deepEqual(bs.labels.map((l) => l.label).slice(0, 2), ['Γ', 'X']);
  });
  it('the closing blank line: optional after a last band as long as the first, required after a lone band', () => {
    const two =
      '  0.00000000E+00 -0.10000000E+01\n  0.10000000E+00 -0.90000000E+00\n  \n  0.00000000E+00  0.10000000E+01\n  0.10000000E+00  0.11000000E+01\n';
    assert.equal(wannier90BandReader.read(f('m_band.dat', two), [], {}).nBands, 2);
    throwsReader(
      () => wannier90BandReader.read(f('m_band.dat', '  0.00000000E+00 -0.10000000E+01\n  0.10000000E+00 -0.90000000E+00\n'), [], {}),
      /truncated/,
      2,
    );
  });
  it('a band with fewer points than the first is named', () => {
    const w = writeWannier90(model, {});
    const lines = w.bandDat.split('\n');
    lines.splice(3, 1);
    throwsReader(() => wannier90BandReader.read(f('m_band.dat', lines.join('\n')), [], {}), /band 1|band 2|points/);
  });
});

describe('CASTEP .bands', () => {
  it('puts k-points written out of order back in index order; converts Hartree and Bohr', () => {
    const order = [...Array(model.nk).keys()].sort((a, b) => ((a * 7) % 11) - ((b * 7) % 11) || a - b);
    const bs = castepBandsReader.read(f('m.bands', writeCastepBands(model, { order })), [], {});
    for (let i = 0; i < bs.nk * 3; i++) assert.ok(Math.abs(bs.kpoints[i]! - model.kpoints[i]!) < 1e-8);
    for (let i = 0; i < bs.energies[0]!.length; i++) assert.ok(Math.abs(bs.energies[0]![i]! - model.energies[0]![i]!) < 1e-6);
    assert.ok(Math.abs(bs.lattice![0][0] - 4) < 1e-5);
  });
  it('a repeated k-point and a missing header line are named', () => {
    const text = writeCastepBands(model).replace('K-point    2', 'K-point    1');
    throwsReader(() => castepBandsReader.read(f('m.bands', text), [], {}), /appears twice/, 10);
    throwsReader(
      () => castepBandsReader.read(f('m.bands', writeCastepBands(model).replace('Unit cell vectors', 'Cell')), [], {}),
      /Unit cell vectors/,
      6,
    );
  });
});

describe('XML number scanning', () => {
  it('agrees with the runtime number parser on fixed, exponent and Fortran forms; refuses junk', async () => {
    const fc = (await import('fast-check')).default;
    const { scanNumbers } = await import('../../../src/core/formats/numbers');
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.integer({ min: 0, max: 15 }), (x, d) => {
        for (const t of [
          x.toFixed(Math.min(d, 10)),
          x.toExponential(d),
          x.toExponential(d).replace('e', 'E'),
          x.toExponential(d).replace('e', 'D'),
        ]) {
          const out = [0];
          const r = scanNumbers(`  ${t} `, out, 0, 1);
          assert.equal(r.bad, null, t);
          assert.equal(r.count, 1);
          // Same double as the runtime's correctly rounded parse (ECMAScript Number), D read as E.
          assert.equal(out[0], Number(t.replace('D', 'e')), t);
        }
      }),
      { seed: 42, numRuns: 300 },
    );
    for (const bad of ['NaN', 'Infinity', '****', '1.0x', '0x10', '--1', '1e', '.'])
      assert.notEqual(scanNumbers(bad, [0], 0, 1).bad, null, bad);
  });
});
