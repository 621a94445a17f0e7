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

export function rangeOf(startLine: number, startChar: number, endLine: number, endChar: number): Range {
  return { start: { line: startLine, character: startChar }, end: { line: endLine, character: endChar } };
}

export function spanRanges(a: Range, b: Range): Range {
  return { start: a.start, end: b.end };
}
