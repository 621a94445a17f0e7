// The positions an edit moved on the lines it changed: a line's words may sit a few characters
// further along after an edited word, so the flat elements written on those lines take their
// lines' new ranges. Shared by the quick patches of the elaboration (rename, reconnection).

import { startLineOf, type Range } from '../core/source';
import type { Origin } from './circuit';
import type { Item, Statement } from '../syntax/tree';

export interface EditedLine {
  file: string;
  before: Statement;
  after: Statement;
}

export interface MovedLines {
  /** The edited lines: old range -> new range, per file. */
  moved: Array<{ file: string; from: Range; to: Range }>;
  /** The element with its origin moved to its line's new place (itself when not on an edited line). */
  move<T extends { origin: Origin }>(x: T): T;
  /** A list with its elements moved (the same list when none was on an edited line). */
  moveAll<T extends { origin: Origin }>(list: T[]): T[];
}

/** A range by value: a line and its first word start at the same place, so the end counts too. */
export function rangeKey(file: string, r: Range): string {
  return `${file}|${startLineOf(r)}|${r.start.character}|${r.end.line}|${r.end.character}`;
}

export function movedLines(edited: readonly EditedLine[]): MovedLines {
  const moves = new Map<string, Range>();
  const moved: MovedLines['moved'] = [];
  for (const line of edited) {
    const key = (r: Range) => rangeKey(line.file, r);
    moves.set(key(line.before.range), line.after.range);
    const pairs = (x: Item[], y: Item[]) => x.forEach((it, k) => moves.set(key(it.range), y[k]!.range));
    pairs([line.before.head], [line.after.head]);
    pairs(line.before.items, line.after.items);
    moved.push({ file: line.file, from: line.before.range, to: line.after.range });
  }
  const editedStart = new Set(edited.map((l) => startLineOf(l.before.range)));
  // one moved origin per original, so every instance of a line still shares its origin
  const movedOrigins = new Map<Origin, Origin>();
  const move = <T extends { origin: Origin }>(x: T): T => {
    const o = x.origin;
    if (!editedStart.has(startLineOf(o.range))) return x;
    let m = movedOrigins.get(o);
    if (!m) {
      const to = moves.get(rangeKey(o.file, o.range));
      if (!to) return x;
      movedOrigins.set(o, (m = { ...o, range: to }));
    }
    return { ...x, origin: m };
  };
  const moveAll = <T extends { origin: Origin }>(list: T[]): T[] => {
    let out: T[] | undefined;
    for (let i = 0; i < list.length; i++) {
      const x = list[i]!;
      const y = move(x);
      if (y === x) continue;
      out ??= list.slice();
      out[i] = y;
    }
    return out ?? list;
  };
  return { moved, move, moveAll };
}
