/**
 * `--energy-zero` for analyze and compare, positions named as "0.85 Γ→X", and spin channels named up/down only
 * in spin-polarised runs.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import { pathPosition, type LabelledLine } from '../../../src/core/lattice/pathPosition';
import { energyZeroOf } from '../../../src/core/report/energyZero';
import { summaryText } from '../../../src/core/report/summaryText';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { cubicLattice, cosineBand, pathModel, type PathLeg } from '../../support/models';
import type { BandStructure } from '../../../src/core/model';
import { capture } from '../../support/unitCliCapture';

const SI = join('fixtures', 'epm', 'si');

/** Two cosine bands on a 4 Å cubic cell, one filled, along Γ–X with 11 points (no Fermi energy written). */
function twoCosineBands(): BandStructure {
  const leg: PathLeg[] = [
    { label: 'Γ', k: [0, 0, 0] },
    { label: 'X', k: [0.5, 0, 0] },
  ];
  const bands = [cosineBand(0, [-0.5, -0.5, -0.5]), cosineBand(2, [0.5, 0.5, 0.5])];
  return pathModel({ lattice: cubicLattice(4), bands, electrons: 2, legs: [leg], pointsPerSegment: 11 });
}

describe('positions on labelled path lines', () => {
  const lines: LabelledLine[] = [
    { from: 'Γ', to: 'X', kFrom: [0, 0, 0], kTo: [0.5, 0, 0.5] },
    { from: 'X', to: 'W', kFrom: [0.5, 0, 0.5], kTo: [0.5, 0.25, 0.75] },
  ];
  it('names a point inside a line by the fraction of the way along it', () => {
    // (0.425, 0, 0.425) = 0.85 × X with X = (½, 0, ½) (arithmetic).
    assert.equal(pathPosition([0.425, 0, 0.425], lines), '0.85 Γ→X');
    assert.equal(pathPosition([0.5, 0.125, 0.625], lines), '0.50 X→W');
    // A line written towards Γ is still counted from Γ.
    assert.equal(pathPosition([0, 0, 0.4], [{ from: 'Z', to: 'Γ', kFrom: [0, 0, 0.5], kTo: [0, 0, 0] }]), '0.80 Γ→Z');
  });
  it('gives nothing at the labelled ends or off the lines', () => {
    assert.equal(pathPosition([0, 0, 0], lines), null);
    assert.equal(pathPosition([0.5, 0, 0.5], lines), null);
    assert.equal(pathPosition([0.3, 0.1, 0.3], lines), null);
  });
});

describe('--energy-zero', () => {
  it('shows energies against the VBM by default and keeps raw energies in JSON', async () => {
    const text = capture();
    assert.equal(await main(['analyze', SI], text), 0, text.stderr);
    const json = capture();
    assert.equal(await main(['analyze', SI, '--json'], json), 0, json.stderr);
    const rep = JSON.parse(json.stdout);
    const vbm = rep.gap.vbm.eV as number;
    // The raw VBM of the model (as written in the file) is the zero; the text shows it as 0.
    assert.deepEqual(rep.energyZero, { requested: 'vbm', used: 'vbm', eV: vbm, reason: null });
    assert.notEqual(vbm, 0);
    assert.match(text.stdout, /Energies relative to the VBM \(raw /);
    assert.match(text.stdout, /VBM: band 4 at Γ \(0\.0000, 0\.0000, 0\.0000\), 0\.0000 eV/);
    // Si's conduction minimum about 0.85 of Γ–X (physics.md; the model's README).
    assert.match(text.stdout, /CBM: band 5 at 0\.8[4-6] Γ→X \(/);
    const cbm = (rep.extrema as { kind: string; pathPosition: string | null }[]).find((e) => e.kind === 'cbm')!;
    assert.match(cbm.pathPosition!, /^0\.8[4-6] Γ→X$/);
    // JSON energies stay raw: the gap edges keep their file values.
    assert.ok(Math.abs(rep.gap.cbm.eV - vbm - rep.gap.eV) < 1e-9);
  });

  it('takes cbm, midgap and raw, and refuses an unknown zero', async () => {
    const json = capture();
    await main(['analyze', SI, '--json'], json);
    const g = JSON.parse(json.stdout).gap;
    const mid = capture();
    assert.equal(await main(['analyze', SI, '--energy-zero', 'midgap'], mid), 0);
    // Mid-gap zero: the VBM sits at −E_g/2 (arithmetic).
    assert.match(mid.stdout, new RegExp(`VBM: band 4 at Γ \\(0\\.0000, 0\\.0000, 0\\.0000\\), ${(-g.eV / 2).toFixed(4)} eV`));
    const raw = capture();
    await main(['analyze', SI, '--energy-zero', 'raw'], raw);
    assert.match(raw.stdout, new RegExp(`VBM: band 4 at Γ .*, ${g.vbm.eV.toFixed(4)} eV`));
    const cbm = capture();
    await main(['analyze', SI, '--energy-zero', 'cbm'], cbm);
    assert.match(cbm.stdout, /CBM: band 5 at .*, 0\.0000 eV/);
    const bad = capture();
    assert.equal(await main(['analyze', SI, '--energy-zero', 'vacuum'], bad), 2);
    assert.match(bad.stderr, /--energy-zero must be one of vbm, cbm, midgap, fermi, raw, got "vacuum"/);
  });

  it('falls back to raw energies, saying why, when the Fermi energy is not known', () => {
    const bs = twoCosineBands();
    const z = energyZeroOf(analyzeBandStructure(bs), 'fermi', null);
    assert.deepEqual([z.used, z.eV], ['raw', 0]);
    assert.match(z.reason!, /no Fermi energy/);
  });

  it('is offered by compare, and changes the extrema energies shown but not the JSON', async () => {
    const ge = join('fixtures', 'epm', 'ge');
    const vbm = capture();
    assert.equal(await main(['compare', SI, ge, '--format', 'csv'], vbm), 0, vbm.stderr);
    assert.match(vbm.stdout, /^fixtures\/epm\/si,v1 Γ,vbm,energy,,,0,eV \(zero: vbm\),/m);
    const raw = capture();
    await main(['compare', SI, ge, '--format', 'csv', '--energy-zero', 'raw'], raw);
    assert.doesNotMatch(raw.stdout, /^fixtures\/epm\/si,v1 Γ,vbm,energy,,,0,/m);
    const j1 = capture();
    const j2 = capture();
    await main(['compare', SI, ge, '--format', 'json'], j1);
    await main(['compare', SI, ge, '--format', 'json', '--energy-zero', 'cbm'], j2);
    assert.equal(j1.stdout, j2.stdout);
  });
});

describe('spin channels in the text', () => {
  function model(spinPolarised: boolean): ReturnType<typeof pathModel> {
    const bs = twoCosineBands();
    if (spinPolarised) {
      bs.nSpin = 2;
      bs.energies = [bs.energies[0]!, Float64Array.from(bs.energies[0]!, (e) => e + 0.1)];
    }
    return bs;
  }
  it('names both channels up/down in a spin-polarised run', () => {
    const text = summaryText(analyzeBandStructure(model(true)));
    const vbmLines = text.split('\n').filter((l) => /^\s+VBM: /.test(l));
    assert.ok(vbmLines.length >= 1);
    for (const l of vbmLines) assert.match(l, /\(spin (up|down)\)/);
    assert.doesNotMatch(text, /spin [01]\b/);
  });
  it('does not mention spin in a run without spin polarisation', () => {
    const text = summaryText(analyzeBandStructure(model(false)));
    assert.doesNotMatch(text, /spin (up|down|0|1)/);
  });
});
