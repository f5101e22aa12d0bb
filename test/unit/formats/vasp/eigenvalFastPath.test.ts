import assert from 'node:assert/strict';
import { readEigenval } from '../../../../src/core/formats/vasp/eigenvalScan';
import { ReaderError } from '../../../../src/core/errors';

// The EIGENVAL reader reads a common k-point block in one pass and leaves anything else to its general path. These
// files mix both kinds of block: every value must be what the text says, and every error must name its line.
// Reference values: ECMAScript's Number() of each written field (the correctly rounded double of the decimal, IEEE 754).

const NB = 5;
const NK = 12;
/** A cosine band model (common practice for test bands), written with VASP's six decimals. */
const energy = (k: number, b: number): string => (-6 + 2.5 * b - 0.8 * Math.cos((2 * Math.PI * k) / NK + b)).toFixed(6);
const occ = (b: number): string => (b < 2 ? 1 : 0).toFixed(6);

/** One block; `variant` picks a layout the fast path reads or one it must leave to the general path. */
function block(k: number, variant: string): string[] {
  const kline = `  ${(k / (2 * NK)).toFixed(7)}E+00  0.0000000E+00  ${(k / (2 * NK)).toFixed(7)}E+00  0.1000000E+00`;
  const lines = variant === 'two-blank-lines' ? ['', '   ', kline] : ['', kline];
  for (let b = 0; b < NB; b++) {
    let e = energy(k, b);
    if (variant === 'exponent' && b === 2) e = `${(Number(e) / 10).toFixed(7)}E+01`;
    if (variant === 'long-mantissa' && b === 3) e = `${e}1234567890123`;
    const sep = variant === 'tabs' ? '\t' : '    ';
    lines.push(`${String(b + 1).padStart(5)}${sep}${e.padStart(11)}${sep}${occ(b)}`);
  }
  return variant === 'crlf' ? lines.map((l) => `${l}\r`) : lines;
}

const VARIANTS = ['plain', 'crlf', 'tabs', 'two-blank-lines', 'exponent', 'long-mantissa'];

function file(variantOf: (k: number) => string, damage?: { k: number; b: number }): { text: string; damagedLine: number } {
  const lines = [
    '       2       2       1       1',
    '  0.4E+02  0.3E-09  0.3E-09  0.3E-09  0.5E-15',
    '  1.0E-004',
    '  CAR ',
    ' model',
    `     4     ${NK}     ${NB}`,
  ];
  let damagedLine = -1;
  for (let k = 0; k < NK; k++) {
    const bl = block(k, variantOf(k));
    if (damage && damage.k === k) {
      const at = bl.length - NB + damage.b;
      bl[at] = bl[at]!.replace(/(-?\d+\.\d{6})/, '**********');
      damagedLine = lines.length + at + 1;
    }
    lines.push(...bl);
  }
  return { text: `${lines.join('\n')}\n`, damagedLine };
}

const read = (text: string) => readEigenval({ path: 'EIGENVAL', bytes: new TextEncoder().encode(text) });

describe('EIGENVAL blocks read by the fast path and by the general path give the same values', () => {
  for (const v of VARIANTS) {
    it(`blocks in the layout "${v}" among plain ones read what the text says`, () => {
      const { text } = file((k) => (k % 3 === 1 ? v : 'plain'));
      const d = read(text);
      assert.equal(d.nk, NK);
      const fields = text
        .split('\n')
        .slice(6)
        .filter((l) => /^\s+\d+\s+-?\d/.test(l) && l.trim().split(/\s+/).length === 3);
      assert.equal(fields.length, NK * NB);
      fields.forEach((l, i) => {
        const [, e, o] = l.trim().split(/\s+/);
        assert.equal(d.energies[0]![i], Number(e), `energy ${i}`);
        assert.equal(d.occupations![0]![i], Math.fround(Number(o)), `occupation ${i}`);
      });
      for (let k = 0; k < NK; k++) {
        assert.equal(d.kpoints[3 * k], Number(`${(k / (2 * NK)).toFixed(7)}E+00`));
        assert.equal(d.weights[k], 0.1);
      }
    });
  }

  for (const k of [1, 7, NK - 1]) {
    it(`an overflowed field in k-point ${k + 1} after fast blocks is named with its own line`, () => {
      const { text, damagedLine } = file((i) => VARIANTS[i % VARIANTS.length]!, { k, b: 3 });
      assert.throws(
        () => read(text),
        (e: unknown) => e instanceof ReaderError && e.line === damagedLine && /overflowed/.test(e.message),
      );
    });
  }
});
