// Nodes of repeated cells: a storage node whose group is wired like an already-estimated node
// of the same structure takes that estimate with its own nets, devices and names put in
// (analysis/electrical/family.ts). Every estimate made that way must equal the node's own
// estimate, field for field, on the samples and on a generated hierarchical datapath (whose
// repeated cells make thousands of twins).

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { memoryHost } from '../server/src/core/host';
import { estimateNodes } from '../server/src/analysis/electrical/estimate';
import type { AnalysisResult } from '../server/src/engine';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');

/** Estimates as plain data (maps as entry lists): the usual pass, and one made another way (`how`). */
function twoWays(r: AnalysisResult, how: { twins?: boolean; shared?: boolean }): { usual: string; other: string; count: number; storage: number } {
  const plain = (m: Map<number, unknown>) => JSON.stringify([...m], (_k, v) => (v instanceof Map ? [...v] : v));
  let usual = '';
  let other = '';
  let count = 0;
  let storage = 0;
  for (const a of r.circuits) {
    if (!a.electrical) continue;
    const t = estimateNodes(a.electrical);
    usual += plain(t);
    other += plain(estimateNodes(a.electrical, how));
    count += t.size;
    for (const e of t.values()) if (e.storage) storage++;
  }
  return { usual, other, count, storage };
}

/** With and without twins carried. */
function both(r: AnalysisResult): { twins: string; own: string; storage: number } {
  const { usual, other, storage } = twoWays(r, { twins: false });
  return { twins: usual, own: other, storage };
}

describe('estimates carried to identically wired twins equal their own', () => {
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(name, () => {
      const { twins, own } = both(analyse(diskHost(), path.join(SAMPLES, name)));
      expect(twins).toBe(own);
    });
  }
  it('a generated hierarchical datapath (10k transistors)', () => {
    const { twins, own, storage } = both(analyse(memoryHost({ '/d.sp': hierarchicalNetlist(10_000) }), '/d.sp'));
    expect(storage).toBeGreaterThan(100);
    expect(twins).toBe(own);
  });
});

// Nodes whose structure keys are equal share one estimate, whole or in part (estimate.ts,
// structureKey). With nothing shared each node is estimated on its own: the two must be equal,
// also with repeated clock values (the key writes a repeated phase's values once). This found
// two faults in the sharing: a copied internal node quoted its twin's devices and nets as its
// capacitance aggressors (an internal node now keeps none: only a storage node's coupling reads
// them), and twins driven to different levels in their other phases shared one primary level.
describe('estimates shared by structure key equal each node estimated on its own', () => {
  function sharedAndAlone(r: AnalysisResult): { shared: string; alone: string; count: number } {
    const { usual, other, count } = twoWays(r, { shared: false });
    return { shared: usual, alone: other, count };
  }
  it('the samples', () => {
    for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
      const { shared, alone } = sharedAndAlone(analyse(diskHost(), path.join(SAMPLES, name)));
      // the same values; a copied record may list its fields in another order
      expect(JSON.parse(shared), name).toEqual(JSON.parse(alone));
    }
  });
  it('a generated hierarchical datapath (10k transistors)', () => {
    const { shared, alone, count } = sharedAndAlone(analyse(memoryHost({ '/d.sp': hierarchicalNetlist(10_000) }), '/d.sp'));
    expect(count).toBeGreaterThan(1000);
    expect(JSON.parse(shared)).toEqual(JSON.parse(alone));
  });
  it('a generated datapath (2k transistors) whose inverters lost their pull-up, with one slice input moved onto another slice\'s output: the nodes joined to that net see it load two slices', () => {
    // found by a long chain of random edits (test/edit-chains): the key held the gate loads of
    // the node alone, not those of the other nodes of its group, which the charge sharing counts
    // in the capacitance of the nodes it joins; three latches took a twin's figures
    const text = hierarchicalNetlist(2_000)
      .replace('Mp y a vdd vdd bp w=0.6u l=0.05u\n', '')
      .replace(/^Xs18 w17 in1 in2 /m, 'Xs18 w17 in1 w12 ');
    expect(text).toContain('Xs18 w17 in1 w12 ');
    const { shared, alone, count } = sharedAndAlone(analyse(memoryHost({ '/d.sp': text }), '/d.sp'));
    expect(count).toBeGreaterThan(100);
    expect(JSON.parse(shared)).toEqual(JSON.parse(alone));
  });
  it('a generated datapath (2k transistors) with two independent clocks at 1 ns and 1.5 ns: nine phases, four sets of clock values', () => {
    const text = hierarchicalNetlist(2_000).replace('PULSE(1 0 0 10p 10p 0.5n 1n)', 'PULSE(1 0 0 10p 10p 0.7n 1.5n)');
    const r = analyse(memoryHost({ '/d.sp': text }), '/d.sp');
    expect(r.circuits[0]!.plan.phases.length).toBe(9);
    const { shared, alone, count } = sharedAndAlone(r);
    expect(count).toBeGreaterThan(100);
    expect(JSON.parse(shared)).toEqual(JSON.parse(alone));
  });
});
