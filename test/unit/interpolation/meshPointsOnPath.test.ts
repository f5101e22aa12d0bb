import assert from 'node:assert/strict';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { readFromBytes } from '../../../src/core/load';
import { readerById } from '../../../src/core/formats/index';
import { interpolatedPathRun } from '../../../src/core/analysis/meshRunPath';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { meshPointsOnSegment, meshRunPointsOnPath } from '../../../src/core/interpolation/meshPointsOnPath';
import type { BandStructure, Vec3 } from '../../../src/core/model';
import { axisValleyBands, axisValleyMeshRun, type AxisValleyParameters } from '../../../scripts/meshModel/axisValleyModel';

const close = (a: number, b: number, tol = 1e-9): boolean => Math.abs(a - b) <= tol;

describe('mesh points on a path (pure geometry)', () => {
  // fcc, primitive reciprocal basis: Γ = (0,0,0), X = (0, ½, ½) (Setyawan & Curtarolo 2010, memory). Along
  // Γ–X, k(t) = (0, t/2, t/2); on a Γ-centred 12×12×12 mesh every coordinate must be j/12, so t/2 = j/12:
  // t = j/6, j = 0…6 (mesh geometry), seven points including both ends.
  it('fcc 12³ Γ-centred: Γ–X passes through a mesh point at every sixth of the segment', () => {
    const got = meshPointsOnSegment({ divisions: [12, 12, 12], shift: [0, 0, 0] }, [0, 0, 0], [0, 0.5, 0.5]);
    assert.equal(got.length, 7);
    got.forEach((p, j) => {
      assert.ok(close(p.t, j / 6), `point ${j}: t = ${p.t}`);
      // Mesh order (j1 n2 + j2) n3 + j3 of (0, j, j) (regularMesh.ts's layout).
      assert.equal(p.meshIndex, j * 12 + j);
    });
  });

  it('fcc 12³: L–Γ (½,½,½ → 0) at every sixth; X–W (0,½,½ → ¼,¾,½) at every third of the segment', () => {
    // L = (½,½,½): 12 t/2 integer -> t = j/6. W = (¼,¾,½) (Setyawan & Curtarolo 2010, memory): from X the
    // first two coordinates move by ¼ and the third stays ½ (= 6/12): 12 t/4 integer -> t = j/3.
    const mesh = { divisions: [12, 12, 12] as [number, number, number], shift: [0, 0, 0] as [number, number, number] };
    assert.deepEqual(
      meshPointsOnSegment(mesh, [0.5, 0.5, 0.5], [0, 0, 0]).map((p) => Math.round(p.t * 6)),
      [0, 1, 2, 3, 4, 5, 6],
    );
    const xw = meshPointsOnSegment(mesh, [0, 0.5, 0.5], [0.25, 0.75, 0.5]);
    assert.equal(xw.length, 4);
    xw.forEach((p, j) => assert.ok(close(p.t, j / 3), `point ${j}: t = ${p.t}`));
  });

  it('a shifted mesh: Γ–X of a ½-shifted 4×4×4 mesh meets no mesh point (k₁ = 0 is never (j + ½)/4)', () => {
    assert.deepEqual(meshPointsOnSegment({ divisions: [4, 4, 4], shift: [0.5, 0.5, 0.5] }, [0, 0, 0], [0, 0.5, 0.5]), []);
    // A line of the shifted mesh itself: (⅛, t, ⅛) meets (j + ½)/4 at t = ⅛, ⅜ within 0 ≤ t ≤ ½.
    const got = meshPointsOnSegment({ divisions: [4, 4, 4], shift: [0.5, 0.5, 0.5] }, [0.125, 0, 0.125], [0.125, 0.5, 0.125]);
    assert.deepEqual(
      got.map((p) => p.t * 0.5),
      [0.125, 0.375],
    );
  });

  it('a point off the line by more than the tolerance is not on it', () => {
    // (t, 1/24, 0) lies half a step of a 12-mesh off every mesh line along axis 1.
    assert.deepEqual(meshPointsOnSegment({ divisions: [12, 12, 12], shift: [0, 0, 0] }, [0, 1 / 24, 0], [0.5, 1 / 24, 0]), []);
    // The same line moved by 1e-7 of a fraction (about 1e-6 of a step) is still on the mesh.
    assert.equal(meshPointsOnSegment({ divisions: [12, 12, 12], shift: [0, 0, 0] }, [0, 1e-7, 0], [0.5, 1e-7, 0]).length, 7);
  });
});

describe('mesh points of a mesh run on its interpolated path', function () {
  this.timeout(120000);
  const MODEL: AxisValleyParameters = { L: 3.8, v0: -0.3, tv: 0.45, ec: 5.2, a: -1.6295, b: 0.25, B: 1.2 };
  let mesh: BandStructure;
  before(async () => {
    await ensureSymmetryReady();
    // Read from the bytes in memory, as the editor hands them to the reader (no files needed).
    const run = axisValleyMeshRun(MODEL, 12, 'axis-valley mesh points');
    const bytes = (path: string, text: string) => ({ path, bytes: new TextEncoder().encode(text) });
    mesh = await readFromBytes(readerById('vasp-eigenval')!, bytes('EIGENVAL', run.eigenval), [bytes('POSCAR', run.poscar)]);
  });

  it('simple cubic 12³: seven points per segment of Γ–X–M–Γ–R–X|M–R, at sixths, carrying the model energies', () => {
    const made = interpolatedPathRun(mesh);
    assert.ok(made.path, made.reason ?? '');
    const path = made.path;
    const g = pathGeometry(path);
    const got = meshRunPointsOnPath(mesh, { kpoints: path.kpoints, distance: g.distance, segments: g.segments }, path.nBands);
    assert.ok(got.points, got.reason ?? '');
    const p = got.points;
    // Every segment of the simple-cubic path moves each changing coordinate by ½ (Γ, X = (0,½,0), M = (½,½,0),
    // R = (½,½,½); Setyawan & Curtarolo 2010, memory): on a 12-mesh six steps, seven points. Five connected
    // segments share four corners (31 points), then M–R after the break adds seven (mesh geometry).
    assert.equal(g.segments.length, 6);
    assert.equal(p.irreducible.length, 38);
    for (let i = 0; i < p.irreducible.length; i++) {
      const k: Vec3 = [p.kpoints[3 * i]!, p.kpoints[3 * i + 1]!, p.kpoints[3 * i + 2]!];
      // On the mesh: every coordinate a multiple of 1/12.
      k.forEach((x) => assert.ok(close(x * 12, Math.round(x * 12), 1e-6), `point ${i}: k = ${k.join(', ')}`));
      // At a sixth of its segment, by path distance.
      const seg = g.segments.find((s) => p.distance[i]! >= g.distance[s.start]! - 1e-9 && p.distance[i]! <= g.distance[s.end]! + 1e-9)!;
      const t = (p.distance[i]! - g.distance[seg.start]!) / (g.distance[seg.end]! - g.distance[seg.start]!);
      assert.ok(close(t * 6, Math.round(t * 6), 1e-6), `point ${i}: t = ${t}`);
      // The energies are the data of the run's k-point that stands for it: the model there (the analytic model
      // as written with 6 decimals), whichever image of the star the path passes through.
      const exact = axisValleyBands(MODEL, k);
      for (let b = 0; b < p.nBands; b++) assert.ok(close(p.energies[0]![i * p.nBands + b]!, exact[b]!, 1e-6), `point ${i} band ${b + 1}`);
    }
    // Both sides of the break X|M are drawn at one distance, with different k-points of the run.
    const atBreak = g.distance[g.segments[5]!.start]!;
    const there = [...p.distance.keys()].filter((i) => close(p.distance[i]!, atBreak));
    assert.equal(there.length, 2);
    assert.notEqual(p.irreducible[there[0]!], p.irreducible[there[1]!]);
  });

  it('a run whose k-points are not a mesh of its crystal has no mesh points to draw, with the reason', () => {
    const broken: BandStructure = { ...mesh, weights: Float64Array.from(mesh.weights!, (w, i) => (i === 0 ? w * 3 : w)) };
    const got = meshRunPointsOnPath(broken, { kpoints: new Float64Array(6), distance: new Float64Array(2), segments: [] }, 2);
    assert.equal(got.points, null);
    assert.match(got.reason ?? '', /weight of k-point 1/);
  });
});
