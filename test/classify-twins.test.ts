// Groups of repeated cells: a group whose witness check reads the same wiring, values and driving
// logic as one already checked takes that group's results with its own nets and devices put in
// (classify.ts, witnessKey). Every result made that way must equal the group's own check, on the
// classification fixtures, the samples, the SKY130 cells and a generated hierarchical datapath.
// Likewise a phase with an earlier phase's clock values takes that phase's results (classify.ts,
// firstWithSameValues): they must equal the phase's own classification, done alone.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDeck } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { elaborate } from '../server/src/circuit/elaborate';
import { findClocks } from '../server/src/phases/clocks';
import { buildPhases, firstWithSameValues } from '../server/src/phases/phases';
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

describe('a phase with the clock values of an earlier one shares its results, which equal its own classification', () => {
  /** Each phase classified alone against its results in the whole plan; how many phases were shared. */
  function eachAlone(host: FileHost, file: string): number {
    const { design } = elaborate(readDeck(host, file));
    let shared = 0;
    for (const c of design.circuits) {
      const clocks = findClocks(c, design.directives, {});
      const plan = buildPhases(c, clocks.clocks, design.directives, {});
      const net = buildSwitchNetwork(c, clocks.clocks);
      const whole = classify(net, plan);
      const first = firstWithSameValues(plan);
      plan.phases.forEach((phase, p) => {
        if (first[p] === p) return;
        shared++;
        const alone = classify(net, { ...plan, phases: [phase] }, { twins: false });
        expect(plain([whole.perPhase[p], whole.phaseValues[p], whole.componentFlags[p]]), `${file} ${phase.name}`).toBe(plain([alone.perPhase[0], alone.phaseValues[0], alone.componentFlags[0]]));
      });
    }
    return shared;
  }
  it('two independent clocks at periods of 1 ns and 1.5 ns (nine phases, four sets of values) in a generated datapath (2k transistors)', () => {
    const text = hierarchicalNetlist(2_000).replace('PULSE(1 0 0 10p 10p 0.5n 1n)', 'PULSE(1 0 0 10p 10p 0.7n 1.5n)');
    expect(eachAlone(memoryHost({ '/d.sp': text }), '/d.sp')).toBe(5);
  });
  it('the samples and classification fixtures', () => {
    let shared = 0;
    for (const dir of dirs) for (const name of fs.readdirSync(dir).filter((f) => /\.(sp|cdl)$/.test(f))) shared += eachAlone(diskHost(), path.join(dir, name));
    expect(shared).toBeGreaterThan(0);
  });
});
