// The elaboration stage's answer to an edit of parameter and model cards: when every edited
// statement is a `.model` card whose values are plain numbers (same name, type and bin bounds),
// the devices on each card take the new one, with no elaboration. Otherwise, when every edited
// statement is a `.param` or `.model` card, a `.subckt` line's defaults, or a MOSFET or instance
// line whose `name=value` parameters took other values (an expression, an instance parameter:
// plain-number sizes are circuit/patch.ts's), that stays on its lines, every cell's values are
// worked out again (once per parameter set) and laid over the previous circuits (elaborate
// `revalue`), the edited element lines' devices and instances taking the lines' new extents.
// When only MOSFET sizes, models or model cards differ (every net, connection, source, passive
// value, directive and line the same), the previous circuit is kept with those devices
// replaced, as after a size edit. Anything else (a supply, clock, capacitor or resistor that
// follows the parameter, a geometry scale that moved) answers `undefined`, and the caller
// analyses afresh.

import type { Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import { mosfetRecord, type Design, type Instance, type Mosfet, type Origin } from './circuit';
import type { Deck } from './deck';
import { revalue } from './elaborate';
import { readModelCard, type ModelCard } from './models';
import { parseSpiceNumber } from './numbers';
import { editedStatements, sameRange } from '../syntax/compare';
import { startLineOf, type Range } from '../core/source';
import { carryElementIndexes, lineIndex, setLineIndex } from './elementIndex';
import type { Item, Statement } from '../syntax/tree';

export interface ValueEdit {
  design: Design;
  /** Per circuit of the design: indices of the MOSFETs that took new values or cards. */
  changed: number[][];
  /** The front end's findings of the new text (parameter errors follow the parameters). */
  frontEnd: Diagnostic[];
  /** Element lines edited whose extent changed: old range -> new range (findings on them move). */
  moved?: Array<{ file: string; from: Range; to: Range }>;
}

const CARD_HEADS = new Set(['.param', '.params', '.parameter', '.parameters', '.model']);

export function reelaborateValues(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[], options: EngineOptions): ValueEdit | undefined {
  const edited = editedStatements(previousDeck.files, deck.files, (file, before: Statement, after: Statement) => {
    const head = before.head.text.toLowerCase();
    if (head !== after.head.text.toLowerCase()) return undefined;
    // on the same lines, so that nothing after it moves
    if (before.range.start.line !== after.range.start.line || before.range.end.line !== after.range.end.line || before.range.start.character !== after.range.start.character) return undefined;
    if (CARD_HEADS.has(head)) return { file, before, after, kind: 'card' as const };
    // a subcircuit's defaults, or a MOSFET or instance line whose parameters took other values
    // (an expression, an instance parameter)
    if (head === '.subckt') return onlyParameterValues(before, after) ? { file, before, after, kind: 'subckt' as const } : undefined;
    return (head[0] === 'm' || head[0] === 'x') && onlyParameterValues(before, after) ? { file, before, after, kind: 'element' as const } : undefined;
  });
  if (!edited || edited.length === 0) return undefined;
  // model cards with plain numbers: the cards are replaced, with no elaboration
  const replaced = edited.every((e) => e.kind === 'card') ? replaceModelCards(previous, edited, previousFrontEnd) : undefined;
  if (replaced) return replaced;
  // the values of every cell worked out again and laid over the previous circuits (elaborate
  // revalue): nets, connections, passive values and sources must come out the same
  const revalued = revalue(deck, previous, options);
  if (!revalued || !sameDesignFacts(previous, revalued.design)) return undefined;
  // element and subcircuit lines whose extent changed: what was written on them moves with them
  const lines = edited.filter((e) => e.kind !== 'card' && !sameRange(e.before.range, e.after.range, 0));
  const elements = lines.filter((e) => e.kind === 'element');
  const design = elements.length ? withLineExtents(revalued.design, elements) : revalued.design;
  return { design, changed: revalued.changed, frontEnd: [...deck.diagnostics, ...revalued.diagnostics], moved: lines.map((e) => ({ file: e.file, from: e.before.range, to: e.after.range })) };
}

/**
 * Two parses of a MOSFET or instance line with the same words but for the values of its
 * `name=value` parameters (the same names, in the same order).
 */
function onlyParameterValues(x: Statement, y: Statement): boolean {
  if (x.head.text !== y.head.text || x.items.length !== y.items.length) return false;
  let differs = false;
  for (let k = 0; k < x.items.length; k++) {
    const p = x.items[k]!;
    const q = y.items[k]!;
    if (p.kind === 'assign' && q.kind === 'assign') {
      if (p.name.text.toLowerCase() !== q.name.text.toLowerCase()) return false;
      if (itemText(p.value) !== itemText(q.value)) differs = true;
      continue;
    }
    if (p.kind !== q.kind || itemText(p) !== itemText(q)) return false;
  }
  return differs;
}

function itemText(it: Item | undefined): string {
  if (!it) return '';
  if (it.kind === 'group') return `(${it.items.map(itemText).join(' ')})`;
  if (it.kind === 'assign') return `${it.name.text}=${itemText(it.value)}`;
  return it.text;
}

/**
 * The devices and instances written on edited element lines (every copy) with the lines' new
 * extents, as a fresh elaboration records where each was written (a longer value moves the
 * line's end). Their nets are named by words before the values, which keep their places.
 */
function withLineExtents(design: Design, lines: ReadonlyArray<{ file: string; before: Statement; after: Statement }>): Design {
  const moved = new Map<Origin, Origin>();
  const next = (o: Origin): Origin | undefined => {
    let to = moved.get(o);
    if (to) return to;
    const e = lines.find((l) => l.file === o.file && sameRange(l.before.range, o.range, 0));
    if (!e) return undefined;
    moved.set(o, (to = { ...o, range: e.after.range }));
    return to;
  };
  const circuits = design.circuits.map((c) => {
    const index = lineIndex(c.mosfets);
    let mosfets: Mosfet[] | undefined;
    for (const e of lines) {
      for (const k of index.get(startLineOf(e.before.range)) ?? []) {
        const m = c.mosfets[k]!;
        const o = next(m.origin);
        // field by field: a spread copy of a device record takes V8's slow path (circuit mosfetRecord)
        if (o) (mosfets ??= c.mosfets.slice())[k] = mosfetRecord(m.name, m.polarity, m.d, m.g, m.s, m.b, m, o);
      }
    }
    // every device stays on its line
    if (mosfets) setLineIndex(mosfets, index);
    let instances: Instance[] | undefined;
    c.instances.forEach((x, k) => {
      const o = next(x.origin);
      if (o) (instances ??= c.instances.slice())[k] = { ...x, origin: o };
    });
    return mosfets || instances ? { ...c, ...(mosfets ? { mosfets } : {}), ...(instances ? { instances } : {}) } : c;
  });
  return { ...design, circuits };
}

/**
 * Edited `.model` cards whose values are all plain numbers, with the same name, type and bin
 * bounds: the devices on each old card take the new one (read as the elaborator reads a card).
 * Undefined for anything else, or when a front-end finding stands on an edited card.
 */
function replaceModelCards(previous: Design, edited: ReadonlyArray<{ file: string; before: Statement; after: Statement }>, previousFrontEnd: readonly Diagnostic[]): ValueEdit | undefined {
  const swap = new Map<ModelCard, ModelCard>();
  for (const { file, before, after } of edited) {
    if (before.head.text.toLowerCase() !== '.model') return undefined;
    if (previousFrontEnd.some((d) => d.file === file && d.range.start.line >= before.range.start.line && d.range.start.line <= before.range.end.line)) return undefined;
    // plain numbers only: any other value is read with the parameter scope, by the elaborator
    let plain = true;
    const next = readModelCard(file, after, (v) => {
      const n = v.kind === 'word' ? parseSpiceNumber(v.text) : undefined;
      if (n === undefined) plain = false;
      return n;
    })?.card;
    if (!next || !plain) return undefined;
    const old = [...previous.modelCards.values()].flat().find((c) => c.file === file && c.range.start.line === before.range.start.line && c.range.start.character === before.range.start.character);
    if (!old || old.name !== next.name || old.type !== next.type) return undefined;
    // the bin a device takes reads these
    for (const k of ['lmin', 'lmax', 'wmin', 'wmax']) if (old.params[k] !== next.params[k]) return undefined;
    if (Object.keys(old.textParams).length) return undefined;
    swap.set(old, next);
  }
  const modelCards = new Map<string, ModelCard[]>();
  for (const [k, list] of previous.modelCards) modelCards.set(k, list.map((c) => swap.get(c) ?? c));
  const changed: number[][] = [];
  const circuits = previous.circuits.map((c) => {
    const indices: number[] = [];
    let mosfets: Mosfet[] | undefined;
    for (let k = 0; k < c.mosfets.length; k++) {
      const m = c.mosfets[k]!;
      const card = m.card && swap.get(m.card);
      if (!card) continue;
      // field by field: a spread copy of a device record takes V8's slow path (circuit mosfetRecord)
      (mosfets ??= c.mosfets.slice())[k] = mosfetRecord(m.name, m.polarity, m.d, m.g, m.s, m.b, { wM: m.wM, lM: m.lM, m: m.m, nf: m.nf, adM2: m.adM2, asM2: m.asM2, pdM: m.pdM, psM: m.psM, model: m.model, card }, m.origin);
      indices.push(k);
    }
    changed.push(indices);
    if (!mosfets) return c;
    // every device stays in its place and on its line
    carryElementIndexes(c.mosfets, mosfets);
    return { ...c, mosfets };
  });
  return { design: { ...previous, circuits, modelCards }, changed, frontEnd: [...previousFrontEnd] };
}

/** Everything of the design but its circuits and cards: the phases and estimates read it. */
function sameDesignFacts(a: Design, b: Design): boolean {
  return (
    a.title === b.title &&
    a.tempC === b.tempC &&
    a.geometryScale.value === b.geometryScale.value &&
    a.geometryScale.from === b.geometryScale.from &&
    JSON.stringify(a.files) === JSON.stringify(b.files) &&
    JSON.stringify(a.directives) === JSON.stringify(b.directives)
  );
}
