/**
 * The standard k-path of each lattice kind whose special points specialPoints.ts knows: the paths of Setyawan &
 * Curtarolo, Comput. Mater. Sci. 49, 299 (2010), as recalled (memory; the cubic one is checked by the tests).
 * Used where a run has no path of its own (a mesh run drawn along its interpolant).
 */
import type { LabelledLatticeKind } from './specialPoints';

/** The standard paths: continuous pieces of labels (a jump between pieces). */
export const STANDARD_PATHS: Record<LabelledLatticeKind, string[][]> = {
  CUB: [
    ['Γ', 'X', 'M', 'Γ', 'R', 'X'],
    ['M', 'R'],
  ],
  FCC: [
    ['Γ', 'X', 'W', 'K', 'Γ', 'L', 'U', 'W', 'L', 'K'],
    ['U', 'X'],
  ],
  BCC: [
    ['Γ', 'H', 'N', 'Γ', 'P', 'H'],
    ['P', 'N'],
  ],
  HEX: [
    ['Γ', 'M', 'K', 'Γ', 'A', 'L', 'H', 'A'],
    ['L', 'M'],
    ['K', 'H'],
  ],
  TET: [
    ['Γ', 'X', 'M', 'Γ', 'Z', 'R', 'A', 'Z'],
    ['X', 'R'],
    ['M', 'A'],
  ],
  BCT1: [
    ['Γ', 'X', 'M', 'Γ', 'Z', 'P', 'N', 'Z₁', 'M'],
    ['X', 'P'],
  ],
  BCT2: [
    ['Γ', 'X', 'Y', 'Σ', 'Γ', 'Z', 'Σ₁', 'N', 'P', 'Y₁', 'Z'],
    ['X', 'P'],
  ],
  ORC: [
    ['Γ', 'X', 'S', 'Y', 'Γ', 'Z', 'U', 'R', 'T', 'Z'],
    ['Y', 'T'],
    ['U', 'X'],
    ['S', 'R'],
  ],
};
