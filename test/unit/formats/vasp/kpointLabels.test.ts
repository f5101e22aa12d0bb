/**
 * The one KPOINTS labelling rule (formats/vasp/kpointLabels.ts) shared by the EIGENVAL and vasprun.xml readers,
 * and the one rule that drops a hybrid run's self-consistent mesh (formats/vasp/hybridMesh.ts).
 * Path: the face-centred cubic path Γ–X–W–L in fractional coordinates of the reciprocal lattice vectors,
 * X = (1/2, 0, 1/2), W = (1/2, 1/4, 3/4), L = (1/2, 1/2, 1/2) (Setyawan & Curtarolo, Comput. Mater. Sci. 49,
 * 299 (2010), table of the FCC special points (memory)). The k-points are sampled on that path here.
 */
import assert from 'node:assert/strict';
import type { Vec3 } from '../../../../src/core/model';
import type { LineModePath } from '../../../../src/core/formats/vasp/kpoints';
import { SAME_K_TOLERANCE, labelsFromLineMode, sameK } from '../../../../src/core/formats/vasp/kpointLabels';
import { dropMeshBeforePath, meshPointsBeforePath } from '../../../../src/core/formats/vasp/hybridMesh';
import { labelsAt } from '../../../support/unitLabels';

const G: Vec3 = [0, 0, 0];
const X: Vec3 = [0.5, 0, 0.5];
const W: Vec3 = [0.5, 0.25, 0.75];
const L: Vec3 = [0.5, 0.5, 0.5];

function linePath(ends: [Vec3, string | null][], n: number): LineModePath {
  return { pointsPerSegment: n, coordinates: 'reciprocal', ends: ends.map(([k, label], i) => ({ k, label, line: 5 + i })) };
}

/** n points per segment, both ends included, as VASP samples a line-mode KPOINTS (common practice). */
function sample(ends: Vec3[], n: number): Float64Array {
  const out: number[] = [];
  for (let s = 0; s < ends.length / 2; s++) {
    const a = ends[2 * s]!;
    const b = ends[2 * s + 1]!;
    for (let i = 0; i < n; i++) for (let c = 0; c < 3; c++) out.push(a[c]! + ((b[c]! - a[c]!) * i) / (n - 1));
  }
  return new Float64Array(out);
}

describe('VASP k-point labels: one rule for EIGENVAL and vasprun.xml', () => {
  const ends: [Vec3, string | null][] = [
    [G, 'Γ'],
    [X, 'X'],
    [X, 'X'],
    [W, 'W'],
    [W, 'W'],
    [L, 'L'],
  ];
  const path = linePath(ends, 5);
  const k = sample(
    ends.map((e) => e[0]),
    5,
  );

  it('labels the ends of each segment by position when the count matches', () => {
    const r = labelsFromLineMode(path, k, 15, null);
    assert.equal(r.warning, null);
    // Segment s of 5 points spans indices 5s … 5s + 4 (both ends written, common practice).
    assert.deepEqual(r.labels, labelsAt([0, 4, 5, 9, 10, 14], ['Γ', 'X', 'X', 'W', 'W', 'L']));
  });

  it('falls back to coordinates, with a warning giving both counts, when the file holds fewer points', () => {
    const r = labelsFromLineMode(path, k.slice(0, 3 * 10), 10, null);
    assert.match(r.warning ?? '', /3 segments of 5 points \(15 k-points\) but the eigenvalue file has 10/);
    assert.match(r.warning ?? '', /5 of 6 found/); // ends Γ, X, X, W, W lie among the first 10 points; L does not
    assert.deepEqual(
      r.labels.map((l) => l.label),
      ['Γ', 'X', 'X', 'W'],
    );
  });

  it('does not label by position when a coordinate disagrees (labels only where the coordinates match)', () => {
    const shifted = k.slice();
    shifted[3 * 14] = 0.4; // the last point is no longer L
    const r = labelsFromLineMode(path, shifted, 15, null);
    assert.equal(r.warning, null);
    assert.ok(!r.labels.some((l) => l.label === 'L'));
    assert.ok(r.labels.some((l) => l.index === 0 && l.label === 'Γ'));
  });

  it('places no label for a cartesian path without a structure, and says why', () => {
    const r = labelsFromLineMode({ ...path, coordinates: 'cartesian' }, k, 15, null);
    assert.deepEqual(r.labels, []);
    assert.match(r.warning ?? '', /cartesian/);
  });

  it('sameK compares each fractional coordinate within the tolerance', () => {
    const at = new Float64Array([0.5, 0, 0.5]);
    assert.ok(sameK(X, at, 0));
    assert.ok(sameK([0.5 + SAME_K_TOLERANCE / 2, 0, 0.5], at, 0));
    assert.ok(!sameK([0.5 + 2 * SAME_K_TOLERANCE, 0, 0.5], at, 0));
    assert.ok(!sameK(W, at, 0));
  });
});

describe('VASP hybrid runs: the weighted mesh before the zero-weight path is dropped once', () => {
  const nBands = 2;
  const arrays = (weights: number[]) => {
    const nk = weights.length;
    const kpoints = new Float64Array(3 * nk).map((_, i) => i);
    const energies = [new Float64Array(nk * nBands).map((_, i) => i)];
    return { kpoints, weights: new Float64Array(weights), energies, occupations: null, nk };
  };

  it('finds the mesh: positive weights first, then at least two zero-weight points', () => {
    assert.equal(meshPointsBeforePath([0.25, 0.25, 0.5, 0, 0, 0], 6), 3);
    assert.equal(meshPointsBeforePath([0.25, 0.25, 0.5, 0], 4), 0); // a path of one point is no path
    assert.equal(meshPointsBeforePath([0.5, 0, 0.5, 0, 0], 5), 0); // a zero inside the mesh: not this layout
    assert.equal(meshPointsBeforePath([0, 0, 0, 0], 4), 0); // a plain band run
    assert.equal(meshPointsBeforePath([0.5, 0.5], 2), 0); // a plain self-consistent run
    assert.equal(meshPointsBeforePath(null, 5), 0);
  });

  it('keeps the path points with their energies and names what it dropped', () => {
    const r = dropMeshBeforePath(arrays([0.5, 0.5, 0, 0, 0]), nBands);
    assert.equal(r.arrays.nk, 3);
    assert.deepEqual([...r.arrays.kpoints], [6, 7, 8, 9, 10, 11, 12, 13, 14]);
    assert.deepEqual([...r.arrays.weights!], [0, 0, 0]);
    assert.deepEqual([...r.arrays.energies[0]!], [4, 5, 6, 7, 8, 9]);
    assert.equal(r.warning?.code, 'mesh-points-dropped');
    assert.match(r.warning?.message ?? '', /first 2 k-points .* the 3 zero-weight points/);
  });

  it('leaves a run without such a mesh as it is', () => {
    const a = arrays([0, 0, 0]);
    const r = dropMeshBeforePath(a, nBands);
    assert.equal(r.arrays, a);
    assert.equal(r.warning, null);
  });
});
