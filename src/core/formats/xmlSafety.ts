/**
 * Streaming XML for the XML readers (vasprun.xml, the pw.x data file), with the safety rules every one of
 * them needs: no document type declaration (so no external entities and no entity expansion), bounded
 * nesting depth, errors as ReaderError with the line and column, a file that ends early told apart from a
 * malformed one. The bytes are decoded and parsed in chunks, so no whole-file string is ever built.
 */
import { SaxesParser, type SaxesTagPlain } from 'saxes';
import { CancelledError, ReaderError } from '../errors';
import type { InputFile } from '../io/fileAccessor';
import type { ReadOptions } from './types';
import { parseDecimal } from './numbers';

/** The sentence for a document type declaration, which every XML reader refuses. */
export const DOCTYPE_REFUSED =
  'the XML declares a document type (<!DOCTYPE ...>); Valleyscope refuses it, because document type declarations can pull in external files or expand entities without bound, and the codes it reads never write one';

/** Deeper nesting than this is refused: no electronic-structure XML layout comes close. */
export const MAX_XML_DEPTH = 64;
/** Bytes decoded and fed to the parser at a time. */
const CHUNK_BYTES = 1 << 16;

export interface XmlEvents {
  /** An element opens; `path` holds the names of the open elements, root first, this one last. */
  open(name: string, attributes: Record<string, string>, path: readonly string[], line: number): void;
  /** Character data inside the innermost open element (may arrive in several pieces). */
  text?: (text: string, path: readonly string[]) => void;
  /** An element closes; `path` still includes it. `line` is the line of the closing tag. */
  close(name: string, path: readonly string[], line: number): void;
}

export interface XmlOutcome {
  /** False when the file ended before the document was complete (only with options.allowPartial). */
  complete: boolean;
  /** Where the document stopped, for messages about partial files. */
  endLine: number;
}

/** The character encoding an XML declaration names, for decoding. Unknown names fall back to UTF-8. */
function declaredEncoding(bytes: Uint8Array): string {
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(bytes.length, 200)));
  const m = /^\uFEFF?<\?xml[^>]*encoding\s*=\s*["']([A-Za-z0-9._-]+)["']/.exec(head);
  const enc = m ? m[1]!.toLowerCase() : 'utf-8';
  if (enc === 'iso-8859-1' || enc === 'latin1' || enc === 'iso8859-1' || enc === 'us-ascii' || enc === 'ascii') return 'latin1';
  return 'utf-8';
}

/**
 * A streaming XML parse: feed bytes in pieces with `write`, then `finish`. Throws ReaderError (never
 * anything else for bad input) with the file, line and column.
 */
export class SafeXmlStream {
  private readonly parser: SaxesParser<{ position: true; fileName: string; xmlns: false }>;
  private readonly path: string[] = [];
  /** Per open element: 1 when it has child elements, 2 when it has non-blank text (the layouts never mix them). */
  private readonly content: number[] = [];
  private decoder: TextDecoder | null = null;
  private fedBytes = 0;
  private sawBom = false;

  constructor(
    private readonly fileName: string,
    private readonly format: string,
    events: XmlEvents,
  ) {
    const parser = new SaxesParser({ position: true, fileName, xmlns: false });
    this.parser = parser;
    const path = this.path;
    parser.on('doctype', () => {
      throw this.fail(DOCTYPE_REFUSED);
    });
    parser.on('error', (err: Error) => {
      throw this.fail(`the XML is malformed: ${plainSaxesMessage(err.message)}`);
    });
    parser.on('opentag', (tag: SaxesTagPlain) => {
      if (path.length >= MAX_XML_DEPTH)
        throw this.fail(`the XML nests elements more than ${MAX_XML_DEPTH} deep; this is not a layout Valleyscope reads`);
      const n = this.content.length;
      if (n > 0) {
        if (this.content[n - 1] === 2)
          throw this.fail(`<${path[n - 1]}> holds both text and elements; the layout never mixes them (stray text in the file?)`);
        this.content[n - 1] = 1;
      }
      this.content.push(0);
      path.push(tag.name);
      events.open(tag.name, tag.attributes, path, parser.line);
    });
    parser.on('closetag', (tag: SaxesTagPlain) => {
      events.close(tag.name, path, parser.line);
      path.pop();
      this.content.pop();
    });
    const onText = events.text;
    parser.on('text', (t: string) => {
      const n = this.content.length;
      if (n === 0) {
        if (/\S/.test(t)) throw this.fail('text outside the root element');
        return;
      }
      if (this.content[n - 1] !== 2 && /\S/.test(t)) {
        if (this.content[n - 1] === 1) {
          const shown = t.trim().slice(0, 20);
          throw this.fail(`unexpected text "${shown}${t.trim().length > 20 ? '…' : ''}" between the elements of <${path[n - 1]}>`);
        }
        this.content[n - 1] = 2;
      }
      onText?.(t, path);
    });
    if (onText) {
      parser.on('cdata', (t: string) => {
        if (path.length > 0) onText(t, path);
      });
    }
  }

  /** An error at the parser's current position. */
  fail(reason: string): ReaderError {
    return new ReaderError(this.format, this.fileName, { line: this.parser.line, column: this.parser.column + 1 }, reason);
  }

  get line(): number {
    return this.parser.line;
  }

  /** Feed the next piece of the file. `last` marks the final piece (so a split character is flushed). */
  write(bytes: Uint8Array, last = false): void {
    let b = bytes;
    if (this.decoder === null) {
      this.decoder = new TextDecoder(declaredEncoding(bytes), { fatal: false });
      if (b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf) {
        b = b.subarray(3);
        this.sawBom = true;
      }
    }
    this.fedBytes += b.length;
    const text = this.decoder.decode(b, { stream: !last });
    if (text.length > 0) this.parser.write(text);
  }

  /**
   * The end of the input. A document still open means the file ended early: with `allowPartial` that is
   * reported as incomplete, otherwise as a ReaderError.
   */
  finish(allowPartial: boolean): XmlOutcome {
    if (this.fedBytes === 0) {
      throw new ReaderError(
        this.format,
        this.fileName,
        { line: 0, column: 0 },
        this.sawBom ? 'the file holds only a byte-order mark' : 'the file is empty',
      );
    }
    if (this.decoder) {
      const tail = this.decoder.decode();
      if (tail.length > 0) this.parser.write(tail);
    }
    const path = this.path;
    if (path.length > 0) {
      const open = path[path.length - 1]!;
      const endLine = this.parser.line;
      if (allowPartial) return { complete: false, endLine };
      throw new ReaderError(
        this.format,
        this.fileName,
        { line: endLine, column: 0 },
        `the file ends inside <${open}> before the XML is complete (it is truncated, or the run is still writing it)`,
      );
    }
    try {
      this.parser.close();
    } catch (e) {
      if (e instanceof ReaderError) throw e;
      throw this.fail('the XML is malformed');
    }
    return { complete: true, endLine: this.parser.line };
  }
}

/**
 * Parse a whole file as XML, calling `events`, in chunks (no whole-file string). Throws ReaderError for bad
 * input, CancelledError when options.isCancelled says so.
 */
export function parseXmlSafely(file: InputFile, format: string, events: XmlEvents, options: ReadOptions = {}): XmlOutcome {
  const stream = new SafeXmlStream(file.path, format, events);
  const bytes = file.bytes;
  let start = 0;
  if (bytes.length === 0) return stream.finish(false);
  while (start < bytes.length) {
    if (options.isCancelled?.()) throw new CancelledError();
    const end = Math.min(bytes.length, start + CHUNK_BYTES);
    stream.write(bytes.subarray(start, end), end >= bytes.length);
    start = end;
    options.onProgress?.(start / bytes.length);
  }
  return stream.finish(options.allowPartial ?? false);
}

/** saxes messages start with "file:line:col: "; keep only the description. */
function plainSaxesMessage(m: string): string {
  return m.replace(/^.*?:\d+:\d+:\s*/, '');
}

/** The value of an attribute as a number, or null when absent or not a finite number. */
export function numberAttribute(attributes: Record<string, string>, name: string): number | null {
  const v = attributes[name];
  if (v === undefined) return null;
  const x = parseDecimal(v.trim());
  return x;
}
