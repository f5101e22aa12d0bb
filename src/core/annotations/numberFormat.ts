/**
 * How each quantity is written in an annotations file: a fixed number of digits per quantity, chosen for
 * what the quantity can carry, so the same result always gives the same text (no float noise) and a
 * changed result changes only its own line.
 *
 *   energies (eV)                4 decimals  (0.1 meV)
 *   masses (m_e), alpha (1/eV)   4 significant digits
 *   fractional k                 6 decimals
 *   unit vectors                 6 decimals
 *   fit residuals, fit windows   2 decimals (meV)
 *   standard errors              2 significant digits
 *   settings and other numbers   shortest text that reads back as the same number
 */

export type NumberStyle = 'energy' | 'mass' | 'k' | 'unit' | 'residual' | 'meV' | 'stderr' | 'plain';

function noNegativeZero(s: string): string {
  return /^-0(\.0*)?(e[+-]?\d+)?$/i.test(s) ? s.slice(1) : s;
}

export function formatNumber(x: number, style: NumberStyle): string {
  if (!Number.isFinite(x)) throw new Error(`cannot write the non-finite number ${x} in an annotations file`);
  switch (style) {
    case 'energy':
      return noNegativeZero(x.toFixed(4));
    case 'k':
    case 'unit':
      return noNegativeZero(x.toFixed(6));
    case 'residual':
    case 'meV':
      return noNegativeZero(x.toFixed(2));
    case 'mass':
      return noNegativeZero(significant(x, 4));
    case 'stderr':
      return noNegativeZero(significant(x, 2));
    case 'plain':
      return Object.is(x, -0) ? '0' : JSON.stringify(x);
  }
}

/** x with n significant digits, written without an exponent between 1e-4 and 1e6, with one outside. */
function significant(x: number, n: number): string {
  if (x === 0) return (0).toFixed(n - 1);
  // Round first, then choose the layout from the rounded value, so reading back and writing again
  // always gives the same text.
  const p = Number(x.toPrecision(n));
  const a = Math.abs(p);
  if (a >= 1e-4 && a < 1e6) {
    const exp = Number(p.toExponential().split('e')[1]);
    return p.toFixed(Math.max(0, n - 1 - exp));
  }
  return p.toExponential(n - 1);
}

/** The value a number has after being written and read back: what a comparison with a file must use. */
export function roundAs(x: number, style: NumberStyle): number {
  return Number(formatNumber(x, style));
}
