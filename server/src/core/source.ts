// Source positions shared by every stage. Lines and characters are 0-based and characters count
// UTF-16 code units, as the Language Server Protocol does, so the server passes them through.

export interface Position {
  line: number;
  character: number;
}

export interface Range {
  start: Position;
  end: Position;
}

/** A place in a named file (the path as the host gave it). */
export interface Location {
  file: string;
  range: Range;
}

/**
 * A range stored as four numbers: one object instead of three, which matters for syntax trees of
 * 100k-line netlists. `start` and `end` are built on access; `toJSON` keeps the wire shape.
 */
export class Span implements Range {
  constructor(
    readonly startLine: number,
    readonly startChar: number,
    readonly endLine: number,
    readonly endChar: number,
  ) {}
  get start(): Position {
    return { line: this.startLine, character: this.startChar };
  }
  get end(): Position {
    return { line: this.endLine, character: this.endChar };
  }
  toJSON(): { start: Position; end: Position } {
    return { start: this.start, end: this.end };
  }
}

/** A range's first line, read without building a position object when it is a `Span`. */
export function startLineOf(r: Range): number {
  return r instanceof Span ? r.startLine : r.start.line;
}

export function rangeOf(startLine: number, startChar: number, endLine: number, endChar: number): Range {
  return new Span(startLine, startChar, endLine, endChar);
}

export function spanRanges(a: Range, b: Range): Range {
  const s = a.start;
  const e = b.end;
  return new Span(s.line, s.character, e.line, e.character);
}
