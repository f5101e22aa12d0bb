/**
 * Round trips: one model band structure (test/support/writers/roundTripModel.ts, an analytic cosine-band
 * model with a 1.2 eV indirect gap Γ → X) written in every layout by the test writers, found by content in a
 * run folder, read with its companions, and analysed. The same gap must come back to the layout's rounding,
 * and the conduction mass along Γ–X the same within fit error.
 */
import assert from 'node:assert/strict';
import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import type { BandStructure, Report } from '../../../src/core/model';
import type { ReadOptions } from '../../../src/core/formats/types';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import {
  MODEL_GAP_EV,
  MODEL_SPLIT_EV,
  MODEL_TC,
  collinearModel,
  spinOrbitModel,
  spinPolarisedModel,
} from '../../support/writers/roundTripModel';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { writeVasprun } from '../../support/writers/vasprun';
import { writeCastepBands } from '../../support/writers/castep';
import { writeWannier90 } from '../../support/writers/wannier90';
import { main } from '../../../src/cli/main';
import { modelVasprun } from '../../support/unitModelVasprun';
import { capture } from '../../support/unitCliCapture';

const root = mkdtempSync(join(tmpdir(), 'vs-roundtrip-'));
let n = 0;
function runFolder(files: Record<string, string>): string {
  const dir = join(root, `run${n++}`);
  mkdirSync(dir);
  for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
  return dir;
}

async function analyzeRun(dir: string, options: ReadOptions = {}): Promise<{ bs: BandStructure; report: Report }> {
  const bs = await loadRun(nodeFileAccessor, dir, options);
  return { bs, report: analyzeBandStructure(bs) };
}

/** Conduction mass along x at X of the model: |ħ²/(2 t a²)| with t = 0.6 eV, a = 4 Å (analytic model). */
const MODEL_MC_X = HBAR2_OVER_ME_EV_A2 / (2 * MODEL_TC[0] * 16);

function cbmMassTowardsGamma(report: Report): number | null {
  const cbm = report.extrema.find((e) => e.kind === 'cbm');
  const m = cbm?.masses.find((f) => f.towards === 'Γ' || Math.abs(Math.abs(f.direction[0]) - 1) < 1e-6);
  return m ? m.mass : null;
}

function checkGap(report: Report, tol: number, format: string): void {
  assert.ok(report.gap, `${format}: a gap is reported (warnings: ${report.warnings.join(' | ')})`);
  // Analytic model: 1.2 eV, indirect (VBM at Γ, CBM at X).
  assert.ok(Math.abs(report.gap.eV - MODEL_GAP_EV) <= tol, `${format}: gap ${report.gap.eV} eV, expected ${MODEL_GAP_EV} within ${tol}`);
  assert.equal(report.gap.direct, false, format);
  assert.deepEqual(
    report.gap.vbm.k.map((x) => Math.round(x * 1e4) / 1e4 + 0),
    [0, 0, 0],
    `${format}: VBM at Γ`,
  );
  assert.deepEqual(
    report.gap.cbm.k.map((x) => Math.round(x * 1e4) / 1e4 + 0),
    [0.5, 0, 0],
    `${format}: CBM at X`,
  );
}

describe('round trips through every layout (model → file → reader → analysis)', () => {
  const model = collinearModel();
  const alat = 4; // Å: |a1| of the orthorhombic model cell, pw.x's alat for CELL_PARAMETERS in Å (common practice)

  const cases: { name: string; files: () => Record<string, string>; main?: string; tol: number; format: string; massTol: number }[] = [
    {
      name: 'pw.x XML data file',
      files: () => ({ 'data-file-schema.xml': writeQeXml(model, { alat }) }),
      tol: 1e-9,
      format: 'qe-xml',
      massTol: 0.002,
    },
    {
      name: 'bands.x output with the XML beside it',
      files: () => ({ 'si.bands.dat': writeBandsx(model, alat), 'si.xml': writeQeXml(model, { alat }) }),
      main: 'si.bands.dat',
      tol: 1.5e-3, // energies rounded to 1 meV (the layout's rounding)
      format: 'qe-bands',
      massTol: 0.03,
    },
    {
      name: 'vasprun.xml',
      files: () => ({
        'vasprun.xml': modelVasprun(model),
      }),
      tol: 1.5e-4,
      format: 'vasprun-xml',
      massTol: 0.002,
    },
    {
      name: 'CASTEP .bands',
      files: () => ({ 'model.bands': writeCastepBands(model, { order: [...Array(model.nk).keys()].reverse() }) }),
      tol: 1e-6,
      format: 'castep-bands',
      massTol: 0.002,
    },
    {
      name: 'Wannier90 band.dat with .kpt, labelinfo and .win',
      files: () => {
        const w = writeWannier90(model, { fermiEnergy: 0.6 });
        return { 'model_band.dat': w.bandDat, 'model_band.kpt': w.kpt, 'model_band.labelinfo.dat': w.labelinfo, 'model.win': w.win };
      },
      tol: 1e-6,
      format: 'wannier90-band',
      massTol: 0.002,
    },
  ];
  // The mass the analysis finds on the model itself: every layout must give it back within fit error.
  const direct = analyzeBandStructure(model);
  const directMass = cbmMassTowardsGamma(direct)!;
  const directFit = direct.extrema.find((e) => e.kind === 'cbm')!.masses.find((f) => f.mass === directMass)!;

  it('the model itself: analysis gives the analytic gap and a conduction mass near ħ²/(2ta²)', () => {
    checkGap(direct, 1e-12, 'model');
    // Analytic model ħ²/(2·0.6·4²) ≈ 0.397 m_e; a 25 meV parabola window on a cosine band reads a few % heavy
    // (the quartic term of the cosine), hence 5 %.
    assert.ok(Math.abs(Math.abs(directMass) - MODEL_MC_X) / MODEL_MC_X < 0.05, `model mass ${directMass}`);
  });

  for (const c of cases) {
    it(`${c.name}: same gap and conduction mass`, async () => {
      const dir = runFolder(c.files());
      const { bs, report } = await analyzeRun(c.main ? join(dir, c.main) : dir);
      assert.equal(bs.source.format, c.format, 'detected by content');
      assert.equal(bs.nk, model.nk);
      assert.equal(bs.nBands, model.nBands);
      assert.equal(bs.partial, false);
      checkGap(report, c.tol, c.format);
      // Every k-point back in fractional coordinates (cartesian layouts converted with the cell).
      for (let i = 0; i < bs.nk * 3; i++) assert.ok(Math.abs(bs.kpoints[i]! - model.kpoints[i]!) < 2e-6, `${c.format}: k[${i}]`);
      const m = cbmMassTowardsGamma(report);
      assert.ok(m !== null, `${c.format}: a conduction mass towards Γ is reported`);
      // Same mass as the model analysed directly, within the fit's error (plus the layout's rounding).
      const tol = Math.max(3 * directFit.stderr, c.massTol * Math.abs(directMass));
      assert.ok(Math.abs(m - directMass) <= tol, `${c.format}: mass ${m} vs ${directMass} (±${tol})`);
    });
  }

  it('bands.x without a data file: --alat and --structure place the k-points; structure alone infers alat; nothing gives a warning', async () => {
    const dir = runFolder({ 'bands.out': writeBandsx(model, alat) });
    const structure = model.structure!;
    const withBoth = await analyzeRun(dir, { alatAngstrom: alat, structure });
    assert.equal(withBoth.bs.fermiEnergy, null);
    assert.ok(withBoth.bs.lattice);
    for (let i = 0; i < model.nk * 3; i++) assert.ok(Math.abs(withBoth.bs.kpoints[i]! - model.kpoints[i]!) < 2e-6);
    // Structure alone: alat inferred from the cell (|a1| here) with a warning naming the guess.
    const inferred = await analyzeRun(dir, { structure });
    assert.ok(inferred.bs.warnings.some((w) => w.code === 'alat-inferred'));
    for (let i = 0; i < model.nk * 3; i++) assert.ok(Math.abs(inferred.bs.kpoints[i]! - model.kpoints[i]!) < 2e-6);
    // alat alone: a cubic frame; distances right, so masses in m_e still come out.
    const alatOnly = await analyzeRun(dir, { alatAngstrom: alat });
    assert.ok(alatOnly.bs.warnings.some((w) => w.code === 'cell-unknown'));
    const none = await analyzeRun(dir);
    assert.equal(none.bs.lattice, null);
    assert.ok(none.bs.warnings.some((w) => w.code === 'no-alat'));
  });

  it('CLI: valleyscope analyze takes --alat and --structure for a bands.x file, says what is missing, refuses a bad --alat', async () => {
    const dir = runFolder({ 'bands.out': writeBandsx(model, alat) });
    const poscar = join(root, 'model.POSCAR');
    writeFileSync(poscar, 'model\n1.0\n4 0 0\n0 5 0\n0 0 6\nXx\n1\nDirect\n0 0 0\n');
    const io = capture();
    // No electron count in bands.x output: the gap needs the XML; here the CLI must still run and say so.
    const code = await main(['analyze', join(dir, 'bands.out'), '--alat', '4A', '--structure', poscar, '--json'], io);
    assert.equal(code, 0, io.stderr);
    const r = JSON.parse(io.stdout);
    assert.equal(r.format, 'qe-bands');
    assert.ok(r.warnings.some((w: string) => /electron count/.test(w)));
    const bad = await main(['analyze', join(dir, 'bands.out'), '--alat', '-3'], io);
    assert.equal(bad, 2);
    const missing = await main(['analyze', join(dir, 'bands.out'), '--structure', join(root, 'no-such.POSCAR')], io);
    assert.equal(missing, 2);
    assert.match(io.stderr, /--structure: .*no-such\.POSCAR could not be read: there is no such file/);
    // A pw.x data file as --structure gives the cell and alat: the bands' k-points land on the model's.
    const xml = join(root, 'structure-source.xml');
    writeFileSync(xml, writeQeXml(model, { alat }));
    io.stdout = '';
    assert.equal(await main(['analyze', join(dir, 'bands.out'), '--structure', xml, '--json'], io), 0, io.stderr);
    assert.ok(!JSON.parse(io.stdout).warnings.some((w: string) => /alat is unknown|No pw.x data file/.test(w)));
  });

  describe('spin-polarised variant (vasprun.xml, pw.x XML, CASTEP)', () => {
    const sp = spinPolarisedModel();
    const layouts: [string, Record<string, string>, number][] = [
      ['vasprun-xml', { 'vasprun.xml': writeVasprun(sp) }, 1.5e-4],
      ['qe-xml', { 'pw.xml': writeQeXml(sp, { alat: 4 }) }, 1e-9],
      ['castep-bands', { 'sp.bands': writeCastepBands(sp) }, 1e-6],
    ];
    for (const [format, files, tol] of layouts) {
      it(`${format}: two channels, per-spin gaps 1.2 and 1.4 eV, overall 1.2 eV`, async () => {
        const { bs, report } = await analyzeRun(runFolder(files));
        assert.equal(bs.source.format, format);
        assert.equal(bs.nSpin, 2);
        checkGap(report, tol, format);
        assert.ok(report.spinGaps && report.spinGaps.length === 2);
        // Analytic model: spin down shifted apart by 0.1 eV each way → 1.4 eV.
        assert.ok(Math.abs(report.spinGaps[0]!.eV - MODEL_GAP_EV) <= tol);
        assert.ok(Math.abs(report.spinGaps[1]!.eV - (MODEL_GAP_EV + 2 * MODEL_SPLIT_EV)) <= tol);
      });
    }
  });

  describe('spin-orbit variant (one electron per band)', () => {
    const so = spinOrbitModel();
    const layouts: [string, Record<string, string>, number, ReadOptions][] = [
      ['vasprun-xml', { 'vasprun.xml': writeVasprun({ ...so, occupations: null }) }, 1.5e-4, {}],
      ['qe-xml', { 'so.xml': writeQeXml({ ...so, occupations: null }, { alat: 4 }) }, 1e-9, {}],
      ['castep-bands', { 'so.bands': writeCastepBands(so) }, 1e-6, { spinorbit: true }],
    ];
    for (const [format, files, tol, options] of layouts) {
      it(`${format}: spin-orbit flag read, 4 electrons fill 4 bands, gap 1.2 eV`, async () => {
        const { bs, report } = await analyzeRun(runFolder(files), options);
        assert.equal(bs.source.format, format);
        assert.equal(bs.spinorbit, true);
        assert.equal(bs.nBands, 6);
        checkGap(report, tol, format);
        assert.equal(report.gap!.vbm.band, 4, 'VBM is band 4 (1-based) with one electron per band');
      });
    }
    it('wannier90: spinors = true in the .win marks the run spin-orbit', async () => {
      const w = writeWannier90(so, { fermiEnergy: 0.6, spinors: true });
      const { bs, report } = await analyzeRun(runFolder({ 'so_band.dat': w.bandDat, 'so_band.kpt': w.kpt, 'so.win': w.win }));
      assert.equal(bs.spinorbit, true);
      checkGap(report, 1e-6, 'wannier90-band');
    });
  });
});
