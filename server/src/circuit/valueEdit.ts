// The elaboration stage's answer to an edit of parameter and model cards: when every edited
// statement is a `.model` card whose values are plain numbers (same name, type and bin bounds),
// the devices on each card take the new one, with no elaboration. Otherwise, when every edited
// statement is a `.param` or `.model` card that stays on its lines, the deck is elaborated
// afresh and compared with the previous design. When only MOSFET sizes, models or model cards
// differ (every net, connection, source, passive value, directive and line the same), the
// previous circuit is kept with those devices replaced, as after a size edit. Anything else (a
// supply, clock, capacitor or resistor that follows the parameter, a geometry scale that moved)
// answers `undefined`, and the caller analyses afresh.

import type { Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import type { Circuit, Design, Mosfet, Origin } from './circuit';
import type { Deck } from './deck';
import { elaborate } from './elaborate';
import { readModelCard, type ModelCard } from './models';
import { parseSpiceNumber } from './numbers';
import { editedStatements } from '../syntax/compare';
import type { Statement } from '../syntax/tree';

export interface ValueEdit {
  design: Design;
  /** Per circuit of the design: indices of the MOSFETs that took new values or cards. */
  changed: number[][];
  /** The front end's findings of the new text (parameter errors follow the parameters). */
  frontEnd: Diagnostic[];
}

const CARD_HEADS = new Set(['.param', '.params', '.parameter', '.parameters', '.model']);

export function reelaborateValues(previousDeck: Deck, previous: Design, deck: Deck, previousFrontEnd: readonly Diagnostic[], options: EngineOptions): ValueEdit | undefined {
  const edited = editedStatements(previousDeck.files, deck.files, (file, before: Statement, after: Statement) => {
    const head = before.head.text.toLowerCase();
    if (head !== after.head.text.toLowerCase() || !CARD_HEADS.has(head)) return undefined;
    // on the same lines, so that nothing after it moves
    return before.range.start.line === after.range.start.line && before.range.end.line === after.range.end.line ? { file, before, after } : undefined;
  });
  if (!edited || edited.length === 0) return undefined;
  // model cards with plain numbers: the cards are replaced, with no elaboration
  const replaced = replaceModelCards(previous, edited, previousFrontEnd);
  if (replaced) return replaced;
  const { design, diagnostics } = elaborate(deck, options);
  if (design.circuits.length !== previous.circuits.length || !sameDesignFacts(previous, design)) return undefined;
  const same = new Sameness();
  const changed: number[][] = [];
  const circuits: Circuit[] = [];
  for (let i = 0; i < design.circuits.length; i++) {
    const before = previous.circuits[i]!;
    const after = design.circuits[i]!;
    if (!same.circuitApartFromMosfets(before, after) || before.mosfets.length !== after.mosfets.length) return undefined;
    const indices: number[] = [];
    let mosfets: Mosfet[] | undefined;
    for (let k = 0; k < before.mosfets.length; k++) {
      const m = before.mosfets[k]!;
      const n = after.mosfets[k]!;
      if (m.name !== n.name || m.polarity !== n.polarity || m.d !== n.d || m.g !== n.g || m.s !== n.s || m.b !== n.b || !same.origin(m.origin, n.origin)) return undefined;
      if (sameValues(m, n) && same.card(m.card, n.card)) continue;
      // the later stages read these devices afresh; their lines are the ones they were
      (mosfets ??= before.mosfets.slice())[k] = { ...n, origin: m.origin };
      indices.push(k);
    }
    changed.push(indices);
    circuits.push(mosfets ? { ...before, mosfets } : before);
  }
  return { design: { ...previous, circuits, modelCards: design.modelCards }, changed, frontEnd: [...deck.diagnostics, ...diagnostics] };
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
      (mosfets ??= c.mosfets.slice())[k] = { ...m, card };
      indices.push(k);
    }
    changed.push(indices);
    return mosfets ? { ...c, mosfets } : c;
  });
  return { design: { ...previous, circuits, modelCards }, changed, frontEnd: [...previousFrontEnd] };
}

function sameValues(m: Mosfet, n: Mosfet): boolean {
  return m.wM === n.wM && m.lM === n.lM && m.m === n.m && m.nf === n.nf && m.adM2 === n.adM2 && m.asM2 === n.asM2 && m.pdM === n.pdM && m.psM === n.psM && m.model === n.model;
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

/** Comparisons memoised by object pair: every instance of a line shares its origin, every device of a card its card. */
class Sameness {
  private readonly origins = new Map<Origin, Origin>();
  private readonly cards = new Map<ModelCard, ModelCard>();

  origin(a: Origin, b: Origin): boolean {
    if (a === b || this.origins.get(a) === b) return true;
    const same = a.file === b.file && a.subckt === b.subckt && a.local === b.local && JSON.stringify(a.range) === JSON.stringify(b.range);
    if (same) this.origins.set(a, b);
    return same;
  }

  card(a: ModelCard | undefined, b: ModelCard | undefined): boolean {
    if (a === b) return true;
    if (!a || !b) return false;
    if (this.cards.get(a) === b) return true;
    const same = JSON.stringify(a) === JSON.stringify(b);
    if (same) this.cards.set(a, b);
    return same;
  }

  circuitApartFromMosfets(a: Circuit, b: Circuit): boolean {
    if (a.name !== b.name || a.standalone !== b.standalone || a.nets.length !== b.nets.length) return false;
    for (let i = 0; i < a.nets.length; i++) {
      const x = a.nets[i]!;
      const y = b.nets[i]!;
      if (x.name !== y.name || x.kind !== y.kind || x.global !== y.global || !this.origin(x.origin, y.origin)) return false;
    }
    if (a.instances.length !== b.instances.length) return false;
    for (let i = 0; i < a.instances.length; i++) {
      const x = a.instances[i]!;
      const y = b.instances[i]!;
      if (x.name !== y.name || x.subckt !== y.subckt || x.below.instances[0] !== y.below.instances[0] || x.below.instances[1] !== y.below.instances[1] || !this.origin(x.origin, y.origin)) return false;
      if (x.ports.length !== y.ports.length || x.ports.some((p, k) => p !== y.ports[k])) return false;
    }
    if (a.instanceMosfets.length !== b.instanceMosfets.length || a.instanceMosfets.some((v, k) => v !== b.instanceMosfets[k])) return false;
    // the rest is short: compared as data
    const rest = (c: Circuit) => JSON.stringify([c.capacitors, c.resistors, c.inductors, c.sources, c.diodes, c.others, c.ports, c.supplies, c.grounds, c.inputs, c.outputs]);
    return rest(a) === rest(b);
  }
}
