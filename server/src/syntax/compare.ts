// Comparing two parses of a file item by item: what an edit changed, and whether it only moved
// lines. Used by the editor's carry-over of findings and by the size-edit patch.

import type { Range } from '../core/source';
import type { Item } from './tree';

/** Same position after moving `lineShift` lines down (characters unchanged). */
export function sameRange(x: Range, y: Range, lineShift: number): boolean {
  return x.start.line + lineShift === y.start.line && x.end.line + lineShift === y.end.line && x.start.character === y.start.character && x.end.character === y.end.character;
}

/** The same item, word for word, at the same place moved by `lineShift` lines. */
export function sameItem(x: Item, y: Item, lineShift: number): boolean {
  if (x.kind !== y.kind || !sameRange(x.range, y.range, lineShift)) return false;
  switch (x.kind) {
    case 'word':
    case 'string':
      return x.text === (y as typeof x).text;
    case 'expr':
      return x.text === (y as typeof x).text && x.delimiter === (y as typeof x).delimiter;
    case 'group': {
      const g = y as typeof x;
      return x.items.length === g.items.length && x.items.every((it, k) => sameItem(it, g.items[k]!, lineShift));
    }
    case 'assign': {
      const v = y as typeof x;
      if (!sameItem(x.name, v.name, lineShift)) return false;
      if (x.value === undefined || v.value === undefined) return x.value === v.value;
      return sameItem(x.value, v.value, lineShift);
    }
  }
}

/** The same words on the same lines, wherever they sit along the line. */
export function sameWords(p: Item, q: Item): boolean {
  if (p.kind !== q.kind || p.range.start.line !== q.range.start.line || p.range.end.line !== q.range.end.line) return false;
  const shift = q.range.start.character - p.range.start.character;
  const moved = (r: Range): Range => ({ start: { line: r.start.line, character: r.start.character + shift }, end: { line: r.end.line, character: r.end.character + (r.end.line === r.start.line ? shift : 0) } });
  // built field by field: the parser's compact nodes keep their fields behind getters
  const shifted = (it: Item): Item => {
    switch (it.kind) {
      case 'word':
        return { kind: 'word', text: it.text, range: moved(it.range) };
      case 'string':
        return { kind: 'string', text: it.text, range: moved(it.range) };
      case 'expr':
        return { kind: 'expr', text: it.text, delimiter: it.delimiter, range: moved(it.range) };
      case 'group':
        return { kind: 'group', items: it.items.map(shifted), range: moved(it.range) };
      case 'assign':
        return { kind: 'assign', name: { kind: 'word', text: it.name.text, range: moved(it.name.range) }, value: it.value && (shifted(it.value) as typeof it.value), range: moved(it.range) };
    }
  };
  return sameItem(shifted(p), q, 0);
}

