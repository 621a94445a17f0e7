// Findings carried over an edit that changes no meaning: comments, blank lines, white space at
// line ends, lines moved up or down by such edits. When every file of the new deck says exactly
// what the old one said (the same statements, directives and pin lines, word for word and laid
// out the same within each one), the analysis is the same up to where things are written, so
// the previous findings are moved to their new lines instead of waiting for a re-analysis.
// Anything else (a changed word, a line that cannot be placed) answers `undefined`.

import type { Diagnostic, RelatedInfo } from '../core/diagnostics';
import { rangeOf, type Range } from '../core/source';
import type { Deck } from '../circuit/deck';
import type { SyntaxFile } from '../syntax/tree';
import { sameDirectiveLine, samePinLine, sameRange, sameStatement } from '../syntax/compare';
import { sharedRuns } from '../syntax/parser';

/** Old first line -> line shift, for every meaningful line of one file. */
interface LineMap {
  /** Sorted by old start line: [oldStart, oldEnd, shift]. */
  spans: Array<[number, number, number]>;
}

export function carryOver(previous: { deck: Deck; diagnostics: Diagnostic[] }, deck: Deck): Diagnostic[] | undefined {
  const maps = new Map<string, LineMap>();
  const before = previous.deck.files;
  const after = deck.files;
  if (before.length !== after.length) return undefined;
  for (let i = 0; i < before.length; i++) {
    const m = fileMap(before[i]!, after[i]!);
    if (!m) return undefined;
    maps.set(before[i]!.file, m);
  }
  // messages that quote a line number would go stale
  if (previous.diagnostics.some((d) => d.rule === 'duplicate-definition')) return undefined;
  const moveRange = (file: string, r: Range): Range | undefined => {
    const m = maps.get(file);
    if (!m) return undefined;
    const shift = shiftAt(m, r.start.line);
    if (shift === undefined) return undefined;
    return shift === 0 ? r : rangeOf(r.start.line + shift, r.start.character, r.end.line + shift, r.end.character);
  };
  const out: Diagnostic[] = [];
  for (const d of previous.diagnostics) {
    const range = moveRange(d.file, d.range);
    if (!range) return undefined;
    const moved: Diagnostic = { ...d, range };
    if (d.related) {
      const related: RelatedInfo[] = [];
      for (const r of d.related) {
        const rr = moveRange(r.file, r.range);
        if (!rr) return undefined;
        related.push({ ...r, range: rr });
      }
      moved.related = related;
    }
    if (d.accepted) {
      const ar = moveRange(d.accepted.file, d.accepted.range);
      if (!ar) return undefined;
      moved.accepted = { ...d.accepted, range: ar };
    }
    out.push(moved);
  }
  return out;
}

function shiftAt(m: LineMap, line: number): number | undefined {
  // the title and file-wide notes sit on line 0, which never moves
  if (line === 0) return 0;
  let lo = 0;
  let hi = m.spans.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const [s, e, shift] = m.spans[mid]!;
    if (line < s) hi = mid - 1;
    else if (line > e) lo = mid + 1;
    else return shift;
  }
  return undefined;
}

/** The line shifts from `a` to `b`, or undefined when they differ in anything but layout between lines. */
function fileMap(a: SyntaxFile, b: SyntaxFile): LineMap | undefined {
  if (a.file !== b.file || a.title !== b.title) return undefined;
  if (a.statements.length !== b.statements.length || a.directives.length !== b.directives.length || a.pinInfos.length !== b.pinInfos.length || a.diagnostics.length !== b.diagnostics.length) return undefined;
  const spans: Array<[number, number, number]> = [];
  // chunks both parses read from the same text: every line in them moved alike, unread
  const runs = sharedRuns(a, b).filter((r) => r.aFirst === r.bFirst);
  let run = 0;
  for (let i = 0; i < a.statements.length; i++) {
    const r = runs[run];
    if (r && r.aFirst === i) {
      run++;
      spans.push([r.fromLine, r.toLine, r.shift]);
      i += r.count - 1;
      continue;
    }
    const x = a.statements[i]!;
    const y = b.statements[i]!;
    // (a statement one parse took from the other, as it was or moved, is known without its words)
    const shift = y.range.start.line - x.range.start.line;
    if (!sameStatement(x, y, shift)) return undefined;
    spans.push([x.range.start.line, x.range.end.line, shift]);
  }
  // chunks and statements come in file order, so the spans are sorted by their first line
  const m: LineMap = { spans };
  // special comments: inside a shared chunk's span they moved with it; elsewhere their own spans
  const others: Array<[number, number, number]> = [];
  const place = (x: { range: Range }, shift: number): boolean => {
    const known = shiftAt(m, x.range.start.line);
    if (known === undefined) others.push([x.range.start.line, x.range.end.line, shift]);
    return known === undefined || known === shift;
  };
  for (let i = 0; i < a.directives.length; i++) {
    const x = a.directives[i]!;
    const y = b.directives[i]!;
    const shift = y.range.start.line - x.range.start.line;
    if (x.statementIndex !== y.statementIndex || !sameDirectiveLine(x, y, shift)) return undefined;
    if (!place(x, shift)) return undefined;
  }
  for (let i = 0; i < a.pinInfos.length; i++) {
    const x = a.pinInfos[i]!;
    const y = b.pinInfos[i]!;
    const shift = y.range.start.line - x.range.start.line;
    if (x.statementIndex !== y.statementIndex || !samePinLine(x, y, shift)) return undefined;
    if (!place(x, shift)) return undefined;
  }
  if (others.length) {
    spans.push(...others);
    spans.sort((p, q) => p[0] - q[0]);
  }
  // the parser's own findings (broken lines) must be the same ones, moved like their lines
  for (let i = 0; i < a.diagnostics.length; i++) {
    const x = a.diagnostics[i]!;
    const y = b.diagnostics[i]!;
    if (x.rule !== y.rule || x.message !== y.message) return undefined;
    const shift = y.range.start.line - x.range.start.line;
    if (!sameRange(x.range, y.range, shift)) return undefined;
    if (shiftAt(m, x.range.start.line) === undefined) insertSpan(spans, x.range.start.line, x.range.end.line, shift);
    else if (shiftAt(m, x.range.start.line) !== shift) return undefined;
  }
  return m;
}

function insertSpan(spans: Array<[number, number, number]>, s: number, e: number, shift: number): void {
  let i = 0;
  while (i < spans.length && spans[i]![0] < s) i++;
  spans.splice(i, 0, [s, e, shift]);
}
