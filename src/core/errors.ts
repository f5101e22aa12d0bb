/**
 * Typed errors. A reader error always says which file, where, and what is wrong in a sentence a physicist
 * understands. Nothing here prints a stack trace: callers show `message`.
 */

export interface SourcePosition {
  /** 1-based line number, or 0 when the error is about the whole file. */
  line: number;
  /** 1-based column, or 0 when unknown. */
  column: number;
}

export class ValleyscopeError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ValleyscopeError';
  }
}

/** An input file that cannot be read as the layout it claims to be. */
export class ReaderError extends ValleyscopeError {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  readonly format: string;
  /** The sentence without the location prefix. */
  readonly reason: string;

  constructor(format: string, file: string, pos: SourcePosition, reason: string) {
    const where = pos.line > 0 ? `${file}:${pos.line}${pos.column > 0 ? `:${pos.column}` : ''}` : file;
    super(`${where}: ${reason}`);
    this.name = 'ReaderError';
    this.format = format;
    this.file = file;
    this.line = pos.line;
    this.column = pos.column;
    this.reason = reason;
  }
}

/** Analysis asked of data that cannot support it (e.g. masses in m_e without a lattice). */
export class AnalysisError extends ValleyscopeError {
  constructor(message: string) {
    super(message);
    this.name = 'AnalysisError';
  }
}

/** Work stopped because the user cancelled it. */
export class CancelledError extends ValleyscopeError {
  constructor() {
    super('Cancelled.');
    this.name = 'CancelledError';
  }
}

export function isValleyscopeError(e: unknown): e is ValleyscopeError {
  return e instanceof ValleyscopeError;
}
