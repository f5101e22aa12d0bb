/**
 * The small pieces of XML markup the byte scanner reads: character classes, the predefined entities and
 * character references (no other entity is expanded: see xmlByteScanner.ts), and a start tag's attributes.
 */
import type { ReaderError } from '../errors';

const AMP = 38;

/** What attribute reading needs from the scanner: decoding in the document's encoding, errors at the tag. */
export interface MarkupContext {
  decode(buf: Uint8Array, start: number, end: number): string;
  fail(reason: string): ReaderError;
}

/** The first `c` in buf[from, to), or -1 (indexOf would search to the end of the buffer). */
export function indexIn(buf: Uint8Array, c: number, from: number, to: number): number {
  for (let i = from; i < to; i++) if (buf[i] === c) return i;
  return -1;
}

export function isWs(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9;
}
export function isNameStart(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95 || c === 58 || c >= 0x80;
}
export function isNameChar(c: number): boolean {
  return isNameStart(c) || (c >= 48 && c <= 57) || c === 45 || c === 46;
}

/** The code point an entity reference `&name;` stands for: the five predefined ones and character references; -1 otherwise. */
export function entityCodePoint(name: string): number {
  switch (name) {
    case 'lt':
      return 60;
    case 'gt':
      return 62;
    case 'amp':
      return 38;
    case 'quot':
      return 34;
    case 'apos':
      return 39;
    default: {
      const m = /^#(?:x([0-9a-fA-F]{1,6})|([0-9]{1,7}))$/.exec(name);
      if (!m) return -1;
      const v = m[1] ? parseInt(m[1], 16) : parseInt(m[2]!, 10);
      return v > 0 && v <= 0x10ffff ? v : -1;
    }
  }
}

export function undefinedEntity(name: string): string {
  return `the XML is malformed: undefined entity "&${name.slice(0, 12)};" (Valleyscope expands no entities beyond the five predefined ones)`;
}

function entityOrFail(name: string, sc: MarkupContext): number {
  const v = entityCodePoint(name);
  if (v < 0) throw sc.fail(undefinedEntity(name));
  return v;
}

/** The attributes of a start tag from buf[p, stop) (after its name), or null when it has none. */
export function readAttributes(buf: Uint8Array, p: number, stop: number, name: string, sc: MarkupContext): Record<string, string> | null {
  let attrs: Record<string, string> | null = null;
  for (;;) {
    let s = p;
    while (s < stop && isWs(buf[s]!)) s++;
    if (s >= stop) break;
    if (s === p) throw sc.fail(`the XML is malformed: no space before an attribute of <${name}>`);
    if (!isNameStart(buf[s]!)) throw sc.fail(`the XML is malformed: an attribute of <${name}> without a name`);
    let e = s + 1;
    while (e < stop && isNameChar(buf[e]!)) e++;
    const aname = sc.decode(buf, s, e);
    while (e < stop && isWs(buf[e]!)) e++;
    if (buf[e] !== 61 /* = */) throw sc.fail(`the XML is malformed: attribute "${aname}" of <${name}> has no value`);
    e++;
    while (e < stop && isWs(buf[e]!)) e++;
    const qc = buf[e];
    if (qc !== 34 && qc !== 39) throw sc.fail(`the XML is malformed: the value of attribute "${aname}" of <${name}> is not quoted`);
    const close = indexIn(buf, qc, e + 1, stop);
    if (close < 0) throw sc.fail(`the XML is malformed: the value of attribute "${aname}" of <${name}> is not closed`);
    attrs ??= {};
    if (Object.hasOwn(attrs, aname)) throw sc.fail(`the XML is malformed: attribute "${aname}" appears twice in <${name}>`);
    // A plain object: an attribute named like an Object.prototype member is kept as an own property;
    // "__proto__" is not a name any layout uses and is skipped.
    if (aname !== '__proto__') attrs[aname] = attributeValue(buf, e + 1, close, sc);
    p = close + 1;
  }
  return attrs;
}

function attributeValue(buf: Uint8Array, from: number, to: number, sc: MarkupContext): string {
  if (indexIn(buf, AMP, from, to) < 0) return sc.decode(buf, from, to);
  let s = '';
  for (let i = from; i < to; i++) {
    const c = buf[i]!;
    if (c !== AMP) {
      s += String.fromCharCode(c);
      continue;
    }
    const semi = indexIn(buf, 59, i, to);
    if (semi < 0 || semi - i > 12) throw sc.fail('the XML is malformed: a "&" that starts no entity reference');
    s += String.fromCodePoint(entityOrFail(sc.decode(buf, i + 1, semi), sc));
    i = semi;
  }
  return s;
}
