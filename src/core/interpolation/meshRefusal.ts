/**
 * Why a run is not interpolated as a mesh run: a kind that callers branch on, and the sentence a user reads.
 * The kinds are the cases the interpolation (and the mesh analysis around it) tells apart.
 */
export type MeshRefusalKind =
  /** The points, with their symmetry images, form no regular mesh or do not cover it (a path is not a mesh either). */
  | 'not-a-mesh'
  /** Weights that are not numbers, or that disagree with the stars: the code used other operations than the crystal's. */
  | 'weights'
  /** Points equivalent by the crystal's symmetry whose energies differ: the bands have less symmetry than the crystal. */
  | 'lower-symmetry'
  /** More points listed, or irreducible points kept, than the interpolation takes. */
  | 'too-many'
  /** One k-point. */
  | 'too-few'
  /** A band's energies do not match the k-points or are not finite numbers. */
  | 'energies'
  /** No crystal structure or symmetry to expand the points with (none beside the data, cells that differ, not loaded). */
  | 'no-symmetry'
  /** A spin channel or bands the run does not have were asked for. */
  | 'request'
  /** The interpolated bands have no edge to report (no channel with both edges, no extremum near an edge). */
  | 'no-edges';

export interface MeshRefusal {
  kind: MeshRefusalKind;
  /** The sentence the report shows. */
  reason: string;
}
