/**
 * Reading typed fields out of positioned JSON (jsonWithPositions.ts) for the annotations reader: every value
 * checked for its type and range, and every refusal a ReaderError at the line and column of the value, in a
 * sentence that says what was expected and what was found. Unknown members are kept as extra fields.
 */
import type { Vec3 } from '../model';
import { ReaderError } from '../errors';
import { emptyExtra, type ExtraFields, type JsonValue } from './annotationsModel';
import { positionOf, type JsonNode } from './jsonWithPositions';

export const ANNOTATIONS_FORMAT = 'valleyscope-annotations';

export type ObjNode = Extract<JsonNode, { type: 'object' }>;

export class Walker {
  constructor(
    private readonly text: string,
    private readonly file: string,
    readonly warnings: string[],
  ) {}

  error(at: number, reason: string): ReaderError {
    return new ReaderError(ANNOTATIONS_FORMAT, this.file, positionOf(this.text, at), reason);
  }

  obj(n: JsonNode, what: string): ObjNode {
    if (n.type !== 'object') throw this.error(n.at, `${what} must be an object ({ ... }), found ${typeName(n)}`);
    return n;
  }

  /** Known members by key, and everything else as extra fields. */
  fields(n: ObjNode, known: readonly string[]): { get: (key: string) => JsonNode | undefined; extra: ExtraFields } {
    const map = new Map<string, JsonNode>();
    const extra = emptyExtra();
    for (const m of n.members) {
      if (known.includes(m.key)) map.set(m.key, m.value);
      else extra[m.key] = plain(m.value);
    }
    return { get: (k) => map.get(k), extra };
  }

  str(n: JsonNode | undefined, what: string, fallback?: string): string {
    if (n === undefined || (n.type === 'null' && fallback !== undefined)) {
      if (fallback !== undefined) return fallback;
      throw this.missing(what);
    }
    if (n.type !== 'string') throw this.error(n.at, `${what} must be text in double quotes, found ${typeName(n)}`);
    return n.value;
  }

  strOrNull(n: JsonNode | undefined, what: string): string | null {
    if (n === undefined || n.type === 'null') return null;
    return this.str(n, what);
  }

  num(n: JsonNode | undefined, what: string, check?: (x: number) => boolean, rule?: string): number {
    if (n === undefined) throw this.missing(what);
    if (n.type !== 'number') throw this.error(n.at, `${what} must be a number, found ${typeName(n)}`);
    if (check && !check(n.value)) throw this.error(n.at, `${what} must be ${rule}, found ${n.value}`);
    return n.value;
  }

  numOrNull(n: JsonNode | undefined, what: string, check?: (x: number) => boolean, rule?: string): number | null {
    if (n === undefined || n.type === 'null') return null;
    return this.num(n, what, check, rule);
  }

  bool(n: JsonNode | undefined, what: string, fallback: boolean): boolean {
    if (n === undefined) return fallback;
    if (n.type !== 'boolean') throw this.error(n.at, `${what} must be true or false, found ${typeName(n)}`);
    return n.value;
  }

  list(n: JsonNode | undefined, what: string): JsonNode[] {
    if (n === undefined || n.type === 'null') return [];
    if (n.type !== 'array') throw this.error(n.at, `${what} must be a list ([ ... ]), found ${typeName(n)}`);
    return n.items;
  }

  strings(n: JsonNode | undefined, what: string): string[] {
    return this.list(n, what).map((x, i) => this.str(x, `${what}[${i}]`));
  }

  vec3(n: JsonNode | undefined, what: string): Vec3 {
    if (n === undefined) throw this.missing(what);
    const items = this.list(n, what);
    if (items.length !== 3) throw this.error(n.at, `${what} must be a list of three numbers, found ${items.length} values`);
    return items.map((x, i) => this.num(x, `${what}[${i}]`)) as Vec3;
  }

  private missing(what: string): ReaderError {
    const dot = what.lastIndexOf('.');
    const owner = dot > 0 ? what.slice(0, dot) : 'the file';
    return new ReaderError(ANNOTATIONS_FORMAT, this.file, { line: 0, column: 0 }, `${what} is missing (required in ${owner})`);
  }

  /** Like error(), but located at the object that lacks the field. */
  missingIn(n: ObjNode, what: string): ReaderError {
    return this.error(n.at, `${what} is missing`);
  }
}

export function typeName(n: JsonNode): string {
  switch (n.type) {
    case 'object':
      return 'an object';
    case 'array':
      return 'a list';
    case 'string':
      return `the text "${n.value.length > 40 ? n.value.slice(0, 40) + '…' : n.value}"`;
    case 'number':
      return `the number ${n.value}`;
    case 'boolean':
      return String(n.value);
    case 'null':
      return 'null';
  }
}

/** A node as a plain JSON value (objects without prototype, so any key is safe). */
export function plain(n: JsonNode): JsonValue {
  switch (n.type) {
    case 'object': {
      const o = emptyExtra();
      for (const m of n.members) o[m.key] = plain(m.value);
      return o;
    }
    case 'array':
      return n.items.map(plain);
    case 'string':
    case 'number':
    case 'boolean':
      return n.value;
    case 'null':
      return null;
  }
}

export const isWhole = (x: number): boolean => Number.isInteger(x);
export const positiveWhole = (x: number): boolean => Number.isInteger(x) && x >= 1;
export const nonNegative = (x: number): boolean => x >= 0;

export function need<T extends JsonNode | undefined>(w: Walker, o: ObjNode, n: T, what: string): NonNullable<T> {
  if (n === undefined) throw w.missingIn(o, what);
  return n;
}
