import type { KLabel } from '../../src/core/model';

/** Label list from k indices (0-based) and the names at them, in the same order: labelsAt([0, 4], ['Γ', 'X']). */
export function labelsAt(indices: number[], names: string[]): KLabel[] {
  if (indices.length !== names.length) throw new Error(`labelsAt: ${indices.length} indices, ${names.length} names`);
  return indices.map((index, i) => ({ index, label: names[i]! }));
}
