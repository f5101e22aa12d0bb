import assert from 'node:assert/strict';
import { kStencil, stencilLayoutFor, writeStencil } from '../../../src/core/lattice/stencil';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import type { Vec3 } from '../../../src/core/model';
import { fccLattice } from '../../support/models';

describe('k stencil for tensor runs', () => {
  const lattice = fccLattice(5.43);
  const rec = reciprocalLattice(lattice);
  const cart = (f: Vec3): Vec3 => [0, 1, 2].map((j) => f[0] * rec[0][j]! + f[1] * rec[1][j]! + f[2] * rec[2][j]!) as Vec3;

  it('places 6 points at h along ±x, ±y, ±z and 12 at h√2 on the face diagonals (the 19-point stencil)', () => {
    const h = 0.02;
    const center: Vec3 = [0.425, 0, 0.425];
    const st = kStencil(center, h, lattice);
    assert.equal(st.points.length, 19);
    assert.deepEqual(st.points[0], center);
    const c0 = cart(center);
    const dists = st.points.slice(1).map((p) => {
      const c = cart(p);
      return Math.hypot(c[0] - c0[0], c[1] - c0[1], c[2] - c0[2]);
    });
    // Geometry of the stencil (analytic): six at h, twelve at h√2, no point repeated.
    assert.equal(dists.filter((d) => Math.abs(d - h) < 1e-12).length, 6);
    assert.equal(dists.filter((d) => Math.abs(d - h * Math.SQRT2) < 1e-12).length, 12);
    const keys = new Set(st.points.map((p) => p.map((x) => x.toFixed(9)).join(',')));
    assert.equal(keys.size, 19);
  });

  it('writes each code its own k-point input layout', () => {
    const st = kStencil([0, 0, 0], 0.01, lattice);
    assert.equal(stencilLayoutFor('vasp-eigenval'), 'vasp');
    assert.equal(stencilLayoutFor('vasprun-xml'), 'vasp');
    assert.equal(stencilLayoutFor('qe-xml'), 'qe');
    assert.equal(stencilLayoutFor('castep-bands'), 'castep');
    assert.equal(stencilLayoutFor('wannier90-band'), 'list');
    const qe = writeStencil(st, 'qe', 'Γ').trim().split('\n');
    assert.equal(qe[1], 'K_POINTS crystal');
    assert.equal(qe[2], '19');
    assert.equal(qe.length, 3 + 19);
    const castep = writeStencil(st, 'castep', 'Γ').trim().split('\n');
    assert.equal(castep[1], '%BLOCK SPECTRAL_KPOINT_LIST');
    assert.equal(castep[castep.length - 1], '%ENDBLOCK SPECTRAL_KPOINT_LIST');
    assert.equal(castep.length, 3 + 19);
    const list = writeStencil(st, 'list', 'Γ').trim().split('\n');
    assert.equal(list.filter((l) => !l.startsWith('#')).length, 19);
  });

  it('refuses a step that is not a positive length', () => {
    assert.throws(() => kStencil([0, 0, 0], 0, lattice), RangeError);
    assert.throws(() => kStencil([0, 0, 0], Number.NaN, lattice), RangeError);
  });
});
