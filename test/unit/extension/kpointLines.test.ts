import assert from 'node:assert/strict';
import { kpointAtLine, lineNumbers, locateKpointLines } from '../../../src/extension/kpointLines';
import { loadSi } from './demoRun';
import { collinearModel } from '../../support/writers/roundTripModel';
import { writeVasprun } from '../../support/writers/vasprun';
import { writeCastepBands } from '../../support/writers/castep';
import { readerById } from '../../../src/core/formats/index';

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
    const xml = ['<kpoints>', ' <varray name="kpointlist" >', '  <v>       0.00000000       0.00000000       0.00000000 </v>', '  <v>       0.50000000       0.00000000       0.50000000 </v>', '  <v>       0.50000000       0.25000000       0.75000000 </v>', ' </varray>'].join('\n');
    assert.deepEqual(Array.from(locateKpointLines(xml, k, 3)), [2, 3, 4]);
    const castep = ['Number of k-points   3', 'K-point    1  0.00000000  0.00000000  0.00000000  0.33333333', '  -0.2', 'K-point    2  0.50000000  0.00000000  0.50000000  0.33333333', '  -0.1', 'K-point    3  0.50000000  0.25000000  0.75000000  0.33333333'].join('\r\n');
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
    const vasprun = writeVasprun(model, { generation: { divisions: 21, ends: [[0, 0, 0], [0.5, 0, 0], [0.5, 0, 0], [0.5, 0.5, 0]] } });
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
});
