// The rename path (circuit/rename.ts, engine `reanalyse`): after renaming a net in its
// subcircuit (or at the top level), the analysis built from the previous one must equal a fresh
// analysis of the new text, finding for finding and figure for figure. Random renames over every
// sample and a generated hierarchical datapath: whole renames (every use in the scope) and
// partial ones (one use only: a reconnection, to be declined or, if taken, equal).

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay, report } from './support/edits';
import { rename } from './support/renames';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  const before = analyse(hostFor(original), file);
  let taken = 0;
  fc.assert(
    fc.property(fc.nat(2000), fc.boolean(), (pick, whole) => {
      const text = rename(original, pick, whole);
      if (text === original) return;
      const host = hostFor(text);
      const fast = reanalyse(before, readDeck(host, file));
      if (!fast) return;
      taken++;
      const full = analyse(host, file);
      expect(JSON.parse(JSON.stringify(fast.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
      expect(report(file, fast)).toEqual(report(file, full));
    }),
    { numRuns: runs, seed: 5 },
  );
  return taken;
}

describe('net renames reuse the previous analysis and equal a fresh one', () => {
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random renames`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 30);
    });
  }
  it('a generated hierarchical datapath (5k transistors): renames in its cells and at the top', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(5_000);
    const taken = check(file, text, (t) => memoryHost({ [file]: t }), 10);
    // the benchmark's edit: a block output renamed on its only line
    const edited = text.replace(/^(Xb3 .*) y3 /m, '$1 y3_tern ');
    expect(edited).not.toBe(text);
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'renaming a net on its only line is a rename').toBeDefined();
    expect(report(file, fast!)).toEqual(report(file, analyse(memoryHost({ [file]: edited }), file)));
    // most nets of the samples are rails, clocks or ports (never renamed this way); some are not
    expect(taken + total).toBeGreaterThan(5);
  });
});
