/**
 * BXSF band grids: the layout read back (periodic general grid, end points repeated, reciprocal vectors in
 * Å⁻¹ with the 2π), and a grid around a minimum fed to the effective-mass engine's tensor fit.
 */
import assert from 'node:assert/strict';
import { readBxsf, detectBxsf, bxsfReader } from '../../../src/core/formats/bxsf';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { ReaderError } from '../../../src/core/errors';
import type { Vec3 } from '../../../src/core/model';
import { orthorhombicLattice } from '../../support/models';
import { writeBxsf } from '../../support/writers/bxsf';

const A: Vec3 = [4, 5, 6];
const T: Vec3 = [0.6, 0.5, 0.4];

/**
 * Orthorhombic nearest-neighbour tight-binding bands on an n×n×n periodic general grid (end points repeated):
 * valence E = −1 − Σ 2t_i(1 − cos 2πk_i)·0.5, conduction E = 1 + Σ 2t_i(1 − cos 2πk_i), minimum 1 eV at Γ.
 */
function tightBindingGrid(n: number): { text: string; bands: Float64Array[] } {
  const nk = n * n * n;
  const v = new Float64Array(nk);
  const c = new Float64Array(nk);
  let p = 0;
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      for (let l = 0; l < n; l++) {
        const f = [i / (n - 1), j / (n - 1), l / (n - 1)];
        const s = f.reduce((acc, x, a) => acc + 2 * T[a]! * (1 - Math.cos(2 * Math.PI * x)), 0);
        v[p] = -1 - 0.5 * s;
        c[p] = 1 + s;
        p++;
      }
  const reciprocal = reciprocalLattice(orthorhombicLattice(...A));
  return { text: writeBxsf({ fermiEnergy: 0, dims: [n, n, n], reciprocal, bands: [v, c] }), bands: [v, c] };
}

const file = (text: string, path = 'tb.bxsf') => ({ path, bytes: new TextEncoder().encode(text) });

describe('BXSF band grid reader', () => {
  it('reads the grid: dims, end points repeated, fractional k, lattice from the reciprocal vectors, Fermi energy', () => {
    const g = tightBindingGrid(5);
    const bs = readBxsf(file(g.text));
    assert.equal(detectBxsf(file(g.text).bytes, 'x'), 0.95);
    assert.equal(bs.nk, 125);
    assert.equal(bs.nBands, 2);
    assert.equal(bs.sampling, 'grid');
    assert.deepEqual(bs.grid, { dims: [5, 5, 5], origin: [0, 0, 0], endpointsRepeated: true });
    assert.equal(bs.fermiEnergy, 0);
    // a_i = 2π (B⁻¹)ᵀ recovers the orthorhombic cell (analytic: reciprocal of the reciprocal).
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) assert.ok(Math.abs(bs.lattice![i]![j]! - (i === j ? A[i]! : 0)) < 1e-9);
    // Point (i, j, l) = (1, 2, 3) sits at index (1·5 + 2)·5 + 3 = 38, fractional (0.25, 0.5, 0.75).
    assert.deepEqual([bs.kpoints[3 * 38], bs.kpoints[3 * 38 + 1], bs.kpoints[3 * 38 + 2]], [0.25, 0.5, 0.75]);
    assert.ok(Math.abs(bs.energies[0]![38 * 2 + 1]! - g.bands[1]![38]!) < 1e-6);
  });

  it('gives the gap of the model (2 eV, direct at Γ, from the Fermi energy)', () => {
    const bs = readBxsf(file(tightBindingGrid(9).text));
    const r = analyzeBandStructure(bs);
    // Analytic model: valence maximum −1 eV and conduction minimum +1 eV, both at Γ.
    assert.ok(r.gap && Math.abs(r.gap.eV - 2) < 1e-6 && r.gap.direct);
  });

  it('feeds the tensor fit: principal masses ħ²/(2 t_i a_i²) within 3 % (orthorhombic tight-binding, analytic model)', () => {
    const bs = readBxsf(file(tightBindingGrid(25).text));
    const r = analyzeBandStructure(bs);
    const cbm = r.extrema.find((e) => e.kind === 'cbm');
    assert.ok(cbm, `a CBM extremum (warnings: ${r.warnings.join(' | ')})`);
    assert.ok(cbm.tensor, `a tensor at the CBM (warnings: ${cbm.warnings.join(' | ')})`);
    const expected = T.map((t, i) => HBAR2_OVER_ME_EV_A2 / (2 * t * A[i]! * A[i]!));
    const got = [...cbm.tensor.principal].sort((a, b) => a - b);
    const want = [...expected].sort((a, b) => a - b);
    for (let i = 0; i < 3; i++) assert.ok(Math.abs(got[i]! - want[i]!) / want[i]! < 0.03, `principal mass ${got[i]} vs ${want[i]}`);
    // Principal axes along the crystal axes x, y, z (orthorhombic): each axis has one component of magnitude ~1.
    for (const axis of cbm.tensor.axes) assert.ok(Math.max(...axis.map(Math.abs)) > 0.999);
  });

  it('refuses a grid whose header announces more values than the file holds, and marks a cut file partial on request', () => {
    const text = tightBindingGrid(5).text;
    const cut = text.slice(0, Math.floor(text.length * 0.8));
    assert.throws(
      () => readBxsf(file(cut)),
      (e: unknown) => e instanceof ReaderError && e.line > 0 && /truncated/.test(e.reason),
    );
    const bs = bxsfReader.read(file(cut), [], { allowPartial: true });
    assert.equal(bs.partial, true);
    assert.equal(bs.nBands, 1);
    assert.ok(bs.warnings.some((w) => w.code === 'partial'));
  });

  it('refuses overflow fields with a sentence naming the line', () => {
    const text = tightBindingGrid(3).text.replace(/(BAND:\s+1\n)(\s*\S+)/, '$1 ***************');
    assert.throws(
      () => readBxsf(file(text)),
      (e: unknown) => e instanceof ReaderError && /overflowed/.test(e.reason) && e.line > 10,
    );
  });

  it("ABINIT's variant: Hartree, reciprocal vectors without the 2π, fractional origin, spins interleaved", () => {
    // The header and record layout of ABINIT's printbxsf (list-directed lines, 7 values per data line).
    const n = 3;
    const vals = (f: (i: number) => number): string => {
      const v = Array.from({ length: n * n * n }, (_, i) => f(i).toExponential(8).padStart(16));
      const rows: string[] = [];
      for (let i = 0; i < v.length; i += 7) rows.push(v.slice(i, i + 7).join(''));
      return rows.join('\n');
    };
    const text = [
      ' BEGIN_INFO',
      '   #',
      '   # this is a Band-XCRYSDEN-Structure-File for Visualization of Fermi Surface',
      '   # generated by the ABINIT package',
      '   #',
      '   #  bands between            1  and            1',
      '   #',
      '   # NOTE: the first band is relative to spin-up electrons,',
      '   # the second band to spin-down and so on .. ',
      '   #',
      '   # Launch as: xcrysden --bxsf ',
      '   #',
      '   Fermi Energy:   1.00000000E-01',
      ' END_INFO',
      ' ',
      ' BEGIN_BLOCK_BANDGRID_3D',
      ' band_energies',
      ' BEGIN_BANDGRID_3D',
      '            2',
      '            3           3           3',
      '   0.0000000000000000        0.0000000000000000        0.0000000000000000',
      // Reciprocal vectors of a 4 × 5 × 6 Å cell without the 2π: 1/a_i (Å⁻¹).
      '  0.25000000000000000        0.0000000000000000        0.0000000000000000',
      '   0.0000000000000000       0.20000000000000001        0.0000000000000000',
      '   0.0000000000000000        0.0000000000000000       0.16666666666666666',
      ' BAND:            1',
      vals((i) => 0.01 * i),
      ' BAND:            2',
      vals((i) => 0.02 * i),
      '  END_BANDGRID_3D',
      ' END_BLOCK_BANDGRID_3D',
      '',
    ].join('\n');
    const bs = readBxsf(file(text, 'abinit_BXSF'));
    assert.equal(bs.nSpin, 2);
    assert.equal(bs.nBands, 1);
    // CODATA 2018 Hartree energy (units.ts): 0.1 Ha = 2.7211386 eV.
    assert.ok(Math.abs(bs.fermiEnergy! - 2.7211386245988) < 1e-9);
    assert.ok(Math.abs(bs.energies[1]![26]! - 0.02 * 26 * 27.211386245988) < 1e-6);
    for (let i = 0; i < 3; i++) assert.ok(Math.abs(bs.lattice![i]![i]! - A[i]!) < 1e-9);
    assert.ok(bs.warnings.some((w) => w.code === 'abinit-units'));
  });
});
