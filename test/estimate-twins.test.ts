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

/** Estimates as plain data (maps as entry lists), with and without twins. */
function both(r: AnalysisResult): { twins: string; own: string; storage: number } {
  const plain = (m: Map<number, unknown>) => JSON.stringify([...m], (_k, v) => (v instanceof Map ? [...v] : v));
  let twins = '';
  let own = '';
  let storage = 0;
  for (const a of r.circuits) {
    if (!a.electrical) continue;
    const t = estimateNodes(a.electrical);
    twins += plain(t);
    own += plain(estimateNodes(a.electrical, { twins: false }));
    for (const e of t.values()) if (e.storage) storage++;
  }
  return { twins, own, storage };
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
