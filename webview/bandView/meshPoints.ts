/**
 * A mesh run's own data points on the drawn path (protocol MeshPointsData): decoded and checked like the rest of
 * the band data, and the sentences the view writes about them (legend, marker titles, the read-out, the plot's
 * accessible name). The lines of such a run are interpolated; these points are data. Pure (no DOM).
 */
import type { BandData } from '../../src/protocol';
import { decodeArray } from '../../src/protocol';
import { fixed, fracK } from '../shared/format';

export interface MeshPointsView {
  count: number;
  distance: Float64Array;
  kpoints: Float64Array;
  fileKpoint: readonly number[];
  nBands: number;
  /** One per spin channel: [point * nBands + band0], eV (raw). */
  energies: Float64Array[];
  divisions: [number, number, number];
}

/** What the legend calls a marker, and the line between them. */
export const MESH_POINT_NAME = 'mesh point (data)';
export const INTERPOLATED_LINE_NAME = 'interpolated';

const asF64 = (a: Float64Array | Float32Array): Float64Array => (a instanceof Float64Array ? a : Float64Array.from(a));

/** The mesh points of the band data, checked against it (counts, bands, spins, distances on the path); null when absent. */
export function decodeMeshPoints(data: BandData, pathDistance: Float64Array): MeshPointsView | null {
  const m = data.meshPoints;
  if (!m) return null;
  const count = m.count;
  if (!Number.isInteger(count) || count < 0) throw new Error(`mesh points: ${String(count)} is not a count`);
  if (!Number.isInteger(m.nBands) || m.nBands < 1 || m.nBands > data.nBands)
    throw new Error(`mesh points: ${m.nBands} bands for a view of ${data.nBands}`);
  const distance = asF64(decodeArray(m.distance));
  const kpoints = asF64(decodeArray(m.kpoints));
  const energies = m.energies.map((e) => asF64(decodeArray(e)));
  if (distance.length !== count) throw new Error(`mesh points: ${distance.length} distances for ${count} points`);
  if (kpoints.length !== 3 * count) throw new Error(`mesh points: ${kpoints.length / 3} k-points for ${count} points`);
  if (!Array.isArray(m.fileKpoint) || m.fileKpoint.length !== count || !m.fileKpoint.every((i) => Number.isInteger(i) && i >= 1))
    throw new Error(`mesh points: the k-point numbers do not match the ${count} points`);
  if (energies.length !== data.nSpin) throw new Error(`mesh points: ${energies.length} spin channels, expected ${data.nSpin}`);
  for (const e of energies)
    if (e.length !== count * m.nBands) throw new Error(`mesh points: ${e.length} energies for ${count} × ${m.nBands}`);
  const [lo, hi] = [pathDistance[0] ?? 0, pathDistance[pathDistance.length - 1] ?? 0];
  const span = 1e-9 * (1 + Math.abs(hi - lo));
  for (const d of distance) if (!(d >= lo - span && d <= hi + span)) throw new Error(`mesh points: distance ${d} is off the path`);
  const divisions = m.divisions;
  if (!Array.isArray(divisions) || divisions.length !== 3 || !divisions.every((n) => Number.isInteger(n) && n >= 1))
    throw new Error('mesh points: the mesh divisions are not three positive integers');
  return { count, distance, kpoints, fileKpoint: m.fileKpoint, nBands: m.nBands, energies, divisions };
}

/** The sentence of the plot's accessible name and legend: how many data points, from which mesh. */
export function meshPointsSentence(m: MeshPointsView): string {
  return `${m.count} points of the ${m.divisions.join('×')} mesh lie on this path: markers, ${MESH_POINT_NAME}; the lines are ${INTERPOLATED_LINE_NAME}.`;
}

/** A marker's title: the data point, the file's k-point it comes from, its energy. */
export function meshPointTitle(m: MeshPointsView, i: number, spin: number, band0: number, energyName: string, offset: number): string {
  const k = fracK(m.kpoints.subarray(3 * i, 3 * i + 3));
  const spinText = m.energies.length === 2 ? (spin === 0 ? ', spin up' : ', spin down') : '';
  const e = energy4(m.energies[spin]![i * m.nBands + band0]! - offset);
  return `${capitalised(MESH_POINT_NAME)}: band ${band0 + 1}${spinText}, k = ${k} (k-point ${m.fileKpoint[i]} of the file, by symmetry), ${energyName} = ${e} eV.`;
}

const capitalised = (s: string): string => s.charAt(0).toUpperCase() + s.slice(1);

/** An energy with 4 decimals, without a minus sign on a value that rounds to zero. */
const energy4 = (e: number): string => fixed(Math.abs(e) < 5e-5 ? 0 : e, 4);

/**
 * The mesh point drawn nearest a path distance, when it is within `reach` (path units): the read-out then says
 * the data there; otherwise the point read is interpolated.
 */
export function meshPointNear(m: MeshPointsView, x: number, reach: number): number {
  let best = -1;
  let bestD = reach;
  for (let i = 0; i < m.count; i++) {
    const d = Math.abs(m.distance[i]! - x);
    if (d <= bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}

/** What the read-out adds for a point of an interpolated band: the data at a mesh point there, or that it is interpolated. */
export function meshPointNote(m: MeshPointsView, i: number, spin: number, band0: number, offset: number): string {
  if (i < 0 || band0 >= m.nBands) return ` · ${INTERPOLATED_LINE_NAME}`;
  const e = energy4(m.energies[spin]![i * m.nBands + band0]! - offset);
  return ` · ${INTERPOLATED_LINE_NAME}; ${MESH_POINT_NAME} here: k-point ${m.fileKpoint[i]} of the file, ${e} eV`;
}
