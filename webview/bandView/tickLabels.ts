/**
 * Which high-symmetry labels fit under the k axis: on a narrow plot, labels closer than their own width would
 * print over each other, so a label is drawn only when it clears the last one drawn (first and last kept when
 * they can be). The tick marks are always drawn. Pure.
 */

/** Approximate width of a label in pixels at the axis font (11 px): wide enough for Γ, K|U, and subscripts. */
export function labelWidthPx(label: string, charPx = 7): number {
  return Math.max(1, [...label].length) * charPx;
}

/**
 * Indices (into `xs`, sorted ascending) of the labels to draw. `gapPx`: least free space between two labels.
 */
export function fittingLabels(xs: readonly number[], labels: readonly string[], gapPx = 4, charPx = 7): number[] {
  const n = Math.min(xs.length, labels.length);
  const half = (i: number): number => labelWidthPx(labels[i]!, charPx) / 2;
  const kept: number[] = [];
  let rightEdge = -Infinity;
  for (let i = 0; i < n; i++) {
    if (xs[i]! - half(i) >= rightEdge + gapPx) {
      kept.push(i);
      rightEdge = xs[i]! + half(i);
    }
  }
  // The path's last point names where it ends: prefer it over the label just before it.
  const last = n - 1;
  if (n > 1 && kept[kept.length - 1] !== last) {
    while (kept.length > 1 && xs[last]! - half(last) < xs[kept[kept.length - 1]!]! + half(kept[kept.length - 1]!) + gapPx) kept.pop();
    if (kept.length === 0 || xs[last]! - half(last) >= xs[kept[kept.length - 1]!]! + half(kept[kept.length - 1]!) + gapPx) kept.push(last);
  }
  return kept;
}
