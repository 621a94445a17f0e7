// Groups of repeated cells: a group whose witness check reads the same wiring, values and driving
// logic as one already checked takes that group's results with its own nets and devices put in
// (classify.ts, witnessKey). Every result made that way must equal the group's own check, on the
// classification fixtures, the samples, the SKY130 cells and a generated hierarchical datapath.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDeck } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { elaborate } from '../server/src/circuit/elaborate';
import { findClocks } from '../server/src/phases/clocks';
import { buildPhases } from '../server/src/phases/phases';
import { buildSwitchNetwork } from '../server/src/analysis/switchNetwork';
import { classify } from '../server/src/analysis/classify';
import { hierarchicalNetlist } from '../scripts/netlists';

const plain = (x: unknown) => JSON.stringify(x, (_k, v) => (v instanceof Map ? [...v] : v instanceof Set ? [...v] : ArrayBuffer.isView(v) ? Array.from(v as Uint8Array) : v));

function both(host: FileHost, file: string): { twins: string; own: string } {
  const { design } = elaborate(readDeck(host, file));
  let twins = '';
  let own = '';
  for (const c of design.circuits) {
    const clocks = findClocks(c, design.directives, {});
    const plan = buildPhases(c, clocks.clocks, design.directives, {});
    const net = buildSwitchNetwork(c, clocks.clocks);
    const a = classify(net, plan);
    const b = classify(net, plan, { twins: false });
    twins += plain([a.perPhase, a.wideComponents, a.uncheckedComponents]);
    own += plain([b.perPhase, b.wideComponents, b.uncheckedComponents]);
  }
  return { twins, own };
}

const dirs = [path.join(__dirname, 'fixtures', 'classify'), path.join(__dirname, '..', 'samples')];

describe('witness results carried to twin groups equal their own check', () => {
  for (const dir of dirs) {
    for (const name of fs.readdirSync(dir).filter((f) => /\.(sp|cdl)$/.test(f))) {
      it(`${path.basename(dir)}/${name}`, () => {
        const { twins, own } = both(diskHost(), path.join(dir, name));
        expect(twins).toBe(own);
      });
    }
  }
  it('the SKY130 cells (every file of the library)', () => {
    const lib = path.join(__dirname, '..', '..', 'shared', 'datasets', 'sky130_fd_sc_hd');
    const files: string[] = [];
    const walk = (d: string) => {
      for (const e of fs.readdirSync(d, { withFileTypes: true })) {
        if (e.isDirectory()) walk(path.join(d, e.name));
        else if (/\.spice$/.test(e.name)) files.push(path.join(d, e.name));
      }
    };
    if (!fs.existsSync(lib)) return expect.fail(`dataset missing: ${lib}`);
    walk(lib);
    expect(files.length).toBeGreaterThan(100);
    for (const f of files) {
      const { twins, own } = both(diskHost(), f);
      expect(twins, f).toBe(own);
    }
  }, 120_000);
  it('a generated hierarchical datapath (10k transistors)', () => {
    const { twins, own } = both(memoryHost({ '/d.sp': hierarchicalNetlist(10_000) }), '/d.sp');
    expect(twins).toBe(own);
  });
});
