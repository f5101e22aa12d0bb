/**
 * An EIGENVAL cut inside a k-point block (a job still writing, a copy cut short) opens, when the caller allows
 * partial data, as the complete k-points before the cut, marked partial; a damaged band line in the middle is
 * blamed on that line. Data: fixtures/epm/si/EIGENVAL (Si, empirical pseudopotential model of Cohen &
 * Bergstresser, Phys. Rev. 141, 789 (1966); 400 k-points, 12 bands, VASP's layout: 6 header lines, then per
 * k-point a blank line, the k-point line and one line per band (common practice, VASP's documented layout)).
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readEigenval } from '../../../../src/core/formats/vasp/eigenvalScan';
import { ReaderError } from '../../../../src/core/errors';

const TEXT = readFileSync(join(__dirname, '../../../../fixtures/epm/si/EIGENVAL'), 'utf8');
const LINES = TEXT.split('\n');
const NB = 12;
/** 0-based line index of the k-point line of k-point k (0-based): 6 header lines, then blocks of a blank line, the k-point line and NB band lines. */
const kLine = (k: number): number => 6 + k * (NB + 2) + 1;
const file = (text: string) => ({ path: 'EIGENVAL', bytes: new TextEncoder().encode(text) });

describe('EIGENVAL cut inside a k-point block', () => {
  it('the fixture has the layout the cuts below assume', () => {
    assert.equal(LINES[5]!.trim().split(/\s+/).map(Number)[1], 400);
    assert.equal(LINES[kLine(1) + 1]!.trim().split(/\s+/)[0], '1');
    assert.equal(LINES[kLine(1) + NB]!.trim().split(/\s+/)[0], String(NB));
  });

  const whole = readEigenval(file(TEXT));
  // 217 k-points complete, the 218th cut in several ways.
  const cuts: [string, string][] = [
    ['inside a band line (mid-number)', LINES.slice(0, kLine(217) + 6).join('\n') + '\n' + LINES[kLine(217) + 6]!.slice(0, 14)],
    ['after a whole band line', LINES.slice(0, kLine(217) + 6).join('\n') + '\n'],
    ['inside the k-point line', LINES.slice(0, kLine(217)).join('\n') + '\n' + LINES[kLine(217)]!.slice(0, 20)],
    ['after the last band line of a k-point without its newline', LINES.slice(0, kLine(217) + NB + 1).join('\n')],
  ];
  for (const [where, text] of cuts) {
    it(`${where}: partial, up to the last complete k-point; without allowPartial, an error`, () => {
      const d = readEigenval(file(text), { allowPartial: true });
      assert.equal(d.partial, true);
      assert.equal(d.announcedK, 400);
      assert.equal(d.nk, 217);
      // The k-points kept are the file's own, unchanged (compared with the whole file's read).
      assert.deepEqual(Array.from(d.energies[0]!.subarray(0, 217 * NB)), Array.from(whole.energies[0]!.subarray(0, 217 * NB)));
      assert.deepEqual(Array.from(d.kpoints), Array.from(whole.kpoints.subarray(0, 217 * 3)));
      assert.throws(
        () => readEigenval(file(text)),
        (e: unknown) => e instanceof ReaderError,
      );
    });
  }

  it('a damaged band line in the middle is an error at that line, not blamed on NBANDS, even with allowPartial', () => {
    const lines = [...LINES];
    const at = kLine(40) + 5; // band 5 of k-point 41
    lines[at] = lines[at]!.replace(/^(\s*)5(\s)/, '$18$2'); // its index digit damaged: 5 → 8
    for (const opts of [{}, { allowPartial: true }]) {
      assert.throws(
        () => readEigenval(file(lines.join('\n')), opts),
        (e: unknown) =>
          e instanceof ReaderError && e.line === at + 1 && /damaged or out of order/.test(e.message) && !/NBANDS/.test(e.message),
      );
    }
    // Control: a k-point with fewer band lines than the header announces is still blamed on NBANDS.
    const short = [...LINES];
    short.splice(kLine(40) + NB, 1);
    assert.throws(
      () => readEigenval(file(short.join('\n'))),
      (e: unknown) => e instanceof ReaderError && /NBANDS/.test(e.message),
    );
  });

  it('a damaged value on a line followed by more data is an error with allowPartial too (not read as a cut)', () => {
    const lines = [...LINES];
    const at = kLine(100) + 3;
    lines[at] = lines[at]!.replace(/(\d)\.(\d)/, '$1.x$2');
    assert.throws(
      () => readEigenval(file(lines.join('\n')), { allowPartial: true }),
      (e: unknown) => e instanceof ReaderError && e.line === at + 1,
    );
  });
});
