/**
 * BXSF band grids (the XCrySDen band-grid layout Wannier90, Quantum ESPRESSO and others write for Fermi
 * surfaces): energies of several bands on a periodic general grid whose end points repeat the start,
 * spanned by the reciprocal vectors in Å⁻¹ (with the 2π). Energies are in eV as the writing codes use them.
 *
 *    BEGIN_INFO
 *      Fermi Energy:   5.123
 *    END_INFO
 *    BEGIN_BLOCK_BANDGRID_3D
 *      a comment
 *      BEGIN_BANDGRID_3D_name
 *        8                       number of bands
 *        21 21 21                points along each reciprocal vector (end points included)
 *        0.0 0.0 0.0             origin
 *        b1x b1y b1z             reciprocal vectors, Å⁻¹
 *        b2x b2y b2z
 *        b3x b3y b3z
 *      BAND:   1
 *        e e e e e e ...         n1·n2·n3 values, the last index running fastest
 *      BAND:   2 ...
 *      END_BANDGRID_3D
 *    END_BLOCK_BANDGRID_3D
 */
import type { BandStructure, InputWarning, Mat3, Vec3 } from '../model';
import type { InputFile } from '../io/fileAccessor';
import type { FormatReader, ReadOptions } from './types';
import { mainFileSha256 } from './sourceHash';
import { CancelledError } from '../errors';
import { TextScanner, decodeText } from './textScanner';
import { det3, mat3Inverse, transpose3 } from '../lattice/linalg';
import { parseDecimal } from './numbers';
import { endpointsRepeat, reciprocalUnits } from './bxsfGrid';
import { HARTREE_EV } from '../units';

export const BXSF_FORMAT = 'bxsf';

export function readBxsf(file: InputFile, options: ReadOptions = {}): BandStructure {
  const sc = TextScanner.atContent(file.bytes, file.path, BXSF_FORMAT, 'the band-grid file is empty');
  // Header: the Fermi energy, anywhere before the grid block.
  let fermiEnergy: number | null = null;
  const headerEnd = (() => {
    const idx = findAscii(file.bytes, 'BEGIN_BLOCK_BANDGRID_3D');
    return idx < 0 ? Math.min(file.bytes.length, 65536) : idx;
  })();
  const header = decodeText(file.bytes, 0, headerEnd);
  const fm = /Fermi\s+Energy\s*:?\s*(\S+)/i.exec(header);
  if (fm) {
    fermiEnergy = parseDecimal(fm[1]!);
    if (fermiEnergy === null) {
      const line = header.slice(0, fm.index).split('\n').length;
      throw sc.error(`the Fermi energy should be a number, found "${fm[1]}"`, line, 0);
    }
  }
  // Before the grid block: blank lines, comments (#) and the BEGIN_INFO … END_INFO block, nothing else.
  let inInfo = false;
  for (;;) {
    sc.skipWhitespace();
    if (sc.atEnd()) throw sc.error('no BEGIN_BLOCK_BANDGRID_3D: this is not a band-grid file, or it is truncated');
    const lineNo = sc.line;
    const t = sc.token() ?? '';
    const u = t.toUpperCase();
    if (u.startsWith('BEGIN_BLOCK_BANDGRID_3D')) {
      if (inInfo) throw sc.error('BEGIN_BLOCK_BANDGRID_3D inside the BEGIN_INFO block (END_INFO is missing)', lineNo, 1);
      break;
    }
    if (u === 'BEGIN_INFO') inInfo = true;
    else if (u === 'END_INFO') inInfo = false;
    else if (!inInfo && !t.startsWith('#')) {
      throw sc.error(
        `unexpected "${t.length > 20 ? `${t.slice(0, 20)}…` : t}" before the band grid (only comments and the BEGIN_INFO block belong there)`,
        lineNo,
        1,
      );
    }
    sc.nextLine();
  }
  const blockLine = sc.line;
  sc.nextLine();
  // The grid header: BEGIN_BANDGRID_3D_<name> (Wannier90 and most writers) or BANDGRID_3D_<name> without
  // the prefix (Quantum ESPRESSO's fs.x); a title line may come before it.
  let gridHeader: string | null = null;
  for (let lines = 0; !sc.atEnd() && lines < 4; lines++) {
    sc.skipWhitespace();
    const save = sc.pos;
    const t = sc.token();
    if (t !== null && /^(BEGIN_)?BANDGRID_3D/i.test(t)) {
      gridHeader = t;
      break;
    }
    if (t !== null && /^END_BLOCK_BANDGRID_3D/i.test(t)) {
      sc.pos = save;
      break;
    }
    sc.nextLine();
  }
  if (gridHeader === null) {
    throw sc.error(
      `no grid header (BEGIN_BANDGRID_3D_… or BANDGRID_3D_…) in the lines after BEGIN_BLOCK_BANDGRID_3D on line ${blockLine}`,
      blockLine + 1,
      1,
    );
  }
  const bareHeader = !/^BEGIN_/i.test(gridHeader);
  sc.nextLine();
  sc.skipBlankLines();
  const countLine = sc.line;
  const nBands = sc.integer('the number of bands');
  if (nBands <= 0) throw sc.error(`the grid announces ${nBands} bands; at least one is needed`, countLine, 0);
  sc.endLine('the number of bands');
  sc.skipBlankLines();
  const dimsLine = sc.line;
  const dims: Vec3 = [
    sc.integer('the number of grid points along b1'),
    sc.integer('the number of grid points along b2'),
    sc.integer('the number of grid points along b3'),
  ];
  sc.endLine('the grid dimensions');
  if (dims.some((d) => d < 2))
    throw sc.error(`each grid dimension must be at least 2 (end points repeated), found ${dims.join(' × ')}`, dimsLine, 0);
  const nk = dims[0] * dims[1] * dims[2];
  const remaining = file.bytes.length - sc.pos;
  // Not even one band of that grid fits: refused also for a file still being written (nothing to allocate for).
  if (nk * 2 > remaining + 16) {
    throw sc.error(
      `the grid (${dims.join(' × ')} points) needs more values than the rest of the file can hold: it is truncated or the header is wrong`,
      dimsLine,
      0,
    );
  }
  if (nk * nBands * 2 > remaining + 16) {
    if (!options.allowPartial) {
      throw sc.error(
        `the grid (${dims.join(' × ')} points, ${nBands} bands) needs more values than the rest of the file can hold: it is truncated or the header is wrong`,
        dimsLine,
        0,
      );
    }
  }
  sc.skipBlankLines();
  const origin: Vec3 = [sc.numberAcrossLines('the grid origin (x)'), sc.number('the grid origin (y)'), sc.number('the grid origin (z)')];
  sc.endLine('the grid origin');
  const rec: Vec3[] = [];
  for (let i = 0; i < 3; i++) {
    sc.skipBlankLines();
    rec.push([
      sc.number(`reciprocal vector b${i + 1} (x)`),
      sc.number(`reciprocal vector b${i + 1} (y)`),
      sc.number(`reciprocal vector b${i + 1} (z)`),
    ]);
    sc.endLine(`reciprocal vector b${i + 1}`);
  }
  // ABINIT writes its own conventions into the layout (its printbxsf): energies and the Fermi energy in
  // Hartree, reciprocal vectors without the 2π, the origin as a fractional shift, and with two spin
  // channels the bands interleaved (band 1 up, band 1 down, ...).
  const abinit = /generated by the ABINIT package/i.test(header);
  const interleavedSpins = abinit && /first band is relative to spin-up/i.test(header);
  const vectorsLine = sc.line - 1;
  if (Math.abs(det3(rec as Mat3)) < 1e-12) throw sc.error('the reciprocal vectors are linearly dependent', vectorsLine, 0);
  const units = abinit ? { scale: 2 * Math.PI, note: null } : reciprocalUnits(rec as Mat3, bareHeader, options);
  const reciprocal = rec.map((r) => r.map((x) => units.scale * x)) as Mat3;
  // a = 2π (B⁻¹)ᵀ, rows a1, a2, a3.
  const lattice = transpose3(mat3Inverse(reciprocal)).map((r) => r.map((x) => 2 * Math.PI * x)) as Mat3;

  const maxBands = Math.max(1, Math.min(nBands, Math.floor(remaining / Math.max(1, 2 * nk)) + 1));
  const bandMajor = new Float64Array(maxBands * nk);
  let bandsRead = 0;
  let partial = false;
  const bandNumbers: number[] = [];
  for (let b = 0; b < nBands; b++) {
    if (options.isCancelled?.()) throw new CancelledError();
    options.onProgress?.(sc.pos / file.bytes.length);
    sc.skipBlankLines();
    if (sc.atEnd() || b >= maxBands) {
      if (options.allowPartial && b > 0) {
        partial = true;
        break;
      }
      throw sc.error(`the file ends after ${b} of the ${nBands} bands the grid announces (it is truncated)`);
    }
    const bandLine = sc.line;
    const tag = sc.token();
    if (tag === null || !/^BAND:?$/i.test(tag))
      throw sc.error(`expected "BAND:" starting band ${b + 1}, found "${tag ?? 'the end of the line'}"`, bandLine, 1);
    bandNumbers.push(sc.integer(`the index of band ${b + 1}`));
    sc.endLine(`the band index`);
    const base = b * nk;
    let complete = true;
    for (let i = 0; i < nk; i++) {
      sc.skipWhitespace();
      if (sc.atEnd()) {
        if (options.allowPartial && b > 0) {
          complete = false;
          break;
        }
        throw sc.error(`the file ends inside band ${b + 1}, after ${i} of its ${nk} grid values (it is truncated)`);
      }
      bandMajor[base + i] = sc.number(`grid value ${i + 1} of band ${b + 1}`);
    }
    if (!complete) {
      partial = true;
      break;
    }
    bandsRead = b + 1;
    if (!sc.atEol()) throw sc.error(`band ${b + 1} holds more than the ${nk} values the grid announces: "${sc.peekToken()}"`);
  }
  let moreGrids = 0;
  if (!partial) {
    sc.skipBlankLines();
    const end = sc.token();
    if (end === null || !/^END_BANDGRID_3D/i.test(end)) {
      throw sc.error(`expected END_BANDGRID_3D after the ${nBands} bands, found "${end ?? 'the end of the file'}"`);
    }
    // After the grid: block ends, comments, or further grids (read the first only, and say so).
    sc.nextLine();
    for (;;) {
      sc.skipWhitespace();
      if (sc.atEnd()) break;
      const lineNo = sc.line;
      const t = sc.token() ?? '';
      if (/^(BEGIN_)?BANDGRID_3D/i.test(t)) moreGrids++;
      else if (moreGrids === 0 && !/^(END_BLOCK_BANDGRID_3D|BEGIN_BLOCK_BANDGRID_3D|#)/i.test(t)) {
        throw sc.error(`unexpected "${t.length > 20 ? `${t.slice(0, 20)}…` : t}" after the end of the band grid`, lineNo, 1);
      }
      if (moreGrids > 0) break;
      sc.nextLine();
    }
  }
  options.onProgress?.(1);
  const eScale = abinit ? HARTREE_EV : 1;
  if (fermiEnergy !== null) fermiEnergy *= eScale;
  const nSpin: 1 | 2 = interleavedSpins && bandsRead % 2 === 0 ? 2 : 1;
  const perSpin = bandsRead / nSpin;
  const energies: Float64Array[] = [];
  for (let sp = 0; sp < nSpin; sp++) {
    const e = new Float64Array(nk * perSpin);
    for (let b = 0; b < perSpin; b++) {
      const src = (b * nSpin + sp) * nk;
      for (let k = 0; k < nk; k++) e[k * perSpin + b] = bandMajor[src + k]! * eScale;
    }
    energies.push(e);
  }
  // Grid points, first index slowest; fractional coordinates i/(n-1) from the origin.
  const originFrac: Vec3 = [0, 0, 0];
  for (let i = 0; i < 3; i++) {
    originFrac[i] = abinit
      ? origin[i]!
      : (origin[0] * lattice[i]![0] + origin[1] * lattice[i]![1] + origin[2] * lattice[i]![2]) / (2 * Math.PI);
  }
  // End points repeated (a periodic general grid: the last plane along each axis repeats the first) or not:
  // told from the energies themselves.
  const repeated = endpointsRepeat(bandMajor, bandsRead, dims);
  const div: Vec3 = repeated ? [dims[0] - 1, dims[1] - 1, dims[2] - 1] : [dims[0], dims[1], dims[2]];
  const kpoints = new Float64Array(3 * nk);
  let p = 0;
  for (let i = 0; i < dims[0]; i++) {
    for (let j = 0; j < dims[1]; j++) {
      for (let l = 0; l < dims[2]; l++) {
        kpoints[3 * p] = originFrac[0] + i / div[0];
        kpoints[3 * p + 1] = originFrac[1] + j / div[1];
        kpoints[3 * p + 2] = originFrac[2] + l / div[2];
        p++;
      }
    }
  }
  const warnings: InputWarning[] = [];
  if (units.note) warnings.push({ code: 'bxsf-units', message: units.note });
  if (!repeated) {
    warnings.push({
      code: 'bxsf-endpoints',
      message: `The grid's last points do not repeat its first ones: read as ${dims.join(' × ')} distinct points over the cell (not a periodic general grid).`,
    });
  }
  const firstBand = bandNumbers[0] ?? 1;
  const consecutive = bandNumbers.every((x, i) => x === firstBand + i);
  if (firstBand !== 1 && consecutive && nSpin === 1) {
    warnings.push({
      code: 'bxsf-band-numbers',
      message: `The file holds bands ${firstBand}–${firstBand + bandsRead - 1} (numbered by its BAND: lines); they are reported with those numbers.`,
    });
  } else if (!consecutive) {
    warnings.push({
      code: 'bxsf-band-numbers',
      message: `The BAND: lines are not numbered consecutively (${bandNumbers.slice(0, 6).join(', ')}${bandNumbers.length > 6 ? ', …' : ''}): bands are reported in file order, from 1.`,
    });
  }
  if (partial) {
    warnings.push({
      code: 'partial',
      message: `The file ends inside band ${bandsRead + 1} of the ${nBands} it announces (truncated or still being written): only the first ${bandsRead} bands were read; results are provisional.`,
    });
  }
  if (abinit) {
    warnings.push({
      code: 'abinit-units',
      message: `Written by ABINIT: energies read as Hartree, reciprocal vectors as given without the 2π${nSpin === 2 ? ', bands as alternating spin-up and spin-down' : ''}.`,
    });
  }
  if (interleavedSpins && nSpin === 1) {
    warnings.push({
      code: 'spin-interleave',
      message: 'The header says bands alternate spin up and down, but the file holds an odd number of bands: read as one channel.',
    });
  }
  if (moreGrids > 0) {
    warnings.push({
      code: 'more-grids',
      message: 'The file holds more than one band grid (e.g. one per spin channel): only the first was read.',
    });
  }
  if (fermiEnergy === null)
    warnings.push({
      code: 'no-fermi',
      message: 'The band-grid file gives no Fermi energy and no electron count: band edges cannot be placed.',
    });
  if (!options.structure)
    warnings.push({
      code: 'no-structure',
      message: 'A band-grid file holds the reciprocal cell but not the atoms: valley degeneracy needs the structure.',
    });
  return {
    source: {
      format: BXSF_FORMAT,
      file: file.path,
      files: [{ role: 'eigenvalues', path: file.path, sha256: mainFileSha256(file.bytes, options) }],
    },
    lattice,
    structure: options.structure ?? null,
    nk,
    nBands: perSpin,
    nSpin,
    kpoints,
    weights: null,
    energies,
    occupations: null,
    fermiEnergy,
    electrons: null,
    spinorbit: options.spinorbit ?? false,
    labels: [],
    sampling: 'grid',
    grid: { dims, origin: originFrac, endpointsRepeated: repeated },
    ...(firstBand > 1 && consecutive && nSpin === 1 ? { bandNumberOffset: firstBand - 1 } : {}),
    writtenDistance: null,
    partial,
    warnings,
  };
}

function findAscii(bytes: Uint8Array, s: string): number {
  const first = s.charCodeAt(0);
  const limit = Math.min(bytes.length, 1 << 20) - s.length;
  outer: for (let i = 0; i <= limit; i++) {
    if (bytes[i] !== first) continue;
    for (let j = 1; j < s.length; j++) if (bytes[i + j] !== s.charCodeAt(j)) continue outer;
    return i;
  }
  return -1;
}

export function detectBxsf(head: Uint8Array, name: string): number {
  const text = decodeText(head, 0, Math.min(head.length, 8192));
  if (/BEGIN_BLOCK_BANDGRID_3D/i.test(text) || /(BEGIN_)?BANDGRID_3D/i.test(text)) return /\.bxsf$/i.test(name) ? 1 : 0.95;
  if (/BEGIN_INFO/.test(text) && /Fermi Energy/i.test(text)) return 0.6;
  return 0;
}

export const bxsfReader: FormatReader = {
  id: BXSF_FORMAT,
  label: 'BXSF band grid',
  detect: detectBxsf,
  companions(): string[] {
    return [];
  },
  read(main: InputFile, _companions: InputFile[], options: ReadOptions): BandStructure {
    return readBxsf(main, options);
  },
};
