// The elaboration stage's answer to a line being typed: an element line the elaborator leaves
// out (too few nodes, no model yet, not an element name) or a line the parser cannot read yet,
// put in, changed or taken out at one place. Such a line adds no element and no net name, so
// the design stands (moved by the edit's line count after it); only the front end's findings on
// the edited lines change: the parser's, and the elaborator's for the lines it leaves out, said
// as the elaborator says them (`skippedLineFindings`) where it reads the line at all. Anything
// else in the edit answers `undefined` and goes to the other paths.

import type { Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import { startLineOf } from '../core/source';
import type { Statement, SyntaxFile } from '../syntax/tree';
import { sameRange, sameStatement } from '../syntax/compare';
import type { Design } from './circuit';
import type { Deck } from './deck';
import { elementNodeWords, skippedLineFindings, topIsElaborated } from './elaborate';
import { oneChangedFile, shiftDiagnostics, type LineShift } from './splice';

export interface InertEdit {
  shift: LineShift;
  /**
   * The new text's front-end findings: the rest moved, then those on the edited lines said
   * again (a fresh elaboration lists them elsewhere; sorted by place, as a result's findings
   * are, the two are the same: nothing else stands on those lines).
   */
  frontEnd: Diagnostic[];
}

/** An element line the elaborator leaves out: it makes no element and names no net. */
function leftOut(st: Statement): boolean {
  return !st.head.text.startsWith('.') && elementNodeWords(st).skipped !== undefined;
}

export function inertEdit(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[], options: EngineOptions = {}): InertEdit | undefined {
  if (options.top || previous.circuits.length === 0) return undefined;
  const changed = oneChangedFile(previousDeck.files, deck.files);
  if (!changed) return undefined;
  const [x, y] = changed;
  const xs = x.statements;
  const ys = y.statements;
  const d = y.lineCount - x.lineCount;
  let p = 0;
  while (p < xs.length && p < ys.length && (xs[p] === ys[p] || sameStatement(xs[p]!, ys[p]!, 0))) p++;
  let s = 0;
  while (s < xs.length - p && s < ys.length - p && sameStatement(xs[xs.length - 1 - s]!, ys[ys.length - 1 - s]!, d)) s++;
  const removed = xs.slice(p, xs.length - s);
  const added = ys.slice(p, ys.length - s);
  if (!removed.every(leftOut) || !added.every(leftOut)) return undefined;
  // the edited lines: between the statements kept before and after (line 0, which holds the
  // title and file-wide notes, never among them)
  const from = p > 0 ? xs[p - 1]!.range.end.line + 1 : x.title !== undefined ? 1 : 0;
  if (from === 0) return undefined;
  const oldEnd = s > 0 ? startLineOf(xs[xs.length - s]!.range) : x.lineCount;
  const newEnd = s > 0 ? startLineOf(ys[ys.length - s]!.range) : y.lineCount;
  if (newEnd - oldEnd !== d || oldEnd < from) return undefined;
  const inOld = (f: string, line: number) => f === x.file && line >= from && line < oldEnd;
  const inNew = (f: string, line: number) => f === x.file && line >= from && line < newEnd;
  // directives and pin lines: none among the edited lines, each the same and moved like its side
  if (!sameSpecialLines(x, y, from, oldEnd, d, p, s)) return undefined;
  const shift: LineShift = { file: x.file, fromLine: oldEnd, lines: d };
  // every other parser and include finding the same, moved with its line
  const keptParse = previousDeck.diagnostics.filter((f) => !inOld(f.file, f.range.start.line));
  const newParse = deck.diagnostics.filter((f) => inNew(f.file, f.range.start.line));
  const otherParse = deck.diagnostics.filter((f) => !inNew(f.file, f.range.start.line));
  if (JSON.stringify(shiftDiagnostics(keptParse, shift)) !== JSON.stringify(otherParse)) return undefined;
  // the lines the elaborator reads (a definition it builds, the top level when it has one) say
  // their findings; it must read the same scopes as before (a line at the top level can make it
  // a circuit of its own)
  if (topIsElaborated(previousDeck, options) !== topIsElaborated(deck, options)) return undefined;
  const built = builtScopes(previous);
  const said: Diagnostic[] = [];
  for (const st of added) {
    const scope = scopeOf(deck, st);
    if (scope === undefined) return undefined;
    const read = scope === null ? topIsElaborated(deck, options) : built.has(scope);
    if (read) said.push(...skippedLineFindings(x.file, st));
  }
  const kept = previousFrontEnd.filter((f) => !inOld(f.file, f.range.start.line));
  return { shift, frontEnd: [...shiftDiagnostics(kept, shift), ...newParse, ...said] };
}

/**
 * Directives and pin lines the same in both parses, none on the edited lines [from, oldEnd),
 * each before them in place and each after them moved by `d`.
 */
function sameSpecialLines(x: SyntaxFile, y: SyntaxFile, from: number, oldEnd: number, d: number, p: number, s: number): boolean {
  if (x.directives.length !== y.directives.length || x.pinInfos.length !== y.pinInfos.length) return false;
  const placed = (si: number, sj: number) => (si <= p && sj === si) || (si >= x.statements.length - s && sj === si + y.statements.length - x.statements.length);
  const by = (line: number) => (line < from ? 0 : line >= oldEnd ? d : undefined);
  for (let i = 0; i < x.directives.length; i++) {
    const u = x.directives[i]!;
    const v = y.directives[i]!;
    const k = by(u.range.start.line);
    if (k === undefined || u.verb !== v.verb || u.args.length !== v.args.length || !placed(u.statementIndex, v.statementIndex) || !sameRange(u.range, v.range, k)) return false;
    for (let j = 0; j < u.args.length; j++) if (u.args[j]!.text !== v.args[j]!.text || !sameRange(u.args[j]!.range, v.args[j]!.range, k)) return false;
  }
  for (let i = 0; i < x.pinInfos.length; i++) {
    const u = x.pinInfos[i]!;
    const v = y.pinInfos[i]!;
    const k = by(u.range.start.line);
    if (k === undefined || u.pins.length !== v.pins.length || !placed(u.statementIndex, v.statementIndex) || !sameRange(u.range, v.range, k)) return false;
    for (let j = 0; j < u.pins.length; j++) if (u.pins[j]!.name !== v.pins[j]!.name || u.pins[j]!.direction !== v.pins[j]!.direction || !sameRange(u.pins[j]!.range, v.pins[j]!.range, k)) return false;
  }
  return true;
}

/** The definitions the elaborator built: each standalone cell, and each one instantiated. */
function builtScopes(design: Design): Set<string> {
  const out = new Set<string>();
  for (const c of design.circuits) {
    if (c.standalone) out.add(c.name);
    for (const inst of c.instances) out.add(inst.subckt);
  }
  return out;
}

/**
 * Where a statement sits: null at the top level, a top-level definition's name; undefined in a
 * nested or ignored definition (left to the other paths).
 */
function scopeOf(deck: Deck, st: Statement): string | null | undefined {
  if (deck.top.some((l) => l.item === st)) return null;
  for (const def of deck.subckts.values()) if (def.body.some((l) => l.item === st)) return def.name;
  return undefined;
}
