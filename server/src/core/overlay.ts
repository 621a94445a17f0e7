// Read-only maps made of an earlier map and what an edit changed, so a stage's result after a
// small edit costs what the edit changed instead of a copy of every entry. Lookups read through
// to the earlier map; the rarely walked whole map is made once, on demand. Long chains of
// overlays are squashed into one overlay on the map below them (what the edits changed, merged),
// so lookups stay short without making the whole map; a chain that cannot be squashed that way
// is folded into a plain map.

import { composeRenumberings } from './renumber';

const MAX_DEPTH = 24;
/** An overlay level with more changed entries than 1/this of the nets (or devices) is renumbered lazily. */
const LAZY_CHANGES_FRACTION = 16;

/**
 * The shared mechanism: a subclass answers lookups (`get`, `has`) and says how to make the whole
 * map (`build`); walking, `size` and `forEach` read that, made once. Writes throw.
 */
export abstract class DerivedMap<K, V> extends Map<K, V> {
  private whole: Map<K, V> | undefined;

  protected constructor(readonly depth: number) {
    super();
  }

  /** This map, or a plain copy of it when the chain of derived maps has grown long. */
  protected folded(): Map<K, V> {
    return this.depth > MAX_DEPTH ? new Map(this.all()) : this;
  }

  abstract override get(key: K): V | undefined;
  abstract override has(key: K): boolean;
  /** The whole map, in the order the entries are walked. */
  protected abstract build(): Map<K, V>;

  protected all(): Map<K, V> {
    return (this.whole ??= this.build());
  }

  /** True when the whole map is made already. */
  protected made(): boolean {
    return this.whole !== undefined;
  }

  override get size(): number {
    return this.all().size;
  }
  override entries(): MapIterator<[K, V]> {
    return this.all().entries();
  }
  override keys(): MapIterator<K> {
    return this.all().keys();
  }
  override values(): MapIterator<V> {
    return this.all().values();
  }
  override [Symbol.iterator](): MapIterator<[K, V]> {
    return this.all().entries();
  }
  override forEach(fn: (value: V, key: K, map: Map<K, V>) => void, thisArg?: unknown): void {
    this.all().forEach((v, k) => fn.call(thisArg, v, k, this));
  }
  override set(): this {
    throw new Error('an analysis result is read-only');
  }
  override delete(): boolean {
    throw new Error('an analysis result is read-only');
  }
  override clear(): void {
    throw new Error('an analysis result is read-only');
  }
}

/**
 * An earlier map with some entries replaced or removed. Entries keep the earlier map's order (a
 * replaced entry stays in its place); keys the earlier map did not have are not taken (the
 * caller builds a fresh map then).
 */
export class OverlayMap<K, V> extends DerivedMap<K, V> {
  private constructor(
    readonly base: ReadonlyMap<K, V>,
    readonly changes: ReadonlyMap<K, V | undefined>,
    depth: number,
    readonly count: number,
  ) {
    super(depth);
  }

  /** The same overlay on another base (the same keys), with other changes: for a renumbering pushed below it. */
  static rebased<K, V>(of: OverlayMap<K, V>, base: ReadonlyMap<K, V>, changes: ReadonlyMap<K, V | undefined>, count = of.count): Map<K, V> {
    const depth = base instanceof DerivedMap ? base.depth + 1 : 1;
    const map = new OverlayMap(base, changes, depth, count);
    map.ordered = of.ordered;
    return map.folded();
  }

  /**
   * `base` with each key of `changes` replaced by its value, or removed for `undefined`. Every
   * key of `changes` must be a key of `base`.
   */
  static over<K, V>(base: ReadonlyMap<K, V>, changes: ReadonlyMap<K, V | undefined>): Map<K, V> {
    let removed = 0;
    for (const [k, v] of changes) {
      if (!base.has(k)) throw new Error('an overlay replaces or removes entries; it does not add them');
      if (v === undefined) removed++;
    }
    const depth = base instanceof DerivedMap ? base.depth + 1 : 1;
    return new OverlayMap(base, changes, depth, base.size - removed).folded();
  }

  /**
   * `over`, and the keys of `changes` that `base` does not have added after its entries, in the
   * order `changes` lists them (as `Map.set` on a copy would put them).
   */
  static extend<K, V>(base: ReadonlyMap<K, V>, changes: ReadonlyMap<K, V | undefined>): Map<K, V> {
    return OverlayMap.extended(base, changes, false);
  }

  /** `extend`; `ordered`: the added keys go among the others by key (mergeInOrder). */
  private static extended<K, V>(base: ReadonlyMap<K, V>, changes: ReadonlyMap<K, V | undefined>, ordered: boolean): Map<K, V> {
    let count = base.size;
    for (const [k, v] of changes) {
      if (base.has(k)) count -= v === undefined ? 1 : 0;
      else count += v === undefined ? 0 : 1;
    }
    const depth = base instanceof DerivedMap ? base.depth + 1 : 1;
    const map = new OverlayMap(base, changes, depth, count);
    map.ordered = ordered;
    return map.folded();
  }

  /**
   * `over`, and the keys of `changes` that `base` does not have merged in by key order (`base`
   * walks in ascending key order, and so does the result).
   */
  static mergeInOrder<V>(base: ReadonlyMap<number, V>, changes: ReadonlyMap<number, V | undefined>): Map<number, V> {
    const map = OverlayMap.extended(base, changes, true);
    // folded into a plain map: put it in key order
    return map instanceof OverlayMap ? map : new Map([...map].sort((a, b) => a[0] - b[0]));
  }

  ordered = false;

  protected override folded(): Map<K, V> {
    if (this.depth <= MAX_DEPTH) return this;
    return this.squashed() ?? new Map(this.all());
  }

  /**
   * The chain of overlays down to the first map that is not one, as one overlay on that map:
   * each key's fate as `build` works it out (replaced in place, removed, or added), without
   * reading the map below beyond `has`. Undefined when one overlay cannot say it (a key removed
   * and added again by a plain addition moves to the end; ordered and plain additions mixed),
   * or when the map below is a long chain itself.
   */
  private squashed(): OverlayMap<K, V> | undefined {
    const levels: Array<OverlayMap<K, V>> = [];
    let bottom: ReadonlyMap<K, V> = this;
    while (bottom instanceof OverlayMap) {
      levels.push(bottom);
      bottom = bottom.base;
    }
    const depth = (bottom instanceof DerivedMap ? bottom.depth : 0) + 1;
    if (depth > MAX_DEPTH / 2) return undefined;
    const fate = new Map<K, V | undefined>();
    let orderedAdds = false;
    let plainAdds = false;
    for (let i = levels.length - 1; i >= 0; i--) {
      const level = levels[i]!;
      for (const [k, v] of level.changes) {
        if (bottom.has(k)) {
          if (v !== undefined && fate.has(k) && fate.get(k) === undefined) {
            // removed, then added again: a plain addition goes to the end, which no replacement
            // says; an ordered one goes back to its place by key (the map below walks in key
            // order), which a replacement says
            if (!level.ordered) return undefined;
            orderedAdds = true;
          }
          fate.set(k, v);
        } else if (v === undefined) fate.delete(k);
        else {
          // an added key keeps its first place among the additions (as Map.set keeps it)
          if (!fate.has(k)) {
            if (level.ordered) orderedAdds = true;
            else plainAdds = true;
          }
          fate.set(k, v);
        }
      }
    }
    if (orderedAdds && plainAdds) return undefined;
    const map = new OverlayMap(bottom, fate, depth, this.count);
    map.ordered = orderedAdds;
    return map;
  }

  override get(key: K): V | undefined {
    return this.changes.has(key) ? this.changes.get(key) : this.base.get(key);
  }

  override has(key: K): boolean {
    return this.changes.has(key) ? this.changes.get(key) !== undefined : this.base.has(key);
  }

  // known without making the whole map
  override get size(): number {
    return this.count;
  }

  /**
   * The whole map from the first map below that is not an overlay (or whose whole map is made
   * already) and every overlay's changes, in one pass: what building it level by level gives,
   * without making each level's whole map on the way.
   */
  protected build(): Map<K, V> {
    const levels: Array<OverlayMap<K, V>> = [];
    let bottom: ReadonlyMap<K, V> = this;
    while (bottom instanceof OverlayMap && (bottom === this || !bottom.made())) {
      levels.push(bottom);
      bottom = bottom.base;
    }
    // each key's fate, lowest overlay first: replaced in place, removed, or added after the rest
    const removed = new Set<K>();
    const replaced = new Map<K, V>();
    const added = new Map<K, V>();
    let orderedAdds = false;
    let plainAdds = false;
    for (let i = levels.length - 1; i >= 0; i--) {
      const level = levels[i]!;
      for (const [k, v] of level.changes) {
        if (v === undefined) {
          if (!added.delete(k) && bottom.has(k)) {
            removed.add(k);
            replaced.delete(k);
          }
        } else if (added.has(k)) added.set(k, v);
        else if (bottom.has(k) && !removed.has(k)) replaced.set(k, v);
        else {
          added.set(k, v);
          if (level.ordered) orderedAdds = true;
          else plainAdds = true;
        }
      }
    }
    if (orderedAdds && plainAdds) return this.buildLevel();
    const m = new Map<K, V>();
    bottom.forEach((v, k) => {
      if (removed.has(k)) return;
      const w = replaced.get(k);
      m.set(k, w === undefined ? v : w);
    });
    if (!orderedAdds) {
      for (const [k, v] of added) m.set(k, v);
      return m;
    }
    return mergeByKey(m, added);
  }

  /** This level's whole map from its base's. */
  private buildLevel(): Map<K, V> {
    const m = new Map<K, V>();
    const changes = this.changes;
    this.base.forEach((v, k) => {
      if (!changes.has(k)) m.set(k, v);
      else {
        const w = changes.get(k);
        if (w !== undefined) m.set(k, w);
      }
    });
    const added = new Map<K, V>();
    for (const [k, v] of changes) if (v !== undefined && !m.has(k)) added.set(k, v);
    if (!this.ordered || added.size === 0) {
      for (const [k, v] of added) m.set(k, v);
      return m;
    }
    return mergeByKey(m, added);
  }
}

/** `m` (in ascending key order) with `added` merged in by key. */
function mergeByKey<K, V>(m: Map<K, V>, added: Map<K, V>): Map<K, V> {
  const list = [...added].sort((a, b) => (a[0] as number) - (b[0] as number));
  const out = new Map<K, V>();
  let i = 0;
  for (const [k, v] of m) {
    for (; i < list.length && (list[i]![0] as number) < (k as number); i++) out.set(list[i]![0], list[i]![1]);
    out.set(k, v);
  }
  for (; i < list.length; i++) out.set(list[i]![0], list[i]![1]);
  return out;
}

/**
 * An earlier map with the device indices in its values under new numbers (`renumber` reads a
 * value through an old-to-new index map): worked out per entry when it is first read. A
 * renumbering of a map that is itself an overlay on a renumbered map is pushed below the
 * overlays and composed with the one there (the overlays' few changed entries are renumbered
 * at once), so a run of edits that renumber never makes the chain deeper than its overlays.
 */
export class RenumberedMap<K, V> extends DerivedMap<K, V> {
  private readonly memo = new Map<K, V>();

  private constructor(
    private readonly base: ReadonlyMap<K, V>,
    private readonly oldToNew: Int32Array,
    private readonly renumber: (v: V, oldToNew: Int32Array) => V,
    depth: number,
  ) {
    super(depth);
  }

  static over<K, V>(map: ReadonlyMap<K, V>, oldToNew: Int32Array, renumber: (v: V, oldToNew: Int32Array) => V): Map<K, V> {
    if (map instanceof RenumberedMap && map.renumber === renumber) {
      return new RenumberedMap(map.base, composeRenumberings(map.oldToNew, oldToNew), renumber, map.depth);
    }
    if (map instanceof OverlayMap) {
      const o = map as OverlayMap<K, V>;
      // a level's few changes are renumbered at once; many (a squashed chain, an edit in a cell
      // with many copies) are read under the renumbering when first read (a removal reads as
      // undefined there too)
      let changes: ReadonlyMap<K, V | undefined>;
      if (o.changes.size * LAZY_CHANGES_FRACTION > oldToNew.length) changes = RenumberedMap.over(o.changes as ReadonlyMap<K, V>, oldToNew, renumber);
      else {
        const now = new Map<K, V | undefined>();
        for (const [k, v] of o.changes) now.set(k, v === undefined ? undefined : renumber(v, oldToNew));
        changes = now;
      }
      return OverlayMap.rebased(o, RenumberedMap.over(o.base, oldToNew, renumber), changes);
    }
    const depth = map instanceof DerivedMap ? map.depth + 1 : 1;
    return new RenumberedMap(map, oldToNew, renumber, depth).folded();
  }

  override get(key: K): V | undefined {
    let v = this.memo.get(key);
    if (v === undefined) {
      const b = this.base.get(key);
      if (b === undefined) return undefined;
      v = this.renumber(b, this.oldToNew);
      this.memo.set(key, v);
    }
    return v;
  }

  override has(key: K): boolean {
    return this.base.has(key);
  }

  override get size(): number {
    return this.base.size;
  }

  protected build(): Map<K, V> {
    const m = new Map<K, V>();
    this.base.forEach((_, k) => m.set(k, this.get(k)!));
    return m;
  }
}

/**
 * An earlier map keyed by net under a net renumbering (core/renumber: keys keep their order), its
 * values renumbered by `renumber` when first read. Nets put in have no entry, nor do nets taken
 * out. Like `RenumberedMap`, a renumbering of one is composed with it, and one of an overlay is
 * pushed below the overlays (their few changed entries are moved at once), so a run of edits
 * that renumber nets makes the chain no deeper than its overlays.
 */
export class NetKeyedMap<V> extends DerivedMap<number, V> {
  private readonly memo = new Map<number, V>();

  private constructor(
    private readonly base: ReadonlyMap<number, V>,
    private readonly oldToNew: Int32Array,
    private readonly newToOld: Int32Array,
    private readonly renumber: (v: V, oldToNew: Int32Array) => V,
    private readonly count: number,
    depth: number,
  ) {
    super(depth);
  }

  /** `removed`: the old keys of the nets taken out (a few), for the size without making the whole map. */
  static over<V>(map: ReadonlyMap<number, V>, oldToNew: Int32Array, newToOld: Int32Array, renumber: (v: V, oldToNew: Int32Array) => V, removed: readonly number[] = []): Map<number, V> {
    let count = map.size;
    for (const r of removed) if (map.has(r)) count--;
    if (map instanceof NetKeyedMap && map.renumber === renumber) {
      const m = map as NetKeyedMap<V>;
      return new NetKeyedMap(m.base, composeRenumberings(m.oldToNew, oldToNew), composeRenumberings(newToOld, m.newToOld), renumber, count, m.depth);
    }
    if (map instanceof OverlayMap) {
      const o = map as OverlayMap<number, V>;
      // a level's few changes are moved at once; many (edits in a cell with many copies) are
      // read under the renumbering when first read, which costs a composition of two
      // renumberings (a pass over every net) at the next renumbering instead
      let changes: ReadonlyMap<number, V | undefined>;
      if (o.changes.size * LAZY_CHANGES_FRACTION > oldToNew.length) changes = NetKeyedMap.over(o.changes as ReadonlyMap<number, V>, oldToNew, newToOld, renumber, removed);
      else {
        const moved = new Map<number, V | undefined>();
        for (const [k, v] of o.changes) {
          const j = oldToNew[k]!;
          if (j >= 0) moved.set(j, v === undefined ? undefined : renumber(v, oldToNew));
        }
        changes = moved;
      }
      return OverlayMap.rebased(o, NetKeyedMap.over(o.base, oldToNew, newToOld, renumber, removed), changes, count);
    }
    const depth = map instanceof DerivedMap ? map.depth + 1 : 1;
    return new NetKeyedMap(map, oldToNew, newToOld, renumber, count, depth).folded();
  }

  override get(key: number): V | undefined {
    let v = this.memo.get(key);
    if (v === undefined) {
      const old = key >= 0 && key < this.newToOld.length ? this.newToOld[key]! : -1;
      if (old < 0) return undefined;
      const b = this.base.get(old);
      if (b === undefined) return undefined;
      v = this.renumber(b, this.oldToNew);
      this.memo.set(key, v);
    }
    return v;
  }

  override has(key: number): boolean {
    const old = key >= 0 && key < this.newToOld.length ? this.newToOld[key]! : -1;
    return old >= 0 && this.base.has(old);
  }

  override get size(): number {
    return this.count;
  }

  protected build(): Map<number, V> {
    const m = new Map<number, V>();
    this.base.forEach((_, k) => {
      const j = this.oldToNew[k]!;
      if (j >= 0) m.set(j, this.get(j)!);
    });
    return m;
  }
}
