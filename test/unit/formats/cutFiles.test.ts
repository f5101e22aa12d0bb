/**
 * Files cut at any byte (a job still writing, a copy interrupted), read with allowPartial: either a reader
 * error (nothing complete yet) or the complete k-points before the cut, marked partial, each exactly as the
 * whole file gives it (a value cut inside its digits is never kept). Data: the fixtures of each layout
 * (fixtures/epm/si: Cohen & Bergstresser's Si model in VASP's EIGENVAL; fixtures/castep/si.bands;
 * fixtures/qe/si.bands.dat, fixtures/wannier90/si_band.dat).
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readEigenval } from '../../../src/core/formats/vasp/eigenvalScan';
import { readCastepBands } from '../../../src/core/formats/castep';
import { readBandsx } from '../../../src/core/formats/qe/bandsx';
import { readBandDat } from '../../../src/core/formats/wannier90';
import { ReaderError } from '../../../src/core/errors';

interface Read {
  nk: number;
  partial: boolean;
  kpoints: Float64Array;
  energies: Float64Array[];
}
type Reader = (f: { path: string; bytes: Uint8Array }, o: { allowPartial?: boolean }) => Read;

const root = join(__dirname, '../../..');
const layouts: [string, string, Reader][] = [
  ['VASP EIGENVAL', 'fixtures/epm/si/EIGENVAL', readEigenval as unknown as Reader],
  ['CASTEP .bands', 'fixtures/castep/si.bands', readCastepBands as unknown as Reader],
  [
    'pw.x bands.x',
    'fixtures/qe/si.bands.dat',
    ((f, o) => {
      const d = readBandsx(f, o);
      return { nk: d.nk, partial: d.partial, kpoints: d.kCartesian, energies: [d.energies] };
    }) as Reader,
  ],
];

describe('files cut at any byte, read with allowPartial', () => {
  it('Wannier90 _band.dat (band after band): the complete bands before the cut, each point exactly as in the whole file', () => {
    const path = 'fixtures/wannier90/si_band.dat';
    const bytes = readFileSync(join(root, path));
    const whole = readBandDat({ path, bytes });
    let kept = 0;
    for (let at = Math.floor(bytes.length * 0.05); at < bytes.length - 1; at += 997) {
      let d;
      try {
        d = readBandDat({ path, bytes: bytes.subarray(0, at) }, { allowPartial: true });
      } catch (e) {
        assert.ok(e instanceof ReaderError, `cut at byte ${at}: ${String(e)}`);
        continue;
      }
      kept++;
      assert.equal(d.partial, true, `cut at byte ${at}`);
      assert.equal(d.nk, whole.nk);
      assert.ok(d.nBands < whole.nBands);
      for (let k = 0; k < d.nk; k++)
        for (let b = 0; b < d.nBands; b++)
          assert.equal(
            d.energies[k * d.nBands + b],
            whole.energies[k * whole.nBands + b],
            `cut at byte ${at}: point ${k + 1}, band ${b + 1}`,
          );
    }
    assert.ok(kept > 3, `${kept} cuts gave partial data`);
  });

  it('Wannier90 _band.dat without its final newline: whole when the last line is as wide as the others, partial when it is cut inside a number', () => {
    // Wannier90 writes every line of the band file in one fixed format (common practice), so a last line as
    // wide as the one before ends on a whole number; the fixture is the reference.
    const path = 'fixtures/wannier90/si_band.dat';
    const text = readFileSync(join(root, path), 'utf8');
    const whole = readBandDat({ path, bytes: Buffer.from(text) });
    const trimmed = text.replace(/\s+$/, '');
    const complete = readBandDat({ path, bytes: Buffer.from(trimmed) }, { allowPartial: true });
    assert.equal(complete.partial, false);
    assert.equal(complete.nBands, whole.nBands);
    assert.deepEqual(complete.energies, whole.energies);
    // Cut inside the last energy's digits: that band is dropped, the rest kept and marked partial.
    const cut = readBandDat({ path, bytes: Buffer.from(trimmed.slice(0, -4)) }, { allowPartial: true });
    assert.equal(cut.partial, true);
    assert.equal(cut.nBands, whole.nBands - 1);
  });

  for (const [name, path, read] of layouts) {
    it(`${name}: the k-points kept are the whole file's own, the rest left out and the data marked partial`, () => {
      const bytes = readFileSync(join(root, path));
      const whole = read({ path, bytes }, {});
      const nb = whole.energies[0]!.length / whole.nk;
      let kept = 0;
      // Cuts spread over the file, at offsets that fall inside lines of every kind.
      for (let at = Math.floor(bytes.length * 0.05); at < bytes.length - 1; at += 997) {
        let d: Read;
        try {
          d = read({ path, bytes: bytes.subarray(0, at) }, { allowPartial: true });
        } catch (e) {
          assert.ok(e instanceof ReaderError, `cut at byte ${at}: ${String(e)}`);
          continue;
        }
        kept++;
        assert.equal(d.partial, true, `cut at byte ${at}`);
        assert.ok(d.nk < whole.nk);
        for (let k = 0; k < d.nk; k++) {
          // The same k-point as in the whole file (the kept ones come in index order)...
          let j = -1;
          for (let q = 0; q < whole.nk && j < 0; q++) if ([0, 1, 2].every((c) => whole.kpoints[3 * q + c] === d.kpoints[3 * k + c])) j = q;
          assert.ok(j >= 0, `cut at byte ${at}: k-point ${k + 1} is not one of the file's`);
          // ...with exactly its energies.
          for (let b = 0; b < nb; b++)
            assert.equal(d.energies[0]![k * nb + b], whole.energies[0]![j * nb + b], `cut at byte ${at}: k-point ${k + 1}, band ${b + 1}`);
        }
      }
      assert.ok(kept > 10, `${kept} cuts gave partial data`);
    });
  }
});
