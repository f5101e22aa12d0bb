/**
 * Where the run lives and what the user must say about it: folder search (including
 * `<prefix>.save/data-file-schema.xml`), several candidates, `--alat` with a unit, no labels from alat alone,
 * the electron count of a pw.x data file given as --structure, spinors and cautions fitted to the functional.
 */
import assert from 'node:assert/strict';
import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { BOHR_ANGSTROM } from '../../../src/core/units';
import { collinearModel, spinOrbitModel } from '../../support/writers/roundTripModel';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { fccLattice, pathModel, parabolicBand } from '../../support/models';
import { capture } from '../../support/unitCliCapture';

const root = mkdtempSync(join(tmpdir(), 'vs-folder-'));
let n = 0;
function folder(files: Record<string, string>): string {
  const dir = join(root, `run${n++}`);
  mkdirSync(dir);
  for (const [name, text] of Object.entries(files)) {
    const parts = name.split('/');
    if (parts.length > 1) mkdirSync(join(dir, ...parts.slice(0, -1)), { recursive: true });
    writeFileSync(join(dir, name), text);
  }
  return dir;
}

describe('run folders', () => {
  const model = collinearModel();

  it('finds <prefix>.save/data-file-schema.xml when the folder holds nothing else', async () => {
    const dir = folder({ 'si.save/data-file-schema.xml': writeQeXml(model), 'pw.in': '&control\n/\n' });
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.equal(bs.source.format, 'qe-xml');
    assert.match(bs.source.file, /si\.save[\\/]data-file-schema\.xml$/);
    assert.ok(!bs.warnings.some((w) => w.code === 'other-candidates'));
  });

  it('<prefix>.xml beside an identical <prefix>.save copy: the folder file is read, the copy named as identical', async () => {
    const text = writeQeXml(model);
    const dir = folder({ 'si.xml': text, 'si.save/data-file-schema.xml': text });
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.match(bs.source.file, /si\.xml$/);
    const w = bs.warnings.find((x) => x.code === 'other-candidates');
    assert.ok(w);
    assert.match(w.message, /si\.save\/data-file-schema\.xml \(Quantum ESPRESSO XML data file, an identical copy\)/);
  });

  it('two different XML data files: one read by the documented rule (by name), the other named in a notice', async () => {
    const other = collinearModel();
    other.fermiEnergy = 0.7;
    const dir = folder({ 'b.xml': writeQeXml(other), 'a.xml': writeQeXml(model) });
    const io = capture();
    assert.equal(await main(['analyze', dir, '--json'], io), 0, io.stderr);
    const r = JSON.parse(io.stdout);
    assert.match(r.file, /a\.xml$/);
    assert.ok(r.warnings.some((w: string) => /also found: b\.xml \(Quantum ESPRESSO XML data file\)/.test(w)));
  });

  it('a batch line (--jsonl) of such a folder names the other file as --json does: the same contract plus path', async () => {
    const other = collinearModel();
    other.fermiEnergy = 0.7;
    const dir = folder({ 'b.xml': writeQeXml(other), 'a.xml': writeQeXml(model) });
    const one = capture();
    assert.equal(await main(['analyze', dir, '--json'], one), 0, one.stderr);
    const batch = capture();
    assert.equal(await main(['analyze', dir, '--jsonl', '--jobs', '1'], batch), 0, batch.stderr);
    const line = JSON.parse(batch.stdout.trim()) as Record<string, unknown>;
    const r = JSON.parse(one.stdout) as Record<string, unknown>;
    assert.deepEqual(line.warnings, r.warnings);
    assert.ok((line.warnings as string[]).some((w) => /also found: b\.xml/.test(w)));
  });
});

describe('--alat with a unit', () => {
  const model = collinearModel();
  const alat = 4; // Å: |a1| of the model cell (common practice for pw.x's alat with CELL_PARAMETERS in Å)

  it('a bare number is refused with a sentence naming bohr and Å (exit 2)', async () => {
    const dir = folder({ 'bands.out': writeBandsx(model, alat) });
    const io = capture();
    assert.equal(await main(['analyze', join(dir, 'bands.out'), '--alat', '7.5589'], io), 2);
    assert.match(io.stderr, /--alat needs a unit: write --alat 7.5589bohr for bohr .* or --alat 7.5589A for ångström \(Å\)/);
  });

  it('the same alat in bohr and in Å gives the same k-points (Bohr radius, CODATA 2018)', async () => {
    const dir = folder({ 'bands.out': writeBandsx(model, alat) });
    const poscar = join(dir, 'model.POSCAR');
    writeFileSync(poscar, 'model\n1.0\n4 0 0\n0 5 0\n0 0 6\nXx\n1\nDirect\n0 0 0\n');
    const inBohr = (alat / BOHR_ANGSTROM).toFixed(8);
    const a = capture();
    const b = capture();
    assert.equal(
      await main(['analyze', join(dir, 'bands.out'), '--alat', `${inBohr}bohr`, '--structure', poscar, '--json'], a),
      0,
      a.stderr,
    );
    assert.equal(await main(['analyze', join(dir, 'bands.out'), '--alat', '4A', '--structure', poscar, '--json'], b), 0, b.stderr);
    assert.deepEqual(JSON.parse(a.stdout).extrema, JSON.parse(b.stdout).extrema);
  });

  it('alat alone gives no labels (an fcc crystal is not labelled as simple cubic)', async () => {
    // An fcc model (common practice: fcc primitive vectors) on the path Γ–X–W, written by bands.x.
    const aFcc = 5.43;
    const fcc = pathModel({
      lattice: fccLattice(aFcc),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.3)],
      electrons: 2,
      legs: [
        [
          { label: 'Γ', k: [0, 0, 0] },
          { label: 'X', k: [0.5, 0, 0.5] },
          { label: 'W', k: [0.5, 0.25, 0.75] },
        ],
      ],
      pointsPerSegment: 11,
    });
    const dir = folder({ 'bands.out': writeBandsx(fcc, aFcc) });
    const bs = await loadRun(nodeFileAccessor, join(dir, 'bands.out'), { alatAngstrom: aFcc });
    assert.equal(bs.labels.length, 0);
    assert.ok(bs.warnings.some((w) => /not inferred from alat alone/.test(w.message)));
  });

  it('a pw.x data file given with --structure also gives the electron count (gap found)', async () => {
    const dir = folder({ 'bands.out': writeBandsx(model, alat) });
    const xml = join(dir, 'elsewhere.xml.keep');
    writeFileSync(xml, writeQeXml(model, { alat }));
    const io = capture();
    assert.equal(await main(['analyze', join(dir, 'bands.out'), '--structure', xml, '--json'], io), 0, io.stderr);
    const r = JSON.parse(io.stdout);
    assert.equal(r.electrons, 4);
    assert.equal(r.metal, false);
    assert.ok(r.gap && Math.abs(r.gap.eV - 1.2) < 1.5e-3); // analytic model gap; bands.x rounds to 1 meV
    assert.ok(r.warnings.some((w: string) => /4 electrons were taken from the structure file/.test(w)));
  });
});

describe('spinors and cautions', () => {
  it('a pw.x spin-orbit run is named as spinors in JSON and text, never "spin-degenerate"', async () => {
    const dir = folder({ 'data-file-schema.xml': writeQeXml(spinOrbitModel(), { functional: 'PBE' }) });
    const io = capture();
    assert.equal(await main(['analyze', dir, '--json'], io), 0, io.stderr);
    assert.equal(JSON.parse(io.stdout).spinors, true);
    const t = capture();
    assert.equal(await main(['analyze', dir], t), 0);
    assert.match(t.stdout, /spinors/);
    assert.doesNotMatch(t.stdout, /spin-degenerate/);
    assert.doesNotMatch(t.stdout, /Spin-orbit coupling is not included/);
  });

  const caution = /underestimates band gaps/;
  it('semilocal functional (PBE): the semilocal-gap caution, naming it', async () => {
    const bs = await loadRun(nodeFileAccessor, folder({ 'data-file-schema.xml': writeQeXml(collinearModel(), { functional: 'PBE' }) }));
    assert.equal(bs.method?.family, 'semilocal');
    const r = analyzeBandStructure(bs);
    assert.ok(r.cautions.some((c) => caution.test(c) && /PBE/.test(c)));
  });

  it('hybrid functional (HSE with a <hybrid> block): no semilocal caution, a hybrid one', async () => {
    const bs = await loadRun(
      nodeFileAccessor,
      folder({ 'data-file-schema.xml': writeQeXml(collinearModel(), { functional: 'HSE', hybrid: true }) }),
    );
    assert.equal(bs.method?.family, 'hybrid');
    const r = analyzeBandStructure(bs);
    assert.ok(!r.cautions.some((c) => caution.test(c)));
    assert.ok(r.cautions.some((c) => /exact exchange/.test(c)));
  });

  it('functional not written: the semilocal caution says the file does not tell', () => {
    const r = analyzeBandStructure(collinearModel());
    assert.ok(r.cautions.some((c) => caution.test(c) && /do not say which functional/.test(c)));
  });

  it('model energies: a model caution and no semilocal caution', () => {
    const bs = collinearModel();
    bs.method = { family: 'model', name: 'cosine bands', evidence: 'test model' };
    const r = analyzeBandStructure(bs);
    assert.ok(r.cautions.some((c) => /come from a model/.test(c)));
    assert.ok(!r.cautions.some((c) => caution.test(c)));
  });

  it('pw.x two_fermi_energies (fixed magnetisation): the higher is the reference, said in a warning', async () => {
    const sp = collinearModel();
    sp.nSpin = 2;
    sp.energies = [sp.energies[0]!, sp.energies[0]!.map((e) => e + 0.05)];
    sp.occupations = null;
    const bs = await loadRun(nodeFileAccessor, folder({ 'data-file-schema.xml': writeQeXml(sp, { twoFermi: [0.6, 0.65] }) }));
    assert.equal(bs.fermiSource, 'two_fermi_energies');
    assert.ok(Math.abs(bs.fermiEnergy! - 0.65) < 1e-9);
    assert.ok(bs.warnings.some((w) => w.code === 'two-fermi'));
    assert.equal(analyzeBandStructure(bs).metal, false); // both levels lie in the 1.2 eV gap (analytic model)
  });

  it('two Fermi energies: each channel is classified at its own (a half-metal under a fixed spin moment)', async () => {
    // Spin up: the model lowered by 1 eV (conduction band from 0.2 eV), its Fermi energy 1.5 eV inside it;
    // spin down: the model as is (gap 0 … 1.2 eV, analytic), its Fermi energy 0.6 eV in the gap. The higher
    // level (1.5 eV) lies inside spin down's conduction band: one shared level would call it metallic too.
    const sp = collinearModel();
    sp.nSpin = 2;
    sp.energies = [sp.energies[0]!.map((e) => e - 1), sp.energies[0]!];
    sp.occupations = null;
    const r = analyzeBandStructure(
      await loadRun(nodeFileAccessor, folder({ 'data-file-schema.xml': writeQeXml(sp, { twoFermi: [1.5, 0.6] }) })),
    );
    assert.equal(r.metal, true);
    assert.deepEqual(
      r.spinChannels?.map((c) => c.metal),
      [true, false],
    );
    assert.deepEqual(
      r.spinChannels?.map((c) => Number(c.fermi_eV?.toFixed(6))),
      [1.5, 0.6],
    );
  });

  it('metals get the metal caution instead of gap cautions', () => {
    const bs = collinearModel();
    bs.occupations = null;
    bs.fermiEnergy = 0.6;
    bs.electrons = 3; // 1.5 bands: a metal by count... but the written E_F (mid-gap) is outside every band
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, false); // the written Fermi energy decides (stronger evidence)
    bs.fermiEnergy = -0.2; // inside the valence band (maximum 0 eV at Γ, analytic model)
    const m = analyzeBandStructure(bs);
    assert.equal(m.metal, true);
    assert.ok(m.cautions.some((c) => /A metal has no gap/.test(c)));
    assert.ok(!m.cautions.some((c) => caution.test(c)));
  });
});
