/**
 * BXSF as written in practice: both grid headers (BEGIN_BANDGRID_3D_* as Wannier90 writes it, BANDGRID_3D_*
 * as Quantum ESPRESSO's fs.x does), band numbers from the BAND: lines, end points repeated or not, and
 * reciprocal vectors in Å⁻¹ with or without 2π or in 2π/alat. Every variant of one analytic model (orthorhombic
 * nearest-neighbour tight binding, conduction mass ħ²/(2 t_i a_i²) along axis i at Γ) must give the same masses.
 */
import assert from 'node:assert/strict';
import { readBxsf } from '../../../src/core/formats/bxsf';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { ReaderError } from '../../../src/core/errors';
import type { ReadOptions } from '../../../src/core/formats/types';
import type { Structure, Vec3 } from '../../../src/core/model';
import { orthorhombicLattice } from '../../support/models';
import { writeBxsf, type BxsfContent } from '../../support/writers/bxsf';

const A: Vec3 = [4, 5, 6];
const T: Vec3 = [0.6, 0.5, 0.4];
const LATTICE = orthorhombicLattice(...A);
const STRUCTURE: Structure = { lattice: LATTICE, species: ['Xx'], positions: new Float64Array([0, 0, 0]) };

/** Valence −1 − ½Σ2t(1 − cos 2πk), conduction 1 + Σ2t(1 − cos 2πk) on n points per axis (repeated: i/(n−1)). */
function grid(n: number, repeated: boolean, fermiEnergy = 0): Pick<BxsfContent, 'dims' | 'bands' | 'reciprocal' | 'fermiEnergy'> {
  const d = repeated ? n - 1 : n;
  const v = new Float64Array(n ** 3);
  const c = new Float64Array(n ** 3);
  let p = 0;
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      for (let l = 0; l < n; l++) {
        const s = [i / d, j / d, l / d].reduce((acc, x, a) => acc + 2 * T[a]! * (1 - Math.cos(2 * Math.PI * x)), 0);
        v[p] = -1 - 0.5 * s;
        c[p++] = 1 + s;
      }
  return { fermiEnergy, dims: [n, n, n], reciprocal: reciprocalLattice(LATTICE), bands: [v, c] };
}

const file = (text: string) => ({ path: 'model.bxsf', bytes: new TextEncoder().encode(text) });
/** Analytic conduction masses at Γ, sorted. */
const EXPECTED = T.map((t, i) => HBAR2_OVER_ME_EV_A2 / (2 * t * A[i]! * A[i]!)).sort((a, b) => a - b);

function cbmMasses(text: string, options: ReadOptions): { masses: number[]; band: number; warnings: string[] } {
  const bs = readBxsf(file(text), options);
  const r = analyzeBandStructure(bs);
  const cbm = r.extrema.find((e) => e.kind === 'cbm');
  assert.ok(cbm?.tensor, `a CBM tensor (warnings: ${r.warnings.join(' | ')})`);
  return { masses: [...cbm.tensor.principal].sort((a, b) => a - b), band: cbm.band, warnings: r.warnings };
}

describe('BXSF header variants and units', () => {
  const variants: { name: string; content: BxsfContent; options: ReadOptions; band: number; unitNote: RegExp | null }[] = [
    {
      name: 'Wannier90 header, Å⁻¹ with 2π, end points repeated',
      content: { ...grid(25, true) },
      options: { structure: STRUCTURE },
      band: 2,
      unitNote: /Å⁻¹ including 2π/,
    },
    {
      name: 'fs.x header (BANDGRID_3D_BANDS), 2π/alat, bands numbered 3–4',
      content: { ...grid(25, true), style: 'fs.x', units: 'two-pi-over-alat', alat: 4, firstBand: 3 },
      options: { structure: STRUCTURE },
      band: 4,
      unitNote: /2π\/alat/,
    },
    {
      name: 'Å⁻¹ without the 2π, end points not repeated (24 distinct points)',
      content: { ...grid(24, false), units: 'angstrom' },
      options: { structure: STRUCTURE },
      band: 2,
      unitNote: /without the 2π/,
    },
    {
      name: 'fs.x header with --alat and no structure: 2π/alat assumed',
      content: { ...grid(25, true), style: 'fs.x', units: 'two-pi-over-alat', alat: 4 },
      options: { alatAngstrom: 4 },
      band: 2,
      unitNote: /assumed in units of 2π\/alat/,
    },
  ];
  const reference = cbmMasses(writeBxsf(variants[0]!.content), variants[0]!.options).masses;

  it('the reference variant gives the analytic principal masses within 3 % (tight-binding model)', () => {
    for (let i = 0; i < 3; i++)
      assert.ok(Math.abs(reference[i]! - EXPECTED[i]!) / EXPECTED[i]! < 0.03, `${reference[i]} vs ${EXPECTED[i]}`);
  });

  for (const v of variants) {
    it(`${v.name}: the same masses, the band numbered as written, the unit said`, () => {
      const text = writeBxsf(v.content);
      const got = cbmMasses(text, v.options);
      // Same k-points and energies in every variant (written to 8 significant digits): same masses.
      for (let i = 0; i < 3; i++)
        assert.ok(Math.abs(got.masses[i]! - reference[i]!) < 1e-4 * reference[i]!, `${got.masses[i]} vs ${reference[i]}`);
      assert.equal(got.band, v.band);
      if (v.unitNote)
        assert.ok(
          got.warnings.some((w) => v.unitNote!.test(w)),
          got.warnings.join(' | '),
        );
    });
  }

  it('detects repeated end points from the energies', () => {
    assert.equal(readBxsf(file(writeBxsf(grid(9, true)))).grid!.endpointsRepeated, true);
    const open = readBxsf(file(writeBxsf(grid(8, false))));
    assert.equal(open.grid!.endpointsRepeated, false);
    // Not repeated: point i sits at i/n (n = 8), so index 1 along the last axis is at 1/8.
    assert.equal(open.kpoints[3 * 1 + 2], 1 / 8);
  });

  it('fs.x header without alat or structure: read as Å⁻¹, and the warning says masses may be off', () => {
    const bs = readBxsf(file(writeBxsf({ ...grid(5, true), style: 'fs.x', units: 'two-pi-over-alat', alat: 4 })));
    assert.ok(bs.warnings.some((w) => /may be off by the factor alat\/2π/.test(w.message)));
  });

  it('the Fermi energy of the header classifies: inside the conduction band is a metal', () => {
    const semi = analyzeBandStructure(readBxsf(file(writeBxsf(grid(9, true, 0)))));
    assert.equal(semi.metal, false);
    const metal = analyzeBandStructure(readBxsf(file(writeBxsf(grid(9, true, 1.5)))));
    // Conduction band spans 1 … 1 + 4Σt = 7 eV (analytic model): 1.5 eV lies inside.
    assert.equal(metal.metal, true);
    assert.deepEqual(metal.crossingBands, [2]);
  });

  it('a broken header: the error names the header line at fault', () => {
    const text = writeBxsf({ ...grid(3, true), style: 'fs.x' });
    const lines = text.split('\n');
    const at = lines.findIndex((l) => /BANDGRID_3D_BANDS/.test(l));
    lines[at + 1] = '   four';
    assert.throws(
      () => readBxsf(file(lines.join('\n'))),
      (e: unknown) => e instanceof ReaderError && e.line === at + 2 && /number of bands/.test(e.reason),
    );
    // No grid header at all: the error points at the line after BEGIN_BLOCK_BANDGRID_3D, not at the block's end.
    const noHeader = text.split('\n');
    const h = noHeader.findIndex((l) => /BANDGRID_3D_BANDS/.test(l));
    noHeader[h] = ' GRID_OF_BANDS';
    const block = noHeader.findIndex((l) => /BEGIN_BLOCK_BANDGRID_3D/.test(l));
    assert.throws(
      () => readBxsf(file(noHeader.join('\n'))),
      (e: unknown) => e instanceof ReaderError && e.line === block + 2 && /no grid header/.test(e.reason),
    );
  });
});
