import assert from 'node:assert/strict';
import fc from 'fast-check';
import { TextScanner } from '../../../src/core/formats/textScanner';
import { ReaderError } from '../../../src/core/errors';

const scan = (s: string): TextScanner => new TextScanner(new TextEncoder().encode(s), 'f.txt', 'test');

describe('TextScanner', () => {
  it('parses the number forms Fortran writers produce', () => {
    // Fortran E, D and dropped-E exponents (common practice of Fortran formatted output).
    const sc = scan('  -5.757104  0.1638729E+02 1.0D-3 0.1234-105 +7 .5\n');
    assert.equal(sc.number('a'), -5.757104);
    assert.equal(sc.number('b'), 16.38729);
    assert.equal(sc.number('c'), 0.001);
    assert.equal(sc.number('d'), 0.1234e-105);
    assert.equal(sc.number('e'), 7);
    assert.equal(sc.number('f'), 0.5);
    assert.ok(sc.atEol());
  });

  it('rounds like the runtime for any double written in exponent form', () => {
    // Reference: JavaScript's own correctly rounded number parser.
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        const text = x.toExponential(12);
        const sc = scan(`${text}\n`);
        assert.equal(sc.number('x'), Number(text));
      }),
      { seed: 7, numRuns: 500 },
    );
  });

  it('reports an overflow field with file, line and column', () => {
    const sc = scan('1.0\n  2.0 ******** 3\n');
    sc.number('a');
    sc.nextLine();
    sc.number('b');
    assert.throws(
      () => sc.number('the energy'),
      (e: unknown) =>
        e instanceof ReaderError && e.line === 2 && e.column === 7 && /overflowed/.test(e.message) && e.message.startsWith('f.txt:2:7'),
    );
  });

  it('refuses NaN and infinities', () => {
    assert.throws(() => scan('NaN').number('x'), /not a finite number/);
    assert.throws(() => scan('-Infinity').number('x'), /not a finite number/);
    assert.throws(() => scan('1e999').number('x'), /expected x/);
  });

  it('skips a byte-order mark and handles Windows line endings', () => {
    const sc = scan('\uFEFF1 2\r\n3\r\n');
    assert.equal(sc.number('a'), 1);
    assert.equal(sc.number('b'), 2);
    assert.ok(sc.atEol());
    sc.nextLine();
    assert.equal(sc.line, 2);
    assert.equal(sc.number('c'), 3);
  });
});
