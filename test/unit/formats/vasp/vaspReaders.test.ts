import assert from 'node:assert/strict';
import { mkdtempSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readEigenval, detectEigenval } from '../../../../src/core/formats/vasp/eigenvalScan';
import { readPoscar } from '../../../../src/core/formats/vasp/poscar';
import { readKpoints } from '../../../../src/core/formats/vasp/kpoints';
import { loadRun } from '../../../../src/core/load';
import { nodeFileAccessor } from '../../../../src/cli/nodeFileAccessor';
import { ReaderError } from '../../../../src/core/errors';
import { det3 } from '../../../../src/core/lattice/linalg';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const f = (path: string, text: string) => ({ path, bytes: enc(text) });
const E = (x: number): string => {
  // VASP's k-point format: Fortran E15.7 style, e.g. "  0.5000000E+00".
  if (x === 0) return '  0.0000000E+00';
  const exp = Math.floor(Math.log10(Math.abs(x))) + 1;
  const m = x / 10 ** exp;
  return `${m < 0 ? ' -' : '  '}${Math.abs(m).toFixed(7)}E${exp >= 0 ? '+' : '-'}${String(Math.abs(exp)).padStart(2, '0')}`;
};

interface EigSpec {
  ispin?: 1 | 2;
  occ?: boolean;
  electrons?: number;
  kpts: number[][];
  weights?: number[];
  /** bands(spin, k) → energies */
  bands: (s: number, k: number) => number[];
  occs?: (s: number, k: number) => number[];
}

/** EIGENVAL in VASP's own layout (header as VASP 5/6 write it). */
function eigenval(spec: EigSpec): string {
  const ispin = spec.ispin ?? 1;
  const nb = spec.bands(0, 0).length;
  const lines = [
    `       2       2       1       ${ispin}`,
    '  0.4002443E+02  0.3840000E-09  0.3840000E-09  0.3840000E-09  0.5000000E-15',
    '  1.000000000000000E-004',
    '  CAR ',
    ' Si bulk',
    `     ${spec.electrons ?? 8}     ${spec.kpts.length}     ${nb}`,
  ];
  spec.kpts.forEach((k, i) => {
    lines.push('');
    lines.push(`${E(k[0]!)}${E(k[1]!)}${E(k[2]!)}${E(spec.weights?.[i] ?? 0)}`);
    for (let b = 0; b < nb; b++) {
      let l = `  ${String(b + 1).padStart(3)}`;
      for (let s = 0; s < ispin; s++) l += `  ${spec.bands(s, i)[b]!.toFixed(6).padStart(12)}`;
      if (spec.occ) for (let s = 0; s < ispin; s++) l += `  ${(spec.occs ? spec.occs(s, i)[b]! : b < 4 ? 1 : 0).toFixed(6)}`;
      lines.push(l);
    }
  });
  return `${lines.join('\n')}\n`;
}

const path3 = [
  [0, 0, 0],
  [0.25, 0, 0.25],
  [0.5, 0, 0.5],
];
const bands6 = (s: number, k: number): number[] => [
  -5.8 + 0.1 * k,
  -1 - 0.2 * k - 0.05 * s,
  -0.5 - 0.3 * k,
  -0.2 * k,
  1.2 - 0.3 * k + 0.1 * s,
  3 + k,
];

const POSCAR5 = `Si2 diamond
   5.43000000000000
     0.0000000000000000    0.5000000000000000    0.5000000000000000
     0.5000000000000000    0.0000000000000000    0.5000000000000000
     0.5000000000000000    0.5000000000000000    0.0000000000000000
   Si
     2
Direct
  0.0000000000000000  0.0000000000000000  0.0000000000000000
  0.2500000000000000  0.2500000000000000  0.2500000000000000
`;

describe('VASP EIGENVAL reader', () => {
  it('reads the VASP 6 layout with occupations', () => {
    const d = readEigenval(f('EIGENVAL', eigenval({ kpts: path3, bands: bands6, occ: true })));
    assert.equal(d.nk, 3);
    assert.equal(d.nBands, 6);
    assert.equal(d.nSpin, 1);
    assert.equal(d.electrons, 8);
    assert.ok(d.occupations);
    assert.equal(d.energies[0]![1 * 6 + 4], 0.9);
    assert.equal(d.occupations[0]![3], 1);
    assert.deepEqual(Array.from(d.kpoints.subarray(3, 6)), [0.25, 0, 0.25]);
  });

  it('reads the older layout without the occupation column', () => {
    const d = readEigenval(f('EIGENVAL', eigenval({ kpts: path3, bands: bands6 })));
    assert.equal(d.occupations, null);
    assert.equal(d.energies[0]![2 * 6 + 5], 5);
  });

  it('reads spin-polarised files with and without occupations', () => {
    for (const occ of [false, true]) {
      const d = readEigenval(f('EIGENVAL', eigenval({ ispin: 2, kpts: path3, bands: bands6, occ })));
      assert.equal(d.nSpin, 2);
      assert.equal(d.energies.length, 2);
      assert.ok(Math.abs(d.energies[1]![4]! - 1.3) < 1e-12);
      assert.equal(d.occupations === null, !occ);
    }
  });

  it('is recognised by content, whatever the file name', () => {
    const head = enc(eigenval({ kpts: path3, bands: bands6 }));
    assert.ok(detectEigenval(head, 'run42.out') > 0.5);
    assert.equal(detectEigenval(enc(POSCAR5), 'EIGENVAL'), 0);
  });

  const bad: [string, string, number, RegExp][] = [
    [
      'truncated inside a k-point',
      eigenval({ kpts: path3, bands: bands6 }).split('\n').slice(0, 20).join('\n'),
      20,
      /ends inside k-point 2 of 3, after 4 of 6 bands/,
    ],
    ['overflow field', eigenval({ kpts: path3, bands: bands6 }).replace('-0.200000', '*********'), 0, /overflowed/],
    [
      'band count that disagrees with the data',
      eigenval({ kpts: path3, bands: bands6 }).replace('     8     3     6', '     8     3     7'),
      0,
      /lists 6 bands, but the header's NBANDS is 7/,
    ],
    ['empty file', '', 1, /empty/],
    ['NaN energy', eigenval({ kpts: path3, bands: bands6 }).replace('-0.200000', '      NaN'), 0, /not a finite number/],
    ['header that ends early', '       2       2       1       1\n  0.4E+02\n', 3, /header ends early/],
  ];
  for (const [what, text, line, re] of bad) {
    it(`refuses a ${what} with the file, line and a plain sentence`, () => {
      assert.throws(
        () => readEigenval(f('EIGENVAL', text)),
        (e: unknown) =>
          e instanceof ReaderError && re.test(e.message) && e.message.startsWith('EIGENVAL:') && (line === 0 || e.line === line),
      );
    });
  }

  it('reads what is complete of a file still being written, marked partial, when asked', () => {
    const text = eigenval({ kpts: path3, bands: bands6 }).split('\n').slice(0, 20).join('\n');
    const d = readEigenval(f('EIGENVAL', text), { allowPartial: true });
    assert.equal(d.partial, true);
    assert.equal(d.nk, 1);
  });
});

describe('VASP POSCAR reader', () => {
  it('reads the VASP 5 layout (species line, Direct)', () => {
    const s = readPoscar(f('POSCAR', POSCAR5));
    assert.deepEqual(s.species, ['Si', 'Si']);
    assert.equal(s.lattice[0][1], 2.715);
    assert.deepEqual(Array.from(s.positions.subarray(3)), [0.25, 0.25, 0.25]);
  });

  it('reads the VASP 4 layout (no species line), Cartesian positions and a negative scale (the volume)', () => {
    // fcc primitive volume a³/4 = 40.0257 Å³ for a = 5.43 Å (analytic).
    const vol = 5.43 ** 3 / 4;
    const text = `Ga As zincblende
  -${vol}
  0.0 1.0 1.0
  1.0 0.0 1.0
  1.0 1.0 0.0
  1 1
Cartesian
  0.0 0.0 0.0
  0.5 0.5 0.5
`;
    const s = readPoscar(f('CONTCAR', text));
    assert.deepEqual(s.species, ['Ga', 'As']);
    assert.ok(Math.abs(Math.abs(det3(s.lattice)) - vol) < 1e-9);
    assert.ok(Math.abs(s.lattice[0][1] - 2.715) < 1e-9);
    // Cartesian (0.5,0.5,0.5)·scale = a/4 (1,1,1) is fractional (1/4,1/4,1/4) in this cell (analytic).
    for (const x of s.positions.subarray(3)) assert.ok(Math.abs(x - 0.25) < 1e-12);
  });

  it('reads Selective dynamics and VASP 6 species with POTCAR hashes', () => {
    const text = POSCAR5.replace('   Si\n', '   Si/b0c6fb84\n')
      .replace('Direct', 'Selective dynamics\nDirect')
      .replace(/0\.0000000000000000\n/, '0.0000000000000000 T T T\n');
    const s = readPoscar(f('POSCAR', text));
    assert.deepEqual(s.species, ['Si', 'Si']);
  });

  it('names the line when the species and counts disagree', () => {
    assert.throws(
      () => readPoscar(f('POSCAR', POSCAR5.replace('     2\n', '     1 1\n'))),
      (e: unknown) => e instanceof ReaderError && e.line === 6,
    );
  });
});

describe('VASP KPOINTS reader (line mode)', () => {
  it('reads ends and labels in every spelling of Γ', () => {
    const text = `k-path for fcc
 20
Line-mode
reciprocal
  0.0 0.0 0.0 ! GAMMA
  0.5 0.0 0.5 ! X

  0.5 0.0 0.5 ! X
  0.0 0.0 0.0 ! \\Gamma

  0 0 0 ! G
  0.5 0.5 0.5 ! L
`;
    const k = readKpoints(f('KPOINTS', text));
    assert.equal(k.mode, 'line');
    if (k.mode !== 'line') return;
    assert.equal(k.path.pointsPerSegment, 20);
    assert.deepEqual(
      k.path.ends.map((e) => e.label),
      ['Γ', 'X', 'X', 'Γ', 'Γ', 'L'],
    );
  });

  it('says when KPOINTS is a mesh, not a path', () => {
    const k = readKpoints(f('KPOINTS', 'auto\n0\nGamma\n 8 8 8\n'));
    assert.equal(k.mode, 'other');
  });
});

describe('a VASP run folder', () => {
  const dir = mkdtempSync(join(tmpdir(), 'vs-vasp-'));
  const kpoints = `fcc path\n 2\nLine-mode\nReciprocal\n 0 0 0 ! \\Gamma\n 0.5 0 0.5 ! X\n\n 0.5 0 0.5 ! X\n 0.5 0.5 0.5 ! L\n`;
  const kp = [
    [0, 0, 0],
    [0.5, 0, 0.5],
    [0.5, 0, 0.5],
    [0.5, 0.5, 0.5],
  ];
  before(() => {
    mkdirSync(join(dir, 'run'), { recursive: true });
    writeFileSync(join(dir, 'run', 'EIGENVAL'), eigenval({ kpts: kp, bands: (s, k) => bands6(s, Math.min(k, 2)), occ: true }));
    writeFileSync(join(dir, 'run', 'POSCAR'), POSCAR5);
    writeFileSync(join(dir, 'run', 'KPOINTS'), kpoints);
    writeFileSync(join(dir, 'run', 'INCAR'), 'ISMEAR = 0\nLSORBIT = .FALSE.\n');
  });

  it('finds the eigenvalue file by content and uses the companions', async () => {
    const bs = await loadRun(nodeFileAccessor, join(dir, 'run'));
    assert.equal(bs.source.format, 'vasp-eigenval');
    assert.ok(bs.lattice);
    assert.equal(bs.sampling, 'path');
    assert.deepEqual(
      bs.labels.map((l) => [l.index, l.label]),
      [
        [0, 'Γ'],
        [1, 'X'],
        [2, 'X'],
        [3, 'L'],
      ],
    );
    assert.deepEqual(
      bs.source.files.map((x) => x.role),
      ['eigenvalues', 'structure', 'settings', 'kpath'],
    );
    assert.equal(bs.spinorbit, false);
  });

  it('a file given alone still works, with what is missing as warnings', async () => {
    mkdirSync(join(dir, 'alone'), { recursive: true });
    writeFileSync(join(dir, 'alone', 'EIGENVAL'), eigenval({ kpts: path3, bands: bands6 }));
    const bs = await loadRun(nodeFileAccessor, join(dir, 'alone', 'EIGENVAL'));
    assert.equal(bs.lattice, null);
    assert.ok(bs.warnings.some((w) => w.code === 'no-lattice' && /masses cannot be given in m_e/.test(w.message)));
  });

  it('keeps only the zero-weight path of a hybrid-functional run', async () => {
    mkdirSync(join(dir, 'hybrid'), { recursive: true });
    const mesh = [
      [0, 0, 0],
      [0.25, 0, 0],
      [0.5, 0, 0],
    ];
    writeFileSync(
      join(dir, 'hybrid', 'EIGENVAL'),
      eigenval({ kpts: [...mesh, ...kp], weights: [0.1, 0.4, 0.5, 0, 0, 0, 0], bands: (s, k) => bands6(s, k % 3), occ: true }),
    );
    writeFileSync(join(dir, 'hybrid', 'KPOINTS'), kpoints);
    const bs = await loadRun(nodeFileAccessor, join(dir, 'hybrid'));
    assert.equal(bs.nk, 4);
    assert.ok(bs.warnings.some((w) => w.code === 'mesh-points-dropped'));
    assert.deepEqual(
      bs.labels.map((l) => l.label),
      ['Γ', 'X', 'X', 'L'],
    );
  });

  it('infers spin-orbit from occupations holding one electron per band', async () => {
    mkdirSync(join(dir, 'soc'), { recursive: true });
    writeFileSync(join(dir, 'soc', 'EIGENVAL'), eigenval({ kpts: path3, bands: bands6, occ: true, electrons: 4 }));
    const bs = await loadRun(nodeFileAccessor, join(dir, 'soc'));
    assert.equal(bs.spinorbit, true);
  });
});

describe('EIGENVAL streamed', () => {
  // Reading whole 16 MiB windows' worth of k-points would be slow here; instead the sources below hand out a
  // few hundred bytes per call, so every window boundary falls somewhere inside a line.
  const kpts = Array.from({ length: 60 }, (_, i) => [i / 120, 0, i / 120]);
  const text = eigenval({ kpts, bands: bands6, occ: true });
  const bytes = enc(text);
  const cases = [
    { how: 'in windows (a source returning at most 1000 bytes per read)', chunk: 1000, into: false },
    { how: "into one reused buffer (a source filling the caller's buffer 700 bytes at a time)", chunk: 700, into: true },
  ];
  for (const { how, chunk, into } of cases) {
    it(`gives the same data and hash as the whole-file read, ${how}`, async () => {
      const { sha256Hex } = await import('../../../../src/core/hash');
      const read = (off: number, len: number) => bytes.slice(off, Math.min(bytes.length, off + Math.min(len, chunk)));
      const readInto = (off: number, target: Uint8Array, at: number, len: number) => {
        const n = Math.max(0, Math.min(len, chunk, bytes.length - off, target.length - at));
        target.set(bytes.subarray(off, off + n), at);
        return n;
      };
      const stream = { size: bytes.length, read, ...(into ? { readInto } : {}), close: () => undefined };
      const whole = readEigenval(f('EIGENVAL', text));
      const streamed = readEigenval({ path: 'EIGENVAL', bytes: new Uint8Array(0), stream });
      assert.deepEqual(Array.from(streamed.energies[0]!), Array.from(whole.energies[0]!));
      assert.deepEqual(Array.from(streamed.occupations![0]!), Array.from(whole.occupations![0]!));
      assert.deepEqual(Array.from(streamed.kpoints), Array.from(whole.kpoints));
      // Reference: the one-shot SHA-256 of the bytes (FIPS 180-4 implementation checked in hash.test.ts).
      assert.equal(streamed.sha256, sha256Hex(bytes));
    });
  }
});
