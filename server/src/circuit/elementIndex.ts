// Where a circuit's elements sit in its lists, by the line they are written on: indexes built
// once per list and carried to the list an edit makes from it, so an edit finds the elements of
// its lines without reading every element (a flat netlist has an element per line).

import { startLineOf } from '../core/source';
import type { Origin } from './circuit';

/** The positions of a list's elements by origin (every instance of a line shares one). */
export type OriginIndex = Map<Origin, number[]>;
const originIndexes = new WeakMap<readonly object[], OriginIndex>();

export function originIndex(list: ReadonlyArray<{ origin: Origin }>): OriginIndex {
  let index = originIndexes.get(list);
  if (!index) {
    index = new Map();
    for (let i = 0; i < list.length; i++) {
      const o = list[i]!.origin;
      const at = index.get(o);
      if (at) at.push(i);
      else index.set(o, [i]);
    }
    originIndexes.set(list, index);
  }
  return index;
}

/** Records `index` as the origin index of `list` (an edit that made the list worked it out). */
export function setOriginIndex(list: ReadonlyArray<{ origin: Origin }>, index: OriginIndex): void {
  originIndexes.set(list, index);
}

/**
 * The positions of a list's elements by the line their origin starts on (all files together: a
 * caller checks the file), built once per list from its origin index. An edit that keeps every
 * element on its line (a size edit) carries it to the list it makes (`setLineIndex`), so a flat
 * netlist's edit does not read every element to find its line's devices.
 */
export type LineIndex = Map<number, number[]>;
const lineIndexes = new WeakMap<readonly object[], LineIndex>();

export function lineIndex(list: ReadonlyArray<{ origin: Origin }>): LineIndex {
  let index = lineIndexes.get(list);
  if (!index) {
    index = new Map();
    for (const [o, at] of originIndex(list)) {
      const line = startLineOf(o.range);
      const there = index.get(line);
      if (there) there.push(...at);
      else index.set(line, at.slice());
    }
    for (const at of index.values()) at.sort((x, y) => x - y);
    lineIndexes.set(list, index);
  }
  return index;
}

export function setLineIndex(list: ReadonlyArray<{ origin: Origin }>, index: LineIndex): void {
  lineIndexes.set(list, index);
}

/** Gives `to` the indexes `from` has (the same elements in the same places, on the same origins). */
export function carryElementIndexes(from: ReadonlyArray<{ origin: Origin }>, to: ReadonlyArray<{ origin: Origin }>): void {
  const o = originIndexes.get(from);
  if (o) originIndexes.set(to, o);
  const l = lineIndexes.get(from);
  if (l) lineIndexes.set(to, l);
}

