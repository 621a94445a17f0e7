// The elaboration stage's answer to an edit of `accept` directives alone (one put in, as the
// quick fix does, taken out or changed): the accepts decide only which findings are marked
// accepted, so the design stands with its other lines moved (splice `shiftedDesign`) and its
// accepts read again, as the elaborator reads them. Anything else in the edit (a statement, any
// other directive, a pin line, a parse finding that is not moved as it was) answers `undefined`.

import type { Diagnostic } from '../core/diagnostics';
import { startLineOf } from '../core/source';
import type { DirectiveLine, SyntaxFile } from '../syntax/tree';
import { sameDirectiveLine, sameStatement } from '../syntax/compare';
import type { Design } from './circuit';
import type { Deck } from './deck';
import { emptyDirectives, readDeckDirectives } from './directives';
import { oneChangedFile, shiftDiagnostics, shiftedDesign, shiftRanges, type LineShift } from './splice';

export interface AcceptEdit {
  design: Design;
  shift: LineShift;
  /** The new text's front-end findings: the old accept lines' taken out, the new ones' put in. */
  frontEnd: Diagnostic[];
}

export function acceptEdit(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[]): AcceptEdit | undefined {
  const isAccept = (d: DirectiveLine) => d.verb === 'accept';
  const edit = directiveLinesEdit(previousDeck, deck, isAccept);
  if (!edit) return undefined;
  const { x, shift } = edit;

  // the accepts read again, in the elaborator's order (the top level's, then each definition's)
  const into = emptyDirectives();
  const found: Diagnostic[] = [];
  readDeckDirectives(deck, into, found, isAccept);
  const shifted = shiftedDesign(previous, shift);
  const design: Design = { ...shifted, directives: { ...shifted.directives, accepts: into.accepts } };
  // the old accept lines' findings (a malformed accept) give way to the new lines'
  const oldAcceptLines = new Set(x.directives.filter(isAccept).map((l) => l.range.start.line));
  const kept = previousFrontEnd.filter((f) => !(f.rule === 'directive' && f.file === x.file && oldAcceptLines.has(f.range.start.line)));
  return { design, shift, frontEnd: [...shiftDiagnostics(kept, shift), ...found] };
}

/**
 * When two parses differ in one file, and there only in directive lines that `changing` picks
 * (put in, taken out or changed), with every statement, other directive, pin line and finding
 * the same and moved by the edit's line count after it: the two files and the shift. Undefined
 * for any other edit, or one with no such directive on either side.
 */
export function directiveLinesEdit(previousDeck: Deck, deck: Deck, changing: (d: DirectiveLine) => boolean): { x: SyntaxFile; y: SyntaxFile; shift: LineShift } | undefined {
  const changed = oneChangedFile(previousDeck.files, deck.files);
  if (!changed) return undefined;
  const [x, y] = changed;
  // none of them on either side: not this kind of edit
  if (!x.directives.some(changing) && !y.directives.some(changing)) return undefined;
  return movedLines(previousDeck, deck, x, y, changing);
}

/**
 * When two parses differ in one file, and there only in layout at one place (comment or blank
 * lines put in or taken out, white space): every statement, directive, pin line and finding the
 * same, those after it moved by the edit's line count. The two files and the shift; undefined
 * for any other edit.
 */
export function layoutEdit(previousDeck: Deck, deck: Deck): { x: SyntaxFile; y: SyntaxFile; shift: LineShift } | undefined {
  const changed = oneChangedFile(previousDeck.files, deck.files);
  return changed && movedLines(previousDeck, deck, changed[0], changed[1], () => false);
}

/** directiveLinesEdit's check, for the directives `changing` picks in a changed file x -> y. */
function movedLines(previousDeck: Deck, deck: Deck, x: SyntaxFile, y: SyntaxFile, changing: (d: DirectiveLine) => boolean): { x: SyntaxFile; y: SyntaxFile; shift: LineShift } | undefined {
  if (x.statements.length !== y.statements.length || x.pinInfos.length !== y.pinInfos.length) return undefined;
  const xd = x.directives.filter((d) => !changing(d));
  const yd = y.directives.filter((d) => !changing(d));
  if (xd.length !== yd.length) return undefined;
  const d = y.lineCount - x.lineCount;
  // every other line moves by 0 before the edit and by d after it: pairs of (old line, moved by)
  const pairs: Array<[number, number]> = [];
  for (let k = 0; k < x.statements.length; k++) {
    const u = x.statements[k]!;
    const v = y.statements[k]!;
    const by = startLineOf(v.range) - startLineOf(u.range);
    if (u !== v && !sameStatement(u, v, by)) return undefined;
    pairs.push([startLineOf(u.range), by]);
  }
  for (let k = 0; k < xd.length; k++) {
    const u = xd[k]!;
    const v = yd[k]!;
    const by = v.range.start.line - u.range.start.line;
    if (u.statementIndex !== v.statementIndex || !sameDirectiveLine(u, v, by)) return undefined;
    pairs.push([u.range.start.line, by]);
  }
  for (let k = 0; k < x.pinInfos.length; k++) {
    const u = x.pinInfos[k]!;
    const v = y.pinInfos[k]!;
    const by = v.range.start.line - u.range.start.line;
    if (u.statementIndex !== v.statementIndex || JSON.stringify(shiftRanges(u, { file: '', fromLine: 0, lines: by })) !== JSON.stringify(v)) return undefined;
    pairs.push([u.range.start.line, by]);
  }
  let fromLine = Infinity;
  for (const [line, by] of pairs) if (by !== 0 && line < fromLine) fromLine = line;
  for (const [line, by] of pairs) if (by !== (line >= fromLine ? d : 0)) return undefined;
  if (fromLine === Infinity && d !== 0) fromLine = x.lineCount;
  const shift: LineShift = { file: x.file, fromLine, lines: d };
  if (JSON.stringify(shiftDiagnostics(x.diagnostics, shift)) !== JSON.stringify(y.diagnostics)) return undefined;
  if (JSON.stringify(shiftDiagnostics(previousDeck.diagnostics, shift)) !== JSON.stringify(deck.diagnostics)) return undefined;
  return { x, y, shift };
}
