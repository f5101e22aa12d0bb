/**
 * Entry identity that survives re-runs: a reviewer's note and status stay with the same extremum when a deep
 * band is added below, an empty band is removed above, the run changes between spin-polarised and not, or
 * the next run finds the valley at a symmetry-equivalent k-point; a layout-1 file migrates on read.
 *
 * The model: a simple cubic crystal (one atom per cell, point group m-3m), a = 4 Å, with
 *   valence     E_v = 2 t (cos 2πkx + cos 2πky + cos 2πkz − 3), t = 0.5 eV: maximum 0 at Γ
 *                 (nearest-neighbour tight binding, a published analytic model; physics.md);
 *   conduction  the lowest of three ellipsoidal valleys at X = (½,0,0), Y = (0,½,0), Z = (0,0,½), 1.2 eV,
 *                 each with m_l = 1.0 along its axis and m_t = 0.2 across it (a Si-like many-valley band).
 * X, Y and Z are one star under the cubic point group (International Tables Vol. A, m-3m), so a run that
 * samples Γ–Y finds "the same valley" as one that samples Γ–X.
 */
import { strict as assert } from 'node:assert';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { mergeWithSummary } from '../../../src/core/annotations/mergeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import type { AnnotationsDoc } from '../../../src/core/annotations/annotationsModel';
import { valleyRepresentative } from '../../../src/core/lattice/valleyIdentity';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import type { BandStructure, Vec3 } from '../../../src/core/model';
import {
  cubicLattice,
  ellipsoidalValley,
  flatBand,
  lowestOf,
  pathModel,
  simpleCubicStructure,
  type Dispersion,
} from '../../support/models';

const A = 4;
const G = (2 * Math.PI) / A;
const valence: Dispersion = (_kc, kf) =>
  2 * 0.5 * (Math.cos(2 * Math.PI * kf[0]) + Math.cos(2 * Math.PI * kf[1]) + Math.cos(2 * Math.PI * kf[2]) - 3);
const conduction: Dispersion = lowestOf(
  ellipsoidalValley(1.2, [G / 2, 0, 0], [1, 0, 0], 1.0, 0.2),
  ellipsoidalValley(1.2, [0, G / 2, 0], [0, 1, 0], 1.0, 0.2),
  ellipsoidalValley(1.2, [0, 0, G / 2], [0, 0, 1], 1.0, 0.2),
);

interface RunShape {
  /** The path's far end: X (½,0,0) or the equivalent Y (0,½,0). */
  towards?: 'X' | 'Y';
  deepBand?: boolean;
  emptyBand?: boolean;
  spinPolarised?: boolean;
}

function run(shape: RunShape = {}): BandStructure {
  const end: Vec3 = shape.towards === 'Y' ? [0, 0.5, 0] : [0.5, 0, 0];
  const bands: Dispersion[] = [valence, conduction];
  if (shape.deepBand) bands.push(flatBand(-40)); // a semicore band far below (sorted into band 1)
  if (shape.emptyBand) bands.push(flatBand(30)); // an empty band far above
  const bs = pathModel({
    lattice: cubicLattice(A),
    structure: simpleCubicStructure(A),
    bands,
    electrons: shape.deepBand ? 4 : 2,
    legs: [
      [
        { label: 'Γ', k: [0, 0, 0] },
        { label: shape.towards ?? 'X', k: end },
      ],
    ],
    pointsPerSegment: 41,
  });
  if (shape.spinPolarised) {
    // A non-magnetic run written with two spin channels: the same bands twice, one electron per band each.
    bs.nSpin = 2;
    bs.energies = [bs.energies[0]!, Float64Array.from(bs.energies[0]!)];
  }
  bs.source = { format: 'model', file: 'run/EIGENVAL', files: [{ role: 'eigenvalues', path: 'run/EIGENVAL', sha256: 'a'.repeat(64) }] };
  return bs;
}

function annotate(bs: BandStructure): AnnotationsDoc {
  const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
  // Through the file's bytes, as a reviewer's editor would see it.
  const doc = buildAnnotations(report, bs.source, DEFAULT_SETTINGS, { toolVersion: 'test' });
  return parseAnnotations(serializeAnnotations(doc), 'a.valleys.json');
}

/** The reviewer's work: every entry accepted with a note naming it. */
function review(doc: AnnotationsDoc): AnnotationsDoc {
  for (const e of doc.entries) {
    e.status = 'accepted';
    e.note = `checked ${e.kind} spin ${e.spin} at ${e.label ?? e.k.join(',')}`;
  }
  return parseAnnotations(serializeAnnotations(doc), 'a.valleys.json');
}

function rerun(older: AnnotationsDoc, bs: BandStructure): ReturnType<typeof mergeWithSummary> {
  const fresh = annotate(bs);
  const out = mergeWithSummary(older, fresh);
  return { doc: parseAnnotations(serializeAnnotations(out.doc), 'a.valleys.json'), summary: out.summary };
}

/** Every reviewed older entry's note and status is on an entry still found, and none is orphaned. */
function assertReviewKept(older: AnnotationsDoc, merged: ReturnType<typeof mergeWithSummary>): void {
  for (const e of older.entries) {
    const holder = merged.doc.entries.find((b) => b.found && b.note.includes(e.note) && b.status === e.status && b.kind === e.kind);
    assert.ok(holder, `the note "${e.note}" (${e.id}) was not carried to a found entry:\n${serializeAnnotations(merged.doc)}`);
  }
  assert.deepEqual(merged.summary.orphaned, []);
  assert.equal(merged.doc.entries.filter((e) => !e.found).length, 0);
  assert.equal(merged.doc.entries.filter((e) => e.status === 'unreviewed').length, merged.summary.added.length);
}

describe('annotation entries keep their identity across re-runs', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('names entries by band from the edge and valley, not by absolute band', () => {
    const doc = annotate(run());
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    // Conduction minimum at X (the model), band 2 of the run, the first band above the gap.
    assert.deepEqual([cbm.band, cbm.edgeBand, cbm.label], [2, 1, 'X']);
    assert.equal(cbm.id, 'cbm/e1/v=0.5,0,0');
    assert.ok(!cbm.id.includes('up') && !cbm.id.includes('s0'), 'a spin-degenerate run names no spin channel');
  });

  it('keeps every reviewed note and status when a deep band is inserted', () => {
    const older = review(annotate(run()));
    const merged = rerun(older, run({ deepBand: true }));
    assertReviewKept(older, merged);
    assert.equal(merged.summary.kept.length, older.entries.length);
    // The CBM is now band 3 (one semicore band below): the absolute index moved, the identity did not.
    assert.equal(merged.doc.entries.find((e) => e.kind === 'cbm')!.band, 3);
  });

  it('keeps every reviewed note and status when an empty band is removed', () => {
    const older = review(annotate(run({ emptyBand: true })));
    const merged = rerun(older, run());
    assertReviewKept(older, merged);
  });

  it('keeps every reviewed note and status when the run becomes spin-polarised, and back', () => {
    const older = review(annotate(run()));
    const polarised = rerun(older, run({ spinPolarised: true }));
    assertReviewKept(older, polarised);
    assert.ok(polarised.doc.spinPolarised);
    assert.ok(
      polarised.doc.entries.some((e) => e.id.startsWith('cbm/up/')),
      polarised.doc.entries.map((e) => e.id).join(' '),
    );
    // The text names the channels by name.
    assert.match(serializeAnnotations(polarised.doc), /"spin": "up"/);

    // Both channels reviewed, then the run is made unpolarised again: both notes land on the one entry.
    const reviewedBoth = review(polarised.doc);
    const back = rerun(reviewedBoth, run());
    assertReviewKept(reviewedBoth, back);
    assert.ok(back.summary.folded.length >= 1, 'the second channel is folded into the unpolarised entry');
    assert.doesNotMatch(serializeAnnotations(back.doc), /"spin":/);
  });

  it('keeps the note of a valley found at a symmetry-equivalent k-point', () => {
    const older = review(annotate(run({ towards: 'X' })));
    const merged = rerun(older, run({ towards: 'Y' }));
    const cbm = merged.doc.entries.find((e) => e.kind === 'cbm' && e.found)!;
    // Y = (0, ½, 0) is in the star of X under m-3m (International Tables Vol. A).
    assert.deepEqual(cbm.k, [0, 0.5, 0]);
    assertReviewKept(older, merged);
    assert.ok(
      merged.summary.kept.some((f) => f.to === cbm.id),
      'kept under the same id',
    );
  });

  it('migrates a layout-1 file: its note follows the extremum into a run with a deep band', () => {
    const v1 = `{
  "valleyscopeAnnotations": 1,
  "gap": { "eV": 1.2, "direct": false,
    "vbm": { "band": 1, "spin": 0, "k": [0, 0, 0], "energy_eV": 0 },
    "cbm": { "band": 2, "spin": 0, "k": [0.5, 0, 0], "energy_eV": 1.2 },
    "directGap": { "eV": 1.2, "k": [0.5, 0, 0] } },
  "entries": [
    { "id": "cbm/s0/b2/k=0.5,0,0", "status": "accepted", "note": "X valley as expected",
      "kind": "cbm", "spin": 0, "band": 2, "k": [0.5, 0, 0], "energy_eV": 1.2 }
  ]
}`;
    const warnings: string[] = [];
    const older = parseAnnotations(v1, 'old.valleys.json', warnings);
    assert.equal(older.entries[0]!.id, 'cbm/e1/v=0.5,0,0');
    assert.ok(
      warnings.some((w) => /layout 1/.test(w)),
      warnings.join('\n'),
    );
    assert.ok(!warnings.some((w) => /does not match/.test(w)), 'a layout-1 id is not a hand edit');
    const merged = rerun(older, run({ deepBand: true }));
    assertReviewKept(older, merged);
    assert.match(serializeAnnotations(merged.doc), /"valleyscopeAnnotations": 2/);
  });

  it('reports an entry no longer found as orphaned, with its note kept', () => {
    const older = review(annotate(run()));
    // An entry for an extremum the model does not have (a reviewer's entry for a shoulder at (¼, ¼, 0)): the
    // next analysis cannot find it, so it is orphaned, kept with its note, and counted as such.
    older.entries.push({
      ...older.entries[0]!,
      kind: 'peak',
      id: 'x',
      k: [0.25, 0.25, 0],
      valley: [0.25, 0.25, 0],
      edgeBand: 1,
      note: 'odd shoulder',
    });
    const merged = rerun(parseAnnotations(serializeAnnotations(older), 'a'), run());
    assert.equal(merged.summary.orphaned.length, 1);
    const orphan = merged.doc.entries.find((e) => !e.found)!;
    assert.equal(orphan.note, 'odd shoulder');
  });
});

describe('valleyRepresentative', () => {
  it('gives one member for the whole star and differs between stars', async () => {
    await ensureSymmetryReady();
    const { crystalSymmetry } = await import('../../../src/core/lattice/symmetry');
    const rots = crystalSymmetry(simpleCubicStructure(A)).reciprocalPointGroup;
    // The six Δ points (±0.4, 0, 0), (0, ±0.4, 0), (0, 0, ±0.4) are one star in m-3m (International Tables).
    const star: Vec3[] = [
      [0.4, 0, 0],
      [-0.4, 0, 0],
      [0, 0.4, 0],
      [0, -0.4, 0],
      [0, 0, 0.4],
      [0, 0, -0.4],
    ];
    const reps = star.map((k) => valleyRepresentative(k, rots).join(','));
    assert.equal(new Set(reps).size, 1);
    // (0.4, 0.4, 0) is on Σ, another star.
    assert.notEqual(valleyRepresentative([0.4, 0.4, 0], rots).join(','), reps[0]);
    // A k and its periodic image (differing by a reciprocal lattice vector) are one valley, also without symmetry.
    assert.deepEqual(valleyRepresentative([0.6, 0, 0], null), valleyRepresentative([-0.4, 0, 0], null));
  });
});
