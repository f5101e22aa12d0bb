import assert from 'node:assert/strict';
import { automaticDivisions, readKpointsMeshHeader } from '../../../../src/core/formats/vasp/kpointsMesh';
import { ensureSymmetryReady } from '../../../../src/core/lattice/symmetry';
import { irreducibleMesh, recogniseMesh } from '../../../../src/core/interpolation/regularMesh';
import { latticeSymmetry } from '../../../support/unitSymmetry';
import { cubicLattice, orthorhombicLattice } from '../../../support/models';

// VASP's automatic KPOINTS layouts (as documented by VASP; common practice): "0" on line 2, the mesh kind on
// line 3, divisions on line 4, an optional shift on line 5. Monkhorst–Pack meshes (Phys. Rev. B 13, 5188
// (1976)) are offset by half a spacing from Γ along axes with an even number of divisions.

describe('KPOINTS automatic mesh headers', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('Γ-centred and Monkhorst–Pack meshes, with and without a shift', () => {
    assert.deepEqual(readKpointsMeshHeader('Automatic mesh\n0\nGamma\n  12 12 12\n  0 0 0\n'), {
      kind: 'mesh',
      mesh: { centring: 'gamma', divisions: [12, 12, 12], shift: [0, 0, 0] },
    });
    assert.deepEqual(readKpointsMeshHeader('mesh\n 0\nMonkhorst-Pack\n4 4 3\n'), {
      kind: 'mesh',
      mesh: { centring: 'monkhorst-pack', divisions: [4, 4, 3], shift: [0.5, 0.5, 0] },
    });
    assert.deepEqual(readKpointsMeshHeader('mesh\n0\ngamma\n6 6 6\n0.5 0.5 0.5\n'), {
      kind: 'mesh',
      mesh: { centring: 'gamma', divisions: [6, 6, 6], shift: [0.5, 0.5, 0.5] },
    });
    assert.deepEqual(readKpointsMeshHeader('auto\n0\nAuto\n  20\n'), { kind: 'auto-length', length: 20 });
  });

  it('line mode, explicit lists and nonsense are not meshes, with the reason', () => {
    assert.equal(readKpointsMeshHeader('path\n40\nLine-mode\nreciprocal\n').kind, 'not-a-mesh');
    assert.equal(readKpointsMeshHeader('list\n2\nReciprocal\n0 0 0 1\n0.5 0 0 1\n').kind, 'not-a-mesh');
    assert.equal(readKpointsMeshHeader('x\n0\nGamma\n12 -1 4\n').kind, 'not-a-mesh');
    assert.equal(readKpointsMeshHeader('x\n0\nGamma\n1e9 1 1\n').kind, 'not-a-mesh');
    assert.equal(readKpointsMeshHeader('').kind, 'not-a-mesh');
  });

  it('the header and the mesh recognised from the k-points agree (simple cubic, shifted 4×4×4)', () => {
    const header = readKpointsMeshHeader('m\n0\nMonkhorst-Pack\n4 4 4\n');
    assert.equal(header.kind, 'mesh');
    if (header.kind !== 'mesh') return;
    const sym = latticeSymmetry(cubicLattice(3));
    const { kpoints, weights } = irreducibleMesh(header.mesh.divisions, header.mesh.shift, sym.reciprocalPointGroup);
    const rec = recogniseMesh(kpoints, weights, sym.reciprocalPointGroup);
    assert.ok(rec.mesh);
    assert.deepEqual(rec.mesh.divisions, header.mesh.divisions);
    assert.deepEqual(rec.mesh.shift, header.mesh.shift);
  });

  it('fully automatic divisions follow n = max(1, ⌊R_k |b| + ½⌋)', () => {
    // Cubic a = 4 Å: |b| = 1/4 Å⁻¹ without 2π, R_k = 20 → n = 5 (the documented rule, worked by hand).
    assert.deepEqual(automaticDivisions(20, cubicLattice(4)), [5, 5, 5]);
    // Tetragonal c = 10 Å: |b3| = 0.1, R_k = 20 → 2; R_k = 1 → 1 (at least one division).
    assert.deepEqual(automaticDivisions(20, orthorhombicLattice(4, 4, 10)), [5, 5, 2]);
    assert.deepEqual(automaticDivisions(1, orthorhombicLattice(4, 4, 10)), [1, 1, 1]);
  });
});
