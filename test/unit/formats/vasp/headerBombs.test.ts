/**
 * Header bombs in the VASP band files: counts that claim far more than the file holds (2e9 bands, 3e8 atoms,
 * 2e9 k-points). Each read ends in a ReaderError sentence (never a RangeError, an "internal error" or a V8
 * abort) or in valid data, and nothing is allocated in proportion to the claimed count: the peak resident
 * memory of this process (process.resourceUsage().maxRSS, a high-water mark) grows by less than 200 MiB per
 * case, where honouring the claim would take gigabytes.
 */
import assert from 'node:assert/strict';
import { ReaderError, ValleyscopeError } from '../../../../src/core/errors';
import { readEigenval } from '../../../../src/core/formats/vasp/eigenvalScan';
import { VasprunStream, vasprunReader } from '../../../../src/core/formats/vasp/vasprun';
import type { InputFile } from '../../../../src/core/io/fileAccessor';
import { collinearModel, spinPolarisedModel } from '../../../support/writers/roundTripModel';
import { writeEigenval } from '../../../support/writers/vasp';
import { writeVasprun } from '../../../support/writers/vasprun';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const model = collinearModel();
const MiB = 2 ** 20;

function eigenvalText(): string {
  return writeEigenval({
    system: 'bomb',
    nIons: 1,
    electrons: 4,
    nBands: model.nBands,
    kpoints: model.kpoints,
    energies: model.energies,
    occupations: model.occupations as Float64Array[],
    lattice: model.lattice!,
  });
}

/** Run `fn`; it must throw a ReaderError matching `reason` (or return), with bounded peak memory. */
function bounded(fn: () => unknown, reason: RegExp | null): void {
  const peakBefore = process.resourceUsage().maxRSS * 1024;
  let error: unknown = null;
  try {
    fn();
  } catch (e) {
    error = e;
  }
  const grown = process.resourceUsage().maxRSS * 1024 - peakBefore;
  assert.ok(grown < 200 * MiB, `peak memory grew by ${(grown / MiB).toFixed(0)} MiB`);
  if (reason === null) {
    assert.ok(error === null || error instanceof ValleyscopeError, `a typed error or data, got ${String(error)}`);
    return;
  }
  assert.ok(error instanceof ReaderError, `a ReaderError, got ${String(error)}`);
  assert.match(error.reason, reason);
}

describe('EIGENVAL header bombs', () => {
  const text = eigenvalText();
  const lines = text.split('\n');
  const counts = lines[5]!.trim().split(/\s+/);
  const withCounts = (nelect: string, nk: string, nb: string): InputFile => {
    const l = lines.slice();
    l[5] = `  ${nelect}  ${nk}  ${nb}`;
    return { path: 'EIGENVAL', bytes: enc(l.join('\n')) };
  };
  it('2e9 bands: refused at the header line, nothing allocated for them', () => {
    bounded(() => readEigenval(withCounts(counts[0]!, counts[1]!, '2000000000')), /announces 2000000000 bands.*cannot hold one k-point/);
    try {
      readEigenval(withCounts(counts[0]!, counts[1]!, '2000000000'));
    } catch (e) {
      assert.equal((e as ReaderError).line, 6);
    }
  });
  it('1e30 bands with two spins: refused the same way', () => {
    const l = lines.slice();
    l[0] = l[0]!.replace(/1\s*$/, '2');
    l[5] = `  4  ${counts[1]}  1000000000000000000000000000000`;
    bounded(() => readEigenval({ path: 'EIGENVAL', bytes: enc(l.join('\n')) }), /bands/);
  });
  it('2e9 k-points: the file ends early (a sentence), or with allowPartial the k-points it holds', () => {
    bounded(() => readEigenval(withCounts(counts[0]!, '2000000000', counts[2]!)), /ends after \d+ of 2000000000 k-points/);
    const partial = readEigenval(withCounts(counts[0]!, '2000000000', counts[2]!), { allowPartial: true });
    assert.equal(partial.nk, model.nk);
    assert.equal(partial.partial, true);
  });
  it('3e8 ions on the first line: not used for any allocation', () => {
    const l = lines.slice();
    l[0] = `300000000 300000000    1    1`;
    bounded(() => readEigenval({ path: 'EIGENVAL', bytes: enc(l.join('\n')) }), null);
  });
});

describe('vasprun.xml header bombs', () => {
  const text = writeVasprun(model);
  const nbandsTag = /<i type="int" name="NBANDS">\s*\d+<\/i>/;
  it('NBANDS = 2e9: refused where the eigenvalues start, with the sizes that disagree', () => {
    const bomb = text.replace(nbandsTag, '<i type="int" name="NBANDS">2000000000</i>');
    bounded(
      () => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bomb) }, [], {}),
      /NBANDS = 2000000000 .* more than a file of \d+ bytes can hold/,
    );
    const line = bomb.slice(0, bomb.indexOf('<eigenvalues>')).split('\n').length;
    try {
      vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bomb) }, [], {});
    } catch (e) {
      assert.equal((e as ReaderError).line, line, 'the line of <eigenvalues>');
    }
  });
  it('NBANDS = 2e9 and ISPIN = 2, streamed without a known size: the buffers grow with the data only', () => {
    const sp = writeVasprun(spinPolarisedModel()).replace(nbandsTag, '<i type="int" name="NBANDS">2000000000</i>');
    const bytes = enc(sp);
    bounded(() => {
      const s = new VasprunStream('vasprun.xml');
      for (let i = 0; i < bytes.length; i += 4096) s.write(bytes.subarray(i, Math.min(bytes.length, i + 4096)), i + 4096 >= bytes.length);
      const d = s.finish(false);
      // The rows decide the band count (the analytic model's three bands).
      assert.equal(d.nBands, model.nBands);
    }, null);
  });
  it('NBANDS written as 1e30 or as junk: no allocation from it', () => {
    for (const v of ['1000000000000000000000000000000', '-5', 'lots']) {
      const bomb = text.replace(nbandsTag, `<i type="int" name="NBANDS">${v}</i>`);
      bounded(() => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bomb) }, [], {}), v.startsWith('1') ? /NBANDS/ : null);
    }
  });
  it('3e8 atoms in <atominfo> and 2e9 line-mode divisions: counts that are not used to allocate', () => {
    const bomb = writeVasprun(model, {
      generation: {
        divisions: 21,
        ends: [
          [0, 0, 0],
          [0.5, 0, 0],
        ],
      },
    })
      .replace(/<atoms>\s*\d+\s*<\/atoms>/, '<atoms> 300000000 </atoms>')
      .replace(/<i name="divisions" type="int">\s*\d+ <\/i>/, '<i name="divisions" type="int">2000000000 </i>');
    bounded(() => {
      const bs = vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bomb) }, [], {});
      assert.equal(bs.structure?.species.length, 1);
    }, null);
  });
});
