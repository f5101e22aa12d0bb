/**
 * The crystals the model is solved for: the face-centred cubic (diamond / zincblende) primitive cell of a
 * material, optionally under a homogeneous strain (lattice rows r → r·(1 + ε), atoms fixed in fractional
 * coordinates, which is exact by symmetry for hydrostatic and (001) biaxial strain: no internal relaxation).
 */
import type { Mat3 } from '../../src/core/model';
import { det3, mulMat } from '../../src/core/lattice/linalg';
import type { EpmMaterial } from './materials';

export interface EpmCrystal {
  material: EpmMaterial;
  /** Primitive lattice rows a1, a2, a3 in Å. */
  lattice: Mat3;
  /** Strain applied to the cubic crystal (symmetric, dimensionless), or null when unstrained. */
  strain: Mat3 | null;
}

/** fcc primitive vectors a1 = (0, ½, ½)a, a2 = (½, 0, ½)a, a3 = (½, ½, 0)a (common practice). */
export function fccLattice(a: number): Mat3 {
  const h = a / 2;
  return [
    [0, h, h],
    [h, 0, h],
    [h, h, 0],
  ];
}

export function unstrainedCrystal(material: EpmMaterial): EpmCrystal {
  return { material, lattice: fccLattice(material.latticeConstant), strain: null };
}

/** The crystal under strain ε (lattice rows multiplied by 1 + ε). */
export function strainedCrystal(material: EpmMaterial, strain: Mat3): EpmCrystal {
  const base = fccLattice(material.latticeConstant);
  const deformation: Mat3 = [
    [1 + strain[0][0], strain[0][1], strain[0][2]],
    [strain[1][0], 1 + strain[1][1], strain[1][2]],
    [strain[2][0], strain[2][1], 1 + strain[2][2]],
  ];
  const lattice = mulMat(base, deformation);
  return { material, lattice, strain };
}

/**
 * (001) biaxial strain: ε_xx = ε_yy = inPlane, ε_zz = −2 (C12/C11) inPlane, the strain of a film grown
 * pseudomorphically on a (001) substrate with a free surface (linear elasticity, common practice).
 */
export function biaxial001Strain(inPlane: number, c12OverC11: number): Mat3 {
  return [
    [inPlane, 0, 0],
    [0, inPlane, 0],
    [0, 0, -2 * c12OverC11 * inPlane],
  ];
}

/** Hydrostatic strain ε_ii = e. */
export function hydrostaticStrain(e: number): Mat3 {
  return [
    [e, 0, 0],
    [0, e, 0],
    [0, 0, e],
  ];
}

export function cellVolume(lattice: Mat3): number {
  return Math.abs(det3(lattice));
}
