// The elaboration stage's answer to transistor lines added or deleted: when the new deck differs
// from the old one only in a run of plain MOSFET lines (plain-number sizes, a model with a card)
// put in or taken out of one definition (or the top level), and that definition's net slots
// come out the same, every flat net keeps its number (lines added may also name new nets: the
// circuit gets them first, as in circuit/newNets, and then the devices). The devices of those lines are put in or
// taken out of every instance of the definition where a fresh elaboration puts them (the flat
// MOSFET list follows the body order of each instance), which renumbers the MOSFETs after them;
// every line after the edit moves by the same count, and so does every origin on one. Anything
// else (another element, a parameter expression, a directive among the edited lines, a guessed
// geometry scale) answers `undefined`, and the caller elaborates afresh.

import { rangeOf, Span, startLineOf, type Range } from '../core/source';
import type { Diagnostic } from '../core/diagnostics';
import { splicedList, type NetRenumbering } from '../core/renumber';
import type { Circuit, Design, Instance, Mosfet, Net, Origin, Polarity } from './circuit';
import { mosfetRecord } from './circuit';
import type { ModelCard } from './models';
import type { Deck } from './deck';
import { elementNodeWords, guessMicronScale, type NetSlots } from './elaborate';
import { selectModel } from './models';
import { parseSpiceNumber } from './numbers';
import { isPlainNumber, PLAUSIBLE_L_M, PLAUSIBLE_W_M, SIZE_PARAMS } from './patch';
import { scopesOfStatements } from './rename';
import { contextPrefixes, netSlotsOf, sameSlots } from './rewire';
import { originIndex, setOriginIndex } from './elementIndex';
import { insertedSlots, namedNets, widenCircuit } from './newNets';
import type { EngineOptions } from '../core/options';
import { sameDirectiveLine, samePinLine, sameRange, sameStatement } from '../syntax/compare';
import type { Statement, SyntaxFile } from '../syntax/tree';

/** How one circuit's MOSFET list changed. */
export interface MosfetRenumbering {
  /** Old index -> new index, -1 for a deleted device. */
  oldToNew: Int32Array;
  /** New indices of the added devices, ascending. */
  added: number[];
  /** Old indices of the deleted devices, ascending. */
  deleted: number[];
}

/** Every range of `file` that starts at or after `fromLine` (old numbering) moves `lines` down. */
export interface LineShift {
  file: string;
  fromLine: number;
  lines: number;
}

export interface DeviceSplice {
  design: Design;
  /** Per circuit of the design; undefined where no device came or went (origins may still move). */
  renumbering: Array<MosfetRenumbering | undefined>;
  shift: LineShift;
  /** The old lines of the deleted statements (findings on them cannot be moved). */
  removedLines: { file: string; from: number; to: number } | undefined;
  /** Per circuit, when the added lines name new nets: the previous circuit with them put in (see Rewiring). */
  widened: Array<{ circuit: Circuit; nets: NetRenumbering } | undefined>;
}

/** A plain transistor line: its local name, node words, model and sizes as the elaborator reads them. */
interface PlainMosfet {
  statement: Statement;
  local: string;
  values: Omit<Mosfet, 'name' | 'd' | 'g' | 's' | 'b' | 'origin'>;
}

/**
 * `limit`: per circuit, how many devices the splice takes on (more: undefined). `options`: the
 * name rules and settings a new net is checked against (circuit/newNets).
 */
export function spliceDevices(previousDeck: Deck, previous: Design, deck: Deck, limit: (circuit: number) => number = () => Infinity, options: EngineOptions = {}): DeviceSplice | undefined {
  const diff = diffFiles(previousDeck.files, deck.files);
  if (!diff) return undefined;
  const { file, removed, added, shift } = diff;
  // messages that quote line numbers, and guesses that read every written length
  if (previous.geometryScale.from === 'assumed' || (previous.geometryScale.from === 'default' && guessMicronScale(deck))) return undefined;
  // model cards after the edit move with their lines: each a moved copy, on every device that has it
  const { movedCards, moveCard, modelCards } = cardMover(previous, shift);
  const middle = removed.length ? removed : added;
  const scopeOf = scopesOfStatements(removed.length ? previousDeck : deck);
  if (!scopeOf) return undefined;
  const scopes = new Set(middle.map((s) => scopeOf.get(s)));
  if (scopes.size !== 1) return undefined;
  const [scope] = scopes;
  if (scope === undefined) return undefined;
  const lines: PlainMosfet[] = [];
  for (const st of middle) {
    const line = plainMosfet(st, previous);
    if (!line) return undefined;
    lines.push(line);
  }
  // the body as the new deck has it: element names unique, none holding a '.'
  const def = scope === null ? undefined : deck.subckts.get(scope);
  if (scope !== null && (!def || !previousDeck.subckts.get(scope))) return undefined;
  const body = def ? def.body : deck.top;
  const bodyIndex = new Map<string, number>();
  const counts = new Map<string, number>();
  body.forEach(({ item }, k) => {
    if (item.head.text.startsWith('.')) return;
    const local = item.head.text.toLowerCase();
    bodyIndex.set(local, k);
    counts.set(local, (counts.get(local) ?? 0) + 1);
  });
  for (const l of lines) if (l.local.includes('.') || (counts.get(l.local) ?? 0) > (removed.length ? 0 : 1)) return undefined;
  if ([...bodyIndex.keys()].some((k) => k.includes('.'))) return undefined;

  const kept = netSlotsOf(previousDeck, deck, scope);
  if (!kept) return undefined;
  const { before, after, portCount } = kept;
  // the same slots, or (lines added) the old ones with new names put in (circuit/newNets)
  let inserted: number[] | undefined;
  if (!sameSlots(before.slots, after.slots)) {
    if (removed.length) return undefined;
    inserted = insertedSlots(before.slots, after.slots, portCount);
    if (!inserted || before.slots.globalNames.join(' ') !== after.slots.globalNames.join(' ')) return undefined;
  }
  const insertedSet = new Set(inserted ?? []);
  const moveRange = (f: string, r: Range): Range => (f === shift.file && startLineOf(r) >= shift.fromLine ? shiftedRange(r, shift.lines) : r);
  // a net first written on an edited line is now first written elsewhere (or the other way);
  // a new net is first written where the new slots say
  const netOrigins = new Map<string, Origin>();
  let newSoFar = 0;
  for (let i = 0; i < after.slots.localOrigins.length; i++) {
    const o = after.slots.localOrigins[i]!;
    if (insertedSet.has(i)) {
      netOrigins.set(o.local, o);
      newSoFar++;
      continue;
    }
    const was = before.slots.localOrigins[i - newSoFar]!;
    if (o.file === was.file && sameRange(moveRange(was.file, was.range), o.range, 0)) continue;
    // a global net takes the first slot's origin of the definition that meets it first
    if (i < portCount || i === 0) return undefined;
    netOrigins.set(o.local, o);
  }
  if (after.slots.localOrigins.length === 0) return undefined;
  const nodeSlots = lines.map((l) => (removed.length ? before : after).refs.get(l.statement));
  if (nodeSlots.some((r) => !r || r.length !== 4)) return undefined;

  const moveOrigin = originMover(shift);
  const edit: SpliceEdit = {
    scope,
    portCount,
    slots: after.slots,
    lines: lines.map((l, k) => ({ ...l, values: { ...l.values, card: moveCard(l.values.card!) }, slots: nodeSlots[k]!, origin: { file, range: l.statement.range, subckt: scope, local: l.local } })),
    deleting: removed.length > 0,
    bodyIndex,
    firstNewBodyIndex: removed.length ? -1 : bodyIndex.get(lines[0]!.local)!,
    moveOrigin,
    movedCards,
    netOrigins,
  };
  const circuits: Circuit[] = [];
  const renumbering: Array<MosfetRenumbering | undefined> = [];
  const widened: DeviceSplice['widened'] = [];
  const named = inserted && namedNets(previous, options);
  for (let i = 0; i < previous.circuits.length; i++) {
    let c = previous.circuits[i]!;
    let wide: DeviceSplice['widened'][number];
    const prefixes = inserted ? contextPrefixes(c, scope) : [];
    if (prefixes.length) {
      if (prefixes.length * lines.length > limit(i)) return undefined;
      wide = widenCircuit(c, prefixes, before.slots, after.slots, portCount, inserted!, named!, options);
      if (!wide) return undefined;
      c = wide.circuit;
    }
    const r = spliceCircuit(c, edit, limit(i));
    if (!r) return undefined;
    circuits.push(r.circuit);
    renumbering.push(r.renumbering);
    widened.push(wide);
  }
  if (renumbering.every((r) => !r)) return undefined;
  const design: Design = { ...previous, circuits, directives: shiftRanges(previous.directives, shift), ...(movedCards.size ? { modelCards } : {}) };
  const removedLines = removed.length ? { file, from: startLineOf(removed[0]!.range), to: removed[removed.length - 1]!.range.end.line } : undefined;
  return { design, renumbering, shift, removedLines, widened };
}

/** The old and new parse of the one file an edit changed (the same list of files, the same title), else undefined. */
export function oneChangedFile(a: readonly SyntaxFile[], b: readonly SyntaxFile[]): [SyntaxFile, SyntaxFile] | undefined {
  if (a.length !== b.length) return undefined;
  let at = -1;
  for (let i = 0; i < a.length; i++) {
    if (a[i] === b[i]) continue;
    if (a[i]!.file !== b[i]!.file || at >= 0) return undefined;
    at = i;
  }
  if (at < 0 || a[at]!.title !== b[at]!.title) return undefined;
  return [a[at]!, b[at]!];
}

/** Origins after the shift moved (one moved copy per origin, shared as the origins are). */
function originMover(shift: LineShift): (o: Origin) => Origin {
  const origins = new Map<Origin, Origin>();
  return (o) => {
    if (o.file !== shift.file || startLineOf(o.range) < shift.fromLine) return o;
    let m = origins.get(o);
    if (!m) origins.set(o, (m = { ...o, range: shiftedRange(o.range, shift.lines) }));
    return m;
  };
}

/** The design's model cards with those after the shift moved, and the old-to-moved map. */
function cardMover(design: Design, shift: LineShift): { movedCards: Map<ModelCard, ModelCard>; moveCard: (c: ModelCard) => ModelCard; modelCards: Map<string, ModelCard[]> } {
  const movedCards = new Map<ModelCard, ModelCard>();
  const moveCard = (card: ModelCard): ModelCard => {
    if (card.file !== shift.file || startLineOf(card.range) < shift.fromLine) return card;
    let m = movedCards.get(card);
    if (!m) movedCards.set(card, (m = { ...card, range: shiftedRange(card.range, shift.lines) }));
    return m;
  };
  const modelCards = new Map<string, ModelCard[]>();
  for (const [name, cards] of design.modelCards) modelCards.set(name, cards.map(moveCard));
  return { movedCards, moveCard, modelCards };
}

/**
 * The design with every line of `shift.file` from `shift.fromLine` on moved by `shift.lines`
 * (an edit that put in or took out lines holding no element: a directive): every origin, card
 * and directive range after it, the same devices and nets.
 */
export function shiftedDesign(previous: Design, shift: LineShift): Design {
  // nothing moves (a line edited in place): the same design
  if (shift.lines === 0) return previous;
  const { movedCards, modelCards } = cardMover(previous, shift);
  // an edit in no definition: every circuit only has its origins moved
  const edit: SpliceEdit = { scope: '\0', portCount: 0, slots: undefined as unknown as NetSlots, lines: [], deleting: false, bodyIndex: new Map(), firstNewBodyIndex: -1, moveOrigin: originMover(shift), movedCards, netOrigins: new Map() };
  const circuits = previous.circuits.map((c) => spliceCircuit(c, edit, Infinity)!.circuit);
  return { ...previous, circuits, directives: shiftRanges(previous.directives, shift), ...(movedCards.size ? { modelCards } : {}) };
}

/** Findings moved with their lines (a finding is kept only where its line still stands). */
export function shiftDiagnostics(list: Diagnostic[], shift: LineShift): Diagnostic[] {
  if (shift.lines === 0) return list;
  return list.map((d) => shiftRanges(d, shift));
}

/**
 * A copy of plain data with every range under `shift.file` at or after its first line moved
 * (the file is the nearest enclosing object's `file`); parts with nothing to move are kept.
 */
export function shiftRanges<T>(value: T, shift: LineShift): T {
  if (shift.lines === 0) return value;
  const walk = (v: unknown, file: string | undefined): unknown => {
    if (typeof v !== 'object' || v === null) return v;
    if (isRange(v)) return file === shift.file && startLineOf(v) >= shift.fromLine ? shiftedRange(v, shift.lines) : v;
    if (Array.isArray(v)) {
      let out: unknown[] | undefined;
      v.forEach((x, i) => {
        const y = walk(x, file);
        if (y !== x) (out ??= v.slice())[i] = y;
      });
      return out ?? v;
    }
    if (Object.getPrototypeOf(v) !== Object.prototype) return v;
    const o = v as Record<string, unknown>;
    const here = typeof o.file === 'string' ? o.file : file;
    let out: Record<string, unknown> | undefined;
    for (const k of Object.keys(o)) {
      const y = walk(o[k], here);
      if (y !== o[k]) (out ??= { ...o })[k] = y;
    }
    return out ?? v;
  };
  return walk(value, undefined) as T;
}

function isRange(v: object): v is Range {
  if (v instanceof Span) return true;
  const r = v as Partial<Range>;
  return typeof r.start === 'object' && typeof r.end === 'object' && r.start !== null && typeof r.start.line === 'number' && Object.keys(v).length === 2;
}

function shiftedRange(r: Range, lines: number): Range {
  return rangeOf(r.start.line + lines, r.start.character, r.end.line + lines, r.end.character);
}

/**
 * How many statements two parses of a file share at the start (`p`, in place) and after that
 * at the end (`s`, moved by the change in line count): the statements between are the edit's.
 */
export function sharedEnds(x: SyntaxFile, y: SyntaxFile): { p: number; s: number } {
  const xs = x.statements;
  const ys = y.statements;
  const d = y.lineCount - x.lineCount;
  let p = 0;
  while (p < xs.length && p < ys.length && (xs[p] === ys[p] || sameStatement(xs[p]!, ys[p]!, 0))) p++;
  let s = 0;
  while (s < xs.length - p && s < ys.length - p && sameStatement(xs[xs.length - 1 - s]!, ys[ys.length - 1 - s]!, d)) s++;
  return { p, s };
}

/**
 * The one file that differs, its removed or added statements (never both), and the line shift
 * after them; every directive, pin line and parser finding must be the same, in place before
 * the edit or moved with the lines after it.
 */
function diffFiles(a: readonly SyntaxFile[], b: readonly SyntaxFile[]): { file: string; removed: Statement[]; added: Statement[]; shift: LineShift } | undefined {
  const changed = oneChangedFile(a, b);
  if (!changed) return undefined;
  const [x, y] = changed;
  const xs = x.statements;
  const ys = y.statements;
  const d = y.lineCount - x.lineCount;
  const { p, s } = sharedEnds(x, y);
  const removed = xs.slice(p, xs.length - s);
  const added = ys.slice(p, ys.length - s);
  if ((removed.length === 0) === (added.length === 0)) return undefined;
  // the first old line that moves: the first statement after the edit, or a line before it
  // (a directive, a broken line) that moved with it
  let fromLine = s > 0 ? startLineOf(xs[xs.length - s]!.range) : Infinity;
  const shifts: Array<{ line: number; by: number }> = [];
  const note = (r: Range, q: Range): boolean => {
    const by = q.start.line - r.start.line;
    if (by !== 0 && by !== d) return false;
    if (!sameRange(r, q, by)) return false;
    shifts.push({ line: r.start.line, by });
    if (by !== 0 && r.start.line < fromLine) fromLine = r.start.line;
    return true;
  };
  const placed = (si: number, sj: number) => (si <= p && sj === si) || (si >= xs.length - s && sj === si + ys.length - xs.length);
  if (x.directives.length !== y.directives.length || x.pinInfos.length !== y.pinInfos.length || x.diagnostics.length !== y.diagnostics.length) return undefined;
  for (let i = 0; i < x.directives.length; i++) {
    const u = x.directives[i]!;
    const v = y.directives[i]!;
    if (!placed(u.statementIndex, v.statementIndex) || !note(u.range, v.range) || !sameDirectiveLine(u, v, v.range.start.line - u.range.start.line)) return undefined;
  }
  for (let i = 0; i < x.pinInfos.length; i++) {
    const u = x.pinInfos[i]!;
    const v = y.pinInfos[i]!;
    if (!placed(u.statementIndex, v.statementIndex) || !note(u.range, v.range) || !samePinLine(u, v, v.range.start.line - u.range.start.line)) return undefined;
  }
  for (let i = 0; i < x.diagnostics.length; i++) {
    const u = x.diagnostics[i]!;
    const v = y.diagnostics[i]!;
    if (u.rule !== v.rule || u.message !== v.message || u.severity !== v.severity || !note(u.range, v.range)) return undefined;
  }
  if (d === 0) fromLine = Infinity;
  // what stays put lies before what moves, and the statements before the edit stay put
  if (shifts.some((t) => (t.by === 0) !== t.line < fromLine)) return undefined;
  if (p > 0 && xs[p - 1]!.range.end.line >= fromLine) return undefined;
  return { file: x.file, removed, added, shift: { file: x.file, fromLine, lines: d } };
}

/** The line as a transistor the splice can place, or undefined. */
function plainMosfet(st: Statement, design: Design): PlainMosfet | undefined {
  if (st.head.text[0]?.toLowerCase() !== 'm') return undefined;
  const read = elementNodeWords(st);
  if (read.skipped !== undefined || read.syntax.kind !== 'mos' || !read.syntax.model) return undefined;
  // exactly four nodes and a model, then plain-number sizes
  if (st.items.filter((it) => it.kind !== 'assign').length !== 5 || st.items.some((it) => it.kind !== 'assign' && it.kind !== 'word')) return undefined;
  const written = new Map<string, number>();
  for (const p of read.syntax.params) {
    const k = p.name.text.toLowerCase();
    if (!(k in SIZE_PARAMS) || !isPlainNumber(p.value)) return undefined;
    written.set(k, parseSpiceNumber((p.value as { text: string }).text)!);
  }
  if (!written.has('w') || !written.has('l')) return undefined;
  const scale = design.geometryScale.value;
  const model = read.syntax.model.text.toLowerCase();
  const wM = written.get('w')! * scale;
  const lM = written.get('l')! * scale;
  if (lM > PLAUSIBLE_L_M || wM > PLAUSIBLE_W_M) return undefined;
  const card = selectModel(design.modelCards, model, lM, wM);
  const polarity: Polarity | undefined = card?.kind === 'nmos' ? 'n' : card?.kind === 'pmos' ? 'p' : undefined;
  // a model without a card is reported with a count of its devices
  if (!card || !polarity) return undefined;
  const values: PlainMosfet['values'] = { polarity, wM, lM, m: written.get('m') ?? written.get('mult') ?? 1, nf: written.get('nf') ?? 1, model, card };
  for (const [k, field, area] of [['ad', 'adM2', true], ['as', 'asM2', true], ['pd', 'pdM', false], ['ps', 'psM', false]] as const) {
    if (written.has(k)) values[field] = written.get(k)! * (area ? scale * scale : scale);
  }
  return { statement: st, local: st.head.text.toLowerCase(), values };
}

interface SpliceEdit {
  scope: string | null;
  portCount: number;
  slots: NetSlots;
  lines: Array<PlainMosfet & { slots: number[]; origin: Origin }>;
  deleting: boolean;
  /** Element local name -> its index in the (new) body. */
  bodyIndex: ReadonlyMap<string, number>;
  firstNewBodyIndex: number;
  moveOrigin: (o: Origin) => Origin;
  /** Cards after the edit, old to moved. */
  movedCards: ReadonlyMap<ModelCard, ModelCard>;
  netOrigins: ReadonlyMap<string, Origin>;
}

function spliceCircuit(c: Circuit, e: SpliceEdit, limit: number): { circuit: Circuit; renumbering: MosfetRenumbering | undefined } | undefined {
  // where the edited definition sits in this circuit, in instance order
  const contexts: Array<{ prefix: string; ports: readonly number[] | null; span: readonly [number, number] }> = [];
  if ((e.scope === null && !c.standalone) || (e.scope !== null && c.standalone && c.name === e.scope)) contexts.push({ prefix: '', ports: null, span: [0, c.mosfets.length] });
  c.instances.forEach((inst, i) => {
    if (inst.subckt === e.scope) contexts.push({ prefix: inst.name + '.', ports: inst.ports, span: [c.instanceMosfets[2 * i]!, c.instanceMosfets[2 * i + 1]!] });
  });
  if (contexts.length && c.standalone && c.ports.some((p) => p.from === 'inferred')) return undefined;
  if (contexts.length * e.lines.length > limit) return undefined;
  const flatNet = (prefix: string, ports: readonly number[] | null, slot: number): number | undefined => {
    if (slot < 0) return c.netByName.get(e.slots.globalNames[-slot - 1]!);
    if (ports && slot < e.portCount) return ports[slot];
    return c.netByName.get(prefix + e.slots.localNames[slot]!);
  };
  const nm = c.mosfets.length;
  let renumbering: MosfetRenumbering | undefined;
  let mosfets: Mosfet[];
  /** Inserts as (old position, device, its context's prefix), in list order. */
  const inserts: Array<{ at: number; prefix: string }> = [];
  if (contexts.length === 0) mosfets = moveAll(c.mosfets, e.moveOrigin);
  else {
    const index = originIndex(c.mosfets);
    const oldToNew = new Int32Array(nm);
    const addedAt: number[] = [];
    const deleted: number[] = [];
    const added: Mosfet[] = [];
    if (e.deleting) {
      const prefixes = new Set(contexts.map((x) => x.prefix));
      const keys = new Set(e.lines.map((l) => `${l.origin.file}|${startLineOf(l.origin.range)}|${l.origin.range.start.character}`));
      for (const [o, at] of index) {
        if (!keys.has(`${o.file}|${startLineOf(o.range)}|${o.range.start.character}`)) continue;
        for (const i of at) {
          const m = c.mosfets[i]!;
          if (!m.name.endsWith(o.local) || !prefixes.has(m.name.slice(0, m.name.length - o.local.length))) return undefined;
          // a device without a card was counted in a finding
          if (!m.card) return undefined;
          deleted.push(i);
        }
      }
      deleted.sort((x, y) => x - y);
      if (deleted.length !== contexts.length * e.lines.length) return undefined;
    } else {
      for (const x of contexts) {
        // the span's devices follow the body order of the elements they come from
        const bodyOf = (i: number): number | undefined => {
          const rest = c.mosfets[i]!.name.slice(x.prefix.length);
          const dot = rest.indexOf('.');
          return e.bodyIndex.get(dot < 0 ? rest : rest.slice(0, dot));
        };
        let lo = x.span[0];
        let hi = x.span[1];
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          const k = bodyOf(mid);
          if (k === undefined) return undefined;
          if (k < e.firstNewBodyIndex) lo = mid + 1;
          else hi = mid;
        }
        for (const l of e.lines) {
          const nets: number[] = [];
          for (const s of l.slots) {
            const id = flatNet(x.prefix, x.ports, s);
            if (id === undefined) return undefined;
            nets.push(id);
          }
          added.push(mosfetRecord(x.prefix + l.local, l.values.polarity, nets[0]!, nets[1]!, nets[2]!, nets[3]!, l.values, l.origin));
          inserts.push({ at: lo, prefix: x.prefix });
        }
      }
    }
    // the list is copied once with the changes (the devices themselves are not read)
    let from = 0;
    let shift = 0;
    const renumberTo = (to: number) => {
      for (let i = from; i < to; i++) oldToNew[i] = i + shift;
      from = to;
    };
    if (e.deleting) {
      for (const i of deleted) {
        renumberTo(i);
        oldToNew[i] = -1;
        from = i + 1;
        shift--;
      }
    } else {
      for (const x of inserts) {
        renumberTo(x.at);
        addedAt.push(x.at + shift);
        shift++;
      }
    }
    renumberTo(nm);
    let q = 0;
    mosfets = splicedList(c.mosfets, deleted, addedAt, () => added[q++]!);
    // the devices of lines after the edit take their lines' new places
    const next = new Map<Origin, number[]>();
    for (const [o, at] of index) {
      const moved = e.moveOrigin(o);
      const to: number[] = [];
      for (const i of at) {
        const j = oldToNew[i]!;
        if (j < 0) continue;
        to.push(j);
        if (moved !== o) mosfets[j] = { ...c.mosfets[i]!, origin: moved };
      }
      if (to.length) next.set(moved, to);
    }
    for (let k = 0; k < added.length; k++) {
      const o = added[k]!.origin;
      const at = next.get(o);
      if (at) at.push(addedAt[k]!);
      else next.set(o, [addedAt[k]!]);
    }
    setOriginIndex(mosfets, next);
    renumbering = { oldToNew, added: addedAt, deleted };
  }

  // the devices on a moved card take the moved copy (their positions, and so the origin index, stay)
  if (e.movedCards.size) {
    const index = originIndex(mosfets);
    let out: Mosfet[] | undefined;
    for (let j = 0; j < mosfets.length; j++) {
      const card = mosfets[j]!.card;
      const moved = card && e.movedCards.get(card);
      if (moved) (out ??= mosfets === c.mosfets ? mosfets.slice() : mosfets)[j] = { ...mosfets[j]!, card: moved };
    }
    if (out && out !== mosfets) setOriginIndex(out, index);
    if (out) mosfets = out;
  }

  // each instance's span of devices below it, and every origin after the edit moved
  const before = (list: readonly number[], v: number) => {
    let lo = 0;
    let hi = list.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (list[mid]! < v) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const insertAt = inserts.map((x) => x.at);
  const deletedList = renumbering?.deleted ?? [];
  // an insert where the span starts or ends is inside it when it belongs to the instance's subtree
  const inside = (k: number, inst: Instance) => inserts[k]!.prefix.startsWith(inst.name) && inserts[k]!.prefix[inst.name.length] === '.';
  let instances = c.instances;
  // (the spans live in one typed array, so most instances keep their objects)
  let instanceMosfets = c.instanceMosfets;
  for (let i = 0; i < c.instances.length; i++) {
    const inst = c.instances[i]!;
    const origin = e.moveOrigin(inst.origin);
    const s0 = c.instanceMosfets[2 * i]!;
    const s1 = c.instanceMosfets[2 * i + 1]!;
    let ns = s0;
    let nt = s1;
    if (renumbering && e.deleting) {
      ns -= before(deletedList, s0);
      nt -= before(deletedList, s1);
    } else if (renumbering) {
      const bs = before(insertAt, s0);
      ns += bs;
      for (let k = bs; k < insertAt.length && insertAt[k] === s0; k++) if (!inside(k, inst)) ns++;
      const bt = before(insertAt, s1);
      nt += bt;
      for (let k = bt; k < insertAt.length && insertAt[k] === s1; k++) if (inside(k, inst)) nt++;
    }
    if (ns !== s0 || nt !== s1) {
      if (instanceMosfets === c.instanceMosfets) instanceMosfets = c.instanceMosfets.slice();
      instanceMosfets[2 * i] = ns;
      instanceMosfets[2 * i + 1] = nt;
    }
    if (origin === inst.origin) continue;
    if (instances === c.instances) instances = c.instances.slice();
    instances[i] = { ...inst, origin };
  }
  // nets by where they were first written (every instance of a line shares the origin)
  let nets: Net[] = c.nets;
  const netIndex = originIndex(c.nets);
  const nextNetIndex = new Map<Origin, number[]>();
  for (const [o, at] of netIndex) {
    const first = c.nets[at[0]!]!;
    const to = o.subckt === e.scope && !first.global ? e.netOrigins.get(o.local) : undefined;
    const origin = to ?? e.moveOrigin(o);
    const known = nextNetIndex.get(origin);
    nextNetIndex.set(origin, known ? [...known, ...at].sort((x, y) => x - y) : at);
    if (origin === o) continue;
    if (nets === c.nets) nets = c.nets.slice();
    for (const i of at) nets[i] = { ...c.nets[i]!, origin };
  }
  if (nets !== c.nets) setOriginIndex(nets, nextNetIndex);
  const circuit: Circuit = {
    ...c,
    nets,
    mosfets,
    capacitors: moveAll(c.capacitors, e.moveOrigin),
    resistors: moveAll(c.resistors, e.moveOrigin),
    inductors: moveAll(c.inductors, e.moveOrigin),
    sources: moveAll(c.sources, e.moveOrigin),
    diodes: moveAll(c.diodes, e.moveOrigin),
    others: moveAll(c.others, e.moveOrigin),
    instances,
    instanceMosfets,
  };
  return { circuit, renumbering };
}

function moveOne<T extends { origin: Origin }>(x: T, move: (o: Origin) => Origin): T {
  const o = move(x.origin);
  return o === x.origin ? x : { ...x, origin: o };
}

function moveAll<T extends { origin: Origin }>(list: T[], move: (o: Origin) => Origin): T[] {
  let out: T[] | undefined;
  for (let i = 0; i < list.length; i++) {
    const y = moveOne(list[i]!, move);
    if (y !== list[i]) (out ??= list.slice())[i] = y;
  }
  return out ?? list;
}
