import assert from 'node:assert/strict';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { makeBands, type BandsSpec } from '../../support/bandStructure';

// Two-band-pair toy spectra: each k has four bands; with 4 electrons and no spin, bands 1-2 are filled
// (2 electrons per band: physics.md step 2, common practice).
const ks = [
  [0, 0, 0],
  [0.25, 0, 0],
  [0.5, 0, 0],
];
/** The same four levels at every k: a flat-band spectrum. */
const flat = ks.map(() => [-3, -1, 1, 3]);

/** Analyse one spin channel of energies[k][band] on the three k above; 4 electrons unless `extra` says otherwise. */
function analyze(rows: number[][], extra: Partial<BandsSpec> = {}) {
  return analyzeBandStructure(makeBands({ kpoints: ks, energies: [rows], electrons: 4, ...extra }));
}

describe('band edges and gap', () => {
  it('finds a direct gap at the shared k of VBM and CBM', () => {
    const r = analyze([
      [-3, -1, 1, 3],
      [-3.1, -1.2, 1.3, 3],
      [-3.2, -1.5, 1.6, 3],
    ]);
    assert.equal(r.metal, false);
    assert.ok(r.gap);
    // Hand count: VBM −1 (band 2, k0), CBM 1 (band 3, k0): gap 2 eV, direct.
    assert.equal(r.gap.eV, 2);
    assert.equal(r.gap.direct, true);
    assert.equal(r.gap.vbm.band, 2);
    assert.equal(r.gap.cbm.band, 3);
    assert.deepEqual(r.gap.vbm.k, [0, 0, 0]);
    assert.equal(r.gap.directGap.eV, 2);
  });

  it('finds an indirect gap and the smallest direct gap elsewhere', () => {
    const r = analyze([
      [-3, -1, 2, 3],
      [-3.1, -1.2, 1.5, 3],
      [-3.2, -1.5, 0.9, 3],
    ]);
    assert.ok(r.gap);
    // Hand count: VBM −1 at k0, CBM 0.9 at k2: 1.9 eV indirect; direct gaps 3, 2.7, 2.4 → 2.4 at k2.
    assert.ok(Math.abs(r.gap.eV - 1.9) < 1e-12);
    assert.equal(r.gap.direct, false);
    assert.deepEqual(r.gap.cbm.k, [0.5, 0, 0]);
    assert.ok(Math.abs(r.gap.directGap.eV - 2.4) < 1e-12);
    assert.deepEqual(r.gap.directGap.k, [0.5, 0, 0]);
  });

  it('reports a metal when a filled band rises above an empty one', () => {
    const r = analyze([
      [-3, -1, 0.2, 3],
      [-3.1, 0.5, 1.3, 3],
      [-3.2, -1.5, 1.6, 3],
    ]);
    // Band 2 reaches 0.5 eV at k1, band 3 dips to 0.2 eV at k0: overlap, so no gap (common practice).
    assert.equal(r.metal, true);
    assert.equal(r.gap, null);
  });

  it('reports a metal for an odd electron count without spin', () => {
    const r = analyze(flat, { electrons: 3 });
    // 3 electrons, 2 per band: band 2 is half filled (physics.md step 2).
    assert.equal(r.metal, true);
    assert.equal(r.gap, null);
  });

  it('with spin-orbit one electron fills one band', () => {
    const r = analyze(flat, { electrons: 3, spinorbit: true });
    // 3 electrons, 1 per band with spin-orbit (physics.md step 2): VBM band 3 (1 eV), CBM band 4 (3 eV).
    assert.equal(r.metal, false);
    assert.equal(r.gap?.vbm.band, 3);
    assert.equal(r.gap?.eV, 2);
  });

  it('occupations decide over the electron count', () => {
    const r = analyze(flat, { occupations: [ks.map(() => [1, 1, 1, 0])] });
    assert.equal(r.gap?.vbm.band, 3);
    assert.ok(r.warnings.some((w) => /Occupations fill 3 bands/.test(w)));
  });

  it('spin-polarised: gaps per channel and overall', () => {
    // Up channel: filled −1, empty 1.0; down channel: filled −0.5, empty 1.5; 2 electrons per k in all.
    const up = [
      [-2, -1, 1, 3],
      [-2, -1.1, 1.2, 3],
      [-2, -1.2, 1.4, 3],
    ];
    const dn = [
      [-2.5, -0.5, 1.5, 3],
      [-2.5, -0.6, 1.7, 3],
      [-2.5, -0.7, 1.8, 3],
    ];
    const bs = makeBands({ kpoints: ks, energies: [up, dn], electrons: 4 });
    const r = analyzeBandStructure(bs);
    assert.equal(r.nspin, 2);
    // Lowest 4 of the 8 states at each k: both channels' first two bands (hand count).
    assert.ok(r.spinGaps && r.spinGaps.length === 2);
    assert.equal(r.spinGaps[0]?.eV, 2); // up: 1.0 − (−1.0)
    assert.equal(r.spinGaps[1]?.eV, 2); // down: 1.5 − (−0.5)
    // Overall: VBM −0.5 (down), CBM 1.0 (up): 1.5 eV, across channels; same-spin direct gap is 2.
    assert.equal(r.gap?.eV, 1.5);
    assert.equal(r.gap?.vbm.spin, 1);
    assert.equal(r.gap?.cbm.spin, 0);
    assert.equal(r.gap?.direct, false);
  });

  it('without electrons, occupations or Fermi energy the edges are unknown, said plainly', () => {
    const r = analyze(flat, { electrons: null });
    assert.equal(r.gap, null);
    assert.equal(r.metal, null);
    assert.ok(r.warnings.some((w) => /cannot be placed/.test(w)));
  });

  it('states the semilocal-DFT caution beside a gap', () => {
    const r = analyze(flat);
    assert.ok(r.cautions.some((c) => /underestimates band gaps/.test(c)));
  });
});
