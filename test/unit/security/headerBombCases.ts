/**
 * Run in a child process by headerBombs.test.ts (node --import tsx this file): each case hands a small
 * companion file whose header claims a huge count to the reader that parses it, and prints one JSON line per
 * case: whether a ReaderError (a sentence) came back, the sentence, and how far the process's peak resident
 * memory (getrusage maxRSS, monotonic) rose during the case. A fresh process keeps the measurement clean.
 */
import { ReaderError, ValleyscopeError } from '../../../src/core/errors';
import { readPoscar } from '../../../src/core/formats/vasp/poscar';
import { readKpoints } from '../../../src/core/formats/vasp/kpoints';
import { readIncarFlags } from '../../../src/core/formats/vasp/incar';
import { readBandKpt, readLabelInfo, readWin, wannier90BandReader } from '../../../src/core/formats/wannier90';
import { readQeXml } from '../../../src/core/formats/qe/qeXml';
import { bandsxReader } from '../../../src/core/formats/qe/bandsx';
import { castepBandsReader } from '../../../src/core/formats/castep';
import { bxsfReader } from '../../../src/core/formats/bxsf';
import { writeBxsf } from '../../support/writers/bxsf';
import { writeCastepBands } from '../../support/writers/castep';
import { vaspEigenvalReader } from '../../../src/core/formats/vasp/eigenval';
import { readFromBytes } from '../../../src/core/load';
import { readStructureFile } from '../../../src/core/formats/structureFile';
import { collinearModel } from '../../support/writers/roundTripModel';
import { writeWannier90 } from '../../support/writers/wannier90';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { eigenvalText, POSCAR_TEXT, KPOINTS_TEXT } from '../annotations/tinyRun';
import type { InputFile } from '../../../src/core/io/fileAccessor';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const file = (path: string, text: string): InputFile => ({ path, bytes: enc(text) });

/** A POSCAR of the tiny model with the atom count line replaced (the 450-byte shape of the issue). */
const poscarWithCount = (count: string): string => POSCAR_TEXT.replace(/\nH\n1\n/, `\nH\n${count}\n`);

const model = collinearModel();
const w90 = writeWannier90(model, { fermiEnergy: 0.6 });
const qeXml = writeQeXml(model, { alat: 4 });

/** A small BXSF grid (4 × 4 × 4, one flat band): the header is what the case changes. */
function bxsfText(): string {
  const band = new Float64Array(64).fill(0.5);
  return writeBxsf({
    fermiEnergy: 0,
    dims: [4, 4, 4],
    reciprocal: [
      [1.5, 0, 0],
      [0, 1.5, 0],
      [0, 0, 1.5],
    ],
    bands: [band],
  });
}

const cases: [string, () => unknown][] = [
  ['POSCAR atoms 100000000', () => readPoscar(file('POSCAR', poscarWithCount('100000000')))],
  ['POSCAR atoms 300000000', () => readPoscar(file('POSCAR', poscarWithCount('300000000')))],
  ['POSCAR atoms 2000000000', () => readPoscar(file('POSCAR', poscarWithCount('2000000000')))],
  ['POSCAR atoms 1e300', () => readPoscar(file('POSCAR', poscarWithCount('1e300')))],
  [
    'POSCAR atoms split 1500000000 1500000000',
    () => readPoscar(file('POSCAR', poscarWithCount('1500000000 1500000000').replace('\nH\n', '\nH He\n'))),
  ],
  ['POSCAR scale 1e300', () => readPoscar(file('POSCAR', POSCAR_TEXT.replace('\n1.0\n', '\n1e300\n')))],
  [
    'EIGENVAL run with a bomb POSCAR',
    () =>
      readFromBytes(vaspEigenvalReader, file('EIGENVAL', eigenvalText()), [
        file('POSCAR', poscarWithCount('2000000000')),
        file('KPOINTS', KPOINTS_TEXT),
      ]),
  ],
  ['KPOINTS line mode 2000000000 points per segment', () => readKpoints(file('KPOINTS', KPOINTS_TEXT.replace('\n21\n', '\n2000000000\n')))],
  ['KPOINTS explicit list of 2000000000 points', () => readKpoints(file('KPOINTS', 'list\n2000000000\nReciprocal\n0 0 0 1\n'))],
  ['KPOINTS path end at 1e300', () => readKpoints(file('KPOINTS', KPOINTS_TEXT.replace('0.5 0.0 0.0 ! X', '1e300 0.0 0.0 ! X')))],
  [
    'EIGENVAL run with KPOINTS of 2000000000 points per segment',
    () =>
      readFromBytes(vaspEigenvalReader, file('EIGENVAL', eigenvalText()), [
        file('POSCAR', POSCAR_TEXT),
        file('KPOINTS', KPOINTS_TEXT.replace('\n21\n', '\n2000000000\n')),
      ]),
  ],
  ['INCAR with NBANDS = 2000000000', () => readIncarFlags(file('INCAR', 'NBANDS = 2000000000\nLSORBIT = .TRUE.\nNKPTS = 2000000000\n'))],
  ['_band.kpt announcing 2000000000 k-points', () => readBandKpt(file('seed_band.kpt', w90.kpt.replace(/^\s*\d+/, '  2000000000')))],
  ['_band.kpt announcing 1e300 k-points', () => readBandKpt(file('seed_band.kpt', w90.kpt.replace(/^\s*\d+/, '  1e300')))],
  [
    '_band.labelinfo.dat with index 2000000000',
    () => readLabelInfo(file('seed_band.labelinfo.dat', w90.labelinfo.replace(/^(\S+\s+)\d+/, '$12000000000'))),
  ],
  [
    'Wannier90 run with a labelinfo index of 2000000000',
    () =>
      readFromBytes(wannier90BandReader, file('seed_band.dat', w90.bandDat), [
        file('seed_band.labelinfo.dat', w90.labelinfo.replace(/\n(\S+\s+)\d+/, '\n$12000000000')),
        file('seed.win', w90.win),
      ]),
  ],
  ['.win with num_wann = 2000000000', () => readWin(file('seed.win', w90.win.replace(/num_wann = \d+/, 'num_wann = 2000000000')))],
  [
    'Wannier90 run with num_wann = 2000000000 and a bomb _band.kpt',
    () =>
      readFromBytes(wannier90BandReader, file('seed_band.dat', w90.bandDat), [
        file('seed_band.kpt', w90.kpt.replace(/^\s*\d+/, '  2000000000')),
        file('seed.win', w90.win.replace(/num_wann = \d+/, 'num_wann = 2000000000')),
      ]),
  ],
  [
    'pw.x XML with <nks>2000000000</nks>',
    () => readQeXml(file('data-file-schema.xml', qeXml.replace(/<nks>\d+<\/nks>/, '<nks>2000000000</nks>'))),
  ],
  [
    'pw.x XML with <nbnd>2000000000</nbnd>',
    () => readQeXml(file('data-file-schema.xml', qeXml.replace(/<nbnd>\d+<\/nbnd>/, '<nbnd>2000000000</nbnd>'))),
  ],
  ['pw.x XML with nat="2000000000"', () => readStructureFile(file('structure.xml', qeXml.replace(/nat="\d+"/, 'nat="2000000000"')))],
  [
    'bands.x output with nbnd=5000000000',
    () => bandsxReader.read(file('bands.out', writeBandsx(model, 4).replace(/nbnd=\s*\d+/, 'nbnd=5000000000')), [], {}),
  ],
  [
    'CASTEP .bands with 5000000000 eigenvalues',
    () =>
      castepBandsReader.read(
        file('run.bands', writeCastepBands(model).replace(/Number of eigenvalues\s+\d+/, 'Number of eigenvalues 5000000000')),
        [],
        {},
      ),
  ],
  [
    'BXSF grid of 3000 × 3000 × 3000 points, read as a file still being written',
    () =>
      bxsfReader.read(file('grid.bxsf', bxsfText().replace(/^(\s+4){3}\s*$/m, '        3000        3000        3000')), [], {
        allowPartial: true,
      }),
  ],
  [
    'bands.x output with a bomb pw.x XML beside it',
    () =>
      readFromBytes(bandsxReader, file('bands.out', writeBandsx(model, 4)), [
        file('data-file-schema.xml', qeXml.replace(/<nks>\d+<\/nks>/, '<nks>2000000000</nks>')),
      ]),
  ],
];

const maxRssMB = (): number => process.resourceUsage().maxRSS / 1024;
async function main(): Promise<void> {
  for (const [name, run] of cases) {
    const before = maxRssMB();
    let sentence: string | null = null;
    let kind = 'none';
    let warnings: string[] = [];
    try {
      const r = (await run()) as { warnings?: { message: string }[] } | undefined;
      warnings = (r?.warnings ?? []).map((x) => x.message);
    } catch (e) {
      kind = e instanceof ReaderError ? 'ReaderError' : e instanceof ValleyscopeError ? 'ValleyscopeError' : `other: ${String(e)}`;
      sentence = e instanceof Error ? e.message : String(e);
    }
    process.stdout.write(JSON.stringify({ name, kind, sentence, warnings, peakRiseMB: maxRssMB() - before }) + '\n');
  }
}
void main();
