// The elaboration stage's answer to a size edit: when the new deck differs from the old one only
// in plain-number sizes of MOSFET lines (W, L, M, NF, AD, AS, PD, PS) or in their model names
// (another card of the same polarity: a threshold flavour), the flat circuit keeps every net
// and connection, and only the devices written on those lines take their new values.
// Anything else (a changed word, a parameter expression, a line moved, an edit that could change
// the assumed geometry scale) answers `undefined`, and the caller elaborates afresh.

import { startLineOf, type Range } from '../core/source';
import type { Circuit, Design, Mosfet, Origin } from './circuit';
import type { Deck } from './deck';
import { selectModel } from './models';
import { parseSpiceNumber } from './numbers';
import { editedStatements, sameItem, sameWords } from '../syntax/compare';
import type { AssignItem, Item, Statement } from '../syntax/tree';
import { interpretElement } from './elements';
import { lineIndex, setLineIndex } from './elementIndex';

/** Sizes the patch can take, and how each scales with the geometry scale. */
export const SIZE_PARAMS: Record<string, 'length' | 'area' | 'count'> = { w: 'length', l: 'length', pd: 'length', ps: 'length', ad: 'area', as: 'area', m: 'count', mult: 'count', nf: 'count' };

/** Written lengths above this look like microns (the elaborator's scale guess). */
const MICRON_LOOKING_L = 1e-3;
/** Sizes the elaborator calls implausible (it reports them, so the patch steps aside). */
export const PLAUSIBLE_L_M = 1e-3;
export const PLAUSIBLE_W_M = 1e-1;

export interface SizePatch {
  design: Design;
  /** Per circuit of the design: indices of the MOSFETs that took new values. */
  changed: number[][];
  /** The edited lines: old range -> new range, per file. */
  moved: Array<{ file: string; from: Range; to: Range }>;
}

interface EditedLine {
  file: string;
  before: Statement;
  after: Statement;
}

export function patchSizes(previousDeck: Deck, previous: Design, deck: Deck): SizePatch | undefined {
  const edited = editedStatements(previousDeck.files, deck.files, (file, before, after): EditedLine | undefined => (sizeEditOf(before, after) ? { file, before, after } : undefined));
  if (!edited || edited.length === 0) return undefined;
  const scale = previous.geometryScale;
  // devices are found by where their line starts: an earlier edit's analysis may hold an
  // older parse of the same, unchanged line
  type Target = { values: Sizes; origin: Origin | undefined; line: EditedLine; card: { for: Mosfet; card: Mosfet['card'] } | undefined };
  const byLine = new Map<number, Target[]>();
  for (const line of edited) {
    const values = sizesOf(line, scale.value, scale.from === 'default' || scale.from === 'assumed');
    if (!values) return undefined;
    const at = startLineOf(line.before.range);
    byLine.set(at, [...(byLine.get(at) ?? []), { values, origin: undefined, line, card: undefined }]);
  }
  const targetOf = (o: Origin): Target | undefined => {
    const list = byLine.get(startLineOf(o.range));
    if (!list) return undefined;
    const ch = o.range.start.character;
    return list.find((t) => t.line.file === o.file && t.line.before.range.start.character === ch);
  };
  const changed: number[][] = [];
  const circuits: Circuit[] = [];
  for (const c of previous.circuits) {
    const indices: number[] = [];
    let mosfets: Mosfet[] | undefined;
    // the devices written on the edited lines (every instance of each), in list order
    const lines = lineIndex(c.mosfets);
    const candidates: number[] = [];
    for (const at of byLine.keys()) candidates.push(...(lines.get(at) ?? []));
    candidates.sort((x, y) => x - y);
    for (const k of candidates) {
      const m = c.mosfets[k]!;
      const hit = targetOf(m.origin);
      if (!hit) continue;
      hit.origin ??= { ...m.origin, range: hit.line.after.range };
      const v = hit.values;
      if (v.model === undefined) return undefined;
      const next: Mosfet = { name: m.name, polarity: m.polarity, d: m.d, g: m.g, s: m.s, b: m.b, wM: v.wM ?? m.wM, lM: v.lM ?? m.lM, m: v.m, nf: v.nf, model: v.model, card: m.card, origin: hit.origin };
      if (v.adM2 !== undefined) next.adM2 = v.adM2;
      if (v.asM2 !== undefined) next.asM2 = v.asM2;
      if (v.pdM !== undefined) next.pdM = v.pdM;
      if (v.psM !== undefined) next.psM = v.psM;
      // the bin follows the size (one choice per line: every device of it has the same sizes
      // and model); a card of the other polarity would change the switch network
      if (!hit.card || hit.card.for.wM !== next.wM || hit.card.for.lM !== next.lM) hit.card = { for: next, card: selectModel(previous.modelCards, next.model, next.lM, next.wM) };
      next.card = hit.card.card;
      // a model without a card is reported by the elaborator (counted per device): another
      // model name is taken only between two that have cards
      if (next.model !== m.model ? m.card === undefined || next.card === undefined : (m.card === undefined) !== (next.card === undefined)) return undefined;
      if (next.card && (next.card.kind === 'nmos' ? 'n' : 'p') !== m.polarity) return undefined;
      if (next.lM > PLAUSIBLE_L_M || next.wM > PLAUSIBLE_W_M) return undefined;
      mosfets ??= c.mosfets.slice();
      mosfets[k] = next;
      indices.push(k);
    }
    changed.push(indices);
    // every device stays on its line
    if (mosfets) setLineIndex(mosfets, lines);
    circuits.push(mosfets ? { ...c, mosfets } : c);
  }
  // a line whose model changed but whose devices were left out (a model with no card and no
  // polarity) would now make devices: not a size edit
  for (const list of byLine.values()) for (const t of list) if (!t.origin && modelWordText(t.line.before) !== t.values.model) return undefined;
  const moved = edited.map((l) => ({ file: l.file, from: l.before.range, to: l.after.range }));
  return { design: { ...previous, circuits }, changed, moved };
}

/**
 * True when `y` is `x` with some size values replaced by other plain numbers: same element,
 * same nodes and model, same parameter names in the same order, on the same lines. Words after
 * a changed value may sit a few characters further along its line.
 */
function sizeEditOf(x: Statement, y: Statement): boolean {
  if (x.head.text[0]?.toLowerCase() !== 'm' || !sameItem(x.head, y.head, 0) || x.items.length !== y.items.length) return false;
  if (x.range.start.line !== y.range.start.line || x.range.end.line !== y.range.end.line) return false;
  const modelBefore = modelWord(x);
  const modelAfter = modelWord(y);
  let changedOnLine = -1;
  for (let k = 0; k < x.items.length; k++) {
    const p = x.items[k]!;
    const q = y.items[k]!;
    if (sameItem(p, q, 0)) continue;
    const onChangedLine = p.range.start.line === changedOnLine && sameWords(p, q);
    if (onChangedLine) continue;
    // another model name in the model's place (a flavour of the same polarity, checked later)
    if (p === modelBefore && q === modelAfter && p.range.start.line === q.range.start.line && (p.range.start.character === q.range.start.character || p.range.start.line === changedOnLine)) {
      changedOnLine = p.range.start.line;
      continue;
    }
    if (p.kind !== 'assign' || q.kind !== 'assign' || p.name.text !== q.name.text || !(p.name.text.toLowerCase() in SIZE_PARAMS)) return false;
    if (!isPlainNumber(p.value) || !isPlainNumber(q.value) || p.range.start.line !== q.range.start.line || p.range.end.line !== q.range.end.line) return false;
    if (p.name.range.start.character !== q.name.range.start.character && p.range.start.line !== changedOnLine) return false;
    changedOnLine = p.range.start.line;
  }
  return changedOnLine >= 0;
}

function modelWordText(x: Statement): string | undefined {
  const w = modelWord(x);
  return w?.kind === 'word' ? w.text.toLowerCase() : undefined;
}

/** The model word of a MOSFET line, if it has one. */
function modelWord(x: Statement): Item | undefined {
  const e = interpretElement(x);
  return e?.kind === 'mos' ? e.model : undefined;
}

export function isPlainNumber(v: AssignItem['value']): boolean {
  return v?.kind === 'word' && parseSpiceNumber(v.text) !== undefined;
}

/**
 * The new sizes of one edited line, as the elaborator would compute them (metres, scaled), or
 * undefined when a size is not a plain number or a written length crosses the scale guess.
 */
type Sizes = { wM?: number; lM?: number; m: number; nf: number; adM2?: number; asM2?: number; pdM?: number; psM?: number; model: string | undefined };

function sizesOf(line: EditedLine, scale: number, scaleGuessed: boolean): Sizes | undefined {
  const written = new Map<string, number>();
  const before = new Map<string, number>();
  for (const it of line.after.items) {
    if (it.kind !== 'assign') continue;
    const k = it.name.text.toLowerCase();
    if (!(k in SIZE_PARAMS)) continue;
    if (!isPlainNumber(it.value)) return undefined;
    written.set(k, parseSpiceNumber((it.value as { text: string }).text)!);
  }
  for (const it of line.before.items) if (it.kind === 'assign' && it.value?.kind === 'word' && it.name.text.toLowerCase() === 'l') before.set('l', parseSpiceNumber(it.value.text) ?? NaN);
  // the elaborator guesses microns from the median written L: keep every L on its side of the line
  if (scaleGuessed && written.has('l') && (before.get('l')! > MICRON_LOOKING_L) !== (written.get('l')! > MICRON_LOOKING_L)) return undefined;
  const area = (k: string) => (written.has(k) ? written.get(k)! * scale * scale : undefined);
  const len = (k: string) => (written.has(k) ? written.get(k)! * scale : undefined);
  const model = modelWord(line.after);
  return { wM: len('w'), lM: len('l'), m: written.get('m') ?? written.get('mult') ?? 1, nf: written.get('nf') ?? 1, adM2: area('ad'), asM2: area('as'), pdM: len('pd'), psM: len('ps'), model: model?.kind === 'word' ? model.text.toLowerCase() : undefined };
}
