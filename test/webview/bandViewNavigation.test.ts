/**
 * The band view's pure navigation (webview/bandView/navigation.ts) and fit targets (fitRequests.ts), on
 * silicon from the empirical pseudopotential model of Cohen & Bergstresser, Phys. Rev. 141, 789 (1966)
 * (fixtures/epm/si), read and analysed by the core. Screen positions come from plain linear maps, so each
 * expected pixel is plain arithmetic.
 */
import assert from 'node:assert/strict';
import { buildViewModel, energyAt, type ViewModel } from '../../webview/bandView/viewModel';
import { reachableCandidates, type Candidate } from '../../webview/bandView/keyNavigation';
import {
  KEY_ZOOM_FACTOR,
  keyCommand,
  nearestBandPoint,
  neighbourCandidate,
  snapCandidate,
  visibleSpins,
} from '../../webview/bandView/navigation';
import { defaultEnergyWindow } from '../../webview/bandView/plotScales';
import { fitTargetOf, sameTarget } from '../../webview/bandView/fitRequests';
import { loadRunForView } from './support/coreBandData';

describe('band view navigation (pure)', function () {
  this.timeout(60_000);
  let vm: ViewModel;
  let list: Candidate[];
  // 100 px per path unit from x = 50; 40 px per eV, energy zero at y = 300 (screen y grows downwards).
  const scales = { zx: (d: number) => 50 + 100 * d, zy: (e: number) => 300 - 40 * e, offset: 0 };

  before(async () => {
    const run = await loadRunForView('fixtures/epm/si', 'Si (EPM)');
    vm = buildViewModel(run.data);
    list = reachableCandidates(vm.marks, vm.extrema, run.data.setAside, (s, k, b) => energyAt(vm, s, k, b));
  });

  it('spin channels shown: one for an unpolarised run whatever the menu says; otherwise as the menu says', () => {
    assert.deepEqual(visibleSpins(1, 'both'), [0]);
    assert.deepEqual(visibleSpins(1, 'down'), [0]);
    assert.deepEqual(visibleSpins(null, 'both'), [0]);
    assert.deepEqual(visibleSpins(2, 'up'), [0]);
    assert.deepEqual(visibleSpins(2, 'down'), [1]);
    assert.deepEqual(visibleSpins(2, 'both'), [0, 1]);
  });

  it('keys: arrows move, Enter and space fit, Escape clears, + = − zoom by one step, 0 resets; others are left alone', () => {
    for (const k of ['ArrowLeft', 'ArrowRight', 'ArrowUp', 'ArrowDown']) assert.deepEqual(keyCommand(k), { kind: 'move', key: k });
    assert.deepEqual(keyCommand('Enter'), { kind: 'fit' });
    assert.deepEqual(keyCommand(' '), { kind: 'fit' });
    assert.deepEqual(keyCommand('Escape'), { kind: 'clear' });
    assert.deepEqual(keyCommand('+'), { kind: 'zoom', factor: KEY_ZOOM_FACTOR });
    assert.deepEqual(keyCommand('='), { kind: 'zoom', factor: KEY_ZOOM_FACTOR });
    assert.deepEqual(keyCommand('-'), { kind: 'zoom', factor: 1 / KEY_ZOOM_FACTOR });
    assert.deepEqual(keyCommand('0'), { kind: 'resetZoom' });
    for (const k of ['a', 'Tab', '1', 'Shift', 'PageDown']) assert.equal(keyCommand(k), null, k);
  });

  it('a click within the tolerance of the CBM snaps to it; a click farther away in either axis finds nothing', () => {
    const cbm = list.find((c) => c.kind === 'cbm');
    assert.ok(cbm, 'the core lists silicon’s CBM');
    const x = scales.zx(vm.distance[cbm.kIndex]!);
    const y = scales.zy(cbm.eV);
    assert.equal(snapCandidate(vm, list, [0], scales, x + 3, y - 3, 8), cbm);
    assert.equal(snapCandidate(vm, list, [0], scales, x, y + 9, 8), null, '9 px below with an 8 px tolerance');
    assert.equal(snapCandidate(vm, list, [1], scales, x, y, 8), null, 'spin channel 2 is not shown: nothing of it is reachable');
  });

  it('of two candidates in reach the nearer wins; at equal distance the one listed first', () => {
    const a: Candidate = { spin: 0, kIndex: 0, band0: 0, eV: 0, sign: 1, kind: 'vbm' };
    const b: Candidate = { spin: 0, kIndex: 0, band0: 1, eV: 0.1, sign: -1, kind: null };
    // a at y = 300, b at y = 296 (0.1 eV × 40 px/eV above); x of both = zx(distance[0]).
    const x = scales.zx(vm.distance[0]!);
    assert.equal(snapCandidate(vm, [a, b], [0], scales, x, 297, 8), b, '1 px from b, 3 px from a');
    assert.equal(snapCandidate(vm, [a, b], [0], scales, x, 298, 8), a, '2 px from each: the first listed');
  });

  it('arrow keys from nothing: Up goes to the CBM, Down to the VBM', () => {
    assert.equal(neighbourCandidate(vm, list, [0], null, 'ArrowUp')?.kind, 'cbm');
    assert.equal(neighbourCandidate(vm, list, [0], null, 'ArrowDown')?.kind, 'vbm');
    assert.equal(neighbourCandidate(vm, list, [1], null, 'ArrowUp'), null, 'no candidate of a hidden channel');
  });

  it('the pointer picks the band nearest in energy at its k-point', () => {
    // A k-point where no two bands meet (silicon's bands are degenerate at Γ, X and along Γ–X).
    const apart = (k: number): boolean => {
      for (let b = 1; b < vm.nBands; b++) if (energyAt(vm, 0, k, b) - energyAt(vm, 0, k, b - 1) < 0.05) return false;
      return true;
    };
    const k = Array.from({ length: vm.nk }, (_, i) => i).find(apart);
    assert.ok(k !== undefined, 'a k-point with every band apart');
    for (const b of [0, 3, 4, vm.nBands - 1]) {
      assert.deepEqual(nearestBandPoint(vm, [0], k, energyAt(vm, 0, k, b)), { spin: 0, band0: b });
    }
    // A quarter of the way from band 3 to band 4 (the gap between the highest valence and lowest conduction band).
    const e3 = energyAt(vm, 0, k, 3);
    const e4 = energyAt(vm, 0, k, 4);
    assert.deepEqual(nearestBandPoint(vm, [0], k, e3 + 0.25 * (e4 - e3)), { spin: 0, band0: 3 });
    assert.deepEqual(nearestBandPoint(vm, [0], k, e3 + 0.75 * (e4 - e3)), { spin: 0, band0: 4 });
  });

  it('the first energy window of a semiconductor holds both band edges and stays near the data', () => {
    const vbm = vm.data.vbm_eV!;
    const cbm = vm.data.cbm_eV!;
    const [lo, hi] = defaultEnergyWindow(vm, vbm);
    assert.ok(lo < 0 && hi > cbm - vbm, `window ${lo}…${hi} eV around the gap 0…${cbm - vbm} eV`);
    assert.ok(lo >= vm.energyMin - vbm - 0.3 && hi <= vm.energyMax - vbm + 0.3, 'within 0.3 eV of the data');
  });

  it('a fit target names a candidate as a maximum or a minimum by its sign; a stored fit keeps its own', () => {
    assert.deepEqual(fitTargetOf({ spin: 0, kIndex: 5, band0: 3, sign: 1 }), { spin: 0, kIndex: 5, band0: 3, maximum: true });
    assert.deepEqual(fitTargetOf({ spin: 1, kIndex: 5, band0: 4, sign: -1 }), { spin: 1, kIndex: 5, band0: 4, maximum: false });
    assert.deepEqual(fitTargetOf({ spin: 0, kIndex: 2, band0: 1, maximum: false }), { spin: 0, kIndex: 2, band0: 1, maximum: false });
    assert.deepEqual(fitTargetOf({ spin: 0, kIndex: 2, band0: 1 }), { spin: 0, kIndex: 2, band0: 1 }, 'neither: the host decides');
    assert.ok(sameTarget({ spin: 0, kIndex: 2, band0: 1 }, { spin: 0, kIndex: 2, band0: 1, maximum: true }));
    assert.ok(!sameTarget({ spin: 0, kIndex: 2, band0: 1 }, { spin: 1, kIndex: 2, band0: 1 }));
  });
});
