// Gives each element line its SPICE meaning by its first letter: which words are nodes, which is
// the model or subcircuit, which are values and parameters. Pure and per statement, so the
// result can be cached with the statement.

import type { AssignItem, GroupItem, Item, Statement, ValueItem, WordItem } from '../syntax/tree';
import { spanRanges } from '../core/source';

export type WaveformSyntax =
  | { kind: 'dc'; value: ValueItem | undefined }
  | { kind: 'pulse' | 'pwl' | 'sin' | 'exp' | 'sffm' | 'am'; args: ValueItem[]; options: AssignItem[]; dc: ValueItem | undefined; range: GroupItem['range'] | WordItem['range'] };

export type ElementSyntax =
  | { kind: 'mos'; name: WordItem; nodes: WordItem[]; model: WordItem | undefined; params: AssignItem[] }
  | { kind: 'instance'; name: WordItem; nodes: WordItem[]; subckt: WordItem | undefined; params: AssignItem[] }
  | { kind: 'passive'; letter: 'r' | 'c' | 'l'; name: WordItem; nodes: WordItem[]; value: ValueItem | undefined; model: WordItem | undefined; params: AssignItem[] }
  | { kind: 'source'; letter: 'v' | 'i'; name: WordItem; nodes: WordItem[]; waveform: WaveformSyntax; params: AssignItem[] }
  | { kind: 'diode'; name: WordItem; nodes: WordItem[]; model: WordItem | undefined; params: AssignItem[] }
  /** Valid SPICE that Tidemark keeps only as connectivity (Q, E, F, G, H, B, J, Z, S, W, T, ...). */
  | { kind: 'other'; letter: string; name: WordItem; nodes: WordItem[]; params: AssignItem[] }
  /** K (mutual inductance) connects no nodes. */
  | { kind: 'coupling'; name: WordItem };

/** Positional words and key=value parameters of a line; groups kept in order among positionals. */
export function splitItems(items: Item[]): { positional: ValueItem[]; params: AssignItem[] } {
  const positional: ValueItem[] = [];
  const params: AssignItem[] = [];
  for (const it of items) {
    if (it.kind === 'assign') params.push(it);
    else positional.push(it);
  }
  return { positional, params };
}

function words(items: ValueItem[]): WordItem[] {
  return items.filter((i): i is WordItem => i.kind === 'word');
}

const FIXED_NODE_COUNT: Record<string, number> = {
  e: 4, g: 4, f: 2, h: 2, b: 2, j: 3, z: 3, s: 4, w: 2, t: 4, o: 4, u: 3,
};

export const MODELLED_LETTERS = new Set(['m', 'x', 'r', 'c', 'l', 'v', 'i', 'd', 'k']);
export const KNOWN_LETTERS = new Set('abcdefghijklmnopqrstuvwxyz'.split(''));

export function interpretElement(stmt: Statement): ElementSyntax | undefined {
  const name = stmt.head;
  const letter = name.text[0]!.toLowerCase();
  const { positional, params } = splitItems(stmt.items);
  switch (letter) {
    case 'm': {
      const w = words(positional);
      return { kind: 'mos', name, nodes: w.slice(0, 4), model: w[4], params };
    }
    case 'x': {
      // The subcircuit is the last positional word, or the word after a CDL '/' separator.
      const w = words(positional).filter((x) => x.text.toLowerCase() !== 'params:');
      const slash = w.findIndex((x) => x.text === '/' || x.text.startsWith('/'));
      if (slash >= 0) {
        const s = w[slash]!;
        const subckt: WordItem | undefined = s.text === '/' ? w[slash + 1] : { kind: 'word', text: s.text.slice(1), range: s.range };
        return { kind: 'instance', name, nodes: w.slice(0, slash), subckt, params };
      }
      return { kind: 'instance', name, nodes: w.slice(0, -1), subckt: w[w.length - 1], params };
    }
    case 'r':
    case 'c':
    case 'l': {
      const nodes = words(positional.slice(0, 2));
      const rest = positional.slice(2);
      let value: ValueItem | undefined;
      let model: WordItem | undefined;
      for (const r of rest) {
        if (r.kind === 'word' && /^[+-]?(\d|\.\d)/.test(r.text)) value ??= r;
        else if (r.kind === 'word') model ??= r;
        else if (r.kind === 'expr') value ??= r;
      }
      const keyed = params.find((p) => p.name.text.toLowerCase() === letter || p.name.text.toLowerCase() === (letter === 'r' ? 'resistance' : letter === 'c' ? 'capacitance' : 'inductance'));
      if (!value && keyed?.value) value = keyed.value;
      return { kind: 'passive', letter, name, nodes, value, model, params };
    }
    case 'v':
    case 'i':
      return { kind: 'source', letter, name, nodes: words(positional.slice(0, 2)), waveform: readWaveform(positional.slice(2), params), params };
    case 'd': {
      const w = words(positional);
      return { kind: 'diode', name, nodes: w.slice(0, 2), model: w[2], params };
    }
    case 'k':
      return { kind: 'coupling', name };
    case 'q': {
      // Q c b e [s] model [area]: the model is the last word that is not a number.
      const w = words(positional).filter((x) => !/^[+-]?(\d|\.\d)/.test(x.text));
      return { kind: 'other', letter, name, nodes: w.slice(0, Math.max(0, w.length - 1)).slice(0, 4), params };
    }
    default: {
      const count = FIXED_NODE_COUNT[letter];
      const w = words(positional);
      return { kind: 'other', letter, name, nodes: count === undefined ? [] : w.slice(0, count), params };
    }
  }
}

const WAVE_KINDS = new Set(['pulse', 'pwl', 'sin', 'exp', 'sffm', 'am']);

/** `[DC] v`, `DC v PULSE(...)`, `PULSE v1 v2 ...` (with or without parentheses), `AC ...` ignored. */
export function readWaveform(items: ValueItem[], trailing: AssignItem[] = []): WaveformSyntax {
  let dc: ValueItem | undefined;
  for (let i = 0; i < items.length; i++) {
    const it = items[i]!;
    const kw = it.kind === 'word' ? it.text.toLowerCase() : '';
    if (kw === 'dc') {
      dc = items[i + 1];
      i++;
      continue;
    }
    if (kw === 'ac' || kw === 'distof1' || kw === 'distof2') {
      // magnitude and phase follow; they do not matter for a switch-level view
      while (i + 1 < items.length && items[i + 1]!.kind !== 'group' && !isKeyword(items[i + 1]!)) i++;
      continue;
    }
    const wk = kw.replace(/\($/, '');
    if (WAVE_KINDS.has(wk)) {
      const next = items[i + 1];
      const args = next?.kind === 'group' ? next.items.filter((x): x is ValueItem => x.kind !== 'assign') : items.slice(i + 1).filter((x) => !isKeyword(x));
      const range = next?.kind === 'group' ? spanRanges(it.range, next.range) : it.range;
      // PWL options such as r= (repeat) and td= sit inside the parentheses or after them
      const options = [...(next?.kind === 'group' ? next.items.filter((x): x is AssignItem => x.kind === 'assign') : []), ...trailing];
      return { kind: wk as 'pulse', args, options, dc, range };
    }
    if (it.kind !== 'group') dc ??= it;
  }
  return { kind: 'dc', value: dc };
}

function isKeyword(it: ValueItem): boolean {
  return it.kind === 'word' && /^(dc|ac|pulse|pwl|sin|exp|sffm|am|distof1|distof2)$/i.test(it.text);
}
