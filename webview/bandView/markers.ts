/**
 * Valleyscope's own marker shapes, as SVG path data centred on (0, 0):
 * - band edge (VBM, CBM): a ring with four short diagonal ticks ("reticle");
 * - secondary extremum: a small open chevron on the side away from the band, pointing at the extremum;
 * - selection: a dashed ring drawn by the caller.
 */

/** Ring of radius r with diagonal ticks from r + gap to r + gap + tick. */
export function edgeMarkerPath(r = 5, tick = 3, gap = 2): string {
  const ring = `M${r},0A${r},${r} 0 1,1 ${-r},0A${r},${r} 0 1,1 ${r},0Z`;
  const a = (r + gap) / Math.SQRT2;
  const b = (r + gap + tick) / Math.SQRT2;
  const f = (n: number): string => n.toFixed(2);
  const ticks = [
    [a, a, b, b],
    [-a, a, -b, b],
    [a, -a, b, -b],
    [-a, -a, -b, -b],
  ]
    .map(([x1, y1, x2, y2]) => `M${f(x1!)},${f(y1!)}L${f(x2!)},${f(y2!)}`)
    .join('');
  return ring + ticks;
}

/**
 * Chevron for a secondary extremum. For a maximum it sits above the point opening downwards (pointing at
 * it from above); for a minimum below it, pointing up.
 */
export function secondaryMarkerPath(isMaximum: boolean, size = 5): string {
  const gap = 4;
  if (isMaximum) return `M${-size},${-gap - size}L0,${-gap}L${size},${-gap - size}`;
  return `M${-size},${gap + size}L0,${gap}L${size},${gap + size}`;
}

export function isMaximumKind(kind: string): boolean {
  return kind === 'vbm' || kind === 'peak';
}

/** A mesh run's data point on its interpolated line: a small open diamond (the line runs through its corners). */
export function meshPointMarkerPath(r = 3.5): string {
  return `M0,${-r}L${r},0L0,${r}L${-r},0Z`;
}
