// The elaboration stage's answer to an edit that changes only settings the electrical estimates
// read for the whole circuit: the values of voltage and current sources written as plain numbers
// (a supply's volts, a clock's edges and period) and the `budget`, `temps`, `clock`, `standby`
// and `supply` directives' values. Every net, device and connection stays; the sources take
// their new waveforms, each supply set by a source or a directive its new volts, and the design
// its new directives.
// Whether the phases keep their pattern (so that the classification stands) is the engine's
// question; this answers undefined for an edit of any other kind, one that could make a net a
// rail or take that away (a supply's volts to or from zero, a DC source turned into a pulse),
// a source or directive whose values are not plain numbers, a directive naming other nets, or
// one where a front-end finding stands on an edited line.

import type { Diagnostic } from '../core/diagnostics';
import { sameStatement } from '../syntax/compare';
import type { DirectiveLine, Statement, ValueItem } from '../syntax/tree';
import type { Circuit, Design, Origin, Source, Supply, Waveform } from './circuit';
import type { Deck } from './deck';
import { directiveLinesEdit } from './acceptEdit';
import { emptyDirectives, readDeckDirectives, type DirectiveSet } from './directives';
import { waveformOf } from './elaborate';
import { interpretElement } from './elements';
import { parseSpiceNumber } from './numbers';
import { shiftDiagnostics, shiftedDesign, type LineShift } from './splice';

/** Directives whose values the estimates read for the whole circuit, and nothing else does. */
const ELECTRICAL_VERBS = new Set(['budget', 'temps', 'clock', 'standby', 'supply']);

interface EditedSource {
  file: string;
  before: Statement;
  after: Statement;
  waveform: Waveform;
  origin?: Origin;
}

export function electricalEdit(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[]): { design: Design } | undefined {
  const a = previousDeck.files;
  const b = deck.files;
  if (a.length !== b.length) return undefined;
  const sources: EditedSource[] = [];
  const editedLines: Array<{ file: string; from: number; to: number }> = [];
  let directivesChanged = false;
  for (let f = 0; f < a.length; f++) {
    const x = a[f]!;
    const y = b[f]!;
    if (x.file !== y.file || x.title !== y.title) return undefined;
    if (x.statements.length !== y.statements.length || x.directives.length !== y.directives.length || x.pinInfos.length !== y.pinInfos.length) return undefined;
    if (JSON.stringify(x.pinInfos) !== JSON.stringify(y.pinInfos) || JSON.stringify(x.diagnostics) !== JSON.stringify(y.diagnostics)) return undefined;
    for (let k = 0; k < x.directives.length; k++) {
      const p = x.directives[k]!;
      const q = y.directives[k]!;
      if (JSON.stringify(p) === JSON.stringify(q)) continue;
      if (!sameDirectiveLine(p, q) || !ELECTRICAL_VERBS.has(p.verb)) return undefined;
      directivesChanged = true;
      editedLines.push({ file: x.file, from: p.range.start.line, to: p.range.end.line });
    }
    for (let k = 0; k < x.statements.length; k++) {
      const p = x.statements[k]!;
      const q = y.statements[k]!;
      if (p === q || sameStatement(p, q)) continue;
      const waveform = sourceEdit(p, q);
      if (!waveform) return undefined;
      sources.push({ file: x.file, before: p, after: q, waveform });
      editedLines.push({ file: x.file, from: p.range.start.line, to: p.range.end.line });
    }
  }
  if (sources.length === 0 && !directivesChanged) return undefined;
  // a finding on an edited line (a directive or parameter note) may change with it
  if (previousFrontEnd.some((d) => editedLines.some((l) => l.file === d.file && d.range.start.line >= l.from && d.range.start.line <= l.to))) return undefined;
  const directives = directivesChanged ? rereadDirectives(deck, previous.directives, previous.circuits) : previous.directives;
  if (!directives) return undefined;
  const circuits: Circuit[] = [];
  for (const c of previous.circuits) {
    const next = withSources(c, sources);
    if (!next) return undefined;
    circuits.push(directivesChanged ? withDirectiveSupplies(next, directives) : next);
  }
  // (a source line in a cell no circuit instantiates leaves every circuit as it was)
  return { design: { ...previous, circuits, directives } };
}

/**
 * A `budget`, `temps` or `standby` line put in or taken out in one file (with those and the
 * `supply`, `clock` and `standby` lines' values changed or not), everything else the same and
 * moved by the edit's line count after it (acceptEdit directiveLinesEdit): the previous design
 * with its lines moved and its directives read again. A `supply` or `clock` line put in or
 * taken out names other nets, which rereadDirectives declines, as it does a standby on a net
 * the circuits would number otherwise. An edit that keeps the line count is `electricalEdit`'s.
 */
export function electricalDirectiveLines(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[]): { design: Design; shift: LineShift; frontEnd: Diagnostic[] } | undefined {
  const isElectrical = (d: DirectiveLine) => ELECTRICAL_VERBS.has(d.verb);
  const edit = directiveLinesEdit(previousDeck, deck, isElectrical);
  if (!edit || edit.shift.lines === 0) return undefined;
  const { x, shift } = edit;
  // a finding on one of the old lines (a malformed directive) would have to go
  const oldLines = new Set(x.directives.filter(isElectrical).map((l) => l.range.start.line));
  if (previousFrontEnd.some((f) => f.file === x.file && oldLines.has(f.range.start.line))) return undefined;
  const shifted = shiftedDesign(previous, shift);
  const directives = rereadDirectives(deck, shifted.directives, shifted.circuits);
  if (!directives) return undefined;
  const circuits = shifted.circuits.map((c) => withDirectiveSupplies(c, directives));
  return { design: { ...shifted, circuits, directives }, shift, frontEnd: shiftDiagnostics([...previousFrontEnd], shift) };
}

/** Two directive lines of one verb on the same lines, with as many words. */
function sameDirectiveLine(p: DirectiveLine, q: DirectiveLine): boolean {
  return p.verb === q.verb && p.statementIndex === q.statementIndex && p.range.start.line === q.range.start.line && p.range.end.line === q.range.end.line && p.args.length === q.args.length;
}

/** The new waveform when `q` is `p`, a source line, with other plain-number values (same name and nodes, same lines). */
function sourceEdit(p: Statement, q: Statement): Waveform | undefined {
  const x = interpretElement(p);
  const y = interpretElement(q);
  if (x?.kind !== 'source' || y?.kind !== 'source' || x.letter !== y.letter) return undefined;
  if (x.name.text !== y.name.text || x.nodes.length !== y.nodes.length || x.nodes.some((n, k) => n.text !== y.nodes[k]!.text)) return undefined;
  if (p.range.start.line !== q.range.start.line || p.range.end.line !== q.range.end.line || p.range.start.character !== q.range.start.character) return undefined;
  let plain = true;
  const num = (v: ValueItem | undefined): number | undefined => {
    const n = v?.kind === 'word' ? parseSpiceNumber(v.text) : undefined;
    if (v !== undefined && n === undefined) plain = false;
    return n;
  };
  const waveform = waveformOf(y.waveform, num);
  return plain ? waveform : undefined;
}

/**
 * The circuit with the edited sources' new waveforms (every copy of each line), and each supply a
 * changed DC source sets at its new volts; undefined when a rail could appear or go.
 */
function withSources(c: Circuit, edited: EditedSource[]): Circuit | undefined {
  let list: Source[] | undefined;
  let dcChanged = false;
  for (let k = 0; k < c.sources.length; k++) {
    const s = c.sources[k]!;
    const e = edited.find((x) => x.file === s.origin.file && x.before.range.start.line === s.origin.range.start.line && x.before.range.start.character === s.origin.range.start.character);
    if (!e) continue;
    const old = s.waveform;
    const next = e.waveform;
    // only DC sources to ground make rails (elaborate assignRails): stay DC, and on the same side of zero
    if ((old.kind === 'dc') !== (next.kind === 'dc')) return undefined;
    if (old.kind === 'dc' && next.kind === 'dc' && (old.volts === undefined) !== (next.volts === undefined)) return undefined;
    if (old.kind === 'dc' && next.kind === 'dc' && old.volts !== undefined && (old.volts === 0) !== (next.volts === 0)) return undefined;
    if (old.kind === 'dc') dcChanged = true;
    e.origin ??= { ...s.origin, range: e.after.range };
    (list ??= c.sources.slice())[k] = { ...s, waveform: next, origin: e.origin };
  }
  if (!list) return c;
  if (!dcChanged) return { ...c, sources: list };
  const supplies = suppliesFrom(c, list);
  return supplies && { ...c, sources: list, supplies };
}

/**
 * The supplies a `supply` directive sets at the volts it now gives: the first directive naming
 * the net, as elaborate assignRails takes it (whether a net is a supply or a ground, by a volts
 * of zero, is the same: rereadDirectives holds it).
 */
function withDirectiveSupplies(c: Circuit, directives: DirectiveSet): Circuit {
  let out: Supply[] | undefined;
  c.supplies.forEach((s, i) => {
    if (s.from !== 'directive') return;
    const d = directives.supplies.find((x) => c.netByName.get(x.net.toLowerCase()) === s.net);
    if (d && d.volts !== s.volts) (out ??= c.supplies.slice())[i] = { ...s, volts: d.volts };
  });
  return out ? { ...c, supplies: out } : c;
}

/**
 * The supplies with the volts the new sources give: a supply set by a source takes the first
 * DC source to ground on its net (elaborate assignRails), and only when that is the only one
 * (with two, which came first depended on the order the rails were found: left to a fresh run).
 */
function suppliesFrom(c: Circuit, sources: readonly Source[]): Supply[] | undefined {
  const ground = (n: number) => c.nets[n]!.kind === 'ground';
  let out: Supply[] | undefined;
  for (let i = 0; i < c.supplies.length; i++) {
    const s = c.supplies[i]!;
    if (s.from !== 'source') continue;
    let volts: number | undefined;
    let count = 0;
    for (const x of sources) {
      if (x.letter !== 'v' || x.waveform.kind !== 'dc' || x.waveform.volts === undefined || x.waveform.volts === 0) continue;
      if (x.p === s.net && ground(x.n) && x.n !== s.net) (count++, (volts = x.waveform.volts));
      else if (x.n === s.net && ground(x.p) && x.p !== s.net) (count++, (volts = -x.waveform.volts));
    }
    if (count !== 1) return undefined;
    if (volts !== s.volts) (out ??= c.supplies.slice())[i] = { ...s, volts: volts! };
  }
  return out ?? c.supplies;
}

/**
 * The deck's directives read again as the elaborator reads them (the top level's, then each
 * definition's), when they differ from the previous ones only in values (a budget or corners
 * put in or taken out included): the same clocks on the same nets, the same everything else,
 * and no finding in the reading. Standby scenarios may also come, go or hold the other level,
 * on nets every circuit numbers first anyway (`pinnedOtherwise`), so the circuits stay as they
 * are; whether the phases still fit the classification is the engine's question.
 */
function rereadDirectives(deck: Deck, previous: DirectiveSet, circuits: readonly Circuit[]): DirectiveSet | undefined {
  const into = emptyDirectives();
  const found: Diagnostic[] = [];
  readDeckDirectives(deck, into, found);
  if (found.length) return undefined;
  if (into.budget?.receiver) return undefined;
  const shape = (d: DirectiveSet) =>
    JSON.stringify({
      ...d,
      budget: undefined,
      tempsC: undefined,
      clocks: d.clocks.map((k) => [k.net, k.inverseOf, k.file, k.range.start.line, k.periodS !== undefined, k.highS !== undefined, k.delayS !== undefined, k.duty !== undefined]),
      standby: undefined,
      // a supply's volts may change, but not to or from zero (a ground)
      supplies: d.supplies.map((s) => [s.net, s.volts === 0, s.file, s.range.start.line]),
    });
  if (shape(into) !== shape(previous)) return undefined;
  const scenarios = (d: DirectiveSet) => JSON.stringify(d.standby.map((s) => [s.net, s.level, s.file, s.range.start.line]));
  if (scenarios(into) !== scenarios(previous) && ![...into.standby, ...previous.standby].every((s) => circuits.every((c) => pinnedOtherwise(c, s.net, into)))) return undefined;
  return into;
}

/**
 * Whether a circuit numbers the net `name` first (elaborate pinnedNets) without a standby
 * directive naming it: a source's terminal, a clock directive's net or a global. A name the
 * circuit lacks pins nothing either way.
 */
function pinnedOtherwise(c: Circuit, name: string, directives: DirectiveSet): boolean {
  const id = c.netByName.get(name);
  if (id === undefined) return true;
  if (c.nets[id]!.global) return true;
  if (c.sources.some((s) => s.p === id || s.n === id)) return true;
  return directives.clocks.some((k) => k.net === name || k.inverseOf === name);
}
