/**
 * The byte input under XmlByteScanner: pieces of a file joined only where a construct spans two of them
 * (one reused buffer), the line and column of the scan position for errors, the document's encoding for
 * decoding names and values, and interned element names. What a construct is, the subclass decides (`scan`).
 */
import { ReaderError } from '../errors';

/** Longest single construct (a tag, a comment, a collected text) accepted. */
export const MAX_CONSTRUCT_BYTES = 1 << 20;

const NL = 10;

export abstract class XmlByteInput {
  /** 1-based line of the scan position. */
  line = 1;
  /** Absolute offset of the first byte of the current line. */
  lineStart = 0;
  /** Absolute offset of buf[0]. */
  protected base = 0;
  private work: Uint8Array = new Uint8Array(0);
  protected carryLength = 0;
  protected fed = 0;
  protected sawBom = false;
  protected first = true;
  private latin1 = true;
  private decoder = new TextDecoder('latin1');
  private readonly names = new Map<number, string[]>();
  /** Column of the scan position, for errors (set before a construct is processed). */
  protected pos = 0;
  protected ended = false;

  constructor(
    protected readonly fileName: string,
    protected readonly format: string,
  ) {}

  /** Scan the constructs of `buf` (carried bytes first); end with `keepRest` for what is incomplete. */
  protected abstract scan(buf: Uint8Array, last: boolean): void;

  /** An error at the current position. */
  fail(reason: string, line = this.line, column = this.base + this.pos - this.lineStart + 1): ReaderError {
    return new ReaderError(this.format, this.fileName, { line, column: Math.max(1, column) }, reason);
  }

  /** An error that names a line only (column 0: the end of the input, a block's start). */
  failAtLine(line: number, reason: string): ReaderError {
    return new ReaderError(this.format, this.fileName, { line, column: 0 }, reason);
  }

  /** An error at buf[at], where the line count is valid at buf[from] (at >= from). */
  protected failIn(buf: Uint8Array, from: number, at: number, reason: string): ReaderError {
    let line = this.line;
    let start = this.lineStart;
    for (let i = from; i < at; i++) {
      if (buf[i] === NL) {
        line++;
        start = this.base + i + 1;
      }
    }
    return this.fail(reason, line, this.base + at - start + 1);
  }

  /** Advance the line count over buf[from, to). */
  countLines(buf: Uint8Array, from: number, to: number): void {
    for (let i = from; i < to; i++) {
      if (buf[i] === NL) {
        this.line++;
        this.lineStart = this.base + i + 1;
      }
    }
  }

  /** For row readers: `count` newlines were consumed, the last at buf[last]. */
  newlines(count: number, last: number): void {
    this.line += count;
    this.lineStart = this.base + last + 1;
  }

  /** For row readers: mark the position (for error columns). */
  at(pos: number): void {
    this.pos = pos;
  }

  /** Decode bytes as the document's encoding (ISO-8859-1 as VASP declares it, else UTF-8). */
  decode(buf: Uint8Array, start: number, end: number): string {
    if (end - start <= 16) {
      // Short ASCII (names, attribute values): no decoder call.
      let s = '';
      let ascii = true;
      for (let i = start; i < end; i++) {
        const c = buf[i]!;
        if (c >= 0x80) {
          ascii = false;
          break;
        }
        s += String.fromCharCode(c);
      }
      if (ascii) return s;
    }
    return this.decoder.decode(buf.subarray(start, end));
  }

  protected name(buf: Uint8Array, start: number, end: number): string {
    const n = end - start;
    if (n > 24) return this.decode(buf, start, end);
    let h = n;
    for (let i = start; i < end; i++) h = (Math.imul(h, 31) + buf[i]!) | 0;
    const list = this.names.get(h);
    if (list) {
      outer: for (const s of list) {
        if (s.length !== n) continue;
        for (let i = 0; i < n; i++) if (s.charCodeAt(i) !== buf[start + i]) continue outer;
        return s;
      }
    }
    const s = this.decode(buf, start, end);
    if (list) list.push(s);
    else this.names.set(h, [s]);
    return s;
  }

  write(chunk: Uint8Array, last = false): void {
    if (this.ended) return;
    let bytes = chunk;
    if (this.first) {
      if (this.carryLength + bytes.length < 3 && !last) {
        // Too short to tell a byte-order mark: keep it for the next piece.
        this.stash(bytes);
        return;
      }
      const all = this.carryLength > 0 ? this.joined(bytes) : bytes;
      this.carryLength = 0;
      this.first = false;
      let skip = 0;
      if (all.length >= 3 && all[0] === 0xef && all[1] === 0xbb && all[2] === 0xbf) {
        skip = 3;
        this.sawBom = true;
      }
      bytes = all.subarray(skip);
      this.base = skip;
      this.lineStart = skip;
      const head = this.decode(bytes, 0, Math.min(bytes.length, 200));
      const m = /^<\?xml[^>]*encoding\s*=\s*["']([A-Za-z0-9._-]+)["']/.exec(head);
      const enc = m ? m[1]!.toLowerCase() : 'utf-8';
      this.latin1 = enc === 'iso-8859-1' || enc === 'latin1' || enc === 'iso8859-1' || enc === 'us-ascii' || enc === 'ascii';
      this.decoder = new TextDecoder(this.latin1 ? 'latin1' : 'utf-8', { fatal: false });
      this.fed += bytes.length;
      this.scan(bytes, last);
      return;
    }
    this.fed += bytes.length;
    const buf = this.carryLength > 0 ? this.joined(bytes) : bytes;
    this.carryLength = 0;
    this.scan(buf, last);
  }

  /** The carried bytes followed by `bytes`, in the reused work buffer. */
  private joined(bytes: Uint8Array): Uint8Array {
    const need = this.carryLength + bytes.length;
    if (this.work.length < need) {
      const w = new Uint8Array(Math.max(need, 2 * this.work.length));
      w.set(this.work.subarray(0, this.carryLength));
      this.work = w;
    }
    this.work.set(bytes, this.carryLength);
    return this.work.subarray(0, need);
  }

  private stash(bytes: Uint8Array): void {
    if (this.work.length < this.carryLength + bytes.length) {
      const w = new Uint8Array(Math.max(1024, 2 * (this.carryLength + bytes.length)));
      w.set(this.work.subarray(0, this.carryLength));
      this.work = w;
    }
    // `bytes` may be a view of `work` (the unconsumed tail): copyWithin handles the overlap.
    if (bytes.buffer === this.work.buffer)
      this.work.copyWithin(
        this.carryLength,
        bytes.byteOffset - this.work.byteOffset,
        bytes.byteOffset - this.work.byteOffset + bytes.length,
      );
    else this.work.set(bytes, this.carryLength);
    this.carryLength += bytes.length;
  }

  /** After a scan stopped at buf[pos]: keep what is left (an incomplete construct) for the next piece. */
  protected keepRest(buf: Uint8Array, pos: number, last: boolean): void {
    const end = buf.length;
    // Keep what is left (an incomplete construct) for the next piece.
    const rest = end - pos;
    if (rest > 0) {
      if (last) {
        this.ended = true;
        this.pos = pos;
        return;
      }
      if (rest > MAX_CONSTRUCT_BYTES)
        throw this.fail(
          `a single XML construct (tag, comment or value) runs over ${MAX_CONSTRUCT_BYTES} bytes; this is not a layout Valleyscope reads`,
        );
      const tail = buf.subarray(pos);
      this.base += pos;
      this.stashTail(tail);
    } else this.base += end;
  }

  private stashTail(tail: Uint8Array): void {
    if (tail.buffer === this.work.buffer) {
      const off = tail.byteOffset - this.work.byteOffset;
      this.work.copyWithin(0, off, off + tail.length);
      this.carryLength = tail.length;
    } else {
      this.carryLength = 0;
      this.stash(tail);
    }
  }
}
