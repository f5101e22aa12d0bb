/**
 * A strict JSON (RFC 8259) parser that remembers where every value starts, so a reader of a hand-edited
 * file can say "line 12, column 7: band must be a whole number". It also refuses what JSON.parse would let
 * through silently in a reviewed file: a key written twice (the first value would be lost), and
 * version-control conflict markers. Nesting is bounded, so a hostile file cannot exhaust the stack.
 */

export interface JsonPosition {
  /** 1-based line. */
  line: number;
  /** 1-based column (UTF-16 code units). */
  column: number;
}

export type JsonNode =
  | { type: 'object'; at: number; members: { key: string; keyAt: number; value: JsonNode }[] }
  | { type: 'array'; at: number; items: JsonNode[] }
  | { type: 'string'; at: number; value: string }
  | { type: 'number'; at: number; value: number }
  | { type: 'boolean'; at: number; value: boolean }
  | { type: 'null'; at: number };

/** A syntax error at a character offset; the caller turns it into a ReaderError with line and column. */
export class JsonSyntaxError extends Error {
  constructor(
    readonly offset: number,
    readonly reason: string,
  ) {
    super(reason);
    this.name = 'JsonSyntaxError';
  }
}

export const MAX_JSON_DEPTH = 64;

/** Line and column of a character offset. */
export function positionOf(text: string, offset: number): JsonPosition {
  let line = 1;
  let lineStart = 0;
  const end = Math.min(offset, text.length);
  for (let i = 0; i < end; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) {
      line++;
      lineStart = i + 1;
    } else if (c === 13 && text.charCodeAt(i + 1) !== 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: end - lineStart + 1 };
}

const CONFLICT = /^(<{7}|={7}|>{7})(\s|$)/m;

/** A key as it can be quoted in one line (control characters written as escapes, long keys cut). */
function shownKey(key: string): string {
  const q = JSON.stringify(key).slice(1, -1);
  return q.length > 60 ? `${q.slice(0, 57)}...` : q;
}

function describeChar(text: string, i: number): string {
  if (i >= text.length) return 'the end of the file';
  const c = text.codePointAt(i)!;
  if (c < 0x20 || c === 0x7f) return `a control character (code ${c})`;
  return `"${String.fromCodePoint(c)}"`;
}

export function parseJsonWithPositions(text: string): JsonNode {
  const conflict = CONFLICT.exec(text);
  if (conflict) {
    throw new JsonSyntaxError(conflict.index, 'the file holds version-control conflict markers; resolve the conflict first');
  }
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;

  const ws = (): void => {
    for (;;) {
      const c = text.charCodeAt(i);
      if (c === 0x20 || c === 0x0a || c === 0x0d || c === 0x09) i++;
      else return;
    }
  };
  const fail = (reason: string, at = i): never => {
    throw new JsonSyntaxError(at, reason);
  };

  const parseString = (): string => {
    const start = i;
    i++; // opening quote
    let out = '';
    let chunk = i;
    for (;;) {
      if (i >= text.length) fail('a text value (in double quotes) is not closed before the end of the file', start);
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        out += text.slice(chunk, i);
        i++;
        return out;
      }
      if (c < 0x20) fail(`${describeChar(text, i)} inside a text value must be written as an escape (e.g. \\n)`);
      if (c === 0x5c) {
        out += text.slice(chunk, i);
        const e = text[i + 1];
        switch (e) {
          case '"':
            out += '"';
            break;
          case '\\':
            out += '\\';
            break;
          case '/':
            out += '/';
            break;
          case 'b':
            out += '\b';
            break;
          case 'f':
            out += '\f';
            break;
          case 'n':
            out += '\n';
            break;
          case 'r':
            out += '\r';
            break;
          case 't':
            out += '\t';
            break;
          case 'u': {
            const hex = text.slice(i + 2, i + 6);
            if (!/^[0-9a-fA-F]{4}$/.test(hex)) fail('"\\u" must be followed by four hexadecimal digits');
            out += String.fromCharCode(parseInt(hex, 16));
            i += 4;
            break;
          }
          default:
            fail(`a backslash followed by ${describeChar(text, i + 1)} is not a JSON escape`);
        }
        i += 2;
        chunk = i;
        continue;
      }
      i++;
    }
  };

  const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  const parseNumber = (): number => {
    NUMBER.lastIndex = i;
    const m = NUMBER.exec(text);
    if (!m || m[0].length === 0 || m[0] === '-') fail(`expected a number, found ${describeChar(text, i)}`);
    const next = text.charCodeAt(i + m![0].length);
    // "01", "1.", ".5", "1e" and the like: the number is followed by something a JSON number cannot hold.
    if ((next >= 0x30 && next <= 0x39) || next === 0x2e || next === 0x65 || next === 0x45) {
      fail(`"${text.slice(i, i + m![0].length + 1)}" is not a valid JSON number`);
    }
    const v = Number(m![0]);
    if (!Number.isFinite(v)) fail(`the number ${m![0]} is too large`);
    i += m![0].length;
    return v;
  };

  const parseValue = (depth: number): JsonNode => {
    if (depth > MAX_JSON_DEPTH) fail(`values are nested more than ${MAX_JSON_DEPTH} levels deep`);
    ws();
    const at = i;
    const c = text[i];
    if (c === '{') {
      i++;
      const members: { key: string; keyAt: number; value: JsonNode }[] = [];
      const seen = new Set<string>();
      ws();
      if (text[i] === '}') {
        i++;
        return { type: 'object', at, members };
      }
      for (;;) {
        ws();
        if (text[i] !== '"') fail(`expected a key in double quotes, found ${describeChar(text, i)}`);
        const keyAt = i;
        const key = parseString();
        if (seen.has(key)) fail(`the key "${shownKey(key)}" appears twice in the same object`, keyAt);
        seen.add(key);
        ws();
        if (text[i] !== ':') fail(`expected ":" after the key "${shownKey(key)}", found ${describeChar(text, i)}`);
        i++;
        const value = parseValue(depth + 1);
        members.push({ key, keyAt, value });
        ws();
        if (text[i] === ',') {
          i++;
          ws();
          if (text[i] === '}') fail('a comma before "}" (JSON allows no trailing comma)');
          continue;
        }
        if (text[i] === '}') {
          i++;
          return { type: 'object', at, members };
        }
        fail(`expected "," or "}" after the value of "${shownKey(key)}", found ${describeChar(text, i)}`);
      }
    }
    if (c === '[') {
      i++;
      const items: JsonNode[] = [];
      ws();
      if (text[i] === ']') {
        i++;
        return { type: 'array', at, items };
      }
      for (;;) {
        items.push(parseValue(depth + 1));
        ws();
        if (text[i] === ',') {
          i++;
          ws();
          if (text[i] === ']') fail('a comma before "]" (JSON allows no trailing comma)');
          continue;
        }
        if (text[i] === ']') {
          i++;
          return { type: 'array', at, items };
        }
        fail(`expected "," or "]" in a list, found ${describeChar(text, i)}`);
      }
    }
    if (c === '"') return { type: 'string', at, value: parseString() };
    if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) return { type: 'number', at, value: parseNumber() };
    if (text.startsWith('true', i)) {
      i += 4;
      return { type: 'boolean', at, value: true };
    }
    if (text.startsWith('false', i)) {
      i += 5;
      return { type: 'boolean', at, value: false };
    }
    if (text.startsWith('null', i)) {
      i += 4;
      return { type: 'null', at };
    }
    if (i >= text.length) return fail(depth === 0 ? 'the file is empty' : 'the file ends in the middle of a value (it is truncated)');
    return fail(`expected a value, found ${describeChar(text, i)}`);
  };

  const root = parseValue(0);
  ws();
  if (i < text.length) fail(`unexpected ${describeChar(text, i)} after the end of the JSON value`);
  return root;
}
