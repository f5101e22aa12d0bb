/**
 * A streaming XML scanner that works on the bytes, for readers of large XML files (vasprun.xml): no text is
 * decoded unless a reader asks for it, and a reader may take over runs of simple elements (the eigenvalue
 * rows) straight from the bytes. The safety rules of the XML readers hold here too:
 * - a document type declaration (<!DOCTYPE ...>) is refused, so no external entity and no entity expansion;
 *   only the five predefined entities and character references are accepted, anything else is malformed;
 * - nesting depth, tag length and collected text length are bounded; every construct must be complete
 *   within MAX_CONSTRUCT_BYTES, so a hostile file cannot make the scanner buffer without bound;
 * - errors are ReaderError with the line and column; a file that ends early is told apart from a malformed one.
 * Feed bytes in pieces with `write`, then `finish`.
 */
import { MAX_CONSTRUCT_BYTES, XmlByteInput } from './xmlByteInput';
import { entityCodePoint, indexIn, isNameChar, isNameStart, isWs, readAttributes, undefinedEntity } from './xmlMarkup';
import { DOCTYPE_REFUSED, MAX_XML_DEPTH } from './xmlSafety';

export { MAX_CONSTRUCT_BYTES };

export interface XmlByteEvents {
  /** An element opens. `depth` counts the root as 1. Return true to receive its text (see `text`). */
  open(name: string, attributes: Record<string, string> | null, depth: number): boolean;
  /** The collected text of the element just closing, as bytes `buf[start, end)` (entities already replaced). */
  close(name: string, depth: number, text: Uint8Array | null, textLength: number): void;
}

/**
 * A reader's fast path for runs of simple rows: called when the scanner is between constructs inside an
 * element whose opening set `rowsActive`. It consumes what it can from `buf[pos, end)` and returns the new
 * position; anything it does not recognise it leaves for the general path.
 */
export type RowReader = (scanner: XmlByteScanner, buf: Uint8Array, pos: number, end: number, last: boolean) => number;

const LT = 60;
const GT = 62;
const SLASH = 47;
const BANG = 33;
const QUESTION = 63;
const AMP = 38;

export class XmlByteScanner extends XmlByteInput {
  private readonly stack: string[] = [];
  /** Per open element: 0 nothing yet, 1 child elements, 2 non-blank text. */
  private readonly content: number[] = [];
  private collecting = false;
  private textBuf = new Uint8Array(256);
  private textLen = 0;
  private sawRoot = false;
  private rootClosed = false;
  /** The fast path for rows, active directly inside the element that was innermost when it was set. */
  private rows: RowReader | null = null;
  private rowsDepth = -1;

  constructor(
    fileName: string,
    format: string,
    private readonly events: XmlByteEvents,
  ) {
    super(fileName, format);
  }

  get depth(): number {
    return this.stack.length;
  }

  /** The name of the open element `up` levels above the innermost (0: the innermost), or ''. */
  ancestor(up: number): string {
    return this.stack[this.stack.length - 1 - up] ?? '';
  }

  /** Use `reader` for the rows directly inside the innermost open element (null: stop). */
  setRows(reader: RowReader | null): void {
    this.rows = reader;
    this.rowsDepth = this.stack.length;
  }

  /**
   * For row readers: the innermost element's end tag was consumed by the reader, which did what its close
   * event would have done. Row reading stops (setRows again after `enterFast`).
   */
  leaveFast(): void {
    this.stack.pop();
    this.content.pop();
    this.collecting = false;
    this.textLen = 0;
    this.rows = null;
  }

  /** For row readers: whether a child element may be opened by `enterFast` here. */
  canEnterFast(): boolean {
    const n = this.stack.length;
    return n > 0 && n < MAX_XML_DEPTH && this.content[n - 1] !== 2;
  }

  /** For row readers: a child element was opened by the reader (its start tag consumed, its open event done). */
  enterFast(name: string): void {
    this.content[this.stack.length - 1] = 1;
    this.stack.push(name);
    this.content.push(0);
  }

  /** For row readers: the innermost element has child elements (rows were read in it). */
  markChild(): void {
    const n = this.content.length;
    if (n > 0) this.content[n - 1] = 1;
  }

  protected scan(buf: Uint8Array, last: boolean): void {
    const end = buf.length;
    let pos = 0;
    while (pos < end) {
      if (this.rows !== null && this.stack.length === this.rowsDepth) {
        pos = this.rows(this, buf, pos, end, last);
        if (pos >= end) break;
      }
      this.pos = pos;
      const c = buf[pos]!;
      if (c === LT) {
        const next = this.markup(buf, pos, end, last);
        if (next < 0) break;
        pos = next;
      } else {
        pos = this.textRun(buf, pos, end, last);
        if (pos < 0) break;
      }
    }
    if (pos < 0) pos = this.pos;
    this.keepRest(buf, pos, last);
  }

  /** Character data from `pos` up to the next '<'. Returns the new position, or -1 to wait for more bytes. */
  private textRun(buf: Uint8Array, pos: number, end: number, last: boolean): number {
    let q = buf.indexOf(LT, pos);
    if (q < 0) q = end;
    let stop = q;
    // An entity reference cut by the end of the piece: wait for the rest.
    if (q === end && !last) {
      let amp = -1;
      for (let i = end - 1; i >= pos && i >= end - 16; i--) {
        if (buf[i] === AMP) {
          amp = i;
          break;
        }
      }
      if (amp >= pos && indexIn(buf, 59 /* ; */, amp, end) < 0 && end - amp < 16) stop = amp;
    }
    if (stop === pos) return -1;
    let first = pos;
    while (first < stop && isWs(buf[first]!)) first++;
    const blank = first === stop;
    const depth = this.stack.length;
    if (!blank) {
      if (depth === 0) throw this.failIn(buf, pos, first, 'text outside the root element');
      const state = this.content[depth - 1]!;
      if (state === 1) {
        const shown = this.decode(buf, first, Math.min(stop, first + 20)).trim();
        throw this.failIn(buf, pos, first, `unexpected text "${shown}…" between the elements of <${this.stack[depth - 1]}>`);
      }
      this.content[depth - 1] = 2;
      if (this.collecting) this.collect(buf, pos, stop);
      else this.checkEntities(buf, pos, stop);
    } else if (this.collecting) this.collect(buf, pos, stop);
    this.countLines(buf, pos, stop);
    return stop;
  }

  /** Entity references in text not collected: only the predefined ones and character references. */
  private checkEntities(buf: Uint8Array, from: number, to: number): void {
    let i = indexIn(buf, AMP, from, to);
    while (i >= 0) {
      const semi = indexIn(buf, 59, i, to);
      if (semi < 0 || semi - i > 12) throw this.failIn(buf, from, i, 'the XML is malformed: a "&" that starts no entity reference');
      this.entity(buf, i + 1, semi, from);
      i = indexIn(buf, AMP, semi, to);
    }
  }

  /** The character an entity reference `&name;` stands for (buf[from, to) is the name). */
  private entity(buf: Uint8Array, from: number, to: number, runStart = from): number {
    const name = this.decode(buf, from, to);
    const v = entityCodePoint(name);
    if (v < 0) throw this.failIn(buf, runStart, from - 1, undefinedEntity(name));
    return v;
  }

  /** Room for `n` more bytes of collected text, within MAX_CONSTRUCT_BYTES. */
  private reserveText(n: number): void {
    if (this.textLen + n > MAX_CONSTRUCT_BYTES)
      throw this.fail(
        `the text of <${this.stack[this.stack.length - 1]}> runs over ${MAX_CONSTRUCT_BYTES} bytes; this is not a layout Valleyscope reads`,
      );
    if (this.textLen + n > this.textBuf.length) {
      const t = new Uint8Array(Math.max(this.textLen + n, 2 * this.textBuf.length));
      t.set(this.textBuf.subarray(0, this.textLen));
      this.textBuf = t;
    }
  }

  private collect(buf: Uint8Array, from: number, to: number): void {
    const n = to - from;
    this.reserveText(n);
    const amp = indexIn(buf, AMP, from, to);
    if (amp < 0) {
      this.textBuf.set(buf.subarray(from, to), this.textLen);
      this.textLen += n;
      return;
    }
    for (let i = from; i < to; i++) {
      const c = buf[i]!;
      if (c !== AMP) {
        this.textBuf[this.textLen++] = c;
        continue;
      }
      const semi = indexIn(buf, 59, i, to);
      if (semi < 0 || semi - i > 12) throw this.failIn(buf, from, i, 'the XML is malformed: a "&" that starts no entity reference');
      const v = this.entity(buf, i + 1, semi, from);
      // Numbers and names only need ASCII; other characters are kept as '?'.
      this.textBuf[this.textLen++] = v < 0x80 ? v : 63;
      i = semi;
    }
  }

  /** A construct starting with '<'. Returns the position after it, or -1 to wait for more bytes. */
  private markup(buf: Uint8Array, pos: number, end: number, last: boolean): number {
    if (pos + 1 >= end) return last ? this.truncatedMarkup() : -1;
    const c1 = buf[pos + 1]!;
    if (c1 === BANG) return this.bang(buf, pos, end, last);
    if (c1 === QUESTION) {
      const close = this.find2(buf, pos + 2, end, QUESTION, GT);
      if (close < 0) return last ? this.truncatedMarkup() : -1;
      const isDecl = end - pos >= 6 && buf[pos + 2] === 120 && buf[pos + 3] === 109 && buf[pos + 4] === 108 && isWs(buf[pos + 5]!);
      if (isDecl && (this.base + pos > (this.sawBom ? 3 : 0) || this.sawRoot))
        throw this.fail('the XML is malformed: an XML declaration that is not at the start of the file');
      this.countLines(buf, pos, close + 2);
      return close + 2;
    }
    // Find the end of the tag, outside quoted attribute values.
    let q = pos + 1;
    let quote = 0;
    for (; q < end; q++) {
      const c = buf[q]!;
      if (quote !== 0) {
        if (c === quote) quote = 0;
        else if (c === LT) throw this.fail('the XML is malformed: "<" inside an attribute value');
      } else if (c === 34 || c === 39) quote = c;
      else if (c === GT) break;
      else if (c === LT) throw this.fail('the XML is malformed: "<" inside a tag');
    }
    if (q >= end) return last ? this.truncatedMarkup() : -1;
    if (c1 === SLASH) this.endTag(buf, pos + 2, q);
    else this.startTag(buf, pos + 1, q);
    this.countLines(buf, pos, q + 1);
    return q + 1;
  }

  private truncatedMarkup(): number {
    // The last piece ends inside a tag: the document is incomplete (finish() words it).
    this.ended = true;
    return -1;
  }

  private find2(buf: Uint8Array, from: number, end: number, a: number, b: number): number {
    let i = buf.indexOf(a, from);
    while (i >= 0 && i + 1 < end) {
      if (buf[i + 1] === b) return i;
      i = buf.indexOf(a, i + 1);
    }
    return -1;
  }

  private bang(buf: Uint8Array, pos: number, end: number, last: boolean): number {
    const startsWith = (s: string): boolean | null => {
      for (let i = 0; i < s.length; i++) {
        if (pos + i >= end) return null;
        if (buf[pos + i] !== s.charCodeAt(i)) return false;
      }
      return true;
    };
    const comment = startsWith('<!--');
    if (comment === null) return last ? this.truncatedMarkup() : -1;
    if (comment) {
      let i = buf.indexOf(45, pos + 4);
      while (i >= 0 && i + 2 < end && !(buf[i + 1] === 45 && buf[i + 2] === GT)) i = buf.indexOf(45, i + 1);
      if (i < 0 || i + 2 >= end) return last ? this.truncatedMarkup() : -1;
      this.countLines(buf, pos, i + 3);
      return i + 3;
    }
    const cdata = startsWith('<![CDATA[');
    if (cdata === null) return last ? this.truncatedMarkup() : -1;
    if (cdata) {
      let i = buf.indexOf(93, pos + 9);
      while (i >= 0 && i + 2 < end && !(buf[i + 1] === 93 && buf[i + 2] === GT)) i = buf.indexOf(93, i + 1);
      if (i < 0 || i + 2 >= end) return last ? this.truncatedMarkup() : -1;
      const depth = this.stack.length;
      if (depth === 0) throw this.fail('the XML is malformed: character data outside the root element');
      let blank = true;
      for (let j = pos + 9; j < i; j++) if (!isWs(buf[j]!)) blank = false;
      if (!blank) {
        if (this.content[depth - 1] === 1) throw this.fail(`unexpected text between the elements of <${this.stack[depth - 1]}>`);
        this.content[depth - 1] = 2;
      }
      if (this.collecting) {
        const n = i - (pos + 9);
        this.reserveText(n);
        this.textBuf.set(buf.subarray(pos + 9, i), this.textLen);
        this.textLen += n;
      }
      this.countLines(buf, pos, i + 3);
      return i + 3;
    }
    const doctype = startsWith('<!DOCTYPE');
    if (doctype === null) return last ? this.truncatedMarkup() : -1;
    if (doctype) throw this.fail(DOCTYPE_REFUSED);
    throw this.fail('the XML is malformed: an unknown "<!" construct');
  }

  private startTag(buf: Uint8Array, from: number, to: number): void {
    let selfClosing = false;
    let stop = to;
    if (buf[to - 1] === SLASH) {
      selfClosing = true;
      stop = to - 1;
    }
    if (from >= stop || !isNameStart(buf[from]!)) throw this.fail('the XML is malformed: a "<" that starts no element name');
    let p = from + 1;
    while (p < stop && isNameChar(buf[p]!)) p++;
    const name = this.name(buf, from, p);
    const attrs = readAttributes(buf, p, stop, name, this);
    const depth = this.stack.length;
    if (depth === 0) {
      if (this.rootClosed) throw this.fail('the XML is malformed: a second root element');
      this.sawRoot = true;
    } else {
      if (this.content[depth - 1] === 2)
        throw this.fail(`<${this.stack[depth - 1]}> holds both text and elements; the layout never mixes them (stray text in the file?)`);
      this.content[depth - 1] = 1;
    }
    if (depth >= MAX_XML_DEPTH)
      throw this.fail(`the XML nests elements more than ${MAX_XML_DEPTH} deep; this is not a layout Valleyscope reads`);
    this.stack.push(name);
    this.content.push(0);
    this.collecting = false;
    this.textLen = 0;
    const want = this.events.open(name, attrs, depth + 1);
    if (selfClosing) {
      this.events.close(name, depth + 1, want ? this.textBuf : null, 0);
      this.pop();
    } else this.collecting = want;
  }

  private endTag(buf: Uint8Array, from: number, to: number): void {
    let e = to;
    while (e > from && isWs(buf[e - 1]!)) e--;
    let p = from;
    while (p < e && isNameChar(buf[p]!)) p++;
    if (p !== e || p === from) throw this.fail('the XML is malformed: a closing tag without a proper name');
    const name = this.name(buf, from, e);
    const depth = this.stack.length;
    if (depth === 0) throw this.fail(`the XML is malformed: </${name}> closes nothing`);
    const open = this.stack[depth - 1]!;
    if (open !== name) throw this.fail(`the XML is malformed: </${name}> where </${open}> was expected`);
    this.events.close(name, depth, this.collecting ? this.textBuf : null, this.textLen);
    this.pop();
  }

  private pop(): void {
    this.stack.pop();
    this.content.pop();
    this.collecting = false;
    this.textLen = 0;
    if (this.stack.length === 0) this.rootClosed = true;
  }

  /**
   * The end of the input. A document still open means the file ended early: with `allowPartial` that is
   * reported as incomplete, otherwise as a ReaderError.
   */
  finish(allowPartial: boolean): { complete: boolean; endLine: number } {
    if (this.first && this.carryLength > 0) this.write(new Uint8Array(0), true);
    if (this.fed === 0) {
      throw this.failAtLine(0, this.sawBom ? 'the file holds only a byte-order mark' : 'the file is empty');
    }
    const depth = this.stack.length;
    if (depth > 0 || (this.ended && !this.rootClosed)) {
      if (allowPartial) return { complete: false, endLine: this.line };
      const open = depth > 0 ? this.stack[depth - 1]! : 'a tag';
      throw this.failAtLine(
        this.line,
        `the file ends inside <${open}> before the XML is complete (it is truncated, or the run is still writing it)`,
      );
    }
    if (this.ended) throw this.fail('the XML is malformed: the file ends inside a tag after the root element');
    if (!this.sawRoot) throw this.failAtLine(this.line, 'the XML is malformed: no root element');
    return { complete: true, endLine: this.line };
  }
}
