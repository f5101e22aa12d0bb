/**
 * Model metals written in every layout the tool reads (test writers), read back by content from a run folder
 * and classified: the free-electron metal (Ashcroft & Mermin ch. 2) with Fermi–Dirac, Gaussian and
 * Methfessel–Paxton occupations (Phys. Rev. B 40, 3616 (1989)), the two-band semimetal, a non-integer and an
 * odd electron count, the spin-polarised half-metal, and a smeared semiconductor that stays one.
 */
import assert from 'node:assert/strict';
import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import type { BandStructure, Report } from '../../../src/core/model';
import { writeEigenval } from '../../support/writers/vasp';
import { writeVasprun } from '../../support/writers/vasprun';
import { writeQeXml } from '../../support/writers/qe';
import { writeCastepBands } from '../../support/writers/castep';
import { writeWannier90 } from '../../support/writers/wannier90';
import { freeElectronMetal, halfMetal, smearedFreeElectronMetal, smearedOccupations, smearedSemiconductor, twoBandSemimetal } from '../../support/metalModels';

const root = mkdtempSync(join(tmpdir(), 'vs-metals-'));
let n = 0;
async function analyse(files: Record<string, string>): Promise<Report> {
  const dir = join(root, `run${n++}`);
  mkdirSync(dir);
  for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
  const bs = await loadRun(nodeFileAccessor, dir);
  return analyzeBandStructure(bs);
}

type Layout = { name: string; occupations: boolean; fermi: boolean; count: boolean; spin2: boolean; write: (bs: BandStructure) => Record<string, string> };

const LAYOUTS: Layout[] = [
  {
    name: 'EIGENVAL',
    occupations: true,
    fermi: false,
    count: true,
    spin2: true,
    write: (bs) => ({ EIGENVAL: writeEigenval({ system: 'model', nIons: 1, electrons: bs.electrons ?? 0, nBands: bs.nBands, kpoints: bs.kpoints, energies: bs.energies, occupations: bs.occupations as Float64Array[] | null, lattice: bs.lattice! }) }),
  },
  { name: 'vasprun.xml', occupations: true, fermi: true, count: true, spin2: true, write: (bs) => ({ 'vasprun.xml': writeVasprun(bs) }) },
  { name: 'pw.x XML', occupations: true, fermi: true, count: true, spin2: true, write: (bs) => ({ 'data-file-schema.xml': writeQeXml(bs, { occupationsKind: bs.occupations ? 'smearing' : 'fixed' }) }) },
  { name: 'CASTEP .bands', occupations: false, fermi: true, count: true, spin2: true, write: (bs) => ({ 'model.bands': writeCastepBands(bs) }) },
  {
    name: 'Wannier90 band.dat',
    occupations: false,
    fermi: true,
    count: false,
    spin2: false,
    write: (bs) => {
      const w = writeWannier90(bs, bs.fermiEnergy !== null ? { fermiEnergy: bs.fermiEnergy } : {});
      return { 'model_band.dat': w.bandDat, 'model_band.kpt': w.kpt, 'model_band.labelinfo.dat': w.labelinfo, 'model.win': w.win };
    },
  },
];

/** The model as the layout can hold it: without occupations where it has none. */
function asWritten(bs: BandStructure, l: Layout): BandStructure {
  const c = { ...bs };
  if (!l.occupations) c.occupations = null;
  return c;
}

describe('model metals through every layout', () => {
  for (const l of LAYOUTS) {
    describe(l.name, () => {
      for (const kind of ['fermi-dirac', 'gaussian', 'methfessel-paxton'] as const) {
        it(`free-electron metal (${kind} occupations where the layout has them): a metal, band 1 crossing`, async () => {
          const r = await analyse(l.write(asWritten(smearedFreeElectronMetal(kind, 0.1), l)));
          assert.equal(r.metal, true, r.classificationReason);
          assert.equal(r.gap, null);
          assert.equal(r.semimetal, false, r.classificationReason);
          assert.ok(r.crossingBands?.includes(1), String(r.crossingBands));
          assert.ok(r.fermi_eV !== null);
        });
      }

      it('two-band semimetal: a semimetal, bands 2 and 3 crossing', async () => {
        const bs = twoBandSemimetal();
        if (l.occupations) bs.occupations = smearedOccupations(bs, 'fermi-dirac', 0, 0.01);
        const r = await analyse(l.write(asWritten(bs, l)));
        assert.equal(r.metal, true, r.classificationReason);
        // Without an electron count (Wannier90), whole filling cannot be checked: undetermined, not false.
        assert.equal(r.semimetal, l.count || l.occupations ? true : null, r.classificationReason);
        assert.deepEqual(r.crossingBands, [2, 3]);
      });

      if (l.spin2) {
        it('spin-polarised half-metal: spin up metallic, spin down gapped', async () => {
          const bs = halfMetal();
          const r = await analyse(l.write(asWritten(bs, l)));
          assert.equal(r.metal, true, r.classificationReason);
          assert.deepEqual(r.spinChannels?.map((c) => c.metal), [true, false], r.classificationReason);
        });
      }

      it('semiconductor with smearing tails stays a semiconductor (gap 1.2 eV, analytic model)', async () => {
        const bs = smearedSemiconductor(0.2);
        const r = await analyse(l.write(asWritten(bs, l)));
        assert.equal(r.metal, false, r.classificationReason);
        assert.ok(r.gap && Math.abs(r.gap.eV - 1.2) < 2e-4, JSON.stringify(r.gap?.eV));
      });
    });
  }

  it('pw.x XML: a non-integer electron count (2.9, no occupations or Fermi energy written) is a metal', async () => {
    const bs = freeElectronMetal(2.9);
    bs.fermiEnergy = null;
    const r = await analyse({ 'data-file-schema.xml': writeQeXml(bs) });
    assert.equal(r.electrons, 2.9);
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /2.9 electrons .* fill 1.45 bands/); // 2.9 / 2 per band
  });

  it('EIGENVAL without occupations: an odd count (3) without spin polarisation is a metal', async () => {
    const bs = freeElectronMetal(3);
    const r = await analyse({ EIGENVAL: writeEigenval({ system: 'model', nIons: 1, electrons: 3, nBands: bs.nBands, kpoints: bs.kpoints, energies: bs.energies, lattice: bs.lattice! }) });
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /3 electrons without spin polarisation .* fill 1.5 bands/);
  });

  it('CASTEP .bands: the same odd count with a Fermi energy outside every band is still reported, and the disagreement said', async () => {
    const bs = freeElectronMetal(3);
    bs.fermiEnergy = -1; // below every band: inconsistent with 3 electrons on purpose
    const r = await analyse({ 'model.bands': writeCastepBands(bs) });
    assert.equal(r.metal, false); // the written Fermi energy is the stronger evidence
    assert.ok(r.warnings.some((w) => /cannot fill whole bands/.test(w)));
  });
});
