/**
 * VASP 6 KPOINTS_OPT runs: the band path's eigenvalues are only in vasprun.xml's <eigenvalues_kpoints_opt>,
 * beside the self-consistent mesh in the ordinary <eigenvalues> (and in EIGENVAL). Synthetic files from the
 * nearest-neighbour tight-binding model on a simple cubic lattice (a = 4 Å), one s band per band index:
 *   E_n(k) = E0_n − 2 t_n (cos k_x a + cos k_y a + cos k_z a)       (the standard s-band model; common practice)
 * with a deep band (E0 = −9, t = 0.1), a valence band (E0 = −1, t = 0.5: maximum 2.0 eV at R) and a conduction
 * band (E0 = 7, t = 0.75: minimum 2.5 eV at Γ): an indirect gap of 0.5 eV from R to Γ, both on the path
 * Γ–X | X–M | M–Γ | Γ–R. The self-consistent set is the 2×2×2 Monkhorst–Pack mesh (k = ±1/4), where every
 * cosine vanishes: there the bands are flat at E0 (gap 8 eV), so reading the wrong set cannot pass.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import type { BandStructure } from '../../../../src/core/model';
import { loadRun, locateRun, otherCandidatesNotice } from '../../../../src/core/load';
import { nodeFileAccessor } from '../../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../../src/core/analysis/analyze';
import { ReaderError } from '../../../../src/core/errors';
import { vasprunReader, VasprunStream } from '../../../../src/core/formats/vasp/vasprun';
import { main } from '../../../../src/cli/main';
import { capture } from '../../../support/unitCliCapture';
import { writeVasprun } from '../../../support/writers/vasprun';
import { writeEigenval } from '../../../support/writers/vasp';
import { kpointsOptBlock, withKpointsOpt, type KpointsOptSpec } from '../../../support/writers/vasprunKpointsOpt';
import { cubicLattice } from '../../../support/models';
import { runFolderMaker } from '../../../support/unitRunFolders';
import { HBAR2_OVER_ME_EV_A2 } from '../../../../src/core/units';

const A = 4;
/** (E0, t) per band of the tight-binding model above. */
const BANDS: [number, number][] = [
  [-9, 0.1],
  [-1, 0.5],
  [7, 0.75],
];
const model = (k: readonly number[], spinShift = 0): number[] =>
  BANDS.map(([e0, t]) => e0 + spinShift - 2 * t * k.reduce((s, f) => s + Math.cos(2 * Math.PI * f), 0));

const G = [0, 0, 0];
const X = [0, 0.5, 0];
const M = [0.5, 0.5, 0];
const R = [0.5, 0.5, 0.5];
const DIV = 21;
const SEGMENTS = [
  [G, X],
  [X, M],
  [M, G],
  [G, R],
];
const PATH: number[][] = SEGMENTS.flatMap(([p, q]) =>
  Array.from({ length: DIV }, (_, i) => p!.map((x, j) => x + ((q![j]! - x) * i) / (DIV - 1))),
);
const KPOINTS_OPT = [
  'k-path of the model',
  ` ${DIV}`,
  'Line-mode',
  'Reciprocal',
  ...SEGMENTS.flatMap(([p, q], i) => [
    ` ${p!.join(' ')} ! ${['GAMMA', 'X', 'M', 'GAMMA'][i]}`,
    ` ${q!.join(' ')} ! ${['X', 'M', 'GAMMA', 'R'][i]}`,
    '',
  ]),
].join('\n');
const KPOINTS_MESH = 'mesh\n0\nMonkhorst-Pack\n2 2 2\n0 0 0\n';

/** The self-consistent run on the 2×2×2 Monkhorst–Pack mesh: 4 electrons (deep and valence bands filled). */
function scfRun(nSpin: 1 | 2, fermiEnergy = 2.3): BandStructure {
  const mesh: number[] = [];
  for (const x of [-0.25, 0.25]) for (const y of [-0.25, 0.25]) for (const z of [-0.25, 0.25]) mesh.push(x, y, z);
  const nk = 8;
  const energies = Array.from({ length: nSpin }, (_, s) =>
    Float64Array.from(Array.from({ length: nk }, (_, k) => model(mesh.slice(3 * k, 3 * k + 3), s * 0.2)).flat()),
  );
  const occupations = energies.map((e) => Float64Array.from(e, (x) => (x < 2.3 ? (nSpin === 2 ? 1 : 2) : 0)));
  return {
    source: { format: 'model', file: 'model', files: [] },
    lattice: cubicLattice(A),
    structure: { lattice: cubicLattice(A), species: ['Si'], positions: new Float64Array([0, 0, 0]) },
    nk,
    nBands: BANDS.length,
    nSpin,
    kpoints: Float64Array.from(mesh),
    weights: new Float64Array(nk).fill(1 / nk),
    energies,
    occupations,
    fermiEnergy,
    electrons: 4,
    spinorbit: false,
    labels: [],
    sampling: 'grid',
    grid: null,
    writtenDistance: null,
    partial: false,
    warnings: [],
  };
}

function optSpec(over: Partial<KpointsOptSpec> = {}): KpointsOptSpec {
  return {
    kpoints: PATH,
    nSpin: 1,
    energies: (s, k) => model(PATH[k]!, s * 0.2),
    generation: { divisions: DIV, ends: SEGMENTS.flat() },
    dosEfermi: 5,
    projectedShift: 40,
    ...over,
  };
}

function vasprun(spec: KpointsOptSpec | null, where: 'after' | 'before' = 'after', fermiEnergy = 2.3): string {
  // The self-consistent <kpoints> declares its 2×2×2 Monkhorst–Pack mesh, as VASP writes it.
  const scf = writeVasprun(scfRun(spec?.nSpin ?? 1, fermiEnergy), { meshGeneration: { param: 'Monkhorst-Pack', divisions: '2 2 2' } });
  return spec ? withKpointsOpt(scf, kpointsOptBlock(spec), where) : scf;
}

const runFolder = runFolderMaker('vs-kpoints-opt-');

const near = (k: readonly number[], want: readonly number[]): boolean => k.every((x, j) => Math.abs(x - want[j]!) < 1e-6);
const codes = (bs: BandStructure): string[] => bs.warnings.map((w) => w.code);

function readText(text: string, options = {}): BandStructure {
  return vasprunReader.read({ path: 'vasprun.xml', bytes: new TextEncoder().encode(text) }, [], options);
}

/** The model's gap: VBM 2.0 eV at R (valence band, −1 + 3), CBM 2.5 eV at Γ (conduction band, 7 − 4.5). */
function assertModelGap(bs: BandStructure, spin: 0 | 1 = 0): void {
  const report = analyzeBandStructure(bs);
  assert.equal(report.metal, false, `${report.classificationReason} ${JSON.stringify(report.warnings)}`);
  const gap = spin === 0 ? report.gap : report.spinGaps?.[1];
  assert.ok(gap, 'a gap');
  const shift = spin * 0.2;
  assert.ok(Math.abs(gap.vbm.eV - (2.0 + shift)) < 1e-4, `VBM ${gap.vbm.eV}`); // tight-binding model above, f10.4 rounding
  assert.ok(Math.abs(gap.cbm.eV - (2.5 + shift)) < 1e-4, `CBM ${gap.cbm.eV}`); // same model
  assert.ok(Math.abs(gap.eV - 0.5) < 2e-4); // 2.5 − 2.0 (model)
  assert.equal(gap.direct, false); // R → Γ (model)
  assert.ok(near(gap.vbm.k, R), `VBM at ${gap.vbm.k.join(' ')}`);
  assert.ok(near(gap.cbm.k, G), `CBM at ${gap.cbm.k.join(' ')}`);
  assert.deepEqual([gap.vbm.band, gap.cbm.band], [2, 3]);
  if (spin === 1) return;
  // Curvature masses of the tight-binding bands: d²E/dk² = 2 t a² at the band's extremum, m* = ħ²/(m_e · 2 t a²)
  // (model): 0.3175 m_e at Γ (t = 0.75), −0.476 m_e at R (t = 0.5). 3 %: the cosine's quartic term over the fit window.
  const massTowards = (kind: string, dir: number[]): number => {
    const unit = dir.map((x) => x / Math.hypot(...dir));
    return report.extrema.find((e) => e.kind === kind)!.masses.find((m) => m.direction.every((x, j) => Math.abs(x - unit[j]!) < 1e-6))!
      .mass;
  };
  const cbmMass = HBAR2_OVER_ME_EV_A2 / (2 * 0.75 * A * A);
  const vbmMass = -HBAR2_OVER_ME_EV_A2 / (2 * 0.5 * A * A);
  assert.ok(Math.abs(massTowards('cbm', [0, 1, 0]) / cbmMass - 1) < 0.03, `m*(Γ→X) vs ${cbmMass}`);
  assert.ok(Math.abs(massTowards('vbm', [-1, -1, -1]) / vbmMass - 1) < 0.03, `m*(R→Γ) vs ${vbmMass}`);
}

describe('VASP 6 KPOINTS_OPT runs (vasprun.xml <eigenvalues_kpoints_opt>)', () => {
  it('(a) mesh + line-mode KPOINTS_OPT path with its companion: the path is read with its labels; gap and k are the model’s', async () => {
    const dir = runFolder({ 'vasprun.xml': vasprun(optSpec()), KPOINTS: KPOINTS_MESH, KPOINTS_OPT });
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.equal(bs.nk, PATH.length);
    assert.equal(bs.sampling, 'path');
    assert.equal(bs.occupations, null, 'the opt rows carry no occupation');
    assert.equal(bs.fermiEnergy, 2.3, 'the self-consistent efermi, not the <dos_kpoints_opt> one');
    assert.ok(bs.source.files.some((f) => f.role === 'kpath' && f.path.endsWith('KPOINTS_OPT')));
    assert.ok(!bs.source.files.some((f) => f.path.endsWith('/KPOINTS')), 'KPOINTS describes the mesh, not this set');
    const labels = bs.labels.map((l) => `${l.index}:${l.label}`);
    assert.deepEqual(labels.slice(0, 3), ['0:Γ', `${DIV - 1}:X`, `${DIV}:X`]);
    assert.equal(labels.at(-1), `${4 * DIV - 1}:R`);
    const w = bs.warnings.find((x) => x.code === 'kpoints-opt');
    assert.ok(w);
    assert.match(w.message, /self-consistent mesh \(8 k-points\) and the KPOINTS_OPT set \(84 k-points\); analysed: the KPOINTS_OPT set/);
    assertModelGap(bs);
  });

  it('(a) without occupations: a metal is still told (NELECT = 3 half-fills the valence band, efermi at its centre)', () => {
    // The s band of the simple cubic model has a density of states symmetric about E0 (common practice): half filled at E0 = −1 eV.
    const text = vasprun(optSpec())
      .replace(/(<i name="NELECT">)\s*[\d.]+/, '$1      3.00000000')
      .replace(/(<i name="efermi">)\s*2\.3/, '$1     -1.00000000');
    const report = analyzeBandStructure(readText(text));
    assert.equal(report.metal, true, report.classificationReason); // an odd electron count in spin-degenerate bands (common practice)
  });

  it('(a) without occupations or a Fermi energy: the electron count decides (NELECT = 4 insulator, 3 metal)', () => {
    // No efermi in the self-consistent <dos>; the <dos_kpoints_opt> one (5 eV, inside the conduction band) is not
    // taken: NELECT and the band order remain (common practice).
    const text = vasprun(optSpec()).replace(/(<dos>\s*)<i name="efermi">[^<]*<\/i>/, '$1');
    assert.match(text, /<dos_kpoints_opt>\s*<i name="efermi">/);
    const bs = readText(text);
    assert.equal(bs.fermiEnergy, null);
    const insulator = analyzeBandStructure(bs);
    assert.equal(insulator.metal, false, insulator.classificationReason);
    assert.ok(Math.abs(insulator.gap!.eV - 0.5) < 2e-4); // 2.5 − 2.0 (model)
    const metal = analyzeBandStructure(readText(text.replace(/(<i name="NELECT">)\s*[\d.]+/, '$1      3.00000000')));
    assert.equal(metal.metal, true, metal.classificationReason); // an odd electron count in spin-degenerate bands (common practice)
  });

  it('(a) --scf-set (ReadOptions.scfSet): the self-consistent mesh instead, said so', () => {
    const bs = readText(vasprun(optSpec()), { scfSet: true });
    assert.equal(bs.nk, 8);
    assert.ok(bs.occupations !== null);
    assert.match(bs.warnings.find((w) => w.code === 'kpoints-opt')!.message, /analysed: the self-consistent set, as asked/);
  });

  it('(a) the CLI: analyze --json reads the KPOINTS_OPT set, --scf-set the mesh', async () => {
    const dir = runFolder({ 'vasprun.xml': vasprun(optSpec()), KPOINTS_OPT });
    const nkOf = async (extra: string[]): Promise<number> => {
      const io = capture();
      assert.equal(await main(['analyze', dir, '--json', ...extra], io), 0, io.stderr);
      return (JSON.parse(io.stdout) as { nk: number }).nk;
    };
    assert.equal(await nkOf([]), PATH.length);
    assert.equal(await nkOf(['--scf-set']), 8);
  });

  it('(a) fed to the stream in small pieces (every row and tag split somewhere): the same KPOINTS_OPT set', () => {
    const bytes = new TextEncoder().encode(vasprun(optSpec({ nSpin: 2 })));
    const whole = new VasprunStream('vasprun.xml', bytes.length);
    whole.write(bytes, true);
    const a = whole.finish(false).kpointsOpt;
    for (const piece of [7, 61]) {
      const s = new VasprunStream('vasprun.xml', bytes.length);
      for (let i = 0; i < bytes.length; i += piece) s.write(bytes.subarray(i, i + piece), i + piece >= bytes.length);
      const b = s.finish(false).kpointsOpt;
      assert.ok(a?.state === 'read' && b?.state === 'read');
      assert.deepEqual(Array.from(b.set.kpoints), Array.from(a.set.kpoints));
      assert.deepEqual(
        b.set.energies.map((e) => Array.from(e)),
        a.set.energies.map((e) => Array.from(e)),
      );
      assert.equal(b.set.nk, PATH.length);
    }
  });

  it('(a) no <generation> in the KPOINTS_OPT set: a path when KPOINTS_OPT is in line mode, else points', () => {
    const text = vasprun(optSpec({ generation: undefined }));
    const optFile = { path: 'KPOINTS_OPT', bytes: new TextEncoder().encode(KPOINTS_OPT) };
    const withFile = vasprunReader.read({ path: 'vasprun.xml', bytes: new TextEncoder().encode(text) }, [optFile], {});
    assert.equal(withFile.sampling, 'path');
    assert.deepEqual(withFile.labels.slice(0, 2), [
      { index: 0, label: 'Γ' },
      { index: DIV - 1, label: 'X' },
    ]);
    const without = readText(text);
    assert.equal(without.sampling, 'points');
    assert.equal(without.nk, PATH.length);
  });

  it('(a) a mesh KPOINTS_OPT set: its own declared mesh (3×3×3 Γ-centred), not the self-consistent 2×2×2', () => {
    const mesh: number[][] = [];
    for (const x of [0, 1, 2]) for (const y of [0, 1, 2]) for (const z of [0, 1, 2]) mesh.push([x / 3, y / 3, z / 3]);
    const bs = readText(
      vasprun(
        optSpec({
          kpoints: mesh,
          energies: (s, k) => model(mesh[k]!),
          generation: undefined,
          meshGeneration: { param: 'Gamma', divisions: '3 3 3' },
        }),
      ),
    );
    assert.equal(bs.nk, 27);
    assert.equal(bs.sampling, 'points');
    assert.deepEqual(bs.declaredMesh?.divisions, [3, 3, 3]);
    assert.ok(
      readText(vasprun(null)).declaredMesh?.divisions.every((n) => n === 2),
      'the self-consistent set declares 2×2×2',
    );
  });

  it('(b) the KPOINTS_OPT block before the ordinary eigenvalues reads the same', () => {
    const after = readText(vasprun(optSpec(), 'after'));
    const before = readText(vasprun(optSpec(), 'before'));
    assert.equal(before.nk, PATH.length);
    assert.deepEqual(Array.from(before.energies[0]!), Array.from(after.energies[0]!));
    assert.deepEqual(Array.from(before.kpoints), Array.from(after.kpoints));
    assertModelGap(before);
  });

  it('(c) ISPIN = 2: two spin sets in the KPOINTS_OPT block (spin 2 shifted up by 0.2 eV)', () => {
    const bs = readText(vasprun(optSpec({ nSpin: 2 })));
    assert.equal(bs.nSpin, 2);
    assert.equal(bs.nk, PATH.length);
    const k = PATH.length - 1; // R
    assert.ok(Math.abs(bs.energies[1]![k * 3 + 1]! - bs.energies[0]![k * 3 + 1]! - 0.2) < 1e-9); // the spin shift of the model
    assertModelGap(bs, 1);
  });

  it('(d) no KPOINTS_OPT block: the self-consistent set as before, no warning about it', () => {
    const bs = readText(vasprun(null));
    assert.equal(bs.nk, 8);
    assert.ok(!codes(bs).some((c) => c.startsWith('kpoints-opt')));
    assert.ok(near(Array.from(bs.kpoints.subarray(0, 3)), [-0.25, -0.25, -0.25]));
  });

  it('(e) a file cut inside the KPOINTS_OPT block: the self-consistent set and a warning (allowPartial)', () => {
    const full = vasprun(optSpec());
    const cutAt = full.indexOf('<set comment="kpoint 30">', full.indexOf('<eigenvalues_kpoints_opt'));
    const bs = readText(full.slice(0, cutAt), { allowPartial: true });
    assert.equal(bs.nk, 8);
    const w = bs.warnings.find((x) => x.code === 'kpoints-opt-incomplete');
    assert.ok(w);
    assert.match(w.message, /file ends inside its eigenvalues.*analysed: the self-consistent mesh \(8 k-points\)/);
    // Cut before its eigenvalues begin, too.
    const early = readText(full.slice(0, full.indexOf('<varray name="weights"', full.indexOf('<eigenvalues_kpoints_opt'))), {
      allowPartial: true,
    });
    assert.equal(early.nk, 8);
    assert.ok(codes(early).includes('kpoints-opt-incomplete'));
  });

  describe('(f) hostile KPOINTS_OPT blocks: a clear error, or the set aside with its reason', () => {
    const refuse = (text: string, pattern: RegExp): void => {
      assert.throws(
        () => readText(text),
        (e: unknown) => e instanceof ReaderError && pattern.test(e.message) && e.line > 0,
      );
    };
    // A second set that does not fit the run is not analysed; the self-consistent set is, and a warning says why.
    const setAside = (text: string, pattern: RegExp): void => {
      const bs = readText(text);
      assert.equal(bs.nk, 8);
      const w = bs.warnings.find((x) => x.code === 'kpoints-opt-incomplete');
      assert.ok(w && pattern.test(w.message), w?.message ?? codes(bs).join(','));
    };
    it('a band count different from NBANDS: set aside', () => {
      setAside(vasprun(optSpec({ energies: (s, k) => [...model(PATH[k]!), 12] })), /4 bands.*NBANDS = 3.*line \d+/);
    });
    it('one k-point with a band more than the others: an error', () => {
      refuse(
        vasprun(optSpec({ energies: (s, k) => (k === 5 ? [...model(PATH[k]!), 12] : model(PATH[k]!)) })),
        /KPOINTS_OPT.*k-point 6 lists 4 bands/,
      );
    });
    it('no kpointlist: set aside, its rows not read', () => {
      setAside(vasprun(optSpec({ omitKpointList: true })), /before any of its k-points is listed \(no <varray name="kpointlist">\)/);
    });
    it('more k-point sets than listed k-points: set aside', () => {
      setAside(vasprun(optSpec({ extraKpointSets: 2 })), /cover 86 \(spin, k-point\) sets, but 84 k-points/);
    });
    it('an energy that is not a number: an error', () => {
      const text = vasprun(optSpec()).replace(/(<eigenvalues_kpoints_opt[\s\S]*?<r>)\s*[-\d.]+/, '$1  nonsense');
      refuse(text, /KPOINTS_OPT.*"nonsense"/);
    });
  });

  it('(i) a self-consistent Fermi energy below the path’s VBM (the mesh misses it): the electron count classifies the path', () => {
    // The 2×2×2 Monkhorst–Pack mesh's valence band tops out at −1 eV (Σ cos = 0 at (±¼, ±¼, ±¼), model); VASP
    // would place E_F there (−0.9 eV), below the path's VBM at R (2.0 eV).
    const bs = readText(vasprun(optSpec(), 'after', -0.9));
    assert.equal(bs.fermiFromOtherKPoints, true);
    assertModelGap(bs);
    const report = analyzeBandStructure(bs);
    assert.match(report.classificationReason, /4 electrons .* fill whole bands/);
    assert.ok(
      report.warnings.some((w) => /found on the self-consistent k-points.*band 2's range here: the electron count was followed/.test(w)),
      JSON.stringify(report.warnings),
    );
    // The self-consistent set itself keeps its written Fermi energy as evidence (it was found on those k-points).
    const scf = readText(vasprun(optSpec(), 'after', -0.9), { scfSet: true });
    assert.equal(scf.fermiFromOtherKPoints, undefined);
  });

  it('(h) k-points in a <kpoints comment="kpoints_opt"> of their own beside the block: read for it, the self-consistent ones kept', () => {
    const text = vasprun(optSpec());
    const start = text.indexOf('<eigenvalues_kpoints_opt');
    const k0 = text.indexOf('<kpoints>', start);
    const k1 = text.indexOf('</kpoints>', k0) + '</kpoints>'.length;
    const own = text.slice(k0, k1).replace('<kpoints>', '<kpoints comment="kpoints_opt">');
    const without = text.slice(0, k0) + text.slice(k1);
    // Directly under <modeling>, after the self-consistent <kpoints>; and under <calculation>, before the block.
    const scfEnd = without.indexOf('</kpoints>') + '</kpoints>'.length;
    const atTop = without.slice(0, scfEnd) + '\n ' + own + without.slice(scfEnd);
    const blockAt = without.indexOf('<eigenvalues_kpoints_opt');
    const inCalc = without.slice(0, blockAt) + own + '\n  ' + without.slice(blockAt);
    const reference = readText(text);
    for (const variant of [atTop, inCalc]) {
      const bs = readText(variant);
      assert.equal(bs.nk, reference.nk);
      assert.deepEqual(Array.from(bs.kpoints), Array.from(reference.kpoints));
      assert.deepEqual(
        bs.energies.map((e) => Array.from(e)),
        reference.energies.map((e) => Array.from(e)),
      );
      assert.equal(bs.sampling, reference.sampling);
      const scf = readText(variant, { scfSet: true });
      const scfReference = readText(text, { scfSet: true });
      assert.deepEqual(Array.from(scf.kpoints), Array.from(scfReference.kpoints));
      assert.equal(scf.sampling, scfReference.sampling);
      assert.deepEqual(scf.declaredMesh ?? null, scfReference.declaredMesh ?? null);
    }
  });

  it('(g) a folder with EIGENVAL, vasprun.xml and KPOINTS_OPT reads vasprun.xml and says why', async () => {
    const scf = scfRun(1);
    const eigenval = writeEigenval({
      system: 'model',
      nIons: 1,
      electrons: 4,
      nBands: scf.nBands,
      kpoints: scf.kpoints,
      weights: scf.weights!,
      energies: scf.energies,
      occupations: scf.occupations!.map((o) => Float64Array.from(o)),
    });
    const files = { EIGENVAL: eigenval, 'vasprun.xml': vasprun(optSpec()), KPOINTS: KPOINTS_MESH };
    // Without KPOINTS_OPT the general rule (same confidence, then by name) reads EIGENVAL: unchanged.
    assert.match((await locateRun(nodeFileAccessor, runFolder(files))).file, /EIGENVAL$/);
    const dir = runFolder({ ...files, KPOINTS_OPT });
    const loc = await locateRun(nodeFileAccessor, dir);
    assert.match(loc.file, /vasprun\.xml$/);
    assert.match(otherCandidatesNotice(loc)!, /KPOINTS_OPT, whose eigenvalues VASP writes only to vasprun\.xml/);
    const bs = await loadRun(nodeFileAccessor, dir);
    assert.equal(bs.nk, PATH.length);
    // EIGENVAL given by name beside a KPOINTS_OPT: read, with a warning that the path is elsewhere.
    const eig = await loadRun(nodeFileAccessor, join(dir, 'EIGENVAL'));
    assert.equal(eig.nk, 8);
    assert.match(eig.warnings.find((w) => w.code === 'kpoints-opt-elsewhere')!.message, /only to vasprun\.xml/);
  });
});
