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
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { writeBxsf } from '../../support/writers/bxsf';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { cubicLattice } from '../../support/models';
import * as metals from '../../support/metalModels';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { writeCastepBands } from '../../support/writers/castep';
import { writeWannier90 } from '../../support/writers/wannier90';

const root = mkdtempSync(join(tmpdir(), 'vs-metals-'));
let n = 0;
async function analyzeRun(files: Record<string, string>, main?: string): Promise<Report> {
  const dir = join(root, `run${n++}`);
  mkdirSync(dir);
  for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
  const bs = await loadRun(nodeFileAccessor, main ? join(dir, main) : dir);
  return analyzeBandStructure(bs);
}

type Layout = {
  name: string;
  occupations: boolean;
  fermi: boolean;
  count: boolean;
  spin2: boolean;
  main?: string;
  write: (bs: BandStructure) => Record<string, string>;
};

const LAYOUTS: Layout[] = [
  {
    name: 'EIGENVAL',
    occupations: true,
    fermi: false,
    count: true,
    spin2: true,
    write: (bs) => ({
      EIGENVAL: writeEigenval({
        system: 'model',
        nIons: 1,
        electrons: bs.electrons ?? 0,
        nBands: bs.nBands,
        kpoints: bs.kpoints,
        energies: bs.energies,
        occupations: bs.occupations as Float64Array[] | null,
        lattice: bs.lattice!,
      }),
    }),
  },
  { name: 'vasprun.xml', occupations: true, fermi: true, count: true, spin2: true, write: (bs) => ({ 'vasprun.xml': writeVasprun(bs) }) },
  {
    name: 'pw.x XML',
    occupations: true,
    fermi: true,
    count: true,
    spin2: true,
    write: (bs) => ({ 'data-file-schema.xml': writeQeXml(bs, { occupationsKind: bs.occupations ? 'smearing' : 'fixed' }) }),
  },
  {
    name: 'CASTEP .bands',
    occupations: false,
    fermi: true,
    count: true,
    spin2: true,
    write: (bs) => ({ 'model.bands': writeCastepBands(bs) }),
  },
  {
    // bands.x rounds energies to 1 meV and takes the Fermi energy and count from the pw.x data file beside it.
    name: 'bands.x output with the data file',
    occupations: false,
    fermi: true,
    count: true,
    spin2: false,
    main: 'model.bands.dat',
    write: (bs) => ({
      'model.bands.dat': writeBandsx(bs, Math.hypot(...bs.lattice![0])),
      'model.xml': writeQeXml({ ...bs, occupations: null }),
    }),
  },
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

const analyzeIn = (l: Layout, files: Record<string, string>): Promise<Report> => analyzeRun(files, l.main);

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
          const r = await analyzeIn(l, l.write(asWritten(metals.smearedFreeElectronMetal(kind, 0.1), l)));
          assert.equal(r.metal, true, r.classificationReason);
          assert.equal(r.gap, null);
          assert.equal(r.semimetal, false, r.classificationReason);
          assert.ok(r.crossingBands?.includes(1), String(r.crossingBands));
          assert.ok(r.fermi_eV !== null);
        });
      }

      it('two-band semimetal: a semimetal, bands 2 and 3 crossing', async () => {
        const bs = metals.twoBandSemimetal();
        if (l.occupations) bs.occupations = metals.smearedOccupations(bs, 'fermi-dirac', 0, 0.01);
        const r = await analyzeIn(l, l.write(asWritten(bs, l)));
        assert.equal(r.metal, true, r.classificationReason);
        // Without an electron count (Wannier90), whole filling cannot be checked: undetermined, not false.
        assert.equal(r.semimetal, l.count || l.occupations ? true : null, r.classificationReason);
        assert.deepEqual(r.crossingBands, [2, 3]);
      });

      if (l.spin2) {
        it('spin-polarised half-metal: spin up metallic, spin down gapped', async () => {
          const bs = metals.halfMetal();
          const r = await analyzeIn(l, l.write(asWritten(bs, l)));
          assert.equal(r.metal, true, r.classificationReason);
          assert.deepEqual(
            r.spinChannels?.map((c) => c.metal),
            [true, false],
            r.classificationReason,
          );
        });
      }

      it('semiconductor with smearing tails stays a semiconductor (gap 1.2 eV, analytic model)', async () => {
        const bs = metals.smearedSemiconductor(0.2);
        const r = await analyzeIn(l, l.write(asWritten(bs, l)));
        assert.equal(r.metal, false, r.classificationReason);
        assert.ok(r.gap && Math.abs(r.gap.eV - 1.2) < 2e-4, JSON.stringify(r.gap?.eV));
      });
    });
  }

  it('BXSF grid of the free-electron metal (empty-lattice bands on a 9³ periodic grid, header Fermi energy): a metal', async () => {
    // Empty simple-cubic lattice (Ashcroft & Mermin ch. 9): E_G(k) = ħ²|k + G|²/2m for G = 0 and ±2π/a x̂.
    const n = 9;
    const rec = reciprocalLattice(cubicLattice(metals.FE_A));
    const g = (2 * Math.PI) / metals.FE_A;
    const bands = [0, 1, -1].map((sh) => {
      const out = new Float64Array(n ** 3);
      let p = 0;
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++)
          for (let l = 0; l < n; l++) {
            const k = [i / (n - 1), j / (n - 1), l / (n - 1)].map((f) => (f > 0.5 ? f - 1 : f) * g);
            out[p++] = (HBAR2_OVER_ME_EV_A2 / 2) * ((k[0]! + sh * g) ** 2 + k[1]! ** 2 + k[2]! ** 2);
          }
      return out;
    });
    // Sort per point so bands are numbered by energy, as codes write them.
    for (let p = 0; p < n ** 3; p++) {
      const row = bands.map((b) => b[p]!).sort((a, b) => a - b);
      row.forEach((e, b) => (bands[b]![p] = e));
    }
    const r = await analyzeRun({
      'fermi.bxsf': writeBxsf({ fermiEnergy: metals.freeElectronFermi(1, metals.FE_A), dims: [n, n, n], reciprocal: rec, bands }),
    });
    assert.equal(r.metal, true, r.classificationReason);
    assert.deepEqual(r.crossingBands, [1]);
    assert.equal(r.semimetal, false);
  });

  it('pw.x XML: a non-integer electron count (2.9, no occupations or Fermi energy written) is a metal', async () => {
    const bs = metals.freeElectronMetal(2.9);
    bs.fermiEnergy = null;
    const r = await analyzeRun({ 'data-file-schema.xml': writeQeXml(bs) });
    assert.equal(r.electrons, 2.9);
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /2.9 electrons .* fill 1.45 bands/); // 2.9 / 2 per band
  });

  it('EIGENVAL without occupations: an odd count (3) without spin polarisation is a metal', async () => {
    const bs = metals.freeElectronMetal(3);
    const r = await analyzeRun({
      EIGENVAL: writeEigenval({
        system: 'model',
        nIons: 1,
        electrons: 3,
        nBands: bs.nBands,
        kpoints: bs.kpoints,
        energies: bs.energies,
        lattice: bs.lattice!,
      }),
    });
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /3 electrons without spin polarisation .* fill 1.5 bands/);
  });

  it('CASTEP .bands: the same odd count with a Fermi energy outside every band is still reported, and the disagreement said', async () => {
    const bs = metals.freeElectronMetal(3);
    bs.fermiEnergy = -1; // below every band: inconsistent with 3 electrons on purpose
    const r = await analyzeRun({ 'model.bands': writeCastepBands(bs) });
    assert.equal(r.metal, false); // the written Fermi energy is the stronger evidence
    assert.ok(r.warnings.some((w) => /cannot fill whole bands/.test(w)));
  });
});
