/**
 * A cursor over the bytes of a text file that reads numbers and tokens straight from the bytes, tracking
 * line and column for error messages. Used by every text-layout reader: no line arrays, no regular
 * expression per number, no intermediate string per value.
 */
import { ReaderError } from '../errors';
import type { ByteRangeSource } from '../io/fileAccessor';
import { DECIMAL as DECIMAL_SLOT, decimalAt as parseDecimalAt } from './numbers';

/** Local bindings of the parser and its value slot: a hot loop then reads no module export per number. */
const decimalAt = parseDecimalAt;
const DECIMAL = DECIMAL_SLOT;

const NL = 10;
const CR = 13;
const SPACE = 32;
const TAB = 9;
const COMMA = 44;

export function isSpace(c: number): boolean {
  return c === SPACE || c === TAB || c === CR || c === 0x0b || c === 0x0c;
}

export function decodeText(bytes: Uint8Array, start = 0, end = bytes.length): string {
  return new TextDecoder('utf-8', { fatal: false }).decode(bytes.subarray(start, end));
}

/** Bytes read per refill when streaming. */
export const STREAM_CHUNK_BYTES = 4 * 1024 * 1024;

export class TextScanner {
  /** The current window of the file (the whole file unless streaming). */
  bytes: Uint8Array;
  readonly file: string;
  readonly format: string;
  pos: number;
  /** 1-based line number of `pos`. */
  line = 1;
  /** Byte offset at which the current line starts. */
  lineStart: number;
  /** Whether commas count as separators (some layouts use them). */
  commaIsSpace = false;

  private source: ByteRangeSource | null = null;
  /** File offset of bytes[0]. */
  private windowOffset = 0;
  /** File offset of the next byte not yet read from the source. */
  private nextRead = 0;
  /** The reusable window buffer of a streaming scanner whose source can read into a buffer. */
  private window: Uint8Array | null = null;
  /** Called with every chunk read from a source (e.g. to hash the file while streaming). */
  onChunk: ((chunk: Uint8Array) => void) | null = null;

  /** A scanner at the first non-blank line of a small file; `empty` is the sentence when there is none. */
  static atContent(bytes: Uint8Array, file: string, format: string, empty: string): TextScanner {
    const sc = new TextScanner(bytes, file, format);
    sc.skipBlankLines();
    if (sc.atEnd()) throw sc.error(empty);
    return sc;
  }

  /** A scanner that reads a large file in windows through a ranged source. */
  static streaming(source: ByteRangeSource, file: string, format: string, onChunk?: (chunk: Uint8Array) => void): TextScanner {
    const first = source.read(0, Math.min(STREAM_CHUNK_BYTES, source.size));
    onChunk?.(first);
    const sc = new TextScanner(first, file, format);
    sc.source = source;
    sc.nextRead = first.length;
    sc.onChunk = onChunk ?? null;
    return sc;
  }

  constructor(bytes: Uint8Array, file: string, format: string) {
    this.bytes = bytes;
    this.file = file;
    this.format = format;
    // Skip a UTF-8 byte-order mark.
    this.pos = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
    this.lineStart = this.pos;
  }

  get column(): number {
    return this.pos - this.lineStart + 1;
  }

  atEnd(): boolean {
    return this.pos >= this.bytes.length && (this.source === null || this.nextRead >= this.source.size);
  }

  /** Total size of the file, in bytes. */
  get fileSize(): number {
    return this.source ? this.source.size : this.bytes.length;
  }

  /** Offset of the cursor in the file. */
  get filePosition(): number {
    return this.windowOffset + this.pos;
  }

  /** Bytes of the file not yet consumed. */
  get remainingBytes(): number {
    return this.fileSize - this.filePosition;
  }

  /**
   * When streaming: make sure at least `n` bytes from the start of the current line are in the window
   * (fewer only at the end of the file). Call at record boundaries; a no-op for whole-file scanners.
   */
  ensure(n: number): void {
    const src = this.source;
    if (!src) return;
    for (;;) {
      const available = this.bytes.length - this.lineStart;
      if (available >= n || this.nextRead >= src.size) return;
      const keepLength = available;
      const want = Math.max(STREAM_CHUNK_BYTES, n - keepLength);
      const shift = this.lineStart;
      if (src.readInto) {
        // Reuse one buffer: move the unread tail to its start and read the next piece after it, so a long
        // file leaves no trail of discarded windows for the collector.
        let buf = this.window;
        if (!buf || buf.length < keepLength + want) {
          const grown = new Uint8Array(keepLength + want);
          grown.set(this.bytes.subarray(this.lineStart));
          buf = grown;
        } else buf.copyWithin(0, this.lineStart, this.bytes.length);
        this.window = buf;
        const got = src.readInto(this.nextRead, buf, keepLength, want);
        if (got === 0) return;
        this.onChunk?.(buf.subarray(keepLength, keepLength + got));
        this.nextRead += got;
        this.bytes = buf.subarray(0, keepLength + got);
      } else {
        const chunk = src.read(this.nextRead, want);
        if (chunk.length === 0) return;
        this.onChunk?.(chunk);
        this.nextRead += chunk.length;
        const next = new Uint8Array(keepLength + chunk.length);
        next.set(this.bytes.subarray(this.lineStart));
        next.set(chunk, keepLength);
        this.bytes = next;
      }
      this.windowOffset += shift;
      this.pos -= shift;
      this.lineStart = 0;
    }
  }

  /** Read the rest of the file through the source (so a streaming caller's hash covers every byte). */
  drain(): void {
    const src = this.source;
    if (!src) return;
    while (this.nextRead < src.size) {
      const chunk = src.read(this.nextRead, STREAM_CHUNK_BYTES);
      if (chunk.length === 0) break;
      this.onChunk?.(chunk);
      this.nextRead += chunk.length;
    }
  }

  error(reason: string, line = this.line, column = this.column): ReaderError {
    return new ReaderError(this.format, this.file, { line, column }, reason);
  }

  /** Skip spaces and tabs (and commas when enabled) on the current line. */
  skipSpaces(): void {
    const b = this.bytes;
    let p = this.pos;
    const n = b.length;
    while (p < n) {
      const c = b[p]!;
      if (c === SPACE || c === TAB || c === CR || (this.commaIsSpace && c === COMMA)) p++;
      else break;
    }
    this.pos = p;
  }

  /** Skip all whitespace including newlines. */
  skipWhitespace(): void {
    const b = this.bytes;
    const n = b.length;
    for (;;) {
      this.skipSpaces();
      if (this.pos < n && b[this.pos] === NL) {
        this.pos++;
        this.line++;
        this.lineStart = this.pos;
      } else break;
    }
  }

  /** True when only spaces remain on the current line. */
  atEol(): boolean {
    this.skipSpaces();
    return this.pos >= this.bytes.length || this.bytes[this.pos] === NL;
  }

  /** Move to the start of the next line. Returns false at the end of the file. */
  nextLine(): boolean {
    const b = this.bytes;
    const idx = b[this.pos] === NL ? this.pos : b.indexOf(NL, this.pos);
    if (idx < 0) {
      this.pos = b.length;
      return false;
    }
    this.pos = idx + 1;
    this.line++;
    this.lineStart = this.pos;
    return true;
  }

  /** Expect the current line to be finished (spaces only), then move to the next line. */
  endLine(what: string): void {
    if (!this.atEol()) throw this.error(`expected the end of the line after ${what}, found "${this.peekToken()}"`);
    this.nextLine();
  }

  /** True when the current line holds nothing but spaces. */
  lineIsBlank(): boolean {
    const save = this.pos;
    const blank = this.atEol();
    this.pos = save;
    return blank;
  }

  /** Skip blank lines. */
  skipBlankLines(): void {
    while (!this.atEnd() && this.lineIsBlank()) this.nextLine();
  }

  /** The rest of the current line as text (without the newline), leaving the cursor at the next line. */
  restOfLine(): string {
    const b = this.bytes;
    let end = b.indexOf(NL, this.pos);
    if (end < 0) end = b.length;
    let e = end;
    if (e > this.pos && b[e - 1] === CR) e--;
    const s = decodeText(b, this.pos, e);
    this.pos = end;
    if (end < b.length) this.nextLine();
    return s;
  }

  /** Peek the next token on the line without consuming it (for messages). */
  peekToken(): string {
    const save = this.pos;
    this.skipSpaces();
    const b = this.bytes;
    let p = this.pos;
    while (p < b.length && !isSpace(b[p]!) && b[p] !== NL && p - this.pos < 40) p++;
    const s = p > this.pos ? decodeText(b, this.pos, p) : this.pos >= b.length ? 'the end of the file' : 'the end of the line';
    this.pos = save;
    return s;
  }

  /** Read a whitespace-delimited token on the current line, or null at the end of the line. */
  token(): string | null {
    this.skipSpaces();
    const b = this.bytes;
    const start = this.pos;
    let p = start;
    while (p < b.length) {
      const c = b[p]!;
      if (isSpace(c) || c === NL || (this.commaIsSpace && c === COMMA)) break;
      p++;
    }
    if (p === start) return null;
    this.pos = p;
    return decodeText(b, start, p);
  }

  /**
   * Read a number on the current line. `what` names the quantity for the error message.
   * Accepts Fortran exponents (D/d), rejects overflow fields (`****`), NaN and infinities.
   */
  number(what: string | (() => string)): number {
    this.skipSpaces();
    const v = this.tryNumber();
    if (v === null) throw this.numberError(typeof what === 'string' ? what : what());
    return v;
  }

  /** Skip spaces, then try to read a number; null (cursor unchanged) when none is there. */
  tryNumberAfterSpaces(): number | null {
    this.skipSpaces();
    return this.tryNumber();
  }

  /** Read a number, skipping newlines before it. */
  numberAcrossLines(what: string): number {
    this.skipWhitespace();
    if (this.atEnd()) throw this.error(`the file ends where ${what} was expected (it may be truncated)`);
    return this.number(what);
  }

  /** Read an integer on the current line. */
  integer(what: string): number {
    const col = this.column + 0;
    this.skipSpaces();
    const startCol = this.column;
    const v = this.number(what);
    if (!Number.isInteger(v)) throw this.error(`${what} should be a whole number, found ${v}`, this.line, startCol);
    void col;
    return v;
  }

  private numberError(what: string): ReaderError {
    const tok = this.peekToken();
    if (tok.includes('***')) {
      return this.error(`${what} is written as "${tok}": the writing program's number field overflowed, so the value is unknown`);
    }
    if (/^[+-]?(nan|inf)/i.test(tok)) return this.error(`${what} is "${tok}", not a finite number`);
    if (tok === 'the end of the line' || tok === 'the end of the file') {
      return this.error(`expected ${what}, found ${tok}${tok === 'the end of the file' ? ' (the file may be truncated)' : ''}`);
    }
    return this.error(`expected ${what}, found "${tok}"`);
  }

  /**
   * Parse a number at the cursor (no leading spaces skipped). Returns null, leaving the cursor unchanged,
   * when no complete number is there. A number must be followed by a separator or the end of the line.
   * The common forms go through the one fast parser (numbers.ts); Fortran's forms (D exponents, an exponent
   * of three digits written without its E: 0.1234-105) and long mantissas through the token's text.
   */
  tryNumber(): number | null {
    const b = this.bytes;
    const n = b.length;
    const start = this.pos;
    const q = decimalAt(b, start, n);
    if (q >= 0 && (q >= n || isSeparator(b[q]!))) {
      this.pos = q;
      return DECIMAL[0]!;
    }
    let p = start;
    while (p < n && !isSeparator(b[p]!)) p++;
    if (p === start || p - start > 64) return null;
    let text = decodeText(b, start, p).replace(/[dD]/, 'e');
    if (!/[eE]/.test(text)) text = text.replace(/^([+-]?(?:\d+\.?\d*|\.\d+))([+-]\d{2,3})$/, '$1e$2');
    if (!FORTRAN_NUMBER.test(text)) return null;
    const v = Number(text);
    if (!Number.isFinite(v)) return null;
    this.pos = p;
    return v;
  }
}

/** A decimal number with an optional exponent, once Fortran's D and dropped E are made plain. */
const FORTRAN_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Bytes that may follow a number: blanks, the end of the line, and , ! ) < ; */
function isSeparator(c: number): boolean {
  return isSpace(c) || c === NL || c === COMMA || c === 33 || c === 41 || c === 60 || c === 59;
}
