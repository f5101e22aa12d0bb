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

/** Exact powers of ten representable as doubles (10^0 .. 10^22). */
const POW10 = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18,
  1e19, 1e20, 1e21, 1e22,
];

function isBlank(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9;
}

/**
 * Read whitespace-separated numbers from the bytes buf[from, to) into `out` from `at`, at most `max` of
 * them, without building strings. Returns how many numbers the bytes hold (more than `max` means too many;
 * only `max` were stored) and the first token that is not a finite number, if any (reading stops there).
 */
export function scanDecimalBytes(buf: Uint8Array, from: number, to: number, out: Float64Array | number[], at: number, max: number): { count: number; bad: string | null } {
  let count = 0;
  let i = from;
  for (;;) {
    while (i < to && isBlank(buf[i]!)) i++;
    if (i >= to) break;
    const s = i;
    let c = buf[i]!;
    let neg = false;
    if (c === 45 || c === 43) {
      neg = c === 45;
      i++;
    }
    let mant = 0;
    let digits = 0;
    let scale = 0;
    while (i < to && (c = buf[i]!) >= 48 && c <= 57) {
      mant = mant * 10 + (c - 48);
      digits++;
      i++;
    }
    if (i < to && buf[i] === 46) {
      i++;
      while (i < to && (c = buf[i]!) >= 48 && c <= 57) {
        mant = mant * 10 + (c - 48);
        digits++;
        scale--;
        i++;
      }
    }
    let v: number;
    if (digits > 0 && digits <= 15 && (i >= to || isBlank(buf[i]!)) && scale >= -22) {
      v = scale < 0 ? mant / POW10[-scale]! : mant;
      if (neg) v = -v;
    } else {
      // Exponents, long mantissas, junk: the strict path on the token's text.
      while (i < to && !isBlank(buf[i]!)) i++;
      let tok = '';
      for (let j = s; j < i && j < s + 41; j++) tok += String.fromCharCode(buf[j]!);
      const parsed = i - s > 40 ? null : parseDecimal(tok);
      if (parsed === null) return { count, bad: tok.length > 30 ? `${tok.slice(0, 30)}…` : tok };
      v = parsed;
    }
    if (count >= max) return { count: count + 1, bad: null };
    out[at + count] = v;
    count++;
  }
  return { count, bad: null };
}
