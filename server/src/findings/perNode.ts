// What the two finding stages share for keeping their facts per node: the defining-line key that
// merges a cell's instances into one finding, and the node list an edit revises.

import type { Origin } from '../circuit/circuit';

/** The defining line of a net, as text; worked out once per origin (every instance shares it). */
const originKeys = new WeakMap<Origin, string>();
export function originKey(o: Origin): string {
  let k = originKeys.get(o);
  if (k === undefined) originKeys.set(o, (k = `${o.file}|${o.range.start.line}|${o.range.start.character}|${o.subckt}|${o.local}`));
  return k;
}

/**
 * The nodes with facts after an edit, in node order: those of `before` that still have some
 * (`keep`) with `added` (ascending, none of them in `before`) merged in.
 */
export function revisedNodes(before: readonly number[], added: readonly number[], keep: (n: number) => boolean): number[] {
  const out: number[] = [];
  let k = 0;
  for (const n of before) {
    for (; k < added.length && added[k]! < n; k++) out.push(added[k]!);
    if (keep(n)) out.push(n);
  }
  for (; k < added.length; k++) out.push(added[k]!);
  return out;
}
