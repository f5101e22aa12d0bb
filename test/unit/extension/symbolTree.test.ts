import assert from 'node:assert/strict';
import { buildSymbolTree, MAX_KPOINT_SYMBOLS } from '../../../src/extension/symbolTree';
import { locateKpointLines } from '../../../src/extension/kpointLines';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { makeBands, line, fccLattice } from '../../support/bandStructure';
import { loadSi } from './demoRun';

describe('extension: outline of an eigenvalue file', () => {
  it('groups the demo silicon path into labelled segments with nested, ordered line ranges', async () => {
    const { bs, geometry, text } = await loadSi();
    const kl = locateKpointLines(text, bs.kpoints, bs.nk);
    const lastLine = text.split('\n').length - 1;
    const tree = buildSymbolTree(bs, geometry, kl, lastLine);
    // The demo KPOINTS path (fixtures/demo/si-bulk/KPOINTS): G-X-W-K-G-L-U-W-L-K|U-X, 10 segments of 40 points.
    assert.deepEqual(
      tree.map((n) => n.name),
      ['Γ → X', 'X → W', 'W → K', 'K → Γ', 'Γ → L', 'L → U', 'U → W', 'W → L', 'L → K', 'U → X'],
    );
    assert.ok(tree[9]!.detail.includes('after a jump'), 'K|U is a jump');
    let prevEnd = -1;
    for (const seg of tree) {
      assert.equal(seg.children.length, 40);
      assert.ok(seg.startLine > prevEnd, 'segments follow each other');
      prevEnd = seg.endLine;
      for (const c of seg.children) {
        assert.ok(c.startLine >= seg.startLine && c.endLine <= seg.endLine, `${c.name} inside ${seg.name}`);
        assert.ok(c.endLine >= c.startLine);
      }
    }
    assert.equal(tree[0]!.children[0]!.name, 'Γ (k 1)');
    assert.equal(tree[0]!.children[39]!.name, 'X (k 40)');
    assert.equal(tree[0]!.children[1]!.name, 'k 2');
    assert.equal(tree[9]!.endLine, lastLine);
  });

  it('lists only labelled points when the path is very long', () => {
    const n = MAX_KPOINT_SYMBOLS + 10;
    const kpts = line([0, 0, 0], [0.5, 0, 0.5], n);
    const bs = makeBands({
      kpoints: kpts,
      energies: [kpts.map((_, i) => [i * 1e-3])],
      lattice: fccLattice(5.43),
      labels: [
        { index: 0, label: 'Γ' },
        { index: n - 1, label: 'X' },
      ],
    });
    const kl = Int32Array.from({ length: n }, (_, i) => i);
    const tree = buildSymbolTree(bs, pathGeometry(bs), kl, n - 1);
    assert.equal(tree.length, 1);
    assert.deepEqual(
      tree[0]!.children.map((c) => c.name),
      ['Γ (k 1)', `X (k ${n})`],
    );
  });

  it('gives a single group for a uniform grid and nothing when no k-point line was found', () => {
    const kpts = [
      [0, 0, 0],
      [0.5, 0, 0],
    ];
    const bs = makeBands({ kpoints: kpts, energies: [[[0], [1]]], sampling: 'grid' });
    const tree = buildSymbolTree(bs, pathGeometry(bs), Int32Array.from([2, 5]), 9);
    assert.equal(tree.length, 1);
    assert.equal(tree[0]!.kind, 'grid');
    assert.equal(tree[0]!.children.length, 2);
    assert.deepEqual(buildSymbolTree(bs, pathGeometry(bs), Int32Array.from([-1, -1]), 9), []);
  });
});
