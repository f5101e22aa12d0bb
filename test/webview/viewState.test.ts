/** The band view's kept state (webview/bandView/viewState.ts): what survives a window reload, checked on the way back. */
import assert from 'node:assert/strict';
import { fitsWithin, parseViewState } from '../../webview/bandView/viewState';

describe('band view state across a window reload', () => {
  const fit = { spin: 0 as const, kIndex: 40, band0: 4, window_meV: 25, method: 'parabola' };

  it('keeps the run, the choices and the fits in order', () => {
    const s = parseViewState({
      run: 'file:///w/si/EIGENVAL',
      reference: 'fermi',
      spin: 'both',
      window_meV: 40,
      method: 'kane',
      fits: [fit, { ...fit, kIndex: 0, band0: 3, note: 'checked' }],
    });
    assert.equal(s.run, 'file:///w/si/EIGENVAL');
    assert.equal(s.reference, 'fermi');
    assert.equal(s.spin, 'both');
    assert.equal(s.window_meV, 40);
    assert.equal(s.method, 'kane');
    assert.deepEqual(s.fits, [fit, { ...fit, kIndex: 0, band0: 3, note: 'checked' }]);
  });

  it('leaves out whatever is malformed (the state comes back from storage)', () => {
    assert.deepEqual(parseViewState(null), {});
    assert.deepEqual(parseViewState('x'), {});
    const s = parseViewState({
      run: 42,
      reference: 'cbm',
      spin: 'left',
      window_meV: -3,
      fits: [{ ...fit, kIndex: -1 }, { ...fit, spin: 2 }, { ...fit, window_meV: Infinity }, { ...fit, band0: 1.5 }, 'x', fit],
    });
    assert.deepEqual(s, { fits: [fit] });
  });

  it('drops fits that point past the data of a run re-read smaller', () => {
    const fits = [fit, { ...fit, kIndex: 99 }, { ...fit, band0: 8 }, { ...fit, spin: 1 as const }];
    assert.deepEqual(fitsWithin(fits, { nSpin: 1, nk: 50, nBands: 8 }), [fit]);
  });
});
