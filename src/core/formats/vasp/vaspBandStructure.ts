/**
 * The BandStructure both VASP readers (EIGENVAL, vasprun.xml) build, in one place: the hybrid-functional mesh
 * dropped by its one rule (hybridMesh.ts), the path labels placed on what is left, the arrays handed over.
 */
import type { BandStructure, DeclaredMesh, KLabel, SourceFile } from '../../model';
import { dropMeshBeforePath, type KArrays } from './hybridMesh';

/** What a VASP reader found beside the arrays. */
export type VaspFindings = Pick<
  BandStructure,
  'lattice' | 'structure' | 'fermiEnergy' | 'spinorbit' | 'method' | 'partial' | 'warnings' | 'fermiFromOtherKPoints'
>;

/** The file's arrays as read (before the mesh is dropped) with the counts that describe them. */
export type VaspArrays = KArrays & { nBands: number; nSpin: 1 | 2; electrons: number | null };

/** Labels and sampling for the k-points kept (`placeLabels` sees the arrays after the mesh is dropped). */
export type LabelPlacer = (kept: KArrays) => { labels: KLabel[]; sampling: BandStructure['sampling']; declaredMesh?: DeclaredMesh | null };

export function vaspBandStructure(
  source: { format: string; file: string; files: SourceFile[] },
  data: VaspArrays,
  found: VaspFindings,
  placeLabels: LabelPlacer,
): BandStructure {
  const dropped = dropMeshBeforePath(data, data.nBands);
  if (dropped.warning) found.warnings.push(dropped.warning);
  const kept = dropped.arrays;
  const { labels, sampling, declaredMesh } = placeLabels(kept);
  // The path after a weighted mesh: VASP fixed E_F on the mesh, and the path's occupations follow from it.
  const otherK = dropped.warning !== null && (found.fermiEnergy !== null || kept.occupations !== null);
  return {
    source,
    ...found,
    ...(otherK ? { fermiFromOtherKPoints: true } : {}),
    nk: kept.nk,
    nBands: data.nBands,
    nSpin: data.nSpin,
    kpoints: kept.kpoints,
    weights: kept.weights,
    energies: kept.energies,
    occupations: kept.occupations,
    electrons: data.electrons,
    labels,
    sampling,
    grid: null,
    writtenDistance: null,
    ...(declaredMesh ? { declaredMesh } : {}),
  };
}
