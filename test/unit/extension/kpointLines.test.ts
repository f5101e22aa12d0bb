import assert from 'node:assert/strict';
import { kpointAtLine, lineNumbers, locateKpointLines } from '../../../src/extension/kpointLines';
import { loadSi } from './demoRun';
import { collinearModel } from '../../support/writers/roundTripModel';
import { writeCastepBands } from '../../support/writers/castep';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { readerById } from '../../../src/core/formats/index';
import { modelVasprun } from '../../support/unitModelVasprun';

describe('extension: k-point lines of a file', () => {
  it('finds the header line of every k-point of an EIGENVAL file, in order', async () => {
    const { bs, text } = await loadSi();
    const lines = text.split('\n');
    const kl = locateKpointLines(text, bs.kpoints, bs.nk);
    assert.equal(kl.length, bs.nk);
    // EIGENVAL layout (VASP, common practice): 6 header lines, then per k-point a blank line, the k line and
    // nBands band lines. (The second header line holds tiny numbers that read as a k-point at Γ.)
    for (let k = 0; k < bs.nk; k++) {
      assert.equal(kl[k], 6 + 1 + k * (bs.nBands + 2), `k-point ${k + 1}`);
      const nums = lines[kl[k]!]!.trim().split(/\s+/).map(Number);
      assert.ok(Math.abs(nums[0]! - bs.kpoints[3 * k]!) < 1e-6);
    }
    for (let k = 0; k < bs.nk; k += 37) assert.equal(kpointAtLine(kl, kl[k]!), k);
    assert.equal(kpointAtLine(kl, kl[5]! + 1), -1, 'a band line is not a k-point line');
  });

  it('works for XML and CASTEP-like layouts, where the k-point is not the first number', () => {
    const k = Float64Array.from([0, 0, 0, 0.5, 0, 0.5, 0.5, 0.25, 0.75]);
    const xml = [
      '<kpoints>',
      ' <varray name="kpointlist" >',
      '  <v>       0.00000000       0.00000000       0.00000000 </v>',
      '  <v>       0.50000000       0.00000000       0.50000000 </v>',
      '  <v>       0.50000000       0.25000000       0.75000000 </v>',
      ' </varray>',
    ].join('\n');
    assert.deepEqual(Array.from(locateKpointLines(xml, k, 3)), [2, 3, 4]);
    const castep = [
      'Number of k-points   3',
      'K-point    1  0.00000000  0.00000000  0.00000000  0.33333333',
      '  -0.2',
      'K-point    2  0.50000000  0.00000000  0.50000000  0.33333333',
      '  -0.1',
      'K-point    3  0.50000000  0.25000000  0.75000000  0.33333333',
    ].join('\r\n');
    assert.deepEqual(Array.from(locateKpointLines(castep, k, 3)), [1, 3, 5]);
  });

  it('marks k-points it cannot find (and all after them) with -1', () => {
    const k = Float64Array.from([0, 0, 0, 0.3, 0.3, 0.3, 0.5, 0.5, 0.5]);
    const t = '0 0 0\n0.5 0.5 0.5\n';
    assert.deepEqual(Array.from(locateKpointLines(t, k, 3)), [0, -1, -1]);
  });

  it('reads Fortran D exponents as numbers', () => {
    const out: number[] = [];
    const s = ' 0.5D+00  1.0d-01 x ';
    lineNumbers(s, 0, s.length, out);
    assert.equal(out[0], 0.5);
    assert.equal(out[1], 0.1);
    assert.ok(Number.isNaN(out[2]!));
  });

  it('in vasprun.xml and CASTEP .bands written by the test writers, every k-point is found on its own line', () => {
    const model = collinearModel();
    const vasprun = modelVasprun(model);
    const cases: [string, string, string, RegExp][] = [
      // vasprun.xml lists the path corners (Γ first) before the k-point list: Γ must come from the list.
      ['vasprun-xml', 'vasprun.xml', vasprun, /^\s*<v>/],
      ['castep-bands', 'model.bands', writeCastepBands(model, {}), /^K-point\s+\d+\s/],
    ];
    for (const [id, name, text, shape] of cases) {
      const bs = readerById(id)!.read({ path: name, bytes: new TextEncoder().encode(text) }, [], {});
      const kl = locateKpointLines(text, bs.kpoints, bs.nk);
      const lines = text.split('\n');
      for (let k = 0; k < bs.nk; k++) {
        assert.ok(kl[k]! >= 0, `${id}: k-point ${k + 1} found`);
        assert.match(lines[kl[k]!]!, shape, `${id}: k-point ${k + 1}`);
        if (k > 0) assert.ok(kl[k]! > kl[k - 1]!, `${id}: in order`);
      }
      if (id === 'vasprun-xml') {
        const list = lines.findIndex((l) => l.includes('kpointlist'));
        assert.equal(kl[0], list + 1, 'Γ is the first line of the k-point list, not the generation block');
      }
    }
  });

  it('in Quantum ESPRESSO layouts (cartesian k in 2π/alat), finds every k-point from the cartesian k and a factor read from the file', () => {
    const model = collinearModel();
    // alat 3.7 Å is not a lattice constant of the model (4, 5, 6 Å): the factor alat/2π must come from the file.
    const alat = 3.7;
    const xml = writeQeXml(model, { alat });
    const bandsx = writeBandsx(model, alat);
    const enc = (t: string) => new TextEncoder().encode(t);
    const fromXml = readerById('qe-xml')!.read({ path: 'data-file-schema.xml', bytes: enc(xml) }, [], {});
    const fromBands = readerById('qe-bands')!.read({ path: 'si.bands.dat', bytes: enc(bandsx) }, [{ path: 'si.xml', bytes: enc(xml) }], {});
    const cases: [string, typeof fromXml, string, RegExp][] = [
      ['pw.x XML', fromXml, xml, /<k_point\b/],
      ['bands.x', fromBands, bandsx, /^\s*-?\d+\.\d+\s+-?\d+\.\d+\s+-?\d+\.\d+\s*$/],
    ];
    for (const [name, bs, text, shape] of cases) {
      const g = pathGeometry(bs);
      assert.ok(g.cartesian, `${name}: lattice known`);
      const kl = locateKpointLines(text, bs.kpoints, bs.nk, g.cartesian);
      const lines = text.split('\n');
      for (let k = 0; k < bs.nk; k++) {
        assert.ok(kl[k]! >= 0, `${name}: k-point ${k + 1} found`);
        assert.match(lines[kl[k]!]!, shape, `${name}: k-point ${k + 1}`);
        if (k > 0) assert.ok(kl[k]! > kl[k - 1]!, `${name}: in order`);
      }
      // Without the cartesian k only the first leg (where the written numbers happen to equal fractional ones,
      // if at all) could be found.
      const fractionalOnly = locateKpointLines(text, bs.kpoints, bs.nk);
      assert.ok(fractionalOnly[bs.nk - 1]! < 0, `${name}: fractional coordinates alone do not find the last k-point`);
    }
  });
});
