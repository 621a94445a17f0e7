// The estimates' structure keys are hashed as they are written and looked up by hash, then
// compared code by code (estimate.ts KeyTable): two different keys with the same hash must stay
// apart. FNV-1a is 32 bits, so a few hundred thousand random keys hold a collision (birthday
// bound); the test finds one and checks the table tells the two keys apart.

import { describe, expect, it } from 'vitest';
import { KeyTable, KeyWriter } from '../server/src/analysis/electrical/estimate';

function write(w: KeyWriter, ints: readonly number[]): KeyWriter {
  w.reset();
  for (const x of ints) w.int(x);
  return w;
}

describe('structure key table', () => {
  it('keeps apart two different keys whose hashes collide', () => {
    const w = new KeyWriter();
    const byHash = new Map<number, number[]>();
    let pair: [number[], number[]] | undefined;
    // a deterministic stream of short keys (a linear congruential generator)
    let seed = 12345;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    for (let i = 0; i < 2_000_000 && !pair; i++) {
      const ints = [next() % 70000, next() % 70000, next() % 5];
      const h = write(w, ints).hash;
      const seen = byHash.get(h);
      if (seen && seen.join() !== ints.join()) pair = [seen, ints];
      else byHash.set(h, ints);
    }
    expect(pair, 'no collision found').toBeDefined();
    const [a, b] = pair!;
    const table = new KeyTable<string>();
    let k = write(w, a);
    table.set(k, k.written, 'a');
    k = write(w, b);
    expect(k.hash).toBe(write(new KeyWriter(), a).hash);
    expect(table.get(k)).toBeUndefined();
    table.set(k, k.written, 'b');
    expect(table.get(write(w, a))).toBe('a');
    expect(table.get(write(w, b))).toBe('b');
  });

  it('refuses a key written over before it was stored', () => {
    const w = new KeyWriter();
    const table = new KeyTable<number>();
    const k = write(w, [1, 2, 3]);
    const written = k.written;
    write(w, [4]);
    expect(() => table.set(k, written, 1)).toThrow(/written over/);
  });

  it('reads long integers and long keys as the lists they are', () => {
    const w = new KeyWriter();
    const table = new KeyTable<number>();
    const long = Array.from({ length: 5000 }, (_, i) => i * 40_000);
    let k = write(w, long);
    table.set(k, k.written, 7);
    expect(table.get(write(w, long))).toBe(7);
    k = write(w, [...long.slice(0, -1), long[long.length - 1]! + 1]);
    expect(table.get(k)).toBeUndefined();
  });
});
