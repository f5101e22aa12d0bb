import assert from 'node:assert/strict';
import type { Mat3, Vec3 } from '../../src/core/model';
import type { RegularMesh } from '../../src/core/interpolation/regularMesh';
import { meshPointsNear } from '../../src/core/interpolation/meshNeighbourhood';

// The neighbourhood search visits only the box of mesh indices the radius can reach; checked against visiting
// every mesh point in the 5×5×5 block of periodic images around it (a brute force), on an oblique cell.
describe('mesh points near a k-point (meshNeighbourhood)', () => {
  const divisions: [number, number, number] = [6, 5, 7];
  const total = divisions[0] * divisions[1] * divisions[2];
  const mesh: RegularMesh = {
    divisions,
    shift: [0, 0.5, 0],
    total,
    irreducibleOf: Int32Array.from({ length: total }, (_, j) => j),
    starSize: new Int32Array(total).fill(1),
  };
  // Reciprocal rows of a triclinic cell of our own, Å⁻¹.
  const b: Mat3 = [
    [1.1, 0.2, -0.1],
    [0.3, 0.9, 0.15],
    [-0.2, 0.25, 1.3],
  ];

  function bruteForce(k: Vec3, radius: number): string[] {
    const out: string[] = [];
    for (let j = 0; j < total; j++) {
      const j3 = j % divisions[2];
      const j2 = Math.floor(j / divisions[2]) % divisions[1];
      const j1 = Math.floor(j / (divisions[1] * divisions[2]));
      const p = [(j1 + mesh.shift[0]) / divisions[0], (j2 + mesh.shift[1]) / divisions[1], (j3 + mesh.shift[2]) / divisions[2]];
      for (let a = -2; a <= 2; a++)
        for (let c = -2; c <= 2; c++)
          for (let d = -2; d <= 2; d++) {
            const g = [p[0]! + a - k[0], p[1]! + c - k[1], p[2]! + d - k[2]];
            const dk = [0, 1, 2].map((x) => g[0]! * b[0][x]! + g[1]! * b[1][x]! + g[2]! * b[2][x]!);
            if (Math.hypot(...dk) <= radius) out.push(`${j}:${dk.map((x) => x.toFixed(9)).join(',')}`);
          }
    }
    return out.sort();
  }

  it('finds exactly the mesh points (every image) within the radius', () => {
    for (const [k, radius] of [
      [[0.1, -0.3, 0.45], 0.35],
      [[0.5, 0.5, 0.5], 0.6],
      [[-0.02, 0.9, 0.33], 1.2],
    ] as [Vec3, number][]) {
      const found = meshPointsNear(mesh, b, k, radius).map((p) => `${p.j}:${p.dk.map((x) => x.toFixed(9)).join(',')}`);
      assert.deepEqual(found.sort(), bruteForce(k, radius));
      assert.ok(found.length > 0);
    }
  });
});
