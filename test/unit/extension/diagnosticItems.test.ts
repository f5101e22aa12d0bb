import assert from 'node:assert/strict';
import { itemsFromError, itemsFromRun } from '../../../src/extension/diagnosticItems';
import { ReaderError, ValleyscopeError } from '../../../src/core/errors';
import { readerById } from '../../../src/core/formats/index';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { makeBands } from '../../support/bandStructure';
import { eigenvalHeader } from '../../support/unitEigenval';

// A VASP 5 EIGENVAL (layout of the code's own files) with an overflowed field, as Fortran writes it.
const EIG = `${eigenvalHeader(4, 2, 2)}
  0.0000000E+00  0.0000000E+00  0.0000000E+00  0.5000000E+00
    1      -4.000000
    2      *********

  0.5000000E+00  0.0000000E+00  0.0000000E+00  0.5000000E+00
    1      -4.500000
    2      -1.500000
`;

describe('extension: Problems-panel entries', () => {
  it('puts a reader error on its line and column (1-based in the error, 0-based in the editor)', () => {
    const reader = readerById('vasp-eigenval')!;
    let err: unknown;
    try {
      reader.read({ path: 'EIGENVAL', bytes: new TextEncoder().encode(EIG) }, [], {});
    } catch (e) {
      err = e;
    }
    assert.ok(err instanceof ReaderError, String(err));
    assert.equal(err.line, 10);
    const [item] = itemsFromError(err);
    assert.equal(item!.line, 9);
    assert.equal(item!.severity, 'error');
    assert.equal(item!.message, err.reason);
    assert.equal(item!.column, Math.max(0, err.column - 1));
  });

  it('puts other errors on the first line', () => {
    const [item] = itemsFromError(new ValleyscopeError('too big'));
    assert.deepEqual([item!.line, item!.message, item!.wholeLine], [0, 'too big', true]);
  });

  it('lists reader warnings at their lines, analysis warnings once, and marks a partial file at its end', () => {
    const bs = makeBands({ kpoints: [[0, 0, 0]], energies: [[[0, 1]]] });
    bs.source.file = '/run/EIGENVAL';
    bs.warnings.push(
      { code: 'w1', message: 'odd weight', line: 8 },
      { code: 'w2', message: 'POSCAR has no species line', file: '/run/POSCAR' },
    );
    bs.partial = true;
    const report = analyzeBandStructure(bs);
    const items = itemsFromRun(bs, report, '/run/EIGENVAL', 41);
    const w1 = items.find((i) => i.code === 'w1')!;
    assert.equal(w1.line, 7);
    const w2 = items.find((i) => i.code === 'w2')!;
    assert.equal(w2.line, 0);
    assert.match(w2.message, /^\/run\/POSCAR: /);
    assert.equal(items.filter((i) => i.message === 'odd weight').length, 1, 'not repeated from the report');
    const partial = items.find((i) => i.code === 'partial')!;
    assert.equal(partial.line, 41);
    assert.match(partial.message, /only the first 1 k-points are complete/);
    assert.ok(items.some((i) => i.code === 'analysis' && /Neither occupations/.test(i.message)));
  });
});
