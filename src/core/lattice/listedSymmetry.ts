/**
 * The symmetry a file's writer says it used, checked against the crystal structure after reading: a reader
 * reports what the file lists (BandStructure.listedRotations), this check analyses it.
 */
import type { BandStructure, InputWarning, Mat3 } from '../model';
import { crystalSymmetry, symmetryReady } from './symmetry';

/**
 * Compare the rotations the code that wrote the file lists (pw.x: `listedRotations`) with those the symmetry
 * library finds for the same structure. Returns a warning when they disagree, null when they agree, when
 * nothing is listed or when the library is not loaded. Run after reading (load.ts): readers do not analyse.
 */
export function crossCheckListedSymmetry(bs: BandStructure): InputWarning | null {
  const listed = bs.listedRotations;
  if (!listed || listed.length === 0 || !bs.structure || !symmetryReady()) return null;
  let found: Mat3[];
  try {
    found = crystalSymmetry(bs.structure).pointGroup;
  } catch {
    return null;
  }
  const key = (m: Mat3): string => m.map((r) => r.map((x) => Math.round(x)).join(',')).join(';');
  const library = new Set(found.map(key));
  const transpose = (m: Mat3): Mat3 => [
    [m[0][0], m[1][0], m[2][0]],
    [m[0][1], m[1][1], m[2][1]],
    [m[0][2], m[1][2], m[2][2]],
  ];
  // pw.x's s acts on crystal coordinates in its own (transposed) convention; accept either reading, the same
  // for every operation.
  const distinct = new Set(listed.map(key));
  const asIs = [...distinct].every((k) => library.has(k));
  const transposed = listed.every((r) => library.has(key(transpose(r))));
  const n = distinct.size;
  if ((asIs || transposed) && n === library.size) return null;
  if (asIs || transposed) {
    return {
      code: 'symmetry-subgroup',
      message: `pw.x used ${n} of the ${library.size} point-group operations the symmetry library finds for this structure (a lower symmetry, e.g. from magnetisation, a chosen FFT grid or nosym): valley counts follow the library's full group.`,
    };
  }
  return {
    code: 'symmetry-mismatch',
    message: `The ${n} symmetry operations pw.x lists are not all among the ${library.size} the symmetry library finds for this structure: check the structure and tolerances before trusting valley degeneracies.`,
  };
}
