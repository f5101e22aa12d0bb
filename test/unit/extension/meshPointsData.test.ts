import assert from 'node:assert/strict';
import { meshPointsData, withMeshPoints } from '../../../src/extension/meshPointsData';
import { decodeArray, type BandData } from '../../../src/protocol';
import type { MeshPointsWithEnergies } from '../../../src/core/interpolation/meshPointsOnPath';

// Two made-up points (encoding only: no physics here): the arrays travel as they are, k-points numbered from 1.
const POINTS: MeshPointsWithEnergies = {
  distance: Float64Array.of(0, 0.5),
  kpoints: Float64Array.of(0, 0, 0, 0, 0.25, 0),
  irreducible: Int32Array.of(0, 3),
  nBands: 2,
  energies: [Float64Array.of(-1, 2, -0.5, 2.5)],
};

describe('extension: mesh points in the band data', () => {
  it('encodes the points, their energies and the file k-point numbers (1-based)', () => {
    const d = meshPointsData(POINTS, [12, 12, 12]);
    assert.equal(d.count, 2);
    assert.deepEqual(d.fileKpoint, [1, 4]);
    assert.deepEqual(Array.from(decodeArray(d.distance)), [0, 0.5]);
    assert.deepEqual(Array.from(decodeArray(d.kpoints)), [0, 0, 0, 0, 0.25, 0]);
    assert.deepEqual(Array.from(decodeArray(d.energies[0]!)), [-1, 2, -0.5, 2.5]);
    assert.deepEqual(d.divisions, [12, 12, 12]);
  });

  it('adds them only to an interpolated run', () => {
    const data = {} as BandData;
    assert.equal(withMeshPoints(data, { bs: {} }).meshPoints, undefined);
    assert.equal(withMeshPoints(data, { bs: { interpolatedFrom: { divisions: [4, 4, 4] } } }).meshPoints, undefined);
    assert.equal(withMeshPoints(data, { bs: { interpolatedFrom: { divisions: [4, 4, 4] } }, meshPoints: POINTS }).meshPoints?.count, 2);
  });
});
