/**
 * Annotations files as comparison inputs. Data: the demo's strained-silicon series (fixtures/demo/si-strain,
 * bands of Cohen & Bergstresser's empirical pseudopotential model, Phys. Rev. 141, 789 (1966), written in
 * VASP's layouts), copied to a temporary folder and annotated there with `valleyscope annotate`. The
 * reference for every number is the core's analysis of the same data file: an annotations run must give
 * back what the analysis said, to the rounding the file layout keeps.
 */
import assert from 'node:assert/strict';
import { appendFileSync, cpSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { loadRun } from '../../../src/core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady, crystalSymmetry } from '../../../src/core/lattice/symmetry';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { annotationsStaleness, reportFromAnnotations, runFromAnnotations } from '../../../src/core/compare/runFromAnnotations';
import { loadAnnotationsRun } from '../../../src/core/compare/loadAnnotationsRun';
import { compareRuns, type RunInput } from '../../../src/core/compare/compareRuns';
import type { AnnotationsDoc } from '../../../src/core/annotations/annotationsModel';
import type { Report } from '../../../src/core/model';
import { capture } from '../../support/unitCliCapture';

const SERIES = join('fixtures', 'demo', 'si-strain');
const RUNS = ['01_biaxial-1.00pct', '03_biaxial+0.00pct', '05_biaxial+1.00pct'];

/** The file layout keeps energies to 4 decimals (eV) and masses to 4 significant digits (serializeAnnotations.ts). */
const E_TOL = 0.5e-4 + 1e-12;
const massTol = (m: number): number => 0.5e-3 * Math.abs(m) + 1e-12;

describe('runs from annotations files', function () {
  this.timeout(60_000);
  let dir: string;
  const data = new Map<string, { report: Report; run: RunInput }>();

  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-compare-ann-'));
    for (const r of RUNS) {
      cpSync(join(SERIES, r), join(dir, r), { recursive: true, filter: (src) => !src.endsWith('.valleys.json') });
      const io = capture();
      const code = await main(['annotate', join(dir, r, 'EIGENVAL')], io);
      assert.equal(code, 0, io.stderr);
      const bs = await loadRun(nodeFileAccessor, join(dir, r, 'EIGENVAL'));
      const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
      data.set(r, {
        report,
        run: {
          name: `${r}/EIGENVAL`,
          report,
          lattice: bs.lattice,
          rotations: bs.structure ? crystalSymmetry(bs.structure).rotations : null,
          origin: 'data',
        },
      });
    }
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  const annotationsOf = (r: string): string => join(dir, r, 'EIGENVAL.valleys.json');
  const docOf = (r: string): AnnotationsDoc => parseAnnotations(readFileSync(annotationsOf(r), 'utf8'), annotationsOf(r));

  it('gives back the gap, edges, masses, N_v and averaged masses the analysis found', () => {
    const r = '03_biaxial+0.00pct';
    const fresh = data.get(r)!.report;
    const rep = reportFromAnnotations(docOf(r), 'x');
    assert.ok(fresh.gap && rep.gap, 'both report a gap');
    // Reference: the core's analysis of the same EIGENVAL (round trip through the annotations layout).
    assert.ok(Math.abs(rep.gap.eV - fresh.gap.eV) <= E_TOL, `gap ${rep.gap.eV} vs ${fresh.gap.eV}`);
    assert.equal(rep.gap.direct, fresh.gap.direct);
    assert.deepEqual(
      rep.gap.cbm.k.map((x) => x.toFixed(4)),
      fresh.gap.cbm.k.map((x) => x.toFixed(4)),
    );
    assert.equal(rep.metal, false);
    assert.equal(rep.extrema.length, fresh.extrema.length, 'every extremum the analysis found');
    for (const e of fresh.extrema) {
      const a = rep.extrema.find((x) => x.kind === e.kind && x.band === e.band && x.k.every((v, i) => Math.abs(v - e.k[i]!) < 1e-5));
      assert.ok(a, `${e.kind} band ${e.band} at ${e.k} is in the annotations run`);
      assert.ok(Math.abs(a.eV - e.eV) <= E_TOL);
      assert.ok(Math.abs(a.offset_eV - e.offset_eV) <= 2 * E_TOL, `offset ${a.offset_eV} vs ${e.offset_eV}`);
      assert.equal(a.valleyDegeneracy, e.valleyDegeneracy);
      assert.equal(a.masses.length, e.masses.length);
      e.masses.forEach((m, i) => {
        const b = a.masses[i]!;
        assert.equal(b.towards, m.towards);
        assert.equal(b.branch, m.branch);
        assert.ok(Math.abs(b.mass - m.mass) <= massTol(m.mass), `${m.towards}: ${b.mass} vs ${m.mass}`);
        assert.equal(b.method, m.method);
        assert.equal(b.points, m.points);
      });
      if (e.dosMass !== null) assert.ok(Math.abs(a.dosMass! - e.dosMass) <= massTol(e.dosMass), 'density-of-states mass');
      if (e.conductivityMass !== null)
        assert.ok(Math.abs(a.conductivityMass! - e.conductivityMass) <= massTol(e.conductivityMass), 'conductivity mass');
    }
  });

  it('reads the structure recorded beside it: lattice, volume and symmetry matching', async () => {
    const r = '03_biaxial+0.00pct';
    const a = await loadAnnotationsRun(nodeFileAccessor, annotationsOf(r));
    assert.equal(a.run.origin, 'annotations');
    assert.equal(a.run.stale, false, a.staleReasons.join('; '));
    assert.deepEqual(a.notes, []);
    assert.deepEqual(a.run.lattice, data.get(r)!.run.lattice, 'the lattice of the POSCAR the data run reads');
    // fcc primitive cell volume a³/4 (common practice), a = 5.43 Å for the unstrained demo run (fixtures/demo/README.md).
    const c = compareRuns([a.run]);
    assert.ok(Math.abs(c.runs[0]!.descriptors!.volume - 5.43 ** 3 / 4) < 1e-3, `volume ${c.runs[0]!.descriptors!.volume}`);
    // Diamond structure: 48 operations (International Tables for Crystallography, Vol. A, space group 227).
    assert.equal(a.run.rotations?.length, 48);
  });

  it('compared with the analysis of its own data file, nothing changed', async () => {
    const r = '05_biaxial+1.00pct';
    const a = await loadAnnotationsRun(nodeFileAccessor, annotationsOf(r));
    const c = compareRuns([data.get(r)!.run, a.run]);
    const b = c.runs[1]!;
    // Reference: the same data analysed now; differences only from the file's rounding.
    assert.ok(Math.abs(b.deltaGap_eV!) <= E_TOL, `Δgap ${b.deltaGap_eV}`);
    assert.equal(b.cbmValley, c.runs[0]!.cbmValley);
    assert.equal(b.vbmValley, c.runs[0]!.vbmValley);
    assert.deepEqual(
      c.events.filter((e) => e.run === b.name),
      [],
      'no event for an unchanged run',
    );
    assert.ok(Math.abs(b.descriptors!.volumeStrain!) < 1e-12, 'same cell: no strain');
  });

  it('reports the six Δ valleys splitting 4 + 2 across the strain series as one event per run, from annotations alone', async () => {
    const ref = await loadAnnotationsRun(nodeFileAccessor, annotationsOf('03_biaxial+0.00pct'));
    const comp = await loadAnnotationsRun(nodeFileAccessor, annotationsOf('01_biaxial-1.00pct'));
    const tens = await loadAnnotationsRun(nodeFileAccessor, annotationsOf('05_biaxial+1.00pct'));
    const c = compareRuns([ref.run, comp.run, tens.run]);
    // Under in-plane compression the in-plane Δ valleys (Δ4) are lowest, under tension the out-of-plane pair
    // (Δ2) (sign of the Δ-valley splitting under biaxial strain: common practice; the demo path puts both on it).
    // The unstrained crystal's six Δ valleys (N_v = 6, the star of Δ in m-3m) are one valley of the reference:
    // the split is one event, and the CBM stays in that valley (no "edge moved").
    const split = c.events.filter((e) => e.kind === 'valley-split');
    assert.deepEqual(
      split.map((e) => e.run),
      [comp.run.name, tens.run.name],
      JSON.stringify(c.events),
    );
    assert.match(split[0]!.message, /N_v 6\) → 4 at .* \+ 2 at /);
    assert.match(split[1]!.message, /N_v 6\) → 2 at .* \+ 4 at /);
    assert.equal(c.events.filter((e) => e.kind === 'edge-moved').length, 0, JSON.stringify(c.events));
    assert.equal(c.runs[1]!.cbmValley, c.runs[0]!.cbmValley);
    // The same data analysed now reports the same split (the data run is the reference of this check).
    const d = compareRuns([data.get('03_biaxial+0.00pct')!.run, data.get('01_biaxial-1.00pct')!.run]);
    assert.equal(d.events.filter((e) => e.kind === 'valley-split').length, 1, JSON.stringify(d.events));
  });

  it('is stale when a data file changed or went missing, and says which', async () => {
    const r = '01_biaxial-1.00pct';
    appendFileSync(join(dir, r, 'EIGENVAL'), '\n');
    const a = await loadAnnotationsRun(nodeFileAccessor, annotationsOf(r));
    assert.equal(a.run.stale, true);
    assert.equal(a.staleReasons.length, 1, a.staleReasons.join('; '));
    assert.match(a.staleReasons[0]!, /source EIGENVAL \(eigenvalues\) has changed/);
    rmSync(join(dir, r, 'KPOINTS'));
    const b = await loadAnnotationsRun(nodeFileAccessor, annotationsOf(r));
    assert.equal(b.staleReasons.length, 2);
    assert.ok(
      b.staleReasons.some((s) => /KPOINTS \(kpath\) is no longer read/.test(s)),
      b.staleReasons.join('; '),
    );
    const c = compareRuns([b.run]);
    assert.equal(c.runs[0]!.stale, true);
    assert.ok(c.events.some((e) => e.kind === 'stale'));
  });

  it('without a check of the sources it is not vouched for: stale', () => {
    const doc = docOf('03_biaxial+0.00pct');
    assert.deepEqual(annotationsStaleness(doc, doc.sources), []);
    const out = runFromAnnotations(doc, { name: 'n', currentSources: null });
    assert.equal(out.run.stale, true);
    assert.match(out.staleReasons[0]!, /not checked/);
  });

  it('leaves out entries the analysis no longer found and masses without a finite value; fills a missing offset from the gap', () => {
    const doc = docOf('03_biaxial+0.00pct');
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    // This run has no secondary valley of its own (the band-index "valley" at X is a crossing, set aside):
    // an entry for one is written here, 0.1 eV above the CBM at X, as a file could hold it.
    let valley = doc.entries.find((e) => e.kind === 'valley');
    if (!valley) {
      valley = {
        ...cbm,
        kind: 'valley',
        id: 'valley/s0/b5/k=0.5,0,0.5',
        k: [0.5, 0, 0.5],
        label: 'X',
        energy_eV: cbm.energy_eV + 0.1,
        masses: [],
        tensor: null,
        warnings: [],
      };
      doc.entries.push(valley);
    }
    const n = doc.entries.filter((e) => e.found).length;
    valley.offset_eV = null;
    // An entry kept from an earlier analysis that the latest one no longer finds.
    doc.entries.push({ ...valley, id: 'valley/s0/b6/k=0.1,0.2,0.3', band: 6, k: [0.1, 0.2, 0.3], found: false });
    const nMass = cbm.masses.length;
    cbm.masses[0]!.mass = null;
    const rep = reportFromAnnotations(doc, 'x');
    assert.equal(rep.extrema.length, n);
    assert.ok(!rep.extrema.some((e) => e.band === 6), 'the entry not found is left out');
    const v = rep.extrema.find((e) => e.kind === 'valley' && e.band === valley.band && e.k.join() === valley.k.join())!;
    // Offset of a conduction valley = its energy minus the CBM's (definition in model.ts).
    assert.ok(Math.abs(v.offset_eV - (valley.energy_eV - doc.gap!.cbm.energy_eV)) < 1e-12);
    assert.equal(rep.extrema.find((e) => e.kind === 'cbm')!.masses.length, nMass - 1);
    assert.equal(rep.nk, 0, 'counts the file does not keep are not invented');
    assert.equal(rep.electrons, null);
  });

  it('valleyscope compare takes annotations files beside data files, flags stale ones on stderr', async () => {
    const io = capture();
    const code = await main(
      [
        'compare',
        annotationsOf('03_biaxial+0.00pct'),
        join(dir, '05_biaxial+1.00pct', 'EIGENVAL'),
        annotationsOf('01_biaxial-1.00pct'),
        '--format',
        'json',
      ],
      io,
    );
    assert.equal(code, 0, io.stderr);
    const j = JSON.parse(io.stdout) as { runs: { origin: string; stale: boolean; gap_eV: number }[] };
    assert.deepEqual(
      j.runs.map((r) => r.origin),
      ['annotations', 'data', 'annotations'],
    );
    assert.deepEqual(
      j.runs.map((r) => r.stale),
      [false, false, true],
      'run 01 was edited above',
    );
    assert.match(io.stderr, /01_biaxial-1\.00pct\/EIGENVAL\.valleys\.json: stale: source EIGENVAL/);
    // Reference: the analysis of the same data files.
    assert.ok(Math.abs(j.runs[0]!.gap_eV - data.get('03_biaxial+0.00pct')!.report.gap!.eV) <= E_TOL);
  });
});
