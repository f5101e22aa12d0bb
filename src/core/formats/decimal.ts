/** A decimal number written as text, checked strictly (for header fields and XML character data). */

/** Strict decimal number (Fortran D exponents accepted); null for anything else, including NaN and Inf. */
export function parseDecimal(token: string): number | null {
  if (token.length === 0 || token.length > 40) return null;
  let ok = true;
  let digit = false;
  let hasD = false;
  for (let i = 0; i < token.length; i++) {
    const c = token.charCodeAt(i);
    if (c >= 48 && c <= 57) digit = true;
    else if (c === 68 || c === 100) hasD = true;
    else if (!(c === 43 || c === 45 || c === 46 || c === 69 || c === 101)) {
      ok = false;
      break;
    }
  }
  if (!ok || !digit) return null;
  const v = Number(hasD ? token.replace(/[dD]/, 'e') : token);
  return Number.isFinite(v) ? v : null;
}
