/**
 * The mesh points of a mesh run that lie on its drawn path (core/interpolation/meshPointsOnPath.ts), as the band
 * view receives them (protocol MeshPointsData: compact arrays, k-points numbered from 1 as in the file).
 */
import type { MeshPointsWithEnergies } from '../core/interpolation/meshPointsOnPath';
import { encodeArray, type BandData, type MeshPointsData } from '../protocol';

export function meshPointsData(m: MeshPointsWithEnergies, divisions: [number, number, number]): MeshPointsData {
  return {
    count: m.irreducible.length,
    distance: encodeArray(m.distance, 'f64'),
    kpoints: encodeArray(m.kpoints, 'f64'),
    fileKpoint: Array.from(m.irreducible, (i) => i + 1),
    nBands: m.nBands,
    energies: m.energies.map((e) => encodeArray(e, 'f64')),
    divisions,
  };
}

/** The band data with a mesh run's points on the path added (unchanged for other runs). */
export function withMeshPoints(
  data: BandData,
  run: { meshPoints?: MeshPointsWithEnergies; bs: { interpolatedFrom?: { divisions: [number, number, number] } } },
): BandData {
  if (run.meshPoints && run.bs.interpolatedFrom) data.meshPoints = meshPointsData(run.meshPoints, run.bs.interpolatedFrom.divisions);
  return data;
}
