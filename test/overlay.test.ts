// The read-only derived maps the quick paths build results from (core/overlay.ts): what they
// hold, in what order they walk, and that long chains of them squash into one overlay, or fold
// into plain maps, that read the same. Also the per-net arrays carried under a net renumbering (core/renumber.ts).

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DerivedMap, OverlayMap, RenumberedMap } from '../server/src/core/overlay';
import { netInsertion, netRemoval, withNetCells, withNetRows } from '../server/src/core/renumber';

const base = () => new Map([[1, 'a'], [3, 'c'], [5, 'e']]);

/**
 * One edit made both ways: an overlay of `kind` on `m` (an `over` takes only keys the map has),
 * and the same changes on a copy of `plain` (kept in key order for a merge).
 */
function edited(m: Map<number, string>, plain: Map<number, string>, kind: 'over' | 'extend' | 'merge', list: Array<[number, string | undefined]>): [Map<number, string>, Map<number, string>] {
  const changes = new Map<number, string | undefined>();
  for (const [k, v] of list) if (kind !== 'over' || plain.has(k)) changes.set(k, v);
  const next = kind === 'over' ? OverlayMap.over(m, changes) : kind === 'extend' ? OverlayMap.extend(m, changes) : OverlayMap.mergeInOrder(m, changes);
  const copy = new Map(plain);
  for (const [k, v] of changes) v === undefined ? copy.delete(k) : copy.set(k, v);
  return [next, kind === 'merge' ? new Map([...copy].sort((a, b) => a[0] - b[0])) : copy];
}

/** A derived map counts, looks up (keys 0-30) and walks as the plain map the same edits made. */
function readsAsPlain(m: Map<number, string>, plain: Map<number, string>): void {
  expect(m.size).toBe(plain.size);
  for (let k = 0; k <= 30; k++) expect([m.has(k), m.get(k)]).toEqual([plain.has(k), plain.get(k)]);
  expect([...m]).toEqual([...plain]);
}

describe('derived maps', () => {
  it('an overlay replaces and removes in place, and an extension adds after', () => {
    const o = OverlayMap.over(base(), new Map([[3, 'C'], [5, undefined]]));
    expect([...o]).toEqual([[1, 'a'], [3, 'C']]);
    expect(o.size).toBe(2);
    expect(() => OverlayMap.over(base(), new Map([[4, 'd']]))).toThrow();
    const x = OverlayMap.extend(base(), new Map([[4, 'd'], [0, 'z'], [1, undefined]]));
    expect([...x]).toEqual([[3, 'c'], [5, 'e'], [4, 'd'], [0, 'z']]);
    expect(x.size).toBe(4);
  });
  it('a merge in order puts new keys among the others by key', () => {
    const m = OverlayMap.mergeInOrder(base(), new Map([[4, 'd'], [0, 'z'], [3, undefined], [6, 'f']]));
    expect([...m]).toEqual([[0, 'z'], [1, 'a'], [4, 'd'], [5, 'e'], [6, 'f']]);
    expect(m.size).toBe(5);
    expect(m.get(4)).toBe('d');
    expect(m.has(3)).toBe(false);
  });
  // values are device lists; a renumbering maps old indices to new ones (-1: deleted)
  const lists = () => new Map([[1, [0, 2]], [3, [1]], [5, [2, 3]]]);
  let calls = 0;
  const renumber = (v: number[], oldToNew: Int32Array) => (calls++, v.map((i) => oldToNew[i]!).filter((i) => i >= 0));
  it('a renumbered map reads each entry through the renumbering once, in the same order', () => {
    calls = 0;
    const m = RenumberedMap.over(lists(), Int32Array.from([1, -1, 2, 3]), renumber);
    expect(m.get(3)).toEqual([]);
    expect(m.get(3)).toEqual([]);
    expect(calls).toBe(1);
    expect(m.has(2)).toBe(false);
    expect([...m]).toEqual([[1, [1, 2]], [3, []], [5, [2, 3]]]);
    expect(calls).toBe(3);
    expect(() => m.set(1, [])).toThrow();
  });
  it('renumberings compose below overlays: the chain does not grow with them', () => {
    let m: Map<number, number[]> = lists();
    const expected = lists();
    // each round: one device put in at the front (every index moves up), then an overlay
    for (let round = 0; round < 40; round++) {
      const n = 4 + round;
      const up = Int32Array.from({ length: n }, (_, i) => i + 1);
      m = RenumberedMap.over(m, up, renumber);
      for (const [k, v] of expected) expected.set(k, v.map((i) => i + 1));
      m = OverlayMap.mergeInOrder(m, new Map([[10 + round, [0]]]));
      expected.set(10 + round, [0]);
      // a key taken out, and later put back (in its place by key: the map walks in key order)
      if (round === 5) {
        m = OverlayMap.over(m, new Map([[3, undefined]]));
        expected.delete(3);
      }
      if (round === 33) {
        m = OverlayMap.mergeInOrder(m, new Map([[3, [2]]]));
        expected.set(3, [2]);
      }
      expect(m instanceof DerivedMap ? m.depth : 0).toBeLessThanOrEqual(25);
    }
    expect([...m]).toEqual([...expected].sort((a, b) => a[0] - b[0]));
  });
  it('a long chain of overlays is squashed into one overlay on the map below (a lazily renumbered map stays lazy)', () => {
    calls = 0;
    const bottom = RenumberedMap.over(lists(), Int32Array.from([0, 1, 2, 3]), renumber);
    let m: Map<number, number[]> = bottom;
    for (let round = 0; round < 60; round++) m = OverlayMap.over(m, new Map([[3, [round]]]));
    expect(m instanceof DerivedMap && m.depth).toBeLessThanOrEqual(25);
    expect(m.get(3)).toEqual([59]);
    // nothing below was read in full: the renumbered entries are still unread
    expect(calls).toBe(0);
    expect([...m]).toEqual([[1, [0, 2]], [3, [59]], [5, [2, 3]]]);
  });
  it('a chain of overlays of mixed kinds on a renumbered map walks, looks up and counts as the same edits on a plain map', () => {
    const change = fc.tuple(fc.nat(30), fc.option(fc.string({ maxLength: 2 }), { nil: undefined }));
    const same = (v: string, _oldToNew: Int32Array) => v;
    fc.assert(
      fc.property(fc.constantFrom('over+extend', 'over+merge'), fc.array(fc.tuple(fc.boolean(), fc.array(change, { maxLength: 6 })), { minLength: 26, maxLength: 80 }), (kinds, edits) => {
        const start = new Map(Array.from({ length: 12 }, (_, i) => [i * 2, `b${i}`] as [number, string]));
        let m: Map<number, string> = RenumberedMap.over(start, new Int32Array(0), same);
        let plain = new Map(start);
        for (const [adds, list] of edits) [m, plain] = edited(m, plain, !adds ? 'over' : kinds === 'over+extend' ? 'extend' : 'merge', list);
        readsAsPlain(m, plain);
      }),
      { numRuns: 300, seed: 7 },
    );
  });
  it('a chain of overlays of one kind walks, looks up and counts as the same edits on a plain map', () => {
    const change = fc.tuple(fc.nat(30), fc.option(fc.string({ maxLength: 2 }), { nil: undefined }));
    fc.assert(
      fc.property(fc.constantFrom('over', 'extend', 'merge'), fc.array(fc.array(change, { maxLength: 6 }), { maxLength: 40 }), (kind, edits) => {
        let m: Map<number, string> = new Map(Array.from({ length: 12 }, (_, i) => [i * 2, `b${i}`] as [number, string]));
        let plain = new Map(m);
        for (const list of edits) [m, plain] = edited(m, plain, kind, list);
        readsAsPlain(m, plain);
      }),
      { numRuns: 300, seed: 5 },
    );
  });
});

describe('per-net arrays under a net renumbering', () => {
  it('withNetCells reads as withNetRows (element by element) for nets put in or taken out anywhere', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -100, max: 100 }), { maxLength: 60 }), fc.array(fc.nat(60), { maxLength: 8 }), fc.boolean(), (values, at, insert) => {
        const a = Int32Array.from(values);
        const spots = [...new Set(at.filter((x) => x <= a.length - (insert ? 0 : 1)))].sort((x, y) => x - y);
        const ins = insert ? netInsertion(a.length, spots) : netRemoval(a.length, spots);
        const expected = withNetRows(values, ins, () => 7);
        expect(Array.from(withNetCells(a, ins, 7))).toEqual(expected);
      }),
      { numRuns: 300 },
    );
  });
});
