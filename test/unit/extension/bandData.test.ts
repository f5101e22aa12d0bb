import assert from 'node:assert/strict';
import { buildBandData, F64_ENERGY_LIMIT, nearestKIndex } from '../../../src/extension/bandData';
import { decodeArray } from '../../../src/protocol';
import { DEFAULT_SETTINGS, analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { emptyReport } from './emptyReport';
import { makeBands } from '../../support/bandStructure';
import { loadSi } from './demoRun';

describe('extension: band data sent to the band view', () => {
  it('carries the band structure as typed arrays that decode to the same numbers', async () => {
    const { bs, report, geometry } = await loadSi();
    const d = buildBandData(bs, report, geometry, 'EIGENVAL', DEFAULT_SETTINGS, 'vbm');
    assert.equal(d.nk, bs.nk);
    assert.equal(d.nBands, bs.nBands);
    assert.deepEqual(Array.from(decodeArray(d.energies[0]!)), Array.from(bs.energies[0]!));
    assert.deepEqual(Array.from(decodeArray(d.distance)), Array.from(geometry.distance));
    assert.deepEqual(Array.from(decodeArray(d.kpoints)), Array.from(bs.kpoints));
    assert.equal(decodeArray(d.cartesian!).length, 3 * bs.nk);
    assert.equal(d.ticks[1]!.label, 'X');
    assert.equal(d.vbm_eV, report.gap!.vbm.eV);
    assert.equal(d.cbm_eV, report.gap!.cbm.eV);
    // No JSON arrays of numbers for the big data: every array field is an ArrayBuffer.
    assert.ok(d.energies[0]!.data instanceof ArrayBuffer);
    // Survives structured cloning (what postMessage does).
    const clone = structuredClone(d);
    assert.deepEqual(Array.from(decodeArray(clone.energies[0]!)), Array.from(bs.energies[0]!));
  });

  it('places each extremum of the report on its k index and 0-based band', async () => {
    const { bs, report, geometry } = await loadSi();
    const d = buildBandData(bs, report, geometry, 'EIGENVAL', DEFAULT_SETTINGS, 'vbm');
    assert.equal(d.marks.length, report.extrema.length);
    for (const m of d.marks) {
      const x = report.extrema[m.reportIndex]!;
      assert.equal(m.band0, x.band - 1);
      assert.equal(bs.energies[m.spin]![m.kIndex * bs.nBands + m.band0], x.eV);
    }
    const cbm = d.marks.find((m) => m.kind === 'cbm')!;
    assert.deepEqual(Array.from(bs.kpoints.subarray(3 * cbm.kIndex, 3 * cbm.kIndex + 3)), report.gap!.cbm.k);
  });

  it('sends 32-bit energies for very large runs', () => {
    const nk = Math.ceil(F64_ENERGY_LIMIT / 100) + 1;
    const small = makeBands({ kpoints: [[0, 0, 0]], energies: [[[0]]] });
    const bs = { ...small, nk, nBands: 100, kpoints: new Float64Array(3 * nk), energies: [new Float64Array(nk * 100)] };
    const geometry = { cartesian: null, distance: new Float64Array(nk), units: 'fractional' as const, segments: [], ticks: [] };
    const report = emptyReport({ file: 'big', nk, nbands: 100 });
    const d = buildBandData(bs, report, geometry, 'big', DEFAULT_SETTINGS, 'raw');
    assert.equal(d.energies[0]!.dtype, 'f32');
  });

  it('falls back from VBM = 0 to the Fermi level, then to raw energies, when edges are unknown', () => {
    const kpts = [
      [0, 0, 0],
      [0.5, 0, 0],
    ];
    const noEdges = makeBands({ kpoints: kpts, energies: [[[0], [1]]] });
    const r = analyzeBandStructure(noEdges);
    assert.equal(buildBandData(noEdges, r, pathGeometry(noEdges), 't', DEFAULT_SETTINGS, 'vbm').defaults.energyReference, 'raw');
    const withEf = makeBands({ kpoints: kpts, energies: [[[0], [1]]], fermiEnergy: 0.5 });
    const r2 = analyzeBandStructure(withEf);
    assert.equal(buildBandData(withEf, r2, pathGeometry(withEf), 't', DEFAULT_SETTINGS, 'vbm').defaults.energyReference, 'fermi');
  });

  it('nearestKIndex finds a k-point by its fractional coordinates', async () => {
    const { bs } = await loadSi();
    assert.equal(nearestKIndex(bs, [0.5, 0, 0.5]), 39);
  });
});
