// The elaboration stage's answer to a line being typed: an element line the elaborator leaves
// out (too few nodes, no model yet, not an element name), an instance whose cell name is not
// complete yet (on nets already used), a directive that reads to nothing yet
// (an unknown verb, a clock with no period) or a line the parser cannot read yet, put in,
// changed or taken out at one place. Such a line adds no element, no net name and no
// directive, so the design stands (moved by the edit's line count after it); only the front
// end's findings on the edited lines change: the parser's, and the elaborator's, said with the
// elaborator's own code (`skippedLineFindings`, `unknownSubcktFinding`, `readDirectives`) where
// it reads the line at all. Anything else in the edit answers `undefined` and goes to the other
// paths.

import type { Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import { startLineOf } from '../core/source';
import type { DirectiveLine, Statement, SyntaxFile } from '../syntax/tree';
import { sameDirectiveLine, samePinLine } from '../syntax/compare';
import type { Design, Origin } from './circuit';
import type { Deck, SubcktDefinition } from './deck';
import { emptyDirectives, readDirectives } from './directives';
import { deckGlobals, deviceRuleList, elementNodeWords, scaleGuessLengths, skippedLineFindings, topIsElaborated, unknownSubcktFinding } from './elaborate';
import { oneChangedFile, sharedEnds, shiftDiagnostics, type LineShift } from './splice';

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
  let { p, s } = sharedEnds(x, y);
  if (p === xs.length && p === ys.length && d === 0) {
    // every statement in place: the edit is where a directive or a parser finding differs (a
    // directive or an unreadable line typed in place); the statements after it are the suffix
    const lines = differingLines(x, y);
    if (lines === undefined) return undefined;
    p = statementsBefore(xs, lines.first);
    if (p < xs.length && startLineOf(xs[p]!.range) <= lines.last) return undefined;
    s = xs.length - p;
  }
  const removed = xs.slice(p, xs.length - s);
  const added = ys.slice(p, ys.length - s);
  // the edited lines: between the statements kept before and after (line 0, which holds the
  // title and file-wide notes, never among them)
  const from = p > 0 ? xs[p - 1]!.range.end.line + 1 : x.title !== undefined ? 1 : 0;
  if (from === 0) return undefined;
  // the elaborator must read the same scopes as before (a line at the top level can make it a
  // circuit of its own): the top level when it is a circuit, and the definitions it built
  const topRead = topIsElaborated(deck, options);
  if (topIsElaborated(previousDeck, options) !== topRead) return undefined;
  const built = builtScopes(previous);
  // each edited statement left out, or an instance the elaborator expands to nothing
  const rules = deviceRuleList(previous.directives, options);
  const unexpanded = (dk: Deck, st: Statement, scope: string | null | undefined) => unexpandedInstance(st, scope, dk, previous, built, topRead, x.file, from, rules);
  if (!removed.every((st) => leftOut(st) || unexpanded(previousDeck, st, scopeOf(previousDeck, st)))) return undefined;
  const addedScopes = added.map((st) => scopeOf(deck, st));
  if (!added.every((st, k) => leftOut(st) || unexpanded(deck, st, addedScopes[k]))) return undefined;
  // a length on a line left out still counts in the guess of the geometry scale
  const guessed = previous.geometryScale.from === 'assumed' || previous.geometryScale.from === 'default';
  if (guessed && [...removed, ...added].some((st) => scaleGuessLengths(st).length > 0)) return undefined;
  const oldEnd = s > 0 ? startLineOf(xs[xs.length - s]!.range) : x.lineCount;
  const newEnd = s > 0 ? startLineOf(ys[ys.length - s]!.range) : y.lineCount;
  if (newEnd - oldEnd !== d || oldEnd < from) return undefined;
  const inOld = (f: string, line: number) => f === x.file && line >= from && line < oldEnd;
  const inNew = (f: string, line: number) => f === x.file && line >= from && line < newEnd;
  // directives being typed (an unknown verb, a clock with no period yet) say only their
  // findings; every other directive and pin line the same, none among the edited lines
  const typedDirectives = new Map<DirectiveLine, Diagnostic[]>();
  const typed = (file: SyntaxFile, end: number) => (l: DirectiveLine) => {
    if (l.range.start.line < from || l.range.start.line >= end) return false;
    const said = readsToNothing(file.file, l);
    if (said && file === y) typedDirectives.set(l, said);
    return said !== undefined;
  };
  if (!sameSpecialLines(x, y, from, oldEnd, d, p, s, typed(x, oldEnd), typed(y, newEnd))) return undefined;
  const shift: LineShift = { file: x.file, fromLine: oldEnd, lines: d };
  // every other parser and include finding the same, moved with its line
  const keptParse = previousDeck.diagnostics.filter((f) => !inOld(f.file, f.range.start.line));
  const newParse = deck.diagnostics.filter((f) => inNew(f.file, f.range.start.line));
  const otherParse = deck.diagnostics.filter((f) => !inNew(f.file, f.range.start.line));
  if (JSON.stringify(shiftDiagnostics(keptParse, shift)) !== JSON.stringify(otherParse)) return undefined;
  // the lines the elaborator reads say their findings
  const said: Diagnostic[] = [];
  for (const [k, st] of added.entries()) {
    const scope = addedScopes[k];
    if (scope === undefined) return undefined;
    if (scope === null ? !topRead : !built.has(scope)) continue;
    const words = elementNodeWords(st);
    if (words.skipped !== undefined) said.push(...skippedLineFindings(x.file, st, words));
    else if (words.syntax.kind === 'instance' && words.syntax.subckt) said.push(unknownSubcktFinding(x.file, words.syntax.subckt));
  }
  // the elaborator reads the directives of the top level and of every definition it keeps
  const reachable = new Set<DirectiveLine>(deck.directives.map((l) => l.item));
  const addDefinitions = (defs: Map<string, SubcktDefinition>) => {
    for (const def of defs.values()) {
      for (const l of def.directives) reachable.add(l.item);
      addDefinitions(def.local);
    }
  };
  if (typedDirectives.size) addDefinitions(deck.subckts);
  for (const [l, findings] of typedDirectives) {
    if (!reachable.has(l)) return undefined;
    said.push(...findings);
  }
  const kept = previousFrontEnd.filter((f) => !inOld(f.file, f.range.start.line));
  return { shift, frontEnd: [...shiftDiagnostics(kept, shift), ...newParse, ...said] };
}

/**
 * An instance line that the elaborator expands to nothing: of a cell nobody defines and no device
 * rule maps (as while its cell's name is typed), at the top level when it is a circuit or in a
 * built top-level definition (none nested anywhere: a cell name could resolve through an outer
 * one), on nets its scope used above the edited lines (`from`) or global ones, so it names no
 * net and moves no net's first use. Its one finding: `unknownSubcktFinding`.
 */
function unexpandedInstance(st: Statement, scope: string | null | undefined, deck: Deck, design: Design, built: ReadonlySet<string>, topRead: boolean, file: string, from: number, rules: ReadonlyArray<{ re: RegExp }>): boolean {
  const read = elementNodeWords(st);
  if (read.skipped !== undefined || read.syntax.kind !== 'instance' || !read.syntax.subckt) return false;
  const name = read.syntax.subckt.text.toLowerCase();
  if (deck.subckts.has(name) || rules.some((r) => r.re.test(name))) return false;
  if (scope === undefined) return false;
  if (scope === null ? !topRead : !built.has(scope) || [...deck.subckts.values()].some((d) => d.local.size > 0)) return false;
  const firstUse = namesUsed(design, scope);
  const globals = deckGlobals(deck);
  // a cell's ports are its first names (bound to the instance's nets, they are not its own)
  const ports = new Set(scope === null ? [] : deck.subckts.get(scope)!.ports);
  for (const w of read.nodes) {
    const n = w.text.toLowerCase();
    if (globals.has(n) || ports.has(n)) continue;
    const origin = firstUse.get(n);
    if (!origin || origin.file !== file || startLineOf(origin.range) >= from) return false;
  }
  return true;
}

/** The names a scope's nets were first used by (null: the top level), with where. */
function namesUsed(design: Design, scope: string | null): Map<string, Origin> {
  const out = new Map<string, Origin>();
  for (const c of design.circuits) {
    if (scope === null && c.standalone) continue;
    for (const net of c.nets) if (!net.global && net.origin.subckt === scope && !out.has(net.origin.local)) out.set(net.origin.local, net.origin);
  }
  return out;
}

/**
 * The first and last line where two parses of the same line count differ in a directive or a
 * parser finding; undefined when they do not.
 */
function differingLines(x: SyntaxFile, y: SyntaxFile): { first: number; last: number } | undefined {
  const keys = (f: SyntaxFile) => [
    ...f.directives.map((l) => [l.range.start.line, JSON.stringify([l.verb, l.range, l.statementIndex, l.args])] as const),
    ...f.diagnostics.map((g) => [g.range.start.line, JSON.stringify(g)] as const),
  ];
  const a = keys(x);
  const b = keys(y);
  const inA = new Set(a.map(([, k]) => k));
  const inB = new Set(b.map(([, k]) => k));
  let first = Infinity;
  let last = -1;
  for (const [line] of [...a.filter(([, k]) => !inB.has(k)), ...b.filter(([, k]) => !inA.has(k))]) {
    first = Math.min(first, line);
    last = Math.max(last, line);
  }
  return last < 0 ? undefined : { first, last };
}

/** How many statements start before `line` (they come in line order). */
function statementsBefore(list: readonly Statement[], line: number): number {
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (startLineOf(list[mid]!.range) < line) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * A directive line that adds nothing to the directives (an unknown verb, a malformed one): what
 * reading it says, as the elaborator reads it (each line on its own); undefined for one that adds.
 */
function readsToNothing(file: string, line: DirectiveLine): Diagnostic[] | undefined {
  const into = emptyDirectives();
  const said: Diagnostic[] = [];
  readDirectives([{ file, item: line }], into, said);
  return JSON.stringify(into) === JSON.stringify(emptyDirectives()) ? said : undefined;
}

/**
 * Directives and pin lines the same in both parses apart from the edited lines' directives that
 * `typedX`, `typedY` take (those that read to nothing), none other on the edited lines
 * [from, oldEnd), each before them in place and each after them moved by `d`.
 */
function sameSpecialLines(x: SyntaxFile, y: SyntaxFile, from: number, oldEnd: number, d: number, p: number, s: number, typedX: (l: DirectiveLine) => boolean, typedY: (l: DirectiveLine) => boolean): boolean {
  const xd = x.directives.filter((l) => !typedX(l));
  const yd = y.directives.filter((l) => !typedY(l));
  if (xd.length !== yd.length || x.pinInfos.length !== y.pinInfos.length) return false;
  const placed = (si: number, sj: number) => (si <= p && sj === si) || (si >= x.statements.length - s && sj === si + y.statements.length - x.statements.length);
  const by = (line: number) => (line < from ? 0 : line >= oldEnd ? d : undefined);
  for (let i = 0; i < xd.length; i++) {
    const u = xd[i]!;
    const v = yd[i]!;
    const k = by(u.range.start.line);
    if (k === undefined || !placed(u.statementIndex, v.statementIndex) || !sameDirectiveLine(u, v, k)) return false;
  }
  for (let i = 0; i < x.pinInfos.length; i++) {
    const u = x.pinInfos[i]!;
    const v = y.pinInfos[i]!;
    const k = by(u.range.start.line);
    if (k === undefined || !placed(u.statementIndex, v.statementIndex) || !samePinLine(u, v, k)) return false;
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
