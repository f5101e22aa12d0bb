/**
 * The pw.x XML data file reader: the file read by qeXmlScan.ts, turned into a BandStructure. The symmetry
 * operations pw.x lists are handed on (listedRotations) and checked after reading (load.ts).
 */
import type { BandStructure, InputWarning, SourceFile } from '../../model';
import type { InputFile } from '../../io/fileAccessor';
import type { FormatReader, ReadOptions } from '../types';
import { mainFileSha256 } from '../sourceHash';
import { QE_XML_FORMAT, readQeXml, type QeXmlData } from './qeXmlScan';
import { qeMethod } from './qeMethod';

export { QE_XML_FORMAT, readQeXml, qeMethod, type QeXmlData };

/** Recognise a pw.x data file: XML whose root is <qes:espresso>. */
export function detectQeXml(head: Uint8Array, name: string): number {
  const text = new TextDecoder('utf-8', { fatal: false }).decode(head.subarray(0, 4096));
  if (!/<qes:espresso[\s>]/.test(text)) return 0;
  return /data-file-schema|\.xml$/i.test(name) ? 1 : 0.97;
}

export function qeXmlToBandStructure(data: QeXmlData, main: InputFile, options: ReadOptions): BandStructure {
  const warnings: InputWarning[] = [];
  const files: SourceFile[] = [{ role: 'eigenvalues', path: main.path, sha256: mainFileSha256(main.bytes, options) }];
  if (!data.complete) {
    warnings.push({
      code: 'partial',
      message: `The file ends early: it holds ${data.nk} of the ${data.announcedK} k-points (a truncated file or one still being written); results are provisional.`,
    });
  }
  if (data.fermiSource === 'highestOccupiedLevel') {
    warnings.push({
      code: 'fermi-is-homo',
      message: 'pw.x gives the highest occupied level (fixed occupations), used as the energy reference.',
    });
  }
  if (data.fermiSource === 'two_fermi_energies') {
    warnings.push({
      code: 'two-fermi',
      message:
        'pw.x gives one Fermi energy per spin channel (fixed magnetisation): each channel is classified at its own, and the higher one is the energy reference.',
    });
  }
  if (data.noncolin && !data.spinorbit) {
    warnings.push({ code: 'noncollinear', message: 'Non-collinear run without spin-orbit coupling: each band holds one electron.' });
  }
  return {
    source: { format: QE_XML_FORMAT, file: main.path, files },
    lattice: data.lattice,
    structure: data.structure,
    nk: data.nk,
    nBands: data.nBands,
    nSpin: data.nSpin,
    kpoints: data.kpoints,
    weights: data.weights,
    energies: data.energies,
    occupations: data.occupations,
    fermiEnergy: data.fermiEnergy,
    electrons: data.electrons,
    spinorbit: options.spinorbit ?? (data.noncolin || data.spinorbit),
    method: qeMethod(data.functional, data.hybrid),
    ...(data.fermiSource ? { fermiSource: data.fermiSource } : {}),
    ...(data.twoFermi && data.nSpin === 2 ? { fermiEnergies: data.twoFermi } : {}),
    ...(data.symmetries.length > 0 ? { listedRotations: data.symmetries.map((o) => o.rotation) } : {}),
    labels: [],
    sampling: data.meshSampling ? 'grid' : 'points',
    grid: null,
    ...(data.declaredMesh ? { declaredMesh: data.declaredMesh } : {}),
    writtenDistance: null,
    partial: !data.complete,
    warnings,
  };
}

export const qeXmlReader: FormatReader = {
  id: QE_XML_FORMAT,
  label: 'Quantum ESPRESSO XML data file',
  detect: detectQeXml,
  companions(): string[] {
    return [];
  },
  read(main: InputFile, _companions: InputFile[], options: ReadOptions): BandStructure {
    return qeXmlToBandStructure(readQeXml(main, options), main, options);
  },
};
