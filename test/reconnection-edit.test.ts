// The reconnection path (circuit/rewire.ts, switchNetwork `patchSwitchNetwork`, classify
// `reclassify`, estimate `reestimate`, engine `reanalyse`): after a node word of an element
// line is changed to another net of its scope, the analysis built from the previous one must
// equal a fresh analysis of the new text, finding for finding and figure for figure, and the
// patched switch network must equal a fresh build, and each stage's findings, revised from the
// previous ones, those written afresh from the same results. Random reconnections over every sample and
// a generated hierarchical datapath, one and two in a row.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { reconnect } from './support/reconnect';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 11, [fc.nat(5000), fc.nat(500)], (t, [pick, to]) => reconnect(t, pick!, to!));
}

describe('reconnections reuse the previous analysis and equal a fresh one', () => {
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random reconnections`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 40);
    });
  }
  // the classification and electrical fixtures: keepers, latches, buses, stacks, memory cells
  for (const kind of ['classify', 'electrical']) {
    const dir = path.join(__dirname, 'fixtures', kind);
    it(`the ${kind} fixtures: random reconnections`, () => {
      let taken = 0;
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 12);
      }
      expect(taken).toBeGreaterThan(10);
    }, 120_000);
  }
  it('a generated hierarchical datapath (2k transistors): reconnections in its cells and at the top', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    const taken = check(file, text, (t) => memoryHost({ [file]: t }), 6);
    // the benchmark's edit: a block input moved to another net
    const edited = text.replace(/^Xb1 a1 /m, 'Xb1 a3 ');
    expect(edited).not.toBe(text);
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'moving an instance input to another existing net is a reconnection').toBeDefined();
    same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    expect(taken).toBeGreaterThan(2);
    expect(total).toBeGreaterThan(20);
  }, 120_000);
});
