/**
 * Numbers written as text: the one table of powers of ten, the strict parser for single tokens, and the one
 * fast parser (`decimalAt`) with the scanner for runs of whitespace-separated numbers built on it (over bytes,
 * and over XML character data as a string). The EIGENVAL and vasprun.xml row readers call `decimalAt`;
 * TextScanner (Fortran quirks, line tracking) uses the same table.
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

/** The value of the number `decimalAt` read last (a module-level slot: no object per number). */
export const DECIMAL = new Float64Array(1);

/**
 * The one fast number parser. At buf[p]: [sign] digits [. digits] [(e|E) [sign] 1–3 digits], at most 15
 * digits, the power of ten within ±22 after scaling; then one multiplication or division by an exact power
 * of ten rounds once, so the value is the correctly rounded double (IEEE 754; Clinger's fast path). Returns
 * the position after the number with its value in DECIMAL[0]. A number of that form with more digits or a
 * larger power of ten returns -2 - (the position after it): the runtime's parse of its text is then exact.
 * Anything else returns -1 (the caller's strict path reads it and words any error). What follows the number
 * is the caller's to check.
 */
export function decimalAt(buf: Uint8Array, p: number, end: number): number {
  let c = p < end ? buf[p]! : 0;
  let neg = false;
  if (c === 45 || c === 43) {
    neg = c === 45;
    p++;
  }
  let mant = 0;
  let digits = 0;
  let scale = 0;
  let d = 0;
  while (p < end && (d = buf[p]! - 48) >= 0 && d <= 9) {
    mant = mant * 10 + d;
    digits++;
    p++;
  }
  if (p < end && buf[p] === 46) {
    p++;
    while (p < end && (d = buf[p]! - 48) >= 0 && d <= 9) {
      mant = mant * 10 + d;
      digits++;
      scale--;
      p++;
    }
  }
  if (digits === 0) return -1;
  if (p < end && ((c = buf[p]!) === 101 || c === 69)) {
    p++;
    let eneg = false;
    c = p < end ? buf[p]! : 0;
    if (c === 45 || c === 43) {
      eneg = c === 45;
      p++;
    }
    let exp = 0;
    let ed = 0;
    while (p < end && (d = buf[p]! - 48) >= 0 && d <= 9) {
      exp = exp * 10 + d;
      ed++;
      p++;
    }
    if (ed === 0 || ed > 3) return -1;
    scale += eneg ? -exp : exp;
  }
  if (digits > 15 || scale < -22 || scale > 22) return -2 - p;
  const v = scale < 0 ? mant / POW10[-scale]! : mant * POW10[scale]!;
  DECIMAL[0] = neg ? -v : v;
  return p;
}

function isBlank(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9;
}

/**
 * Read whitespace-separated numbers from the bytes buf[from, to) into `out` from `at`, at most `max` of
 * them, without building strings. Returns how many numbers the bytes hold (more than `max` means too many;
 * only `max` were stored) and the first token that is not a finite number, if any (reading stops there).
 * `text`, when given, is the string these bytes encode one byte per character: unusual tokens are then
 * sliced from it instead of rebuilt from the bytes.
 */
export function scanDecimalBytes(
  buf: Uint8Array,
  from: number,
  to: number,
  out: Float64Array | number[],
  at: number,
  max: number,
  text?: string,
): { count: number; bad: string | null } {
  let count = 0;
  let i = from;
  for (;;) {
    while (i < to && isBlank(buf[i]!)) i++;
    if (i >= to) break;
    const s = i;
    const q = decimalAt(buf, i, to);
    const e = q < -1 ? -2 - q : q;
    let v = NaN;
    if (e >= 0 && (e >= to || isBlank(buf[e]!))) {
      v = q >= 0 ? DECIMAL[0]! : Number(text !== undefined ? text.slice(s - from, e - from) : latin1(buf, s, e));
      i = e;
    }
    if (!Number.isFinite(v)) {
      // Fortran D exponents, junk: the strict path on the token's text.
      i = s;
      while (i < to && !isBlank(buf[i]!)) i++;
      const tok = text !== undefined ? text.slice(s - from, Math.min(i, s + 41) - from) : latin1(buf, s, Math.min(i, s + 41));
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

function latin1(buf: Uint8Array, from: number, to: number): string {
  let s = '';
  for (let j = from; j < to; j++) s += String.fromCharCode(buf[j]!);
  return s;
}

const ENCODER = new TextEncoder();
/** Scratch bytes for scanNumbers, grown on demand. */
let scratch = new Uint8Array(1 << 12);

/**
 * The same over XML character data given as a string (the small XML layouts parsed by saxes): the text is
 * copied into scratch bytes (one native call) and read by the same parser. Returns as scanDecimalBytes.
 */
export function scanNumbers(text: string, out: Float64Array | number[], at: number, max: number): { count: number; bad: string | null } {
  if (scratch.length < 3 * text.length) scratch = new Uint8Array(Math.max(3 * text.length, 2 * scratch.length));
  const { written } = ENCODER.encodeInto(text, scratch);
  if (written === text.length) return scanDecimalBytes(scratch, 0, written, out, at, max, text);
  // Text with other than one-byte characters: the bad token is named from the text itself.
  const r = scanDecimalBytes(scratch, 0, written, out, at, max);
  if (r.bad === null) return r;
  const tok = text.trim().split(/\s+/)[r.count] ?? r.bad;
  return { count: r.count, bad: tok.length > 30 ? `${tok.slice(0, 30)}…` : tok };
}
