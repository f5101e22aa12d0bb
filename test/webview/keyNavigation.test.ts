/**
 * Every listed extremum reachable by keyboard, and a fit of exactly the one selected (webview/bandView/
 * keyNavigation.ts with the host's fit service). Data: GaAs and Si from the empirical pseudopotential model
 * of Cohen & Bergstresser, Phys. Rev. 141, 789 (1966), on the standard fcc path (Setyawan & Curtarolo 2010),
 * in VASP's layout (fixtures/epm). In this model GaAs has its CBM at Γ and secondary conduction valleys at L
 * and near X (common practice for GaAs; the analysis lists them), Si a crossing of bands 5 and 6 at X.
 */
import assert from 'node:assert/strict';
import { buildViewModel, energyAt } from '../../webview/bandView/viewModel';
import { nextCandidate, reachableCandidates, type ArrowKey, type Candidate } from '../../webview/bandView/keyNavigation';
import { hostFitResult, loadRunForView } from './support/coreBandData';
import { kpointAt } from '../../src/core/model';

async function candidatesOf(path: string) {
  const run = await loadRunForView(path, path);
  const vm = buildViewModel(run.data);
  const list = reachableCandidates(vm.marks, vm.extrema, run.data.setAside, (s, k, b) => energyAt(vm, s, k, b));
  return { run, vm, list, x: (k: number) => vm.distance[k]! };
}

function walk(list: Candidate[], x: (k: number) => number, keys: ArrowKey[]): Candidate[] {
  const seen: Candidate[] = [];
  let cur: Candidate | null = null;
  for (const key of keys) {
    cur = nextCandidate(list, cur, key, x);
    if (cur) seen.push(cur);
  }
  return seen;
}

describe('band view: keyboard order and exact fits', function () {
  this.timeout(60000);

  it('GaAs: Left then Right from the VBM visit every listed extremum before any other local extremum', async () => {
    const { list, x } = await candidatesOf('fixtures/epm/gaas');
    const listed = list.filter((c) => c.kind !== null);
    assert.ok(listed.length >= 4, `listed: ${listed.map((c) => c.kind).join(', ')}`);
    assert.ok(
      listed.some((c) => c.kind === 'valley'),
      'a secondary conduction valley is listed',
    );
    // From nothing, Left selects the VBM; going Left to the start of the path, then Right to its end.
    const first = nextCandidate(list, null, 'ArrowLeft', x)!;
    assert.equal(first.kind, 'vbm');
    const path = walk(list, x, [
      'ArrowLeft',
      ...Array<ArrowKey>(listed.length + 2).fill('ArrowLeft'),
      ...Array<ArrowKey>(2 * listed.length + 2).fill('ArrowRight'),
    ]);
    const firstUnlisted = path.findIndex((c) => c.kind === null);
    const before = new Set(path.slice(0, firstUnlisted < 0 ? path.length : firstUnlisted).map((c) => `${c.kIndex}:${c.band0}`));
    for (const c of listed)
      assert.ok(
        before.has(`${c.kIndex}:${c.band0}`),
        `listed ${c.kind} at k-point ${c.kIndex + 1}, band ${c.band0 + 1} reached before other extrema`,
      );
    // Control: the walk does go on to other local extrema once the listed ones are behind it.
    const more = walk(list, x, [...Array<ArrowKey>(list.length).fill('ArrowRight')]);
    assert.ok(
      list.some((c) => c.kind === null),
      'the bands have other local extrema too',
    );
    assert.ok(
      more.some((c) => c.kind === null),
      'Right goes on to them past the last listed extremum',
    );
  });

  it('GaAs: the host fits exactly the selected extremum, listed or not (never another)', async () => {
    const { run, list } = await candidatesOf('fixtures/epm/gaas');
    let id = 1;
    for (const c of list) {
      const out = hostFitResult(run, id++, { spin: c.spin, kIndex: c.kIndex, band0: c.band0, maximum: c.sign > 0 }, 25, 'parabola', false);
      assert.deepEqual(out.extremum.k, kpointAt(run.bs, c.kIndex), `candidate at k-point ${c.kIndex + 1}, band ${c.band0 + 1}`);
      assert.ok(!out.extremum.warnings.some((w) => /^Moved/.test(w)), out.extremum.warnings.join(' | '));
      if (c.kind !== null) assert.equal(out.extremum.kind, c.kind, `listed ${c.kind} keeps its kind`);
    }
  });

  it('Si: what the analysis set aside (the crossing at X), and the other band of that crossing, are not offered', async () => {
    const { run, list } = await candidatesOf('fixtures/epm/si');
    const aside = run.data.setAside ?? [];
    assert.ok(aside.length > 0, 'the analysis set something aside in Si');
    for (const a of aside) {
      assert.ok(
        !list.some((c) => c.spin === a.spin && c.band0 === a.band0 && Math.abs(c.kIndex - a.kIndex) <= 2),
        `set-aside candidate at k-point ${a.kIndex + 1}, band ${a.band0 + 1} is offered`,
      );
    }
    // Nor the other band of that crossing: at X bands 5 and 6 meet (the X₁ level of Si is twofold without
    // spin-orbit; common practice), so band 5 at X is not an extremum to fit either.
    const xs = aside.filter((a) => a.reason === 'crossing').map((a) => a.kIndex);
    assert.ok(xs.length > 0);
    assert.ok(!list.some((c) => c.band0 === 4 && xs.some((k) => Math.abs(c.kIndex - k) <= 2)), 'band 5 at the X crossing is not offered');
    // Control: without the energies the view cannot tell, and offers band 5 at the last X of the path.
    const { vm } = await candidatesOf('fixtures/epm/si');
    const blind = reachableCandidates(vm.marks, vm.extrema, run.data.setAside);
    assert.ok(blind.some((c) => c.band0 === 4 && xs.some((k) => Math.abs(c.kIndex - k) <= 2)));
  });
});
