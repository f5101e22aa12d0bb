/**
 * The order runs are printed and merged in: path component by component (so a folder's runs stay together,
 * as a depth-first walk with sorted names visits them), code-unit order within a component.
 */
export function comparePaths(a: string, b: string): number {
  const x = a.split('/');
  const y = b.split('/');
  const n = Math.min(x.length, y.length);
  for (let i = 0; i < n; i++) {
    if (x[i] !== y[i]) return x[i]! < y[i]! ? -1 : 1;
  }
  return x.length - y.length;
}
