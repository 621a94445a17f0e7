// The elaboration stage's answer to a reconnection: when the new deck differs from the old one
// only in node names on element lines of one definition (or of the top level), and that
// definition's net slots come out the same (the same local names first used in the same order,
// the same globals; or new names put in among them, see circuit/newNets), every flat net keeps its number and name, and only the terminals of the
// elements written on those lines (and, for an instance line, of the devices below it that
// reached a moved port) take other nets. Sources, diodes and connectivity-only elements, nested
// definitions, and cells whose port directions are inferred from their wiring are left to a
// fresh elaboration: `undefined`.

import type { EngineOptions } from '../core/options';
import type { NetRenumbering } from '../core/renumber';
import { startLineOf } from '../core/source';
import { insertedSlots, namedNets, narrowCircuit, removedSlots, widenCircuit } from './newNets';
import type { Capacitor, Circuit, Design, Instance, Mosfet, Net, Origin, Resistor, TwoTerminal } from './circuit';
import type { Deck } from './deck';
import { deckGlobals, elementNodeWords, NetSlots } from './elaborate';
import { movedLines, type EditedLine, type MovedLines } from './movedLines';
import { originIndex, setOriginIndex, type OriginIndex } from './elementIndex';
import { renamedNodes, scopesOfStatements } from './rename';
import { editedStatements, sameRange } from '../syntax/compare';
import type { Statement } from '../syntax/tree';

/** What moved in one circuit: indices into its element lists whose terminals changed. */
export interface RewiredElements {
  mosfets: number[];
  resistors: number[];
  inductors: number[];
  capacitors: number[];
}

export interface Rewiring {
  design: Design;
  /** Per circuit of the design. */
  changed: RewiredElements[];
  moved: MovedLines['moved'];
  /**
   * Per circuit, when the edit named nets the circuit did not have: the previous circuit with
   * them put in (nothing on them yet), and the net insertion the later stages apply first.
   */
  widened: Array<{ circuit: Circuit; nets: NetRenumbering } | undefined>;
  /**
   * Per circuit, when the edit left nets unused: `design`'s circuit (the rewired one) still has
   * them, with nothing on them, for the later stages to be patched; this is the circuit without
   * them, and the net renumbering the patched results take after.
   */
  narrowed: Array<{ circuit: Circuit; nets: NetRenumbering } | undefined>;
}

/**
 * `limit`: per circuit, how many copies of the edited lines the patch takes on (more: undefined).
 * `options`: the name rules and settings a net put in is checked against (circuit/newNets).
 */
export function rewireNets(previousDeck: Deck, previous: Design, deck: Deck, limit: (circuit: number) => number = () => Infinity, options: EngineOptions = {}): Rewiring | undefined {
  const edited = editedStatements(previousDeck.files, deck.files, (file, before, after): EditedLine | undefined => (renamedNodes(before, after) ? { file, before, after } : undefined));
  if (!edited || edited.length === 0) return undefined;
  const scope = scopeOfLines(deck, edited);
  if (scope === undefined) return undefined;
  const kept = netSlotsOf(previousDeck, deck, scope);
  if (!kept) return undefined;
  const { before, after, portCount } = kept;
  // the same slots, the old ones with new names put in, or with names no longer used taken out
  let inserted: number[] | undefined;
  let removed: number[] | undefined;
  if (!sameSlots(before.slots, after.slots)) {
    inserted = insertedSlots(before.slots, after.slots, portCount);
    if (!inserted) removed = removedSlots(before.slots, after.slots, portCount);
    if ((!inserted && !removed) || !sameList(before.slots.globalNames, after.slots.globalNames)) return undefined;
  }
  // a global net takes the first slot's origin of the definition that meets it first
  const first0 = before.slots.localOrigins[0];
  const first1 = after.slots.localOrigins[0];
  if (!first0 !== !first1 || (first0 && first1 && (first0.local !== first1.local || first0.file !== first1.file || !sameRange(first0.range, first1.range, 0)))) return undefined;
  // an internal net first written on an edited line may now be first written elsewhere
  const netOrigins = new Map<string, Origin>();
  const beforeAt = new Map<string, number>();
  before.slots.localNames.forEach((n, i) => i >= portCount && beforeAt.set(n, i));
  after.slots.localOrigins.forEach((o, i) => {
    const k = i >= portCount ? beforeAt.get(after.slots.localNames[i]!) : undefined;
    if (k === undefined) return;
    const was = before.slots.localOrigins[k]!;
    if (o.file !== was.file || !sameRange(o.range, was.range, 0)) netOrigins.set(o.local, o);
  });
  // the edited lines by where each started (devices keep the origin of the parse they came from)
  const lineAt = new Map<string, { refs: number[]; local: string }>();
  const startLines = new Set<number>();
  for (const l of edited) {
    const refs = after.refs.get(l.after);
    if (!refs || before.refs.get(l.before)?.length !== refs.length) return undefined;
    lineAt.set(`${l.file}|${startLineOf(l.before.range)}|${l.before.range.start.character}`, { refs, local: l.before.head.text.toLowerCase() });
    startLines.add(startLineOf(l.before.range));
  }
  // one lookup per origin object (every instance of a line shares it), a cheap test first
  const seen = new Map<Origin, { refs: number[]; local: string } | undefined>();
  const lineOf = (o: Origin) => {
    if (!startLines.has(startLineOf(o.range))) return undefined;
    if (!seen.has(o)) seen.set(o, lineAt.get(`${o.file}|${startLineOf(o.range)}|${o.range.start.character}`));
    return seen.get(o);
  };
  const lines = movedLines(edited);
  const circuits: Circuit[] = [];
  const changed: RewiredElements[] = [];
  const widened: Rewiring['widened'] = [];
  const narrowed: Rewiring['narrowed'] = [];
  const named = (inserted || removed) && namedNets(previous, options);
  for (let i = 0; i < previous.circuits.length; i++) {
    let c = previous.circuits[i]!;
    let wide: Rewiring['widened'][number];
    const prefixes = inserted || removed ? contextPrefixes(c, scope) : [];
    if (inserted && prefixes.length) {
      if (prefixes.length > limit(i) / edited.length) return undefined;
      wide = widenCircuit(c, prefixes, before.slots, after.slots, portCount, inserted, named!, options);
      if (!wide) return undefined;
      c = wide.circuit;
    }
    const result = rewireCircuit(c, scope, portCount, after.slots, lineOf, netOrigins, lines, limit(i) / edited.length);
    if (!result) return undefined;
    let narrow: Rewiring['narrowed'][number];
    if (removed && prefixes.length) {
      // the nets of the names no longer used, one per instance: nothing is on them now
      const ids: number[] = [];
      for (const prefix of prefixes) {
        for (const slot of removed) {
          const name = prefix + before.slots.localNames[slot]!;
          const id = c.netByName.get(name);
          if (id === undefined || named!.has(name)) return undefined;
          ids.push(id);
        }
      }
      narrow = narrowCircuit(result.circuit, ids.sort((x, y) => x - y));
      if (!narrow) return undefined;
    }
    circuits.push(result.circuit);
    changed.push(result.changed);
    widened.push(wide);
    narrowed.push(narrow);
  }
  if (changed.every((x) => x.mosfets.length + x.resistors.length + x.inductors.length + x.capacitors.length === 0)) return undefined;
  return { design: { ...previous, circuits }, changed, moved: lines.moved, widened, narrowed };
}

/** The prefixes of a definition's places in a circuit ('' for the top level or a standalone cell). */
export function contextPrefixes(c: Circuit, scope: string | null): string[] {
  return [...contextsOf(c, scope).keys()];
}

/** Where a definition (lower case; null: the top level) sits in a circuit: prefix -> the nets its ports are bound to (null for the top level or a standalone cell). */
function contextsOf(c: Circuit, scope: string | null): Map<string, readonly number[] | null> {
  const contexts = new Map<string, readonly number[] | null>();
  if (scope === null && !c.standalone) contexts.set('', null);
  if (scope !== null && c.standalone && c.name === scope) contexts.set('', null);
  for (const inst of c.instances) if (inst.subckt === scope) contexts.set(inst.name + '.', inst.ports);
  return contexts;
}

/** The one definition (lower case) or top level (null) holding every edited line, else undefined. */
function scopeOfLines(deck: Deck, edited: readonly EditedLine[]): string | null | undefined {
  const scopeOf = scopesOfStatements(deck);
  if (!scopeOf) return undefined;
  const scopes = new Set(edited.map((l) => scopeOf.get(l.after)));
  if (scopes.size !== 1) return undefined;
  const [scope] = scopes;
  return scope;
}

/**
 * The edited definition's (or the top level's) net slots before and after an edit, when they
 * come out the same (the same globals, the same local names first used in the same order), so
 * every flat net keeps its number; else undefined.
 */
export function sameNetSlots(previousDeck: Deck, deck: Deck, scope: string | null): { before: ScopeSlots; after: ScopeSlots; portCount: number } | undefined {
  const kept = netSlotsOf(previousDeck, deck, scope);
  return kept && sameSlots(kept.before.slots, kept.after.slots) ? kept : undefined;
}

/** The definition's net slots before and after an edit, when the deck's globals are the same. */
export function netSlotsOf(previousDeck: Deck, deck: Deck, scope: string | null): { before: ScopeSlots; after: ScopeSlots; portCount: number } | undefined {
  const globals = deckGlobals(deck);
  const oldGlobals = deckGlobals(previousDeck);
  if (globals.size !== oldGlobals.size || [...globals].some((g) => !oldGlobals.has(g))) return undefined;
  const before = slotsOf(previousDeck, scope, globals);
  const after = slotsOf(deck, scope, globals);
  if (!before || !after) return undefined;
  return { before, after, portCount: scope === null ? 0 : deck.subckts.get(scope)!.ports.length };
}

export function sameSlots(a: NetSlots, b: NetSlots): boolean {
  return sameList(a.localNames, b.localNames) && sameList(a.globalNames, b.globalNames);
}

type ScopeSlots = { slots: NetSlots; refs: Map<Statement, number[]> };

/** A definition's net slots and each element line's node slots, as its template reads them. */
function slotsOf(deck: Deck, scope: string | null, globals: ReadonlySet<string>): ScopeSlots | undefined {
  const def = scope === null ? undefined : deck.subckts.get(scope);
  if (scope !== null && !def) return undefined;
  const slots = new NetSlots(scope, globals);
  if (def) for (const p of def.portItems) slots.addPort(p, def.file);
  const refs = new Map<Statement, number[]>();
  for (const { file, item } of def ? def.body : deck.top) {
    if (item.head.text.startsWith('.')) continue;
    const read = elementNodeWords(item);
    if (read.skipped !== undefined) continue;
    refs.set(item, read.nodes.map((w) => slots.ref(w, file)));
  }
  return { slots, refs };
}

function sameList(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

/**
 * One circuit with the edited lines' elements wired anew in every instance of the edited
 * definition, or undefined when a case the patch does not take turns up.
 */
function rewireCircuit(
  c: Circuit,
  scope: string | null,
  portCount: number,
  slots: NetSlots,
  lineOf: (o: Origin) => { refs: number[]; local: string } | undefined,
  netOrigins: ReadonlyMap<string, Origin>,
  lines: MovedLines,
  maxContexts: number,
): { circuit: Circuit; changed: RewiredElements } | undefined {
  // where the edited definition sits in this circuit: prefix -> the nets its ports are bound to
  const contexts = contextsOf(c, scope);
  const none: RewiredElements = { mosfets: [], resistors: [], inductors: [], capacitors: [] };
  if (contexts.size === 0) return { circuit: c, changed: none };
  if (contexts.size > maxContexts) return undefined;
  // a cell's inferred port directions read its wiring
  if (c.standalone && c.ports.some((p) => p.from === 'inferred')) return undefined;
  const flatNet = (prefix: string, ports: readonly number[] | null, slot: number): number | undefined => {
    if (slot < 0) return c.netByName.get(slots.globalNames[-slot - 1]!);
    if (ports && slot < portCount) return ports[slot];
    return c.netByName.get(prefix + slots.localNames[slot]!);
  };
  /** The new nets of an element written on an edited line, or null when it is not on one. */
  const newNets = (x: { name: string; origin: Origin }): number[] | null | undefined => {
    const line = lineOf(x.origin);
    if (!line || !x.name.endsWith(line.local)) return null;
    const prefix = x.name.slice(0, x.name.length - line.local.length);
    const ports = contexts.get(prefix);
    if (ports === undefined) return undefined;
    const out: number[] = [];
    for (const s of line.refs) {
      const id = flatNet(prefix, ports, s);
      if (id === undefined) return undefined;
      out.push(id);
    }
    return out;
  };

  // instance lines first: their subtrees' devices follow the moved ports
  const below = new Map<string, Map<number, number>>();
  const spans: Array<{ instances: readonly [number, number]; mosfets: readonly [number, number] }> = [];
  const flagged = new Uint8Array(c.nets.length);
  let instances: Instance[] | undefined;
  const instanceIndex = originIndex(c.instances);
  for (const i of onEditedLines(instanceIndex, lineOf)) {
    const inst = c.instances[i]!;
    const nets = newNets(inst);
    if (nets === undefined) return undefined;
    if (nets === null) continue;
    if (nets.length !== inst.ports.length) return undefined;
    const remap = new Map<number, number>();
    const q = inst.name + '.';
    for (let k = 0; k < nets.length; k++) {
      const from = inst.ports[k]!;
      const to = nets[k]!;
      if (from === to) continue;
      // the subtree reaches the old net through this port alone, or the remap would be ambiguous
      if (inst.ports.indexOf(from) !== k || inst.ports.lastIndexOf(from) !== k || c.nets[from]!.global || c.nets[from]!.name.startsWith(q)) return undefined;
      remap.set(from, to);
      flagged[from] = 1;
    }
    instances ??= c.instances.slice();
    instances[i] = lines.move({ ...inst, ports: nets });
    if (remap.size) {
      below.set(q, remap);
      spans.push({ instances: inst.below.instances, mosfets: [c.instanceMosfets[2 * i]!, c.instanceMosfets[2 * i + 1]!] });
    }
  }
  /** The remap of the edited instance whose subtree holds `name`, if any. */
  const subtreeRemap = (name: string): Map<number, number> | undefined => {
    for (let p = name.indexOf('.'); p >= 0; p = name.indexOf('.', p + 1)) {
      const r = below.get(name.slice(0, p + 1));
      if (r) return r;
    }
    return undefined;
  };
  const through = (r: Map<number, number>, n: number) => r.get(n) ?? n;
  // the instances and devices below an edited instance (contiguous in their lists)
  if (below.size && instances) {
    for (const span of spans) {
      for (let i = span.instances[0]; i < span.instances[1]; i++) {
        const inst = instances[i]!;
        if (!inst.ports.some((n) => flagged[n])) continue;
        const r = subtreeRemap(inst.name);
        if (r) instances[i] = { ...inst, ports: inst.ports.map((n) => through(r, n)) };
      }
    }
  }

  const changed: RewiredElements = { mosfets: [], resistors: [], inductors: [], capacitors: [] };
  let mosfets: Mosfet[] | undefined;
  const mosfetIndex = originIndex(c.mosfets);
  // the devices of the edited lines, then (for an edited instance) those on a moved port's net
  const candidates = onEditedLines(mosfetIndex, lineOf);
  if (below.size) {
    const listed = new Set(candidates);
    for (const span of spans) {
      for (let i = span.mosfets[0]; i < span.mosfets[1]; i++) {
        const m = c.mosfets[i]!;
        if ((flagged[m.d] || flagged[m.g] || flagged[m.s] || flagged[m.b]) && !listed.has(i)) candidates.push(i);
      }
    }
  }
  candidates.sort((x, y) => x - y);
  for (const i of candidates) {
    const m = c.mosfets[i]!;
    let d = m.d, g = m.g, s = m.s, b = m.b;
    const nets = newNets(m);
    if (nets === undefined) return undefined;
    if (nets) {
      if (nets.length < 4) return undefined;
      [d, g, s, b] = nets as [number, number, number, number];
    } else if (below.size && (flagged[d] || flagged[g] || flagged[s] || flagged[b])) {
      const r = subtreeRemap(m.name);
      if (r) [d, g, s, b] = [through(r, d), through(r, g), through(r, s), through(r, b)];
    }
    const same = d === m.d && g === m.g && s === m.s && b === m.b;
    // a device written on an edited line takes its line's new place
    if (same && !nets) continue;
    mosfets ??= c.mosfets.slice();
    mosfets[i] = lines.move({ ...m, d, g, s, b });
    if (!same) changed.mosfets.push(i);
  }
  const twoTerminals = <T extends TwoTerminal>(list: T[], into: number[]): T[] | undefined => {
    let out: T[] | undefined;
    for (let i = 0; i < list.length; i++) {
      const x = list[i]!;
      let a = x.a, b = x.b;
      const nets = newNets(x);
      if (nets === undefined) return undefined;
      if (nets) [a, b] = [nets[0]!, nets[1] ?? nets[0]!];
      else if (below.size && (flagged[a] || flagged[b])) {
        const r = subtreeRemap(x.name);
        if (r) [a, b] = [through(r, a), through(r, b)];
      }
      const same = a === x.a && b === x.b;
      if (same && !nets) continue;
      out ??= list.slice();
      out[i] = lines.move({ ...x, a, b });
      if (!same) into.push(i);
    }
    return out ?? list;
  };
  const resistors = twoTerminals<Resistor>(c.resistors, changed.resistors);
  const inductors = twoTerminals<TwoTerminal>(c.inductors, changed.inductors);
  const capacitors = twoTerminals<Capacitor>(c.capacitors, changed.capacitors);
  if (!resistors || !inductors || !capacitors) return undefined;
  // sources decide rails, clocks and inputs; diodes and connectivity-only elements are not patched
  const still = (x: { name: string; origin: Origin }, terminals: number[]) => newNets(x) === null && !(below.size && terminals.some((n) => flagged[n]) && subtreeRemap(x.name));
  if (!c.sources.every((x) => still(x, [x.p, x.n])) || !c.diodes.every((x) => still(x, [x.a, x.b])) || !c.others.every((x) => still(x, x.nets))) return undefined;

  let nets: Net[] = c.nets;
  if (netOrigins.size) {
    const renewed = new Map<Origin, Origin>();
    nets = c.nets.map((n) => {
      const to = n.origin.subckt === scope ? netOrigins.get(n.origin.local) : undefined;
      if (!to) return n;
      let o = renewed.get(n.origin);
      if (!o) renewed.set(n.origin, (o = to));
      return { ...n, origin: o };
    });
  }
  if (mosfets) carryOriginIndex(mosfetIndex, mosfets, lineOf);
  if (instances) carryOriginIndex(instanceIndex, instances, lineOf);
  const circuit: Circuit = {
    ...c,
    nets,
    // the elements on edited lines were moved above; sources and the rest are not on them
    mosfets: mosfets ?? c.mosfets,
    resistors,
    inductors,
    capacitors,
    instances: instances ?? c.instances,
  };
  return { circuit, changed };
}

/** The index of `next` (`list` with the elements of the edited lines on moved origins). */
function carryOriginIndex(index: OriginIndex, next: ReadonlyArray<{ origin: Origin }>, onEdited: (o: Origin) => unknown): void {
  const out = new Map(index);
  for (const [o, at] of index) {
    if (!onEdited(o)) continue;
    out.delete(o);
    for (const i of at) {
      const moved = next[i]!.origin;
      const list = out.get(moved);
      if (list) list.push(i);
      else out.set(moved, [i]);
    }
  }
  setOriginIndex(next, out);
}

/** Positions of the elements written on an edited line, ascending. */
function onEditedLines(index: OriginIndex, lineOf: (o: Origin) => unknown): number[] {
  const out: number[] = [];
  for (const [o, at] of index) if (lineOf(o)) out.push(...at);
  return out.sort((x, y) => x - y);
}
