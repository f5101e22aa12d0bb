/**
 * The demo's mesh run (invented): a self-consistent run of "tessellite", a fictitious simple-cubic crystal
 * whose bands are the tight-binding model of axisValleyModel.ts with parameters of our own, written on the
 * irreducible points of a Γ-centred 12×12×12 mesh with an automatic-mesh KPOINTS beside it, as a code would
 * leave an ordinary run. No band path was run: the valleys and masses come from the mesh.
 */
import { axisValleyMeshRun, type AxisValleyParameters } from './axisValleyModel';

/** Tessellite's model bands: conduction minima at 0.78 of Γ–X (cos 2πx₀ = −(a + 2B)/(4b)). */
export const TESSELLITE: AxisValleyParameters = { L: 3.8, v0: -0.3, tv: 0.45, ec: 5.2, a: -1.6295, b: 0.25, B: 1.2 };

export const DEMO_MESH_FOLDER = 'fixtures/demo/tessellite-mesh';

export function demoMeshRunFiles(): { path: string; content: string }[] {
  const run = axisValleyMeshRun(TESSELLITE, 12, 'tessellite scf 12x12x12, Brightwater model run', 'Po');
  return [
    { path: `${DEMO_MESH_FOLDER}/EIGENVAL`, content: run.eigenval },
    { path: `${DEMO_MESH_FOLDER}/POSCAR`, content: run.poscar },
    { path: `${DEMO_MESH_FOLDER}/KPOINTS`, content: 'Automatic mesh (tessellite scf, Brightwater demo)\n0\nGamma\n 12 12 12\n 0 0 0\n' },
  ];
}
