// A read-only map made of an earlier map and the few entries an edit replaced or removed, so a
// stage's result after a small edit costs what the edit changed instead of a copy of every
// entry. Entries keep the earlier map's order (a replaced entry stays in its place); keys the
// earlier map did not have are not taken (the caller builds a fresh map then). Chains of
// overlays are folded into a plain map after a few edits, so lookups stay short.

const MAX_DEPTH = 8;

export class OverlayMap<K, V> extends Map<K, V> {
  private constructor(
    private readonly base: ReadonlyMap<K, V>,
    private readonly changes: ReadonlyMap<K, V | undefined>,
    private readonly depth: number,
    private readonly count: number,
  ) {
    super();
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
    const depth = base instanceof OverlayMap ? base.depth + 1 : 1;
    const map = new OverlayMap(base, changes, depth, base.size - removed);
    return depth > MAX_DEPTH ? new Map(map.all()) : map;
  }

  override get(key: K): V | undefined {
    return this.changes.has(key) ? this.changes.get(key) : this.base.get(key);
  }

  override has(key: K): boolean {
    return this.changes.has(key) ? this.changes.get(key) !== undefined : this.base.has(key);
  }

  override get size(): number {
    return this.count;
  }

  /** The whole map, made once when first walked (walking a plain map is much faster than a generator). */
  private whole: Map<K, V> | undefined;

  private all(): Map<K, V> {
    if (!this.whole) {
      const m = new Map<K, V>();
      const changes = this.changes;
      this.base.forEach((v, k) => {
        if (!changes.has(k)) m.set(k, v);
        else {
          const w = changes.get(k);
          if (w !== undefined) m.set(k, w);
        }
      });
      this.whole = m;
    }
    return this.whole;
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
    return this.entries();
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
