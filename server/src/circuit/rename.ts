// The elaboration stage's answer to a net rename: when the new deck differs from the old one only
// in node names on element lines, and within each subcircuit (or the top level) every use of a
// name became one new name that was not used there before, the flat circuit is the same graph
// with some nets called differently. Names that carry meaning (rails and clocks by their name,
// globals, ports, names in directives or settings, source nodes) are never taken this way.
// Anything else answers `undefined`, and the caller elaborates afresh.

import type { Range } from '../core/source';
import { movedLines } from './movedLines';
import { DerivedMap } from '../core/overlay';
import { DEFAULT_CLOCK_PATTERN, DEFAULT_GROUND_PATTERN, DEFAULT_SUPPLY_PATTERN, type EngineOptions } from '../core/options';
import type { Circuit, Design, Net, Origin } from './circuit';
import type { Deck, SubcktDefinition } from './deck';
import { interpretElement } from './elements';
import { editedStatements, sameItem, sameWords } from '../syntax/compare';
import type { Item, Statement } from '../syntax/tree';

export interface NetRename {
  design: Design;
  /** Flat net name -> its new name. */
  names: Map<string, string>;
  /** The edited lines: old range -> new range, per file. */
  moved: Array<{ file: string; from: Range; to: Range }>;
}

const GROUND_ALIASES = new Set(['0', 'gnd', 'gnd!']);

interface EditedLine {
  file: string;
  before: Statement;
  after: Statement;
  /** Node words renamed on it: [old, new], lower case. */
  renames: Array<[string, string]>;
}

export function renameNets(previousDeck: Deck, previous: Design, deck: Deck, options: EngineOptions): NetRename | undefined {
  const edited = editedStatements(previousDeck.files, deck.files, (file, before, after): EditedLine | undefined => {
    const renames = renamedNodes(before, after);
    return renames ? { file, before, after, renames } : undefined;
  });
  if (!edited || edited.length === 0) return undefined;
  const scopeOf = scopesOfStatements(deck);
  if (!scopeOf) return undefined;
  const renames = new Map<string | null, Map<string, string>>();
  for (const line of edited) {
    const scope = scopeOf.get(line.after);
    if (scope === undefined) return undefined;
    const m = renames.get(scope) ?? new Map<string, string>();
    renames.set(scope, m);
    for (const [from, to] of line.renames) {
      const had = m.get(from);
      if (had !== undefined && had !== to) return undefined;
      m.set(from, to);
    }
  }
  if (!meaningless(renames, previousDeck, deck, options)) return undefined;
  // every use renamed, and the new names new in their scope: the same graph
  for (const [scope, m] of renames) {
    const before = namesIn(previousDeck, scope);
    const after = namesIn(deck, scope);
    if (!before || !after) return undefined;
    const targets = new Set<string>();
    for (const [from, to] of m) {
      if (targets.has(to) || after.other.has(from) || after.nodes.has(from) || before.nodes.has(to) || before.other.has(to) || after.other.has(to) || before.other.has(from)) return undefined;
      targets.add(to);
    }
  }
  // positions on the edited lines: old start -> new range (items after a renamed word move along)
  const lines = movedLines(edited);
  const names = new Map<string, string>();
  const renamedOrigins = new Map<Origin, Origin>();
  const circuits: Circuit[] = [];
  for (const c of previous.circuits) {
    let nets: Net[] | undefined;
    for (let i = 0; i < c.nets.length; i++) {
      const n = c.nets[i]!;
      const to = renames.get(n.origin.subckt)?.get(n.origin.local);
      if (to === undefined) continue;
      if (n.global || !n.name.endsWith(n.origin.local)) return undefined;
      const name = n.name.slice(0, n.name.length - n.origin.local.length) + to;
      nets ??= c.nets.slice();
      let origin = renamedOrigins.get(n.origin);
      if (!origin) renamedOrigins.set(n.origin, (origin = { ...n.origin, local: to }));
      nets[i] = { ...n, name, origin };
      names.set(n.name, name);
    }
    const touched = lines.moveAll;
    const allNets = touched(nets ?? c.nets);
    let netByName = c.netByName;
    if (nets) {
      const back = new Map<string, string>();
      for (const [from, to] of names) {
        if (c.netByName.get(from) === undefined || c.netByName.has(to)) return undefined;
        back.set(to, from);
      }
      netByName = RenamedNetNames.over(c.netByName, names, back);
    }
    circuits.push({ ...c, nets: allNets, netByName, mosfets: touched(c.mosfets), capacitors: touched(c.capacitors), resistors: touched(c.resistors), inductors: touched(c.inductors), sources: touched(c.sources), diodes: touched(c.diodes), others: touched(c.others), instances: touched(c.instances) });
  }
  if (names.size === 0) return undefined;
  return { design: { ...previous, circuits }, names, moved: lines.moved };
}

/** Names that decide roles, and names the user wrote elsewhere, are not renamed here. */
function meaningless(renames: Map<string | null, Map<string, string>>, previousDeck: Deck, deck: Deck, options: EngineOptions): boolean {
  const supply = new RegExp(options.supplyNamePattern ?? DEFAULT_SUPPLY_PATTERN, 'i');
  const ground = new RegExp(options.groundNamePattern ?? DEFAULT_GROUND_PATTERN, 'i');
  const clock = new RegExp(options.clockNamePattern ?? DEFAULT_CLOCK_PATTERN, 'i');
  const globals = new Set([...previousDeck.globals, ...deck.globals].map((g) => g.item.text.toLowerCase()));
  const written = new Set<string>();
  for (const d of [...previousDeck.directives, ...deck.directives]) for (const w of d.item.args) for (const part of w.text.toLowerCase().split(/[=,.:()]/)) written.add(part);
  const collect = (defs: Map<string, SubcktDefinition>) => {
    for (const d of defs.values()) {
      for (const x of d.directives) for (const w of x.item.args) for (const part of w.text.toLowerCase().split(/[=,.:()]/)) written.add(part);
      collect(d.local);
    }
  };
  collect(previousDeck.subckts);
  collect(deck.subckts);
  for (const k of Object.keys(options.supplies ?? {})) written.add(k.toLowerCase());
  for (const g of options.grounds ?? []) written.add(g.toLowerCase());
  for (const k of options.clocks ?? []) written.add(k.net.toLowerCase()), k.inverseOf && written.add(k.inverseOf.toLowerCase());
  for (const k of options.standby ?? []) written.add(k.net.toLowerCase());
  for (const [scope, m] of renames) {
    const ports = scope === null ? [] : [...(previousDeck.subckts.get(scope)?.ports ?? []), ...(deck.subckts.get(scope)?.ports ?? [])];
    for (const [from, to] of m) {
      for (const name of [from, to]) {
        if (GROUND_ALIASES.has(name) || name.endsWith('!') || name.includes('.') || globals.has(name) || ports.includes(name) || written.has(name)) return false;
        if (supply.test(name) || ground.test(name) || clock.test(name)) return false;
      }
    }
  }
  return true;
}

/** Node names used in a scope, and every other word there (so a renamed name may not hide in a card). */
function namesIn(deck: Deck, scope: string | null): { nodes: Set<string>; other: Set<string> } | undefined {
  const body = scope === null ? deck.top : deck.subckts.get(scope)?.body;
  if (!body) return undefined;
  const nodes = new Set<string>();
  const other = new Set<string>();
  const words = (it: Item) => {
    if (it.kind === 'word') other.add(it.text.toLowerCase());
    else if (it.kind === 'group') it.items.forEach(words);
    else if (it.kind === 'assign') it.value && words(it.value);
  };
  for (const { item } of body) {
    const head = item.head.text.toLowerCase();
    const syntax = head.startsWith('.') ? undefined : interpretElement(item);
    const nodeItems = new Set(syntax && 'nodes' in syntax ? syntax.nodes : []);
    // a source's nodes decide clocks and inputs by name: never renamed
    if (syntax?.kind === 'source') for (const w of syntax.nodes) other.add(w.text.toLowerCase());
    for (const it of item.items) {
      if (it.kind === 'word' && nodeItems.has(it)) nodes.add(it.text.toLowerCase());
      else words(it);
    }
  }
  return { nodes, other };
}

/** The node words of an element line that changed, when nothing else on it did. */
export function renamedNodes(x: Statement, y: Statement): Array<[string, string]> | undefined {
  if (x.head.text[0] === '.' || !sameItem(x.head, y.head, 0) || x.items.length !== y.items.length) return undefined;
  if (x.range.start.line !== y.range.start.line || x.range.end.line !== y.range.end.line) return undefined;
  const sx = interpretElement(x);
  const sy = interpretElement(y);
  if (!sx || !sy || sx.kind !== sy.kind || !('nodes' in sx) || !('nodes' in sy) || sx.nodes.length !== sy.nodes.length || sx.kind === 'source') return undefined;
  const nodeAt = new Map<Item, number>();
  sx.nodes.forEach((w, k) => nodeAt.set(w, k));
  const out: Array<[string, string]> = [];
  let shiftedLine = -1;
  for (let k = 0; k < x.items.length; k++) {
    const p = x.items[k]!;
    const q = y.items[k]!;
    if (sameItem(p, q, 0)) continue;
    const node = nodeAt.get(p);
    if (node !== undefined && q.kind === 'word' && sy.nodes[node] === q && p.range.start.line === q.range.start.line) {
      if (p.range.start.character !== q.range.start.character && p.range.start.line !== shiftedLine) return undefined;
      const from = (p as { text: string }).text.toLowerCase();
      const to = q.text.toLowerCase();
      if (from !== to) out.push([from, to]);
      shiftedLine = p.range.start.line;
      continue;
    }
    // a word further along a line whose earlier word was renamed
    if (p.range.start.line === shiftedLine && sameWords(p, q)) continue;
    return undefined;
  }
  return out.length ? out : undefined;
}

/**
 * The circuit's name -> net table after a rename, read through the old one (copying a table of
 * 50,000 names was most of a rename's cost). Lookups are what every stage does with it; the
 * rarely used whole-table views are built on demand. Read-only, like every stage's output.
 */
class RenamedNetNames extends DerivedMap<string, number> {
  private constructor(
    private readonly base: Map<string, number>,
    private readonly renamed: ReadonlyMap<string, string>,
    private readonly back: ReadonlyMap<string, string>,
    depth: number,
  ) {
    super(depth);
  }

  static over(base: Map<string, number>, renamed: ReadonlyMap<string, string>, back: ReadonlyMap<string, string>): Map<string, number> {
    const depth = base instanceof DerivedMap ? base.depth + 1 : 1;
    return new RenamedNetNames(base, renamed, back, depth).folded();
  }

  override get(name: string): number | undefined {
    const old = this.back.get(name);
    if (old !== undefined) return this.base.get(old);
    return this.renamed.has(name) ? undefined : this.base.get(name);
  }

  override has(name: string): boolean {
    return this.get(name) !== undefined;
  }

  protected build(): Map<string, number> {
    const m = new Map<string, number>();
    for (const [k, v] of this.base) m.set(this.renamed.get(k) ?? k, v);
    return m;
  }
}

/**
 * Which subcircuit (lower case) or the top level (null) holds each statement of a deck, or
 * undefined when a definition holds local definitions (the quick patches leave those alone).
 */
export function scopesOfStatements(deck: Deck): Map<Statement, string | null> | undefined {
  const scopeOf = new Map<Statement, string | null>();
  let nested = false;
  const walk = (defs: Map<string, SubcktDefinition>) => {
    for (const d of defs.values()) {
      if (d.local.size) nested = true;
      for (const s of d.body) scopeOf.set(s.item, d.name);
      walk(d.local);
    }
  };
  walk(deck.subckts);
  for (const s of deck.top) scopeOf.set(s.item, null);
  return nested ? undefined : scopeOf;
}
