/**
 * The VASP EIGENVAL reader: the file (eigenvalScan.ts) plus what sits beside it (POSCAR or CONTCAR for the structure, KPOINTS for the
 * path labels, INCAR for spin-orbit). Each companion is optional; what is missing becomes a warning.
 */
import type { BandStructure, InputWarning, Mat3, SourceFile, Structure } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import { basename } from '../../io/fileAccessor';
import type { FormatReader, ReadOptions } from '../types';
import { sha256Hex } from '../../hash';
import { ReaderError } from '../../errors';
import { EIGENVAL_FORMAT, detectEigenval, readEigenval } from './eigenvalScan';
import { readPoscarWithScale } from './poscar';
import { placeLineModeLabels, readKpointsCompanion } from './kpointLabels';
import { vaspBandStructure } from './vaspBandStructure';
import { readIncar } from './incar';
import { declaredMeshOfKpoints } from './kpointsMesh';
import { modelMethodFromSystem, vaspMethod } from './vaspMethod';
import { eigenvalBesideKpointsOpt, isKpointsOptName, KPOINTS_OPT_NAME } from './kpointsOptChoice';

const STRUCTURE_NAMES = ['CONTCAR', 'POSCAR'];

export const vaspEigenvalReader: FormatReader = {
  id: EIGENVAL_FORMAT,
  label: 'VASP EIGENVAL',
  streaming: true,
  detect: detectEigenval,
  companions(mainName: string, siblings: string[]): string[] {
    // Run folders name files by role; a prefixed eigenvalue file (e.g. "si.EIGENVAL") pairs with
    // "si.POSCAR" / "si.KPOINTS" when present.
    const prefix = /^(.*?)(EIGENVAL)(.*)$/i.exec(mainName);
    const want: string[] = [];
    for (const role of [...STRUCTURE_NAMES, 'KPOINTS', 'INCAR', KPOINTS_OPT_NAME]) {
      const candidates = prefix ? [`${prefix[1]}${role}${prefix[3]}`, role] : [role];
      const hit = candidates.find((c) => siblings.includes(c));
      if (hit) want.push(hit);
    }
    return [...new Set(want)];
  },
  read(main: InputFile, companions: InputFile[], options: ReadOptions): BandStructure {
    const data = readEigenval(main, options);
    const warnings: InputWarning[] = [];
    const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: data.sha256 }];
    const byRole = (role: string): InputFile | undefined =>
      companions.find(
        (c) => basename(c.path).toUpperCase().includes(role) && isKpointsOptName(basename(c.path)) === (role === KPOINTS_OPT_NAME),
      );

    // Structure: CONTCAR (the final structure) when present and not empty, else POSCAR.
    let structure: Structure | null = null;
    let scale = 1;
    for (const role of STRUCTURE_NAMES) {
      const f = byRole(role);
      if (!f || f.bytes.length === 0) continue;
      try {
        const r = readPoscarWithScale(f);
        structure = r.structure;
        scale = r.scale;
        files.push({ role: 'structure', path: f.path, sha256: sha256Hex(f.bytes) });
        break;
      } catch (e) {
        if (e instanceof ReaderError)
          warnings.push({ code: 'structure-unreadable', message: `${e.message}; the structure was not used`, file: f.path, line: e.line });
        else throw e;
      }
    }
    if (!structure && options.structure) structure = options.structure;
    const lattice: Mat3 | null = structure?.lattice ?? options.lattice ?? null;
    if (!lattice) {
      warnings.push({
        code: 'no-lattice',
        message:
          'No POSCAR or CONTCAR beside the eigenvalue file: path distances are in fractional units and masses cannot be given in m_e.',
      });
    } else if (!structure) {
      warnings.push({ code: 'no-structure', message: 'No crystal structure: valley degeneracy cannot be determined.' });
    }

    // Spin-orbit: INCAR when present; otherwise inferred from occupations when they say so.
    let spinorbit = options.spinorbit ?? false;
    const incar = byRole('INCAR');
    const incarContent = incar ? readIncar(incar) : null;
    if (incar && incarContent) files.push({ role: 'settings', path: incar.path, sha256: sha256Hex(incar.bytes) });
    if (incarContent && incarContent.noncollinear !== null && options.spinorbit === undefined) {
      spinorbit = incarContent.noncollinear;
    } else if (options.spinorbit === undefined && data.occupations && data.nSpin === 1 && data.nk > 0) {
      let occupied = 0;
      for (let b = 0; b < data.nBands; b++) occupied += data.occupations[0]![b]!;
      if (Math.abs(occupied - data.electrons) < 0.5 && Math.abs(occupied * 2 - data.electrons) > 0.5) {
        spinorbit = true;
        warnings.push({
          code: 'spinorbit-inferred',
          message: 'Occupations hold one electron per band: read as a non-collinear (spin-orbit) run.',
        });
      }
    }
    // How the energies were computed: INCAR's tags, or our model marker in the EIGENVAL's SYSTEM line.
    const method =
      modelMethodFromSystem(data.system, `The EIGENVAL (${basename(main.path)})`) ??
      (incarContent
        ? vaspMethod(incarContent.tags, `The INCAR beside the EIGENVAL (${basename(incar!.path)})`)
        : {
            family: 'unknown' as const,
            name: null,
            evidence: `No INCAR beside ${basename(main.path)}: nothing says how the energies were computed.`,
          });

    if (data.partial) {
      warnings.push({
        code: 'partial',
        message: `The file holds ${data.nk} of the ${data.announcedK} k-points its header announces (a running or interrupted job): results are provisional.`,
      });
    }
    const optFile = byRole(KPOINTS_OPT_NAME);
    if (optFile) warnings.push(eigenvalBesideKpointsOpt(basename(optFile.path)));
    const source = { format: EIGENVAL_FORMAT, file: main.path, files };
    const found = { lattice, structure, fermiEnergy: null, spinorbit, method, partial: data.partial, warnings };
    // Path labels from KPOINTS in line mode (cartesian ends converted with the POSCAR lattice over its scale).
    const kfile = byRole('KPOINTS');
    return vaspBandStructure(source, data, found, ({ kpoints, nk }) => {
      if (!kfile) {
        warnings.push({
          code: 'no-kpath',
          message: 'No KPOINTS beside the eigenvalue file: high-symmetry labels are recognised from the lattice where possible.',
        });
        return { labels: [], sampling: 'points' };
      }
      const content = readKpointsCompanion(kfile, files, warnings);
      if (content?.mode !== 'line') {
        // An automatic mesh: what it declares is checked against the points by the analysis.
        const declaredMesh = content ? declaredMeshOfKpoints(kfile.bytes, lattice, basename(kfile.path)) : null;
        return { labels: [], sampling: content ? 'grid' : 'points', declaredMesh };
      }
      const overScale = structure ? (structure.lattice.map((row) => row.map((x) => x / scale)) as Mat3) : null;
      return { labels: placeLineModeLabels(content.path, kpoints, nk, overScale, kfile.path, warnings), sampling: 'path' };
    });
  },
};
