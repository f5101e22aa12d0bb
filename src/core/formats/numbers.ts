/**
 * Numbers written as text: the one table of powers of ten, the strict parser for single tokens, and the fast
 * scanners for runs of whitespace-separated numbers: over bytes (vasprun.xml) and over XML character data
 * as a string (saxes; converting that text to bytes first measured 1.3-1.6x slower). TextScanner (Fortran
 * quirks, line tracking) and vasprun.xml's row reader use the same table.
 */

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

/**
 * Exact powers of ten representable as doubles (10^0 .. 10^22): a mantissa of at most 15 digits times or
 * over one of them is rounded once, so the result is the correctly rounded double (IEEE 754).
 */
export const POW10 = new Float64Array([
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
]);

function isBlank(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9;
}

/**
 * Read whitespace-separated numbers from the bytes buf[from, to) into `out` from `at`, at most `max` of
 * them, without building strings. Returns how many numbers the bytes hold (more than `max` means too many;
 * only `max` were stored) and the first token that is not a finite number, if any (reading stops there).
 */
export function scanDecimalBytes(
  buf: Uint8Array,
  from: number,
  to: number,
  out: Float64Array | number[],
  at: number,
  max: number,
): { count: number; bad: string | null } {
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

/**
 * Read whitespace-separated numbers from XML character data into `out` from `at`, at most `max` of them.
 * Returns how many numbers the text holds (more than `max` means too many; only `max` were stored) and the
 * first token that is not a finite number, if any (reading stops there).
 */
export function scanNumbers(text: string, out: Float64Array | number[], at: number, max: number): { count: number; bad: string | null } {
  let count = 0;
  const n = text.length;
  let i = 0;
  for (;;) {
    let c = 0;
    while (i < n && ((c = text.charCodeAt(i)) === 32 || c === 10 || c === 13 || c === 9)) i++;
    if (i >= n) break;
    const s = i;
    // Fast path: [sign] digits [. digits] [(e|E) [sign] digits], at most 15 significant digits.
    let neg = false;
    if (c === 45 || c === 43) {
      neg = c === 45;
      i++;
    }
    let mant = 0;
    let digits = 0;
    let scale = 0;
    while (i < n && (c = text.charCodeAt(i)) >= 48 && c <= 57) {
      mant = mant * 10 + (c - 48);
      digits++;
      i++;
    }
    if (i < n && c === 46) {
      i++;
      while (i < n && (c = text.charCodeAt(i)) >= 48 && c <= 57) {
        mant = mant * 10 + (c - 48);
        digits++;
        scale--;
        i++;
      }
    }
    let exp = 0;
    let ok = digits > 0 && digits <= 15;
    if (ok && i < n && (c === 101 || c === 69)) {
      i++;
      let eneg = false;
      c = text.charCodeAt(i);
      if (c === 45 || c === 43) {
        eneg = c === 45;
        i++;
      }
      let ed = 0;
      while (i < n && (c = text.charCodeAt(i)) >= 48 && c <= 57) {
        exp = exp * 10 + (c - 48);
        ed++;
        i++;
      }
      if (ed === 0 || ed > 3) ok = false;
      if (eneg) exp = -exp;
    }
    let v: number;
    const atSeparator = i >= n || (c = text.charCodeAt(i)) === 32 || c === 10 || c === 13 || c === 9;
    const e10 = scale + exp;
    if (ok && atSeparator && e10 >= -22 && e10 <= 22) {
      v = e10 < 0 ? mant / POW10[-e10]! : mant * POW10[e10]!;
      if (neg) v = -v;
    } else {
      // Anything unusual (Fortran D exponents, long mantissas, junk): the strict, slower path.
      while (i < n && !((c = text.charCodeAt(i)) === 32 || c === 10 || c === 13 || c === 9)) i++;
      const tok = text.slice(s, i);
      const parsed = parseDecimal(tok);
      if (parsed === null) return { count, bad: tok.length > 30 ? `${tok.slice(0, 30)}…` : tok };
      v = parsed;
    }
    if (count >= max) return { count: count + 1, bad: null };
    out[at + count] = v;
    count++;
  }
  return { count, bad: null };
}
