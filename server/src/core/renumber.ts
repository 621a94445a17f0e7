// Device renumberings (old index to new, -1 for a deleted one), as every stage applies them to
// the indices it keeps when devices are put in or taken out.

/** A list of indices under their new numbers, deleted ones left out (the same list when none moved). */
export function renumbered(list: readonly number[], oldToNew: Int32Array): number[] {
  let out: number[] | undefined;
  for (let k = 0; k < list.length; k++) {
    const j = oldToNew[list[k]!]!;
    if (j !== list[k]) (out ??= list.slice())[k] = j;
  }
  return out ? out.filter((j) => j >= 0) : (list as number[]);
}

/**
 * `first` then `second`: old index to newest, -1 for one either of them deleted. Renumberings
 * are never changed once made, so the composition is kept for the pair: carrying a chain of
 * overlays under one net renumbering composes the same two arrays at every level.
 */
export function composeRenumberings(first: Int32Array, second: Int32Array): Int32Array {
  let after = composed.get(first);
  const known = after?.get(second);
  if (known) return known;
  const out = new Int32Array(first.length);
  for (let i = 0; i < first.length; i++) out[i] = first[i]! < 0 ? -1 : second[first[i]!]!;
  if (!after) composed.set(first, (after = new WeakMap()));
  after.set(second, out);
  return out;
}

const composed = new WeakMap<Int32Array, WeakMap<Int32Array, Int32Array>>();

/**
 * `list` with the entries at `deleted` (old positions, ascending) taken out and new ones put in
 * at `added` (new positions, ascending; `make(j)` gives the one at j), in one pass and one new
 * array (a long list copied in runs and joined cost several copies, which the collector paid for).
 */
export function splicedList<T>(list: readonly T[], deleted: readonly number[], added: readonly number[], make: (j: number) => T): T[] {
  // preallocated and filled (measured faster than pushing, or slicing and joining runs)
  const out = new Array<T>(list.length - deleted.length + added.length);
  let i = 0;
  let d = 0;
  let a = 0;
  for (let j = 0; j < out.length; j++) {
    while (d < deleted.length && deleted[d] === i) (i++, d++);
    if (a < added.length && added[a] === j) {
      out[j] = make(j);
      a++;
    } else out[j] = list[i++]!;
  }
  return out;
}

/**
 * Nets put in among the old ones or taken out, as an edit that names a new net or leaves one
 * unused makes them: old id to new id (ascending; -1 for a net taken out), the new ids of the
 * nets put in and the old ids of those taken out (both ascending).
 */
export interface NetRenumbering {
  oldToNew: Int32Array;
  added: number[];
  removed: number[];
  /** How many nets there are after it. */
  count: number;
}

/** Inserts nets before the old ids `before` (ascending, repeats allowed: one net each). */
export function netInsertion(oldCount: number, before: readonly number[]): NetRenumbering {
  const oldToNew = new Int32Array(oldCount);
  const added: number[] = [];
  let k = 0;
  for (let i = 0; i <= oldCount; i++) {
    while (k < before.length && before[k] === i) added.push(i + k++);
    if (i < oldCount) oldToNew[i] = i + k;
  }
  return { oldToNew, added, removed: [], count: oldCount + added.length };
}

/** Takes out the nets `removed` (old ids, ascending). */
export function netRemoval(oldCount: number, removed: readonly number[]): NetRenumbering {
  const oldToNew = new Int32Array(oldCount);
  let k = 0;
  for (let i = 0; i < oldCount; i++) {
    if (k < removed.length && removed[k] === i) {
      oldToNew[i] = -1;
      k++;
    } else oldToNew[i] = i - k;
  }
  return { oldToNew, added: [], removed: removed.slice(), count: oldCount - removed.length };
}

/** A per-net list with a row made for each net put in and none for a net taken out. */
export function withNetRows<T>(list: readonly T[], ins: NetRenumbering, make: (j: number) => T): T[] {
  return splicedList(list, ins.removed, ins.added, make);
}

/** A per-net typed array with `fill` for each net put in and no cell for a net taken out. */
export function withNetCells<A extends Uint8Array | Int32Array | Float64Array>(a: A, ins: NetRenumbering, fill: number): A {
  const out = new (a.constructor as new (n: number) => A)(ins.count);
  const { added, removed } = ins;
  let i = 0;
  let j = 0;
  let k = 0;
  let r = 0;
  // the cells between two nets put in or taken out are copied as one run
  while (j < ins.count) {
    while (r < removed.length && removed[r] === i) (i++, r++);
    if (k < added.length && added[k] === j) {
      out[j++] = fill;
      k++;
      continue;
    }
    const run = Math.min((k < added.length ? added[k]! : ins.count) - j, (r < removed.length ? removed[r]! : a.length) - i);
    out.set(a.subarray(i, i + run), j);
    i += run;
    j += run;
  }
  return out;
}

/** Net ids under a net renumbering, those taken out left out (the same list when none moved). */
export function movedNets(list: readonly number[], ins: NetRenumbering): number[] {
  return renumbered(list, ins.oldToNew);
}

/** The lowest old net whose number changes: every net below it keeps its number. */
export function firstMovedNet(ins: NetRenumbering): number {
  return Math.min(ins.added[0] ?? ins.oldToNew.length, ins.removed[0] ?? ins.oldToNew.length);
}

/** New id to old, -1 for a net put in. */
export function newToOldNets(ins: NetRenumbering): Int32Array {
  const out = new Int32Array(ins.count).fill(-1);
  for (let i = 0; i < ins.oldToNew.length; i++) if (ins.oldToNew[i]! >= 0) out[ins.oldToNew[i]!] = i;
  return out;
}
