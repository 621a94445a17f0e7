// Comparing two parses of a file item by item: what an edit changed, and whether it only moved
// lines. Used by the editor's carry-over of findings and by the size-edit patch.

import type { Range } from '../core/source';
import type { DirectiveLine, Item, PinInfoLine, Statement, SyntaxFile } from './tree';
import { movedLinesBetween } from './parser';

/** Same position after moving `lineShift` lines down (characters unchanged). */
export function sameRange(x: Range, y: Range, lineShift: number): boolean {
  return x.start.line + lineShift === y.start.line && x.end.line + lineShift === y.end.line && x.start.character === y.start.character && x.end.character === y.end.character;
}

/** Two directive lines alike: the same verb and words where they were, moved `lineShift` lines. */
export function sameDirectiveLine(x: DirectiveLine, y: DirectiveLine, lineShift: number): boolean {
  if (x.verb !== y.verb || x.args.length !== y.args.length || !sameRange(x.range, y.range, lineShift)) return false;
  for (let k = 0; k < x.args.length; k++) if (x.args[k]!.text !== y.args[k]!.text || !sameRange(x.args[k]!.range, y.args[k]!.range, lineShift)) return false;
  return true;
}

/** Two `*.PININFO` lines alike: the same pins and directions where they were, moved `lineShift` lines. */
export function samePinLine(x: PinInfoLine, y: PinInfoLine, lineShift: number): boolean {
  if (x.pins.length !== y.pins.length || !sameRange(x.range, y.range, lineShift)) return false;
  for (let k = 0; k < x.pins.length; k++) if (x.pins[k]!.name !== y.pins[k]!.name || x.pins[k]!.direction !== y.pins[k]!.direction || !sameRange(x.pins[k]!.range, y.pins[k]!.range, lineShift)) return false;
  return true;
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


/**
 * The statements that differ between two parses of the same files, each judged by `judge`
 * (undefined: a difference of another kind, and the comparison gives up). Titles, directives,
 * pin lines, the parser's findings and every other statement must be the same, in place.
 */
export function editedStatements<T>(a: readonly SyntaxFile[], b: readonly SyntaxFile[], judge: (file: string, before: Statement, after: Statement) => T | undefined): T[] | undefined {
  if (a.length !== b.length) return undefined;
  const out: T[] = [];
  for (let f = 0; f < a.length; f++) {
    const x = a[f]!;
    const y = b[f]!;
    if (x.file !== y.file || x.title !== y.title) return undefined;
    if (x.statements.length !== y.statements.length || x.directives.length !== y.directives.length || x.pinInfos.length !== y.pinInfos.length || x.diagnostics.length !== y.diagnostics.length) return undefined;
    if (JSON.stringify(x.directives) !== JSON.stringify(y.directives) || JSON.stringify(x.pinInfos) !== JSON.stringify(y.pinInfos) || JSON.stringify(x.diagnostics) !== JSON.stringify(y.diagnostics)) return undefined;
    for (let i = 0; i < x.statements.length; i++) {
      const p = x.statements[i]!;
      const q = y.statements[i]!;
      if (p === q || sameStatement(p, q)) continue;
      const judged = judge(x.file, p, q);
      if (judged === undefined) return undefined;
      out.push(judged);
    }
  }
  return out;
}

/** The same statement, word for word, moved down `lineShift` lines. */
export function sameStatement(x: Statement, y: Statement, lineShift = 0): boolean {
  // one parse took it from the other's, moved (see parseNetlist): known without the words
  const moved = movedLinesBetween(x, y);
  if (moved !== undefined) return moved === lineShift;
  return sameRange(x.range, y.range, lineShift) && sameItem(x.head, y.head, lineShift) && x.items.length === y.items.length && x.items.every((it, k) => sameItem(it, y.items[k]!, lineShift));
}
