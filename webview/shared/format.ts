/** Number formatting for the read-outs and the side panel. Pure. */

/** A number with `digits` significant digits, using a true minus sign. */
export function sig(x: number, digits = 3): string {
  if (!Number.isFinite(x)) return x > 0 ? '∞' : x < 0 ? '−∞' : '—';
  const a = Math.abs(x);
  return minus(a !== 0 && (a >= 1e5 || a < 1e-3) ? x.toExponential(digits - 1) : x.toPrecision(digits));
}

/** Fixed decimals with a true minus sign. */
export function fixed(x: number, decimals = 3): string {
  if (!Number.isFinite(x)) return '—';
  return minus(x.toFixed(decimals));
}

export function minus(s: string): string {
  return s.replace(/^-/, '−').replace(/e-/, 'e−');
}

export function fracK(k: ArrayLike<number>): string {
  return `(${fixed(k[0]!, 3)}, ${fixed(k[1]!, 3)}, ${fixed(k[2]!, 3)})`;
}
