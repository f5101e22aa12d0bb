/**
 * formats/numbers.ts: the one table of powers of ten and the fast number scanner shared by the XML readers.
 * Reference: ECMAScript's own decimal-to-double conversion (`Number(text)`, correctly rounded by ECMA-262's
 * StringToNumber), on numbers printed as the electronic-structure codes print them.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { DECIMAL, POW10, decimalAt, parseDecimal, scanDecimalBytes, scanNumbers } from '../../../src/core/formats/numbers';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);

describe('formats/numbers: one number scanner', () => {
  it('POW10 holds 10^0 .. 10^22 exactly (the largest power of ten a double represents exactly is 10^22: 5^22 < 2^53)', () => {
    assert.equal(POW10.length, 23);
    POW10.forEach((p, i) => assert.equal(BigInt(p), 10n ** BigInt(i), `10^${i}`));
  });

  it('agrees with Number() on fixed, exponent and Fortran D layouts (property)', () => {
    const value = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true });
    const layout = fc.constantFrom('fixed4', 'fixed8', 'exp7', 'exp15', 'fortranD');
    fc.assert(
      fc.property(fc.array(fc.tuple(value, layout), { minLength: 1, maxLength: 20 }), (items) => {
        const tokens = items.map(([v, l]) => {
          switch (l) {
            case 'fixed4':
              return v.toFixed(4);
            case 'fixed8':
              return v.toFixed(8);
            case 'exp7':
              return v.toExponential(7);
            case 'exp15':
              return v.toExponential(15).toUpperCase();
            default:
              return v.toExponential(10).replace('e', 'D');
          }
        });
        const text = `  ${tokens.join(' \n\t')} `;
        const expected = tokens.map((t) => Number(t.replace('D', 'e')));
        const fromBytes = new Float64Array(tokens.length);
        const b = enc(text);
        assert.deepEqual(scanDecimalBytes(b, 0, b.length, fromBytes, 0, tokens.length), { count: tokens.length, bad: null });
        const fromText = new Float64Array(tokens.length);
        assert.deepEqual(scanNumbers(text, fromText, 0, tokens.length), { count: tokens.length, bad: null });
        for (let i = 0; i < tokens.length; i++) {
          assert.ok(Object.is(fromBytes[i], expected[i]), `${tokens[i]}: ${fromBytes[i]} vs ${expected[i]}`);
          assert.ok(Object.is(fromText[i], expected[i]), `${tokens[i]} (text): ${fromText[i]} vs ${expected[i]}`);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('decimalAt: the fast form gives its end and the correctly rounded value; other forms say so', () => {
    // Reference: ECMAScript Number() (ECMA-262 StringToNumber, correctly rounded).
    for (const t of ['-5.757104', '0.1638729E+02', '+7', '.5', '1e-22', '123456789012345']) {
      const b = enc(`${t} `);
      assert.equal(decimalAt(b, 0, b.length), t.length, t);
      assert.ok(Object.is(DECIMAL[0], Number(t)), t);
    }
    // Valid, but more than 15 digits or a power of ten beyond ±22: -2 - (the end), for the runtime's parse.
    for (const t of ['0.1234567890123456', '1e-23', '2.5e300']) assert.equal(decimalAt(enc(t), 0, t.length), -2 - t.length, t);
    // Not a number of this form: -1 (the caller's strict path words the error).
    for (const t of ['abc', '-', '.', '1.0e', '1.0e+1234']) assert.equal(decimalAt(enc(t), 0, t.length), -1, t);
    assert.equal(decimalAt(enc('1.5D-03'), 0, 7), 3); // stops before the D: the caller checks what follows
  });

  it('names the first token that is not a finite number, and counts past max', () => {
    assert.deepEqual(scanNumbers('1.0 2.0 abc 4', [0, 0, 0, 0], 0, 4), { count: 2, bad: 'abc' });
    assert.deepEqual(scanNumbers('1 2 3', [0], 0, 1), { count: 2, bad: null });
    for (const bad of ['NaN', 'Infinity', '1e', '1e5x', '--1', '1.0E+1234']) assert.notEqual(scanNumbers(bad, [0], 0, 1).bad, null, bad);
    assert.equal(parseDecimal('1.5D-03'), 1.5e-3);
    assert.equal(parseDecimal('1.0x'), null);
  });
});
