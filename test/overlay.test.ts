// The read-only derived maps the quick paths build results from (core/overlay.ts): what they
// hold, in what order they walk, and that long chains of them fold into plain maps that read
// the same.

import { describe, expect, it } from 'vitest';
import { DerivedMap, MappedMap, OverlayMap } from '../server/src/core/overlay';

const base = () => new Map([[1, 'a'], [3, 'c'], [5, 'e']]);

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
  it('a mapped map reads each entry through its function once, in the same order', () => {
    let calls = 0;
    const m = MappedMap.over(base(), (v) => (calls++, v.toUpperCase()));
    expect(m.get(3)).toBe('C');
    expect(m.get(3)).toBe('C');
    expect(calls).toBe(1);
    expect(m.has(2)).toBe(false);
    expect([...m]).toEqual([[1, 'A'], [3, 'C'], [5, 'E']]);
    expect(calls).toBe(3);
    expect(() => m.set(1, 'x')).toThrow();
  });
  it('a long chain folds into a plain map that reads the same', () => {
    let m: Map<number, string> = base();
    const expected = base();
    for (let i = 0; i < 40; i++) {
      m = i % 2 ? MappedMap.over(m, (v) => v + '.') : OverlayMap.mergeInOrder(m, new Map([[10 + i, 'n']]));
      if (i % 2) for (const [k, v] of expected) expected.set(k, v + '.');
      else expected.set(10 + i, 'n');
      expect(m instanceof DerivedMap ? m.depth : 0).toBeLessThanOrEqual(25);
    }
    expect([...m]).toEqual([...expected]);
  });
});
