/**
 * Which k-points neighbour a k-point: along the path network's directions, or along the axes of a uniform
 * grid, and the same neighbours laid out as one flat table for the candidate scan.
 */
import type { BandStructure } from '../model';
import type { PathNetwork } from './pathRays';

/** Neighbouring k indices of a point (path directions or grid axes), or null when unknown. */
export type NeighbourFn = (k: number) => Int32Array | number[];

export function pathNeighbours(net: PathNetwork): NeighbourFn {
  return (k) => net.neighboursOf(k);
}

/** Axis neighbours on a uniform grid stored first index slowest (periodic). */
export function gridNeighbours(bs: BandStructure): NeighbourFn | null {
  const g = bs.grid;
  if (!g) return null;
  const [n1, n2, n3] = g.dims;
  if (n1 * n2 * n3 !== bs.nk) return null;
  const m = g.endpointsRepeated ? [n1 - 1, n2 - 1, n3 - 1] : [n1, n2, n3];
  return (k) => {
    const i = Math.floor(k / (n2 * n3));
    const j = Math.floor(k / n3) % n2;
    const l = k % n3;
    const out: number[] = [];
    const at = (a: number, b: number, c: number): number =>
      ((((a % m[0]!) + m[0]!) % m[0]!) * n2 + (((b % m[1]!) + m[1]!) % m[1]!)) * n3 + (((c % m[2]!) + m[2]!) % m[2]!);
    if (m[0]! > 1) out.push(at(i - 1, j, l), at(i + 1, j, l));
    if (m[1]! > 1) out.push(at(i, j - 1, l), at(i, j + 1, l));
    if (m[2]! > 1) out.push(at(i, j, l - 1), at(i, j, l + 1));
    return [...new Set(out)];
  };
}

/** The neighbour table of a grid (or any neighbour function), built once in the same layout as a path's. */
export function gridTable(bs: BandStructure, firstOf: Int32Array, neighbours: NeighbourFn): { start: Int32Array; list: Int32Array } {
  const start = new Int32Array(bs.nk + 1);
  const all: number[] = [];
  for (let i = 0; i < bs.nk; i++) {
    start[i] = all.length;
    if (firstOf[i] === i) for (const j of neighbours(i)) all.push(j);
  }
  start[bs.nk] = all.length;
  return { start, list: Int32Array.from(all) };
}
