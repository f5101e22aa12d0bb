import assert from 'node:assert/strict';
import { hoverLines } from '../../../src/extension/hoverText';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { makeBands } from '../../support/bandStructure';
import { loadSi } from './demoRun';

function numbersIn(s: string): number[] {
  return (s.match(/-?\d+\.\d+/g) ?? []).map(Number);
}

describe('extension: hover on a k-point line', () => {
  it('gives X of the fcc zone at |k| = 2π/a in Å⁻¹, the bands around the edges, and the valley it hosts', async () => {
    const { bs, report, geometry } = await loadSi();
    const lines = hoverLines(bs, report, geometry, 39);
    assert.match(lines[0]!, /k-point 40 of 400\*\* — X/);
    // fcc reciprocal lattice: X = (2π/a)(0, 1, 0) up to orientation, so |k| = 2π/a (textbook geometry, common
    // practice); a = 5.43 Å in the demo POSCAR (2 × 2.715 Å).
    const cart = lines.find((l) => l.startsWith('cartesian'))!;
    const nums = numbersIn(cart);
    assert.ok(Math.abs(nums[3]! - (2 * Math.PI) / 5.43) < 1e-4, cart);
    assert.ok(Math.abs(Math.hypot(nums[0]!, nums[1]!, nums[2]!) - (2 * Math.PI) / 5.43) < 2e-4);
    const bands = lines.find((l) => l.includes('VB top band'))!;
    // 8 electrons, 2 per band (no spin-orbit, common practice): VBM band 4, CBM band 5; bands 3..6 listed.
    assert.match(bands, /band 3: .*band 4 \(VB top band\).*band 5 \(CB bottom band\).*band 6/);
    const e4 = bs.energies[0]![39 * bs.nBands + 3]!;
    assert.ok(bands.includes(`band 4 (VB top band): ${e4.toFixed(4)} eV`));
    // At X the two lowest conduction bands of the diamond structure meet and cross (common practice): by band
    // index the upper one has a "V" there, which is not a valley. The hover says so and names no valley.
    assert.ok(!lines.some((l) => l.includes('conduction valley')), lines.join('\n'));
    assert.ok(
      lines.some((l) => l.startsWith('not an extremum here:') && /band 6 \(crossing\)/.test(l)),
      lines.join('\n'),
    );
  });

  it('says that Γ hosts the VBM, with the degeneracy of the top valence bands', async () => {
    const { bs, report, geometry } = await loadSi();
    const lines = hoverLines(bs, report, geometry, 0);
    const hosts = lines.find((l) => l.startsWith('hosts'))!;
    // Cubic semiconductors: the top valence bands are threefold degenerate at Γ without spin-orbit (physics.md, item 7).
    assert.match(hosts, /VBM \(band 4, 3 bands degenerate\)/);
    assert.ok(lines.some((l) => l.includes('+0.000 eV from VBM')));
  });

  it('for a metal lists the bands around the Fermi level and says when cartesian k is unknown', () => {
    const kpts = [
      [0, 0, 0],
      [0.25, 0, 0],
      [0.5, 0, 0],
    ];
    // One band crossing E_F = 0 (a metal), no lattice.
    const bs = makeBands({
      kpoints: kpts,
      energies: [
        [
          [-3, -1],
          [-3, 0.5],
          [-3, 1],
        ],
      ],
      fermiEnergy: 0,
      electrons: 3,
    });
    const report = analyzeBandStructure(bs);
    const lines = hoverLines(bs, report, pathGeometry(bs), 1);
    assert.ok(lines.some((l) => l.includes('cartesian k unknown')));
    assert.ok(
      lines.some((l) => l.includes('(below E_F)') && l.includes('from E_F')),
      lines.join('\n'),
    );
  });
});
