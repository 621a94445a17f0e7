// Elaboration: subcircuit definitions and instances become one flat circuit (or, for a cell
// library with no top-level instances, one circuit per subcircuit with its ports as boundary
// nets). Each definition is compiled once into a template (its local nets and elements); each
// distinct set of parameter values is evaluated once, so a cell instantiated 10,000 times costs
// one evaluation and 10,000 cheap copies.

import type { Diagnostic } from '../core/diagnostics';
import { diag } from '../core/diagnostics';
import type { Range } from '../core/source';
import { DEFAULT_GROUND_PATTERN, DEFAULT_SUPPLY_PATTERN, type EngineOptions } from '../core/options';
import type { AssignItem, Statement, ValueItem, WordItem } from '../syntax/tree';
import type { Circuit, Design, Instance, Mosfet, Net, NetKind, Origin, Polarity, Port, PortDirection, Waveform } from './circuit';
import { mosfetRecord } from './circuit';
import type { Deck, Located, SubcktDefinition } from './deck';
import { emptyDirectives, readDeckDirectives, roleNames, type DeviceKind, type DirectiveSet } from './directives';
import { interpretElement, MODELLED_LETTERS, splitItems, type ElementSyntax, type WaveformSyntax } from './elements';
import { readModelCard, selectModel, type ModelCard } from './models';
import { evaluateValue, ParamScope } from './params';
import { parseSpiceNumber } from './numbers';
import { carryElementIndexes } from './elementIndex';
import { ITEMS_PER_SLICE, runToEnd, stepDue, type Steps } from '../core/steps';

const GROUND_ALIASES = new Set(['0', 'gnd', 'gnd!']);

const DEFAULT_DEVICE_RULES: { re: RegExp; kind: DeviceKind }[] = [
  { re: /^short$/, kind: 'short' },
  { re: /nfet|nmos|^nch|_nch|^n(lvt|hvt|svt|ulvt)\b/, kind: 'nmos' },
  { re: /pfet|pmos|^pch|_pch|^p(lvt|hvt|svt|ulvt)\b/, kind: 'pmos' },
  { re: /diode/, kind: 'diode' },
];

/**
 * The flat name of a global net a node word names ('0' for the ground aliases), or undefined for
 * a name local to its definition. A definition's own ports are looked up before this.
 */
export function globalNameOf(word: string, globals: ReadonlySet<string>): string | undefined {
  const name = GROUND_ALIASES.has(word) ? '0' : word;
  return globals.has(name) || name.endsWith('!') ? name : undefined;
}

/** The global net names of a deck: node 0 and its `.global` names. */
export function deckGlobals(deck: Deck): Set<string> {
  return new Set(['0', ...deck.globals.map((g) => g.item.text.toLowerCase())]);
}

/**
 * The node words of an element line as the elaborator reads them, or why it skips the line:
 * not an element name, not readable, too few nodes (or a MOSFET without a model), an instance
 * without a subcircuit name.
 */
export function elementNodeWords(item: Statement): { skipped?: undefined; syntax: ElementSyntax; nodes: WordItem[] } | { skipped: 'name' | 'unreadable' | 'nodes' | 'subckt'; syntax?: ElementSyntax; need?: number } {
  if (!/[a-z]/.test(item.head.text[0]!.toLowerCase())) return { skipped: 'name' };
  const syntax = interpretElement(item);
  if (!syntax) return { skipped: 'unreadable' };
  const nodes = 'nodes' in syntax ? syntax.nodes : [];
  const need = syntax.kind === 'mos' ? 4 : syntax.kind === 'passive' || syntax.kind === 'source' || syntax.kind === 'diode' ? 2 : 0;
  if (nodes.length < need || (syntax.kind === 'mos' && !syntax.model)) return { skipped: 'nodes', syntax, need };
  if (syntax.kind === 'instance' && !syntax.subckt) return { skipped: 'subckt', syntax };
  return { syntax, nodes };
}

/**
 * What the elaborator says of an element line it leaves out (`elementNodeWords` skipped it: no
 * element, no net name), in the order it says it; a line that is not left out says nothing here.
 * The quick answer to a half-typed line (inertEdit.ts) says the same through this.
 */
export function skippedLineFindings(file: string, item: Statement, read = elementNodeWords(item)): Diagnostic[] {
  if (read.skipped === undefined || read.skipped === 'unreadable') return [];
  if (read.skipped === 'name') return [diag('syntax', file, item.head.range, `'${item.head.text}' is not an element name: elements start with a letter`)];
  const out: Diagnostic[] = [];
  if (!MODELLED_LETTERS.has(item.head.text[0]!.toLowerCase())) out.push(unmodelledFinding(file, item));
  if (read.skipped === 'nodes') out.push(diag('syntax', file, item.range, `${item.head.text} needs ${read.need} nodes${read.syntax?.kind === 'mos' ? ' (drain gate source bulk) and a model' : ''}`));
  else out.push(diag('syntax', file, item.range, `${item.head.text} needs nodes and a subcircuit name`));
  return out;
}

function unmodelledFinding(file: string, item: Statement): Diagnostic {
  const letter = item.head.text[0]!.toLowerCase();
  return diag('unknown-element', file, item.head.range, `${item.head.text}: '${letter.toUpperCase()}' elements are not modelled; kept as connectivity only`);
}

/**
 * Whether the top level is elaborated (a circuit of its own, its element lines read): it has an
 * element line other than a source, or there is no definition; never under a chosen top cell.
 */
export function topIsElaborated(deck: Deck, options: EngineOptions): boolean {
  if (options.top) return false;
  const topHasDevices = deck.top.some((s) => {
    const c = s.item.head.text[0]!.toLowerCase();
    return c !== '.' && c !== 'v' && c !== 'i';
  });
  return topHasDevices || deck.subckts.size === 0;
}

/**
 * The flat nets renumbered in runs by the definition whose body names them, the circuit's own
 * scope (`own`: null for the top level) last, after the definitions from the most copied to the
 * least (ties in the order first built); before them all the `pinned` nets, those every part of
 * the circuit reaches and no quick edit can give or take a role: globals, source terminals,
 * rails by name, nets a directive or a setting names. A name put in to a definition's body then
 * moves only the nets of its later copies and of the definitions after it (newNets.ts), not
 * every net built after its first copy, nor the supply and the clocks every device touches: a
 * name put in at the top level moves only the top level's later nets, one in a cell of a
 * hundred copies a few thousand. Each copy's own nets stay one run, in slot order. The records
 * are this elaboration's own, not yet seen by anyone, so they are set in place. Returns old id
 * -> new id.
 */
function* numberNetsByScope(c: Circuit, own: string | null, pinned: Uint8Array): Steps<Int32Array> {
  // a pass over every record: it yields, as the rest of elaboration does
  const due = stepDue();
  const pause = (k: number) => (k & 4095) === 0 && due();
  const copies = new Map<string, number>();
  for (let i = 0; i < c.instances.length; i++) {
    if (pause(i)) yield;
    const name = c.instances[i]!.subckt;
    copies.set(name, (copies.get(name) ?? 0) + 1);
  }
  // each net's scope (undefined: pinned), as an index into the scopes in the order first built
  const scopes: Array<string | null | undefined> = [];
  const scopeIndex = new Map<string | null | undefined, number>();
  const scopeOfNet = new Int32Array(c.nets.length);
  for (let x = 0; x < c.nets.length; x++) {
    if (pause(x)) yield;
    const k = pinned[x] ? undefined : c.nets[x]!.origin.subckt;
    let i = scopeIndex.get(k);
    if (i === undefined) (scopeIndex.set(k, (i = scopes.length)), scopes.push(k));
    scopeOfNet[x] = i;
  }
  const rank = (k: string | null | undefined) => (k === undefined ? -Infinity : k === own ? Infinity : -(copies.get(k as string) ?? 0));
  const order = scopes.map((k, i) => ({ k, i })).sort((x, y) => rank(x.k) - rank(y.k) || x.i - y.i);
  const runOf = new Int32Array(scopes.length);
  order.forEach(({ i }, r) => (runOf[i] = r));
  // a counting sort: each scope's nets keep their order within its run
  const start = new Int32Array(order.length + 1);
  for (let x = 0; x < c.nets.length; x++) start[runOf[scopeOfNet[x]!]! + 1]!++;
  for (let r = 0; r < order.length; r++) start[r + 1]! += start[r]!;
  c.pinnedNets = order.length > 0 && order[0]!.k === undefined ? start[1]! : 0;
  const oldToNew = new Int32Array(c.nets.length);
  for (let x = 0; x < c.nets.length; x++) oldToNew[x] = start[runOf[scopeOfNet[x]!]!]!++;
  const nets = new Array<Net>(c.nets.length);
  for (let x = 0; x < c.nets.length; x++) nets[oldToNew[x]!] = c.nets[x]!;
  yield;
  for (let x = 0; x < nets.length; x++) c.nets[x] = nets[x]!;
  // every name is in the map already: new values, no entries put in (the map keeps the order the
  // nets were built in; nothing walks it)
  for (let x = 0; x < nets.length; x++) {
    if (pause(x)) yield;
    c.netByName.set(nets[x]!.name, x);
  }
  const at = (x: number) => oldToNew[x]!;
  for (let i = 0; i < c.mosfets.length; i++) {
    if (pause(i)) yield;
    const m = c.mosfets[i]!;
    (m.d = at(m.d)), (m.g = at(m.g)), (m.s = at(m.s)), (m.b = at(m.b));
  }
  for (const list of [c.capacitors, c.resistors, c.inductors, c.diodes]) for (const e of list) (e.a = at(e.a)), (e.b = at(e.b));
  for (const v of c.sources) (v.p = at(v.p)), (v.n = at(v.n));
  for (const o of c.others) for (let k = 0; k < o.nets.length; k++) o.nets[k] = at(o.nets[k]!);
  for (let i = 0; i < c.instances.length; i++) {
    if (pause(i)) yield;
    const ports = c.instances[i]!.ports;
    for (let k = 0; k < ports.length; k++) ports[k] = at(ports[k]!);
  }
  return oldToNew;
}

/**
 * A definition's net slots as its template numbers them: ports first (each its own slot, even
 * when named like a global, so binding stays positional), then the other names in the order
 * the element lines first use them; globals apart, in the order first used. The flat circuit's
 * net order follows from these lists, so an edit that keeps them keeps every net's number.
 */
export class NetSlots {
  readonly localNames: string[] = [];
  readonly localOrigins: Origin[] = [];
  readonly globalNames: string[] = [];
  private readonly index = new Map<string, number>();
  private readonly globalIndex = new Map<string, number>();

  constructor(
    private readonly subckt: string | null,
    private readonly globals: ReadonlySet<string>,
  ) {}

  /** False when the port's name was listed already (it still gets its slot). */
  addPort(p: WordItem, file: string): boolean {
    const name = p.text.toLowerCase();
    const fresh = !this.index.has(name);
    const i = this.localNames.length;
    this.localNames.push(name);
    this.localOrigins.push({ file, range: p.range, subckt: this.subckt, local: name });
    if (fresh) this.index.set(name, i);
    return fresh;
  }

  /** A node word's slot: >= 0 a local net, < 0 -(k+1) for globalNames[k]. */
  ref(w: WordItem, file: string): number {
    const name = w.text.toLowerCase();
    const known = this.index.get(name);
    if (known !== undefined) return known;
    const global = globalNameOf(name, this.globals);
    if (global !== undefined) {
      let g = this.globalIndex.get(global);
      if (g === undefined) {
        g = this.globalNames.length;
        this.globalNames.push(global);
        this.globalIndex.set(global, g);
      }
      return -(g + 1);
    }
    const i = this.localNames.length;
    this.localNames.push(name);
    this.localOrigins.push({ file, range: w.range, subckt: this.subckt, local: name });
    this.index.set(name, i);
    return i;
  }
}

/** The device rules in the order the elaborator tries them: the directives', the settings', the defaults. */
export function deviceRuleList(directives: DirectiveSet, options: EngineOptions): Array<{ re: RegExp; kind: DeviceKind }> {
  return [...directives.devices.map((r) => ({ re: globToRegExp(r.pattern), kind: r.kind })), ...(options.deviceRules ?? []).map((r) => ({ re: globToRegExp(r.pattern), kind: r.kind })), ...DEFAULT_DEVICE_RULES];
}

/** What the elaborator says of an instance of a cell nobody defines and no device rule maps. */
export function unknownSubcktFinding(file: string, subckt: WordItem): Diagnostic {
  return diag('unknown-subckt', file, subckt.range, `subcircuit '${subckt.text}' is not defined, and no device rule maps it to a transistor`);
}

function globToRegExp(glob: string): RegExp {
  return new RegExp('^' + glob.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '.*').replace(/\?/g, '.') + '$', 'i');
}

/** A compiled subcircuit body: local nets (ports first) and its elements with local net indices. */
interface Template {
  def: SubcktDefinition | undefined;
  localNames: string[];
  localOrigins: Origin[];
  globalNames: string[];
  elements: TemplateElement[];
  params: Located<Statement>[];
  /** Evaluated values by parameter key. */
  valueCache: Map<string, ElementValues[]>;
}

interface TemplateElement {
  syntax: ElementSyntax;
  /** >= 0: local net index; < 0: -(k+1) indexes globalNames. */
  nodes: number[];
  origin: Origin;
  file: string;
}

type ElementValues =
  | { kind: 'mos'; polarity: Polarity | undefined; wM: number; lM: number; m: number; nf: number; adM2?: number; asM2?: number; pdM?: number; psM?: number; model: string; card: ModelCard | undefined }
  | { kind: 'value'; value: number | undefined }
  | { kind: 'wave'; waveform: Waveform }
  | { kind: 'instance'; target: SubcktDefinition; scope: ParamScope; key: string }
  | { kind: 'none' };

export interface ElaborateResult {
  design: Design;
  diagnostics: Diagnostic[];
}

/**
 * No scale stated: the lengths written as plain numbers decide. Channel lengths in metres are far
 * below a millimetre; written in microns they are 0.01 or more. The median written L and the
 * first micron-looking one when the median looks like microns, else undefined.
 */
export function guessMicronScale(deck: Deck): { median: number; first: { file: string; range: Range } } | undefined {
  return runToEnd(guessMicronScaleSteps(deck));
}

/**
 * The lengths a line gives the guess of the geometry scale: every `l=` written as a plain number
 * on a MOSFET or instance line, read or not as an element (a line left out counts too).
 */
export function scaleGuessLengths(stmt: Statement): Array<{ value: number; range: Range }> {
  const c = stmt.head.text[0]!.toLowerCase();
  if (c !== 'm' && c !== 'x') return [];
  const out: Array<{ value: number; range: Range }> = [];
  for (const it of stmt.items) {
    if (it.kind === 'assign' && it.name.text.toLowerCase() === 'l' && it.value?.kind === 'word') {
      const v = parseSpiceNumber(it.value.text);
      if (v !== undefined) out.push({ value: v, range: it.range });
    }
  }
  return out;
}

/** `guessMicronScale` in slices (a flat netlist has a line per device). */
function* guessMicronScaleSteps(deck: Deck): Steps<{ median: number; first: { file: string; range: Range } } | undefined> {
  const lengths: number[] = [];
  let first: { file: string; range: Range } | undefined;
  const due = stepDue();
  const scan = (file: string, stmt: Statement) => {
    for (const { value: v, range } of scaleGuessLengths(stmt)) {
      lengths.push(v);
      if (v > 1e-3 && !first) first = { file, range };
    }
  };
  const bodies: Array<Located<Statement>[]> = [deck.top];
  const walk = (defs: Map<string, SubcktDefinition>) => {
    for (const d of defs.values()) {
      bodies.push(d.body);
      walk(d.local);
    }
  };
  walk(deck.subckts);
  for (const body of bodies) {
    for (const s of body) {
      scan(s.file, s.item);
      if (due()) yield;
    }
  }
  if (lengths.length === 0) return undefined;
  lengths.sort((a, b) => a - b);
  const median = lengths[lengths.length >> 1]!;
  return median > 1e-3 && first ? { median, first } : undefined;
}

/** A design after an edit of values alone (see `revalue`). */
export interface RevaluedDesign {
  /** The previous circuits, with the MOSFETs whose values or card changed replaced; the new cards and facts. */
  design: Design;
  /** Per circuit: the indices of the replaced MOSFETs. */
  changed: number[][];
  /** What `elaborate` reports for the deck. */
  diagnostics: Diagnostic[];
}

/**
 * The elaboration of `deck`, from `previous` (the design of a deck that differs from it only in
 * `.param` and `.model` values), as `elaborate` would give it when nothing but MOSFET values
 * and cards changed; undefined otherwise. It reads each cell's values once per parameter set
 * and walks the previous circuits instead of building them again.
 */
export function revalue(deck: Deck, previous: Design, options: EngineOptions = {}): RevaluedDesign | undefined {
  return runToEnd(new Elaborator(deck, options).revalue(previous));
}

/** Model cards compared by value once per pair (a card read again from the same text is equal). */
class SameCards {
  private readonly seen = new Map<ModelCard, ModelCard>();
  same(old: ModelCard | undefined, next: ModelCard | undefined): boolean {
    if (old === next) return true;
    if (!old || !next) return false;
    if (this.seen.get(next) === old) return true;
    const same = JSON.stringify(old) === JSON.stringify(next);
    if (same) this.seen.set(next, old);
    return same;
  }
  /** The previous card a card read again was found equal to, else the card itself. */
  kept(next: ModelCard): ModelCard {
    return this.seen.get(next) ?? next;
  }
}

/** Where `revalue`'s walk stands in a previous circuit's lists, and the MOSFETs it replaced. */
class ValueWalk {
  mosfets = 0;
  capacitors = 0;
  resistors = 0;
  inductors = 0;
  diodes = 0;
  sources = 0;
  others = 0;
  instances = 0;
  readonly changed: number[] = [];
  private replaced: Mosfet[] | undefined;
  constructor(
    private readonly c: Circuit,
    private readonly cards: SameCards,
  ) {}

  /** The previous circuit's next device is this one (by its flat name): the same, or replaced. */
  mosfet(name: string, v: Extract<ElementValues, { kind: 'mos' }>): boolean {
    const k = this.mosfets++;
    const m = this.c.mosfets[k];
    if (!m || m.name !== name || m.polarity !== v.polarity) return false;
    const sameCard = this.cards.same(m.card, v.card);
    if (m.wM === v.wM && m.lM === v.lM && m.m === v.m && m.nf === v.nf && m.adM2 === v.adM2 && m.asM2 === v.asM2 && m.pdM === v.pdM && m.psM === v.psM && m.model === v.model && sameCard) return true;
    // the new values on the previous device's nets and line; a card read again equal to the one
    // it had stays that one (revalue puts it in the design's table), so a later edit of the card
    // finds this device among those on it
    const values = sameCard && v.card !== m.card ? { ...v, card: m.card } : v;
    (this.replaced ??= this.c.mosfets.slice())[k] = mosfetRecord(m.name, m.polarity, m.d, m.g, m.s, m.b, values, m.origin);
    this.changed.push(k);
    return true;
  }

  instance(name: string): boolean {
    return this.c.instances[this.instances++]?.name === name;
  }

  capacitor(value: number | undefined): boolean {
    return this.c.capacitors[this.capacitors++]?.capacitanceF === value;
  }

  resistor(value: number | undefined): boolean {
    return this.c.resistors[this.resistors++]?.resistanceOhm === value;
  }

  source(waveform: Waveform): boolean {
    const old = this.c.sources[this.sources++];
    return old !== undefined && JSON.stringify(old.waveform) === JSON.stringify(waveform);
  }

  /** Every list walked to its end. */
  complete(): boolean {
    const c = this.c;
    return this.mosfets === c.mosfets.length && this.capacitors === c.capacitors.length && this.resistors === c.resistors.length && this.inductors === c.inductors.length && this.diodes === c.diodes.length && this.sources === c.sources.length && this.others === c.others.length && this.instances === c.instances.length;
  }

  circuit(): Circuit {
    if (!this.replaced) return this.c;
    // every device stays in its place and on its line
    carryElementIndexes(this.c.mosfets, this.replaced);
    return { ...this.c, mosfets: this.replaced };
  }
}

export function elaborate(deck: Deck, options: EngineOptions = {}): ElaborateResult {
  return runToEnd(elaborateSteps(deck, options));
}

/** `elaborate` in slices: it yields every few thousand elements copied into the circuit. */
export function elaborateSteps(deck: Deck, options: EngineOptions = {}): Steps<ElaborateResult> {
  return new Elaborator(deck, options).run();
}

class Elaborator {
  private readonly diagnostics: Diagnostic[] = [];
  private readonly seen = new Set<string>();
  private readonly globalScope = new ParamScope(undefined);
  private readonly models = new Map<string, ModelCard[]>();
  private readonly templates = new Map<SubcktDefinition | undefined, Template>();
  private readonly globals = new Set<string>(['0']);
  private readonly directives: DirectiveSet = emptyDirectives();
  private readonly deviceRules: { re: RegExp; kind: DeviceKind }[] = [];
  private scale = 1;
  /** The circuit being elaborated: its instances' MOSFET spans (Circuit.instanceMosfets). */
  private spans: number[] = [];
  /** Elements copied since the last yield. */
  private copied = 0;
  private scaleFrom: Design['geometryScale']['from'] = 'default';
  private tempC: number | undefined;
  private defL = 100e-6;
  private defW = 100e-6;
  /** Model names used without a card: first use and count, reported once each. */
  private readonly missingModels = new Map<string, { origin: Origin; count: number; polarity: Polarity | undefined }>();
  private readonly supplyRe: RegExp;
  private readonly groundRe: RegExp;

  constructor(
    private readonly deck: Deck,
    private readonly options: EngineOptions,
  ) {
    this.supplyRe = new RegExp(options.supplyNamePattern ?? DEFAULT_SUPPLY_PATTERN, 'i');
    this.groundRe = new RegExp(options.groundNamePattern ?? DEFAULT_GROUND_PATTERN, 'i');
  }

  private report(d: Diagnostic): void {
    const key = `${d.rule}|${d.file}|${d.range.start.line}:${d.range.start.character}|${d.message}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.diagnostics.push(d);
  }

  private paramReport = (file: string, range: Range, message: string): void => {
    this.report(diag('param-error', file, range, message));
  };

  /** Directives, device rules, globals, top-level cards, every model card and the geometry scale. */
  private *prepare(): Steps<void> {
    const deck = this.deck;
    // Directives anywhere in the deck apply to the whole design.
    readDeckDirectives(deck, this.directives, this.diagnostics);
    this.deviceRules.push(...deviceRuleList(this.directives, this.options));

    for (const g of deckGlobals(deck)) this.globals.add(g);

    // Top-level cards: parameters, options, temperature, models (models anywhere are global).
    // (A flat netlist's top level holds every device: these loops yield too.)
    const due = stepDue();
    for (const { file, item } of deck.top) {
      this.topCard(file, item);
      if (due()) yield;
    }
    // Every global parameter is evaluated, used or not, so its errors are reported (as ngspice does).
    for (const name of this.globalScope.ownNames()) this.globalScope.tryLookup(name, this.paramReport);
    const modelStatements = (defs: Map<string, SubcktDefinition>) => {
      for (const d of defs.values()) {
        for (const { file, item } of d.body) if (item.head.text.toLowerCase() === '.model') this.modelCard(file, item);
        modelStatements(d.local);
      }
    };
    modelStatements(deck.subckts);
    yield* this.chooseScale();
  }

  /** The circuits to elaborate: the top level (undefined) or standalone cells. */
  private circuitPlan(): Array<SubcktDefinition | undefined> {
    const deck = this.deck;
    if (this.options.top) {
      const def = deck.subckts.get(this.options.top.toLowerCase());
      if (def) return [def];
      const f = deck.files[0];
      this.report(diag('unknown-subckt', f?.file ?? '', { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, `--top names '${this.options.top}', which the netlist does not define`));
      return [];
    }
    if (topIsElaborated(deck, this.options)) return [undefined];
    return [...deck.subckts.values()];
  }

  /** The findings that count over every circuit, and the design around the circuits. */
  private finish(circuits: Circuit[]): Design {
    this.reportMissingModels();
    this.checkPlausibleGeometry(circuits);
    return {
      title: this.deck.title,
      circuits,
      directives: this.directives,
      geometryScale: { value: this.scale, from: this.scaleFrom },
      tempC: this.tempC,
      files: this.deck.files.map((f) => f.file),
      modelCards: this.models,
    };
  }

  *run(): Steps<ElaborateResult> {
    yield* this.prepare();
    const circuits: Circuit[] = [];
    for (const def of this.circuitPlan()) circuits.push(def === undefined ? yield* this.elaborateTop() : yield* this.elaborateStandalone(def));
    return { design: this.finish(circuits), diagnostics: this.diagnostics };
  }

  // ---- cards -----------------------------------------------------------------------------

  private topCard(file: string, stmt: Statement): void {
    const head = stmt.head.text.toLowerCase();
    const { positional, params } = splitItems(stmt.items);
    switch (head) {
      case '.param':
      case '.params':
      case '.parameter':
      case '.parameters':
        for (const p of params) {
          if (p.value) this.globalScope.define(p.name.text, p.value, file);
          else this.report(diag('syntax', file, p.range, `parameter '${p.name.text}' has no value`));
        }
        return;
      case '.model':
        this.modelCard(file, stmt);
        return;
      case '.option':
      case '.options':
      case '.opt':
        for (const p of params) {
          const key = p.name.text.toLowerCase();
          if (!p.value) continue;
          if (key === 'scale' || key === 'defl' || key === 'defw') {
            const v = evaluateValue(p.value, file, this.globalScope, this.paramReport);
            if (v === undefined) continue;
            if (key === 'scale') {
              this.scale = v;
              this.scaleFrom = 'option';
            } else if (key === 'defl') this.defL = v;
            else this.defW = v;
          }
        }
        return;
      case '.temp': {
        const v = positional[0] ? evaluateValue(positional[0], file, this.globalScope, this.paramReport) : undefined;
        if (v !== undefined) this.tempC = v;
        return;
      }
      default:
        if (head.startsWith('.')) this.otherCard(file, stmt);
    }
  }

  private otherCard(file: string, stmt: Statement): void {
    const head = stmt.head.text.toLowerCase();
    const known = /^\.(tran|dc|ac|op|noise|tf|sens|pz|disto|four|meas|measure|print|plot|save|probe|ic|nodeset|width|title|csparam|func|data|endl|lib|include|inc|global|end)$/;
    if (!known.test(head)) this.report(diag('unknown-card', file, stmt.head.range, `'${stmt.head.text}' is not used by the analysis`));
  }

  private modelCard(file: string, stmt: Statement): void {
    // a word that is no number and no parameter is text
    const read = readModelCard(file, stmt, (v) =>
      v.kind === 'word' && parseSpiceNumber(v.text) === undefined && !this.globalScope.has(v.text.toLowerCase()) ? v.text : evaluateValue(v, file, this.globalScope, this.paramReport),
    );
    if (!read) {
      this.report(diag('syntax', file, stmt.range, '.model needs a name and a type, e.g. `.model nch nmos level=54 ...`'));
      return;
    }
    const { card, nameItem } = read;
    const { name, baseName } = card;
    const list = this.models.get(baseName) ?? [];
    const dup = list.find((c) => c.name === name);
    if (dup) {
      this.report(diag('duplicate-definition', file, nameItem.range, `model '${nameItem.text}' is already defined at ${dup.file}:${dup.range.start.line + 1}; this card is ignored`));
      return;
    }
    list.push(card);
    this.models.set(baseName, list);
    if (name !== baseName && !this.models.has(name)) this.models.set(name, [card]);
  }

  private *chooseScale(): Steps<void> {
    if (this.scaleFrom === 'option') return;
    if (this.directives.scale) {
      this.scale = this.directives.scale.value;
      this.scaleFrom = 'directive';
      return;
    }
    if (this.options.geometryScale !== undefined) {
      this.scale = this.options.geometryScale;
      this.scaleFrom = 'setting';
      return;
    }
    const guess = yield* guessMicronScaleSteps(this.deck);
    if (guess) {
      const { median, first } = guess;
      this.scale = 1e-6;
      this.scaleFrom = 'assumed';
      this.report(
        diag('geometry-scale', first.file, first.range, `W and L look like microns (median L = ${median}); assumed scale = 1e-6 (1 unit = 1 um). State it with \`.option scale=1e-6\` or \`* tidemark: scale 1u\``),
      );
    }
  }

  private checkPlausibleGeometry(circuits: Circuit[]): void {
    for (const c of circuits) {
      for (const m of c.mosfets) {
        if (m.lM > 1e-3 || m.wM > 1e-1) {
          this.report(
            diag('geometry-scale', m.origin.file, m.origin.range, `${m.name}: W = ${m.wM} m, L = ${m.lM} m are implausible with scale ${this.scale} (${this.scaleFrom}); is the geometry in microns?`),
          );
          return;
        }
      }
    }
  }

  private reportMissingModels(): void {
    for (const [name, info] of this.missingModels) {
      const pol = info.polarity ? `treated as ${info.polarity}-channel by its name` : 'polarity unknown, so the devices are left out';
      this.report(
        diag('unknown-model', info.origin.file, info.origin.range, `no .model card for '${name}' (${info.count} device${info.count === 1 ? '' : 's'}); ${pol}; electrical estimates will use the fallback profile`, info.polarity ? 'warning' : 'error'),
      );
    }
  }

  // ---- templates ---------------------------------------------------------------------------

  private template(def: SubcktDefinition | undefined): Template {
    return runToEnd(this.templateSteps(def));
  }

  /** `template` in slices (the top level of a flat netlist is one template of every device). */
  private *templateSteps(def: SubcktDefinition | undefined): Steps<Template> {
    let t = this.templates.get(def);
    if (t) return t;
    const due = stepDue();
    const subckt = def ? def.name : null;
    const slots = new NetSlots(subckt, this.globals);
    if (def) {
      for (const p of def.portItems) if (!slots.addPort(p, def.file)) this.report(diag('syntax', def.file, p.range, `port '${p.text}' is listed twice`));
    }
    const netRef = (w: WordItem, file: string) => slots.ref(w, file);
    const elements: TemplateElement[] = [];
    const params: Located<Statement>[] = [];
    const body = def ? def.body : this.deck.top;
    for (const { file, item } of body) {
      if (due()) yield;
      const head = item.head.text.toLowerCase();
      if (head.startsWith('.')) {
        if (def) {
          if (head === '.param' || head === '.params' || head === '.parameter' || head === '.parameters') params.push({ file, item });
          else if (head !== '.model') this.otherCard(file, item);
        }
        continue;
      }
      const read = elementNodeWords(item);
      if (read.skipped !== undefined) {
        for (const d of skippedLineFindings(file, item, read)) this.report(d);
        continue;
      }
      const syntax = read.syntax;
      if (!MODELLED_LETTERS.has(head[0]!)) this.report(unmodelledFinding(file, item));
      const nodes = read.nodes.map((w) => netRef(w, file));
      elements.push({ syntax, nodes, origin: { file, range: item.range, subckt, local: item.head.text.toLowerCase() }, file });
    }
    t = { def, localNames: slots.localNames, localOrigins: slots.localOrigins, globalNames: slots.globalNames, elements, params, valueCache: new Map() };
    this.templates.set(def, t);
    return t;
  }

  private findSubckt(name: string, within: SubcktDefinition[]): SubcktDefinition | undefined {
    for (let i = within.length - 1; i >= 0; i--) {
      const d = within[i]!.local.get(name);
      if (d) return d;
    }
    return this.deck.subckts.get(name);
  }

  private deviceKindOf(name: string): DeviceKind | undefined {
    for (const r of this.deviceRules) if (r.re.test(name)) return r.kind;
    return undefined;
  }

  /** Each element's values in one parameter scope (`key`), worked out once per template and key. */
  private *values(t: Template, scope: ParamScope, key: string, defStack: SubcktDefinition[]): Steps<ElementValues[]> {
    const hit = t.valueCache.get(key);
    if (hit) return hit;
    const out: ElementValues[] = [];
    const due = stepDue();
    for (const el of t.elements) {
      out.push(this.elementValues(el, scope, defStack));
      if (due()) yield;
    }
    t.valueCache.set(key, out);
    return out;
  }

  private num(item: ValueItem | undefined, file: string, scope: ParamScope): number | undefined {
    return item ? evaluateValue(item, file, scope, this.paramReport) : undefined;
  }

  private paramMap(params: AssignItem[]): Map<string, AssignItem> {
    const m = new Map<string, AssignItem>();
    for (const p of params) m.set(p.name.text.toLowerCase(), p);
    return m;
  }

  private mosValues(el: TemplateElement, model: string, params: AssignItem[], scope: ParamScope, polarityHint: Polarity | undefined): ElementValues {
    const p = this.paramMap(params);
    const get = (k: string) => this.num(p.get(k)?.value, el.file, scope);
    const s = this.scale;
    const wRaw = get('w');
    const lRaw = get('l');
    const wM = wRaw !== undefined ? wRaw * s : this.defW;
    const lM = lRaw !== undefined ? lRaw * s : this.defL;
    const mult = get('m') ?? get('mult') ?? 1;
    const nf = get('nf') ?? 1;
    const area = (k: string) => {
      const v = get(k);
      return v === undefined ? undefined : v * s * s;
    };
    const len = (k: string) => {
      const v = get(k);
      return v === undefined ? undefined : v * s;
    };
    const card = selectModel(this.models, model, lM, wM);
    let polarity: Polarity | undefined = card?.kind === 'nmos' ? 'n' : card?.kind === 'pmos' ? 'p' : polarityHint;
    if (!card) {
      if (!polarity) {
        const k = this.deviceKindOf(model);
        polarity = k === 'nmos' ? 'n' : k === 'pmos' ? 'p' : undefined;
      }
      // counted per flat device in instantiate()
      if (!this.missingModels.has(model)) this.missingModels.set(model, { origin: el.origin, count: 0, polarity });
    }
    return { kind: 'mos', polarity, wM, lM, m: mult, nf, adM2: area('ad'), asM2: area('as'), pdM: len('pd'), psM: len('ps'), model, card };
  }

  private elementValues(el: TemplateElement, scope: ParamScope, defStack: SubcktDefinition[]): ElementValues {
    const s = el.syntax;
    switch (s.kind) {
      case 'mos':
        return this.mosValues(el, s.model!.text.toLowerCase(), s.params, scope, undefined);
      case 'passive': {
        let value = this.num(s.value, el.file, scope);
        if (s.letter === 'r' && value === undefined && s.model && this.deviceKindOf(s.model.text.toLowerCase()) === 'short') value = 0;
        if (value === undefined && !s.value && !s.model) this.report(diag('syntax', el.file, s.name.range, `${s.name.text} has no value`));
        return { kind: 'value', value };
      }
      case 'source':
        return { kind: 'wave', waveform: this.waveform(s, el.file, scope) };
      case 'instance': {
        const name = s.subckt!.text.toLowerCase();
        const target = this.findSubckt(name, defStack);
        if (!target) {
          const k = this.deviceKindOf(name);
          if (k === 'nmos' || k === 'pmos') {
            if (el.nodes.length !== 4) {
              this.report(diag('pin-count', el.file, s.name.range, `${s.name.text}: device '${s.subckt!.text}' is a MOSFET by the device rule and needs 4 nodes (d g s b), not ${el.nodes.length}`));
              return { kind: 'none' };
            }
            return this.mosValues(el, name, s.params, scope, k === 'nmos' ? 'n' : 'p');
          }
          if (k === 'short' || k === 'resistor' || k === 'capacitor' || k === 'diode') return { kind: 'value', value: k === 'short' ? 0 : undefined };
          this.report(unknownSubcktFinding(el.file, s.subckt!));
          return { kind: 'none' };
        }
        if (defStack.includes(target)) {
          this.report(diag('recursive-subckt', el.file, s.subckt!.range, `'${target.name}' instantiates itself (${[...defStack.map((d) => d.name), target.name].join(' -> ')}); not expanded`));
          return { kind: 'none' };
        }
        if (target.ports.length !== el.nodes.length) {
          this.report(
            diag('pin-count', el.file, s.name.range, `${s.name.text} connects ${el.nodes.length} net${el.nodes.length === 1 ? '' : 's'}, but '${target.name}' has ${target.ports.length} port${target.ports.length === 1 ? '' : 's'} (${target.ports.join(' ')})`),
          );
          return { kind: 'none' };
        }
        const child = new ParamScope(this.globalScope);
        for (const d of target.defaults) child.define(d.name, d.value, d.file);
        const declared = new Set(target.defaults.map((d) => d.name));
        for (const p of s.params) {
          const k = p.name.text.toLowerCase();
          if (!p.value) continue;
          if (!declared.has(k) && k !== 'm') {
            this.report(diag('param-error', el.file, p.name.range, `'${target.name}' has no parameter '${p.name.text}'`, 'warning'));
            continue;
          }
          child.define(k, p.value, el.file, scope);
        }
        const t = this.template(target);
        for (const ps of t.params) for (const a of ps.item.items) if (a.kind === 'assign' && a.value) child.define(a.name.text, a.value, ps.file);
        const vals = target.defaults.map((d) => {
          const v = evaluateValue({ kind: 'word', text: d.name, range: d.range }, d.file, child, () => undefined);
          return v === undefined ? 'x' : String(v);
        });
        return { kind: 'instance', target, scope: child, key: vals.join(',') };
      }
      default:
        return { kind: 'none' };
    }
  }

  private waveform(s: Extract<ElementSyntax, { kind: 'source' }>, file: string, scope: ParamScope): Waveform {
    return waveformOf(s.waveform, (v) => this.num(v, file, scope));
  }

  // ---- flattening --------------------------------------------------------------------------

  private newCircuit(name: string, standalone: boolean): Circuit {
    this.spans = [];
    return {
      name,
      standalone,
      nets: [],
      netByName: new Map(),
      mosfets: [],
      capacitors: [],
      resistors: [],
      inductors: [],
      sources: [],
      diodes: [],
      others: [],
      instances: [],
      instanceMosfets: new Int32Array(0),
      pinnedNets: 0,
      ports: [],
      supplies: [],
      grounds: [],
      inputs: [],
      outputs: [],
    };
  }

  private addNet(c: Circuit, name: string, origin: Origin, global: boolean): number {
    const existing = c.netByName.get(name);
    if (existing !== undefined) return existing;
    const id = c.nets.length;
    const net: Net = { name, kind: 'signal', global, origin };
    c.nets.push(net);
    c.netByName.set(name, id);
    return id;
  }

  private globalNet(c: Circuit, name: string, origin: Origin): number {
    return this.addNet(c, name, { ...origin, local: name }, true);
  }

  private *elaborateTop(): Steps<Circuit> {
    const c = this.newCircuit('(top)', false);
    const t = yield* this.templateSteps(undefined);
    const netMap = t.localNames.map((n, i) => this.addNet(c, n, t.localOrigins[i]!, false));
    yield* this.instantiate(c, t, netMap, '', this.globalScope, 'top', []);
    yield* this.numberNets(c, null);
    c.instanceMosfets = Int32Array.from(this.spans);
    this.assignRails(c, netIdsWhere(c, (n) => !n.name.includes('.')));
    return c;
  }

  /** The circuit's nets numbered in runs by scope (numberNetsByScope), its own scope `own` last: old id -> new id. */
  private *numberNets(c: Circuit, own: string | null): Steps<Int32Array> {
    yield;
    const pinned = this.pinnedNets(c);
    yield;
    return yield* numberNetsByScope(c, own, pinned);
  }

  /** The nets numbered first (numberNetsByScope): what every part of the circuit reaches and no quick edit gives or takes a role. */
  private pinnedNets(c: Circuit): Uint8Array {
    const pinned = new Uint8Array(c.nets.length);
    for (const s of c.sources) (pinned[s.p] = 1), (pinned[s.n] = 1);
    for (const name of roleNames(this.directives, this.options)) {
      const id = c.netByName.get(name);
      if (id !== undefined) pinned[id] = 1;
    }
    for (let x = 0; x < c.nets.length; x++) {
      const n = c.nets[x]!;
      if (n.global || (!n.name.includes('.') && (this.supplyRe.test(n.name) || this.groundRe.test(n.name)))) pinned[x] = 1;
    }
    return pinned;
  }

  private *elaborateStandalone(def: SubcktDefinition): Steps<Circuit> {
    const c = this.newCircuit(def.name, true);
    const t = yield* this.templateSteps(def);
    const { scope, key } = this.standaloneScope(def, t);
    const netMap = t.localNames.map((n, i) => this.addNet(c, n, t.localOrigins[i]!, false));
    yield* this.instantiate(c, t, netMap, '', scope, key, [def]);
    const oldToNew = yield* this.numberNets(c, def.name);
    c.instanceMosfets = Int32Array.from(this.spans);
    const portNets = def.ports.map((_, i) => oldToNew[netMap[i]!]!);
    this.assignRails(c, [...portNets, ...netIdsWhere(c, (n) => n.global)]);
    this.assignPorts(c, def, portNets);
    return c;
  }

  /** A cell analysed on its own: its defaults and body parameters over the global ones, and their key. */
  private standaloneScope(def: SubcktDefinition, t: Template): { scope: ParamScope; key: string } {
    const scope = new ParamScope(this.globalScope);
    for (const d of def.defaults) scope.define(d.name, d.value, d.file);
    for (const ps of t.params) for (const a of ps.item.items) if (a.kind === 'assign' && a.value) scope.define(a.name.text, a.value, ps.file);
    const key = def.defaults
      .map((d) => {
        const v = evaluateValue({ kind: 'word', text: d.name, range: d.range }, d.file, scope, () => undefined);
        return v === undefined ? 'x' : String(v);
      })
      .join(',');
    return { scope, key };
  }

  /**
   * `run` for a deck that differs from the one `previous` was elaborated from only in values
   * (parameter and model cards): every template's values are worked out as `run` works them
   * out, in the same order (so the same findings come out), and each circuit of `previous` is
   * walked as `instantiate` builds it, without building nets or elements: every device and
   * instance must be the previous circuit's next one (by its flat name), a MOSFET whose values
   * or card changed is replaced; any other difference (a passive value, a source, a device left
   * out now and not before, a list of another length) answers undefined.
   */
  *revalue(previous: Design): Steps<RevaluedDesign | undefined> {
    yield* this.prepare();
    const plan = this.circuitPlan();
    if (plan.length !== previous.circuits.length) return undefined;
    const cards = new SameCards();
    const circuits: Circuit[] = [];
    const changed: number[][] = [];
    for (let i = 0; i < plan.length; i++) {
      const def = plan[i];
      const c = previous.circuits[i]!;
      const walk = new ValueWalk(c, cards);
      if (def === undefined) {
        if (c.standalone) return undefined;
        const t = yield* this.templateSteps(undefined);
        if (!(yield* this.revalueInstance(walk, t, '', this.globalScope, 'top', []))) return undefined;
      } else {
        if (!c.standalone || c.name !== def.name) return undefined;
        const t = yield* this.templateSteps(def);
        const { scope, key } = this.standaloneScope(def, t);
        if (!(yield* this.revalueInstance(walk, t, '', scope, key, [def]))) return undefined;
      }
      if (!walk.complete()) return undefined;
      changed.push(walk.changed);
      circuits.push(walk.circuit());
    }
    const design = this.finish(circuits);
    // a card read again equal to the one the previous devices keep stands in the design's table
    // as that one, so that every device's card is the table's (a later card edit finds its devices)
    const modelCards = new Map([...design.modelCards].map(([k, list]) => [k, list.map((c) => cards.kept(c))]));
    return { design: { ...design, modelCards }, changed, diagnostics: this.diagnostics };
  }

  /** One more element copied (or walked): true when a slice's worth has passed since the last yield. */
  private sliceDue(): boolean {
    if (++this.copied < ITEMS_PER_SLICE) return false;
    this.copied = 0;
    return true;
  }

  /** The circuit's list a two-terminal element with a value goes in (`instantiate` and `revalue` agree on it). */
  private valueList(s: ElementSyntax): 'capacitors' | 'inductors' | 'diodes' | 'resistors' {
    if (s.kind === 'passive') return s.letter === 'c' ? 'capacitors' : s.letter === 'l' ? 'inductors' : 'resistors';
    if (s.kind === 'instance') {
      const k = this.deviceKindOf(s.subckt!.text.toLowerCase());
      if (k === 'capacitor') return 'capacitors';
      if (k === 'diode') return 'diodes';
    }
    return 'resistors';
  }

  /** `instantiate`'s walk over one instance, comparing values with the previous circuit's (see `revalue`). */
  private *revalueInstance(w: ValueWalk, t: Template, prefix: string, scope: ParamScope, key: string, defStack: SubcktDefinition[]): Steps<boolean> {
    const vals = yield* this.values(t, scope, key, defStack);
    for (let i = 0; i < t.elements.length; i++) {
      if (this.sliceDue()) yield;
      const el = t.elements[i]!;
      const v = vals[i]!;
      const s = el.syntax;
      switch (v.kind) {
        case 'mos':
          if (!v.card) this.missingModels.get(v.model)!.count++;
          // a device left out (no card, no polarity by its name) and put in before makes the
          // next device, or the count at the end, another one
          if (v.polarity && !w.mosfet(prefix + el.origin.local, v)) return false;
          break;
        case 'value': {
          const list = this.valueList(s);
          if (list === 'inductors') w.inductors++;
          else if (list === 'diodes') w.diodes++;
          else if (!(list === 'capacitors' ? w.capacitor(v.value) : w.resistor(v.value))) return false;
          break;
        }
        case 'wave':
          if (s.kind === 'source' && !w.source(v.waveform)) return false;
          break;
        case 'instance': {
          const child = this.template(v.target);
          const name = prefix + el.origin.local;
          if (!w.instance(name)) return false;
          if (!(yield* this.revalueInstance(w, child, name + '.', v.scope, v.key, [...defStack, v.target]))) return false;
          break;
        }
        case 'none':
          if (s.kind === 'diode') w.diodes++;
          else if (s.kind === 'other') w.others++;
          break;
      }
    }
    return true;
  }

  /** Copies a template into the circuit with its nets bound by `netMap` (local index -> flat id). */
  private *instantiate(c: Circuit, t: Template, netMap: number[], prefix: string, scope: ParamScope, key: string, defStack: SubcktDefinition[]): Steps<void> {
    // Internal nets: the first ports.length slots are bound by the caller.
    const bound = netMap.length;
    for (let i = bound; i < t.localNames.length; i++) {
      netMap.push(this.addNet(c, prefix + t.localNames[i]!, t.localOrigins[i]!, false));
    }
    const globalIds = t.globalNames.map((g) => this.globalNet(c, g, t.localOrigins[0] ?? t.elements[0]?.origin ?? { file: '', range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, subckt: null, local: g }));
    const net = (k: number) => (k >= 0 ? netMap[k]! : globalIds[-k - 1]!);
    const vals = yield* this.values(t, scope, key, defStack);
    for (let i = 0; i < t.elements.length; i++) {
      if (this.sliceDue()) yield;
      const el = t.elements[i]!;
      const v = vals[i]!;
      const name = prefix + el.origin.local;
      const s = el.syntax;
      switch (v.kind) {
        case 'mos': {
          if (!v.card) this.missingModels.get(v.model)!.count++;
          if (!v.polarity) break;
          c.mosfets.push(mosfetRecord(name, v.polarity, net(el.nodes[0]!), net(el.nodes[1]!), net(el.nodes[2]!), net(el.nodes[3]!), v, el.origin));
          break;
        }
        case 'value': {
          const a = net(el.nodes[0]!);
          const b = net(el.nodes[1] ?? el.nodes[0]!);
          const list = this.valueList(s);
          if (list === 'capacitors') c.capacitors.push({ name, a, b, capacitanceF: v.value, origin: el.origin });
          else if (list === 'inductors') c.inductors.push({ name, a, b, origin: el.origin });
          else if (list === 'diodes') c.diodes.push({ name, a, b, model: s.kind === 'instance' ? s.subckt!.text.toLowerCase() : '', origin: el.origin });
          else c.resistors.push({ name, a, b, resistanceOhm: v.value, origin: el.origin });
          break;
        }
        case 'wave':
          if (s.kind === 'source') c.sources.push({ name, letter: s.letter, p: net(el.nodes[0]!), n: net(el.nodes[1]!), waveform: v.waveform, origin: el.origin });
          break;
        case 'instance': {
          const child = this.template(v.target);
          const childMap = el.nodes.map(net);
          const inst: Instance = { name, subckt: v.target.name, ports: childMap.slice(), below: { instances: [c.instances.length + 1, 0] }, origin: el.origin };
          const at = c.instances.length;
          c.instances.push(inst);
          this.spans[2 * at] = c.mosfets.length;
          yield* this.instantiate(c, child, childMap, name + '.', v.scope, v.key, [...defStack, v.target]);
          this.spans[2 * at + 1] = c.mosfets.length;
          inst.below.instances[1] = c.instances.length;
          break;
        }
        case 'none':
          if (s.kind === 'diode') c.diodes.push({ name, a: net(el.nodes[0]!), b: net(el.nodes[1]!), model: s.model?.text.toLowerCase() ?? '', origin: el.origin });
          else if (s.kind === 'other') c.others.push({ name, letter: s.letter, nets: el.nodes.map(net), origin: el.origin });
          break;
      }
    }
  }

  // ---- rails and ports ---------------------------------------------------------------------

  private setKind(c: Circuit, id: number, kind: NetKind, volts: number | null, from: 'source' | 'directive' | 'setting' | 'name'): void {
    const net = c.nets[id]!;
    if (net.kind !== 'signal') return;
    net.kind = kind;
    if (kind === 'ground') c.grounds.push(id);
    else c.supplies.push({ net: id, volts, from });
  }

  /** Supplies and grounds: node 0, DC sources, directives, settings, then name rules on `candidates`. */
  private assignRails(c: Circuit, candidates: number[]): void {
    const zero = c.netByName.get('0');
    if (zero !== undefined) this.setKind(c, zero, 'ground', 0, 'source');
    const byName = (n: string) => c.netByName.get(n.toLowerCase());
    for (const g of this.directives.grounds) {
      const id = byName(g.net);
      if (id !== undefined) this.setKind(c, id, 'ground', 0, 'directive');
    }
    for (const s of this.directives.supplies) {
      const id = byName(s.net);
      if (id !== undefined) s.volts === 0 ? this.setKind(c, id, 'ground', 0, 'directive') : this.setKind(c, id, 'supply', s.volts, 'directive');
    }
    for (const g of this.options.grounds ?? []) {
      const id = byName(g);
      if (id !== undefined) this.setKind(c, id, 'ground', 0, 'setting');
    }
    for (const [n, v] of Object.entries(this.options.supplies ?? {})) {
      const id = byName(n);
      if (id !== undefined) v === 0 ? this.setKind(c, id, 'ground', 0, 'setting') : this.setKind(c, id, 'supply', v, 'setting');
    }
    // DC voltage sources to ground (repeat until no change, for sources stacked on supplies).
    for (let pass = 0; pass < 3; pass++) {
      for (const s of c.sources) {
        if (s.letter !== 'v' || s.waveform.kind !== 'dc' || s.waveform.volts === undefined) continue;
        const v = s.waveform.volts;
        const pKind = c.nets[s.p]!.kind;
        const nKind = c.nets[s.n]!.kind;
        if (nKind === 'ground' && pKind === 'signal') v === 0 ? this.setKind(c, s.p, 'ground', 0, 'source') : this.setKind(c, s.p, 'supply', v, 'source');
        else if (pKind === 'ground' && nKind === 'signal') v === 0 ? this.setKind(c, s.n, 'ground', 0, 'source') : this.setKind(c, s.n, 'supply', -v, 'source');
      }
    }
    for (const id of candidates) {
      const net = c.nets[id]!;
      if (net.kind !== 'signal') continue;
      const local = net.name;
      if (this.groundRe.test(local)) this.setKind(c, id, 'ground', 0, 'name');
      else if (this.supplyRe.test(local)) this.setKind(c, id, 'supply', this.options.defaultSupplyVolts ?? null, 'name');
    }
    for (const i of this.directives.inputs) {
      const id = byName(i.net);
      if (id !== undefined) c.inputs.push(id);
    }
    for (const o of this.directives.outputs) {
      const id = byName(o.net);
      if (id !== undefined) c.outputs.push(id);
    }
  }

  /**
   * Port directions of a standalone cell: supplies and grounds first, then `*.PININFO`, then
   * inferred. A port is an output when a channel path inside the cell joins it to a rail; one
   * that reaches only gates or only pass devices (no rail in its channel-connected group)
   * cannot be driven from inside, so it is an input.
   */
  private assignPorts(c: Circuit, def: SubcktDefinition, portNets: number[]): void {
    const parent = c.nets.map((_, i) => i);
    const find = (x: number): number => {
      while (parent[x] !== x) x = parent[x] = parent[parent[x]!]!;
      return x;
    };
    const isRail = (n: number) => c.nets[n]!.kind !== 'signal';
    const touchesRail = new Uint8Array(c.nets.length);
    const channel = (a: number, b: number) => {
      if (isRail(a) && isRail(b)) return;
      if (isRail(a)) touchesRail[b] = 1;
      else if (isRail(b)) touchesRail[a] = 1;
      else parent[find(a)] = find(b);
    };
    const hasChannel = new Uint8Array(c.nets.length);
    for (const m of c.mosfets) {
      channel(m.d, m.s);
      hasChannel[m.d] = hasChannel[m.s] = 1;
    }
    for (const r of c.resistors) {
      channel(r.a, r.b);
      hasChannel[r.a] = hasChannel[r.b] = 1;
    }
    const groupHasRail = new Uint8Array(c.nets.length);
    for (let i = 0; i < c.nets.length; i++) if (touchesRail[i]) groupHasRail[find(i)] = 1;
    const declaredIn = new Set(this.directives.inputs.map((x) => x.net));
    const declaredOut = new Set(this.directives.outputs.map((x) => x.net));
    def.ports.forEach((name, i) => {
      const net = portNets[i]!;
      const kind = c.nets[net]!.kind;
      let direction: PortDirection;
      let from: Port['from'];
      const pin = def.pinDirections.get(name);
      if (kind === 'supply' || kind === 'ground') {
        direction = kind;
        from = 'rail';
      } else if (declaredIn.has(name) || declaredOut.has(name)) {
        direction = declaredIn.has(name) ? 'input' : 'output';
        from = 'directive';
      } else if (pin) {
        direction = pin;
        from = 'pininfo';
      } else {
        direction = hasChannel[net] && groupHasRail[find(net)] ? 'output' : 'input';
        from = 'inferred';
      }
      c.ports.push({ net, name, direction, from });
      if (direction === 'input' && !c.inputs.includes(net)) c.inputs.push(net);
      if (direction === 'output' && !c.outputs.includes(net)) c.outputs.push(net);
    });
  }
}

function netIdsWhere(c: Circuit, keep: (n: Net) => boolean): number[] {
  const out: number[] = [];
  c.nets.forEach((n, i) => keep(n) && out.push(i));
  return out;
}

/** A source's waveform, its values read by `num` (the elaborator's, or plain numbers alone: see circuit/electricalEdit). */
export function waveformOf(w: WaveformSyntax, num: (v: ValueItem | undefined) => number | undefined): Waveform {
  if (w.kind === 'dc') return { kind: 'dc', volts: w.value ? num(w.value) : 0 };
  const a = w.args.map((x) => num(x));
  const at = (i: number, dflt: number) => a[i] ?? dflt;
  switch (w.kind) {
    case 'pulse':
      return { kind: 'pulse', v1: at(0, 0), v2: at(1, 0), delayS: at(2, 0), riseS: at(3, 0), fallS: at(4, 0), widthS: at(5, Infinity), periodS: at(6, Infinity) };
    case 'pwl': {
      const points: Array<[number, number]> = [];
      for (let i = 0; i + 1 < a.length; i += 2) points.push([a[i] ?? 0, a[i + 1] ?? 0]);
      const pwl: Waveform = { kind: 'pwl', points };
      for (const o of w.options) {
        const k = o.name.text.toLowerCase();
        const v = num(o.value);
        if (v === undefined) continue;
        if (k === 'r') pwl.repeatFromS = v;
        else if (k === 'td') pwl.delayS = v;
      }
      return pwl;
    }
    case 'sin':
      return { kind: 'sin', offset: at(0, 0), amplitude: at(1, 0), freqHz: at(2, 0), delayS: at(3, 0) };
    default:
      return { kind: 'other', name: w.kind };
  }
}
