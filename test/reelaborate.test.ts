// The editor's answer to a reconnection or a device added or deleted in a cell with many copies,
// and to a clock or standby edit that brings new clock values: `reanalyse` declines it (patching
// would take longer than a fresh analysis, or the classification cannot stand), and the new
// design is built from the previous one (`reelaborate`) for the later stages to run on. That design must
// be the fresh elaboration, and the analysis on it the fresh analysis, finding for finding.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, analyseDesignSteps, readDeck, reanalyse, reelaborate, type AnalysisResult } from '../server/src/engine';
import { elaborate } from '../server/src/circuit/elaborate';
import { phaseWithValues } from '../server/src/phases/phases';
import { memoryHost } from '../server/src/core/host';
import { runToEnd } from '../server/src/core/steps';
import { hierarchicalNetlist } from '../scripts/netlists';
import { addDevice, addDeviceOnNewNet, deleteDevice } from './support/deviceEdits';
import { reconnect } from './support/reconnect';
import { report } from './support/edits';

const FILE = '/datapath.sp';

/** A circuit as plain data (as the quick paths' check compares it): cards by name, name indexes left out. */
function circuitData(c: AnalysisResult['circuits'][number]['circuit']): unknown {
  return JSON.parse(JSON.stringify(c, (k, v) => (k === 'card' ? (v as { name: string } | undefined)?.name : v instanceof Map ? undefined : v)));
}

/** The edit's analysis from the previous one's design against a fresh one; false when reelaborate declined. */
function checkEdit(before: AnalysisResult, text: string): boolean {
  const host = memoryHost({ [FILE]: text });
  const deck = readDeck(host, FILE);
  const built = reelaborate(before, deck);
  if (!built) return false;
  const fresh = elaborate(deck);
  expect(built.design.circuits.map(circuitData)).toEqual(fresh.design.circuits.map(circuitData));
  const full = analyse(host, FILE);
  const ours = runToEnd(analyseDesignSteps(built));
  expect(JSON.parse(JSON.stringify(ours.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
  expect(report(FILE, ours)).toEqual(report(FILE, full));
  return true;
}

describe('a design built from the previous one when the analysis is not patched', () => {
  // 10k transistors: 420 copies of the domino cell, over the 256 groups an edit may rebuild
  const text = hierarchicalNetlist(10_000);
  const before = analyse(memoryHost({ [FILE]: text }), FILE);

  it('a reconnection, a device added and one on a new node in the domino cell: declined by reanalyse, built by reelaborate, equal to a fresh analysis', () => {
    const edits = [
      text.replace('Mna dyn a n1 vss bn', 'Mna dyn b n1 vss bn'),
      text.replace(/^(Mkp dyn out.*)$/m, '$1\nMx dyn clk vdd vdd bp w=0.1u l=0.1u'),
      text.replace(/^(Mkp dyn out.*)$/m, '$1\nMx dyn clk dmid vdd bp w=0.1u l=0.1u'),
      text.replace(/^Mkp dyn out.*\n/m, ''),
    ];
    for (const edited of edits) {
      expect(edited).not.toBe(text);
      expect(reanalyse(before, readDeck(memoryHost({ [FILE]: edited }), FILE))).toBeUndefined();
      expect(checkEdit(before, edited)).toBe(true);
    }
  });

  it('random reconnections and added and deleted devices anywhere in the datapath', () => {
    let built = 0;
    fc.assert(
      fc.property(fc.nat(5000), fc.nat(5000), fc.nat(7), (pick, where, kind) => {
        const edited = kind === 0 ? reconnect(text, pick, where) : kind === 1 ? deleteDevice(text, pick, where % 2 === 0) : kind === 2 ? addDeviceOnNewNet(text, pick, where, kind) : addDevice(text, pick, where, kind);
        if (edited !== text && checkEdit(before, edited)) built++;
      }),
      { numRuns: 12, seed: 4242 },
    );
    expect(built).toBeGreaterThan(6);
  });

  it('a clock at another period, and a standby line that holds one clock of two: new clock values, declined by reanalyse, built by reelaborate, equal to a fresh analysis', () => {
    const edits = [
      text.replace('PULSE(0 1 0 10p 10p 0.5n 1n)', 'PULSE(0 1 0 10p 10p 0.7n 1.5n)'),
      text.replace('\n.end\n', '\n* tidemark: standby clk=0 for=1u\n.end\n'),
    ];
    for (const edited of edits) {
      expect(edited).not.toBe(text);
      expect(reanalyse(before, readDeck(memoryHost({ [FILE]: edited }), FILE))).toBeUndefined();
      expect(checkEdit(before, edited)).toBe(true);
    }
  });

  it('after a clock edit the switch network stands, each phase with clock values the previous analysis had takes its results, and the edit back (nine phases to two) equals a fresh analysis too', () => {
    const edited = text.replace('PULSE(0 1 0 10p 10p 0.5n 1n)', 'PULSE(0 1 0 10p 10p 0.7n 1.5n)');
    const built = reelaborate(before, readDeck(memoryHost({ [FILE]: edited }), FILE))!;
    expect(built.earlier).toBeDefined();
    const ours = runToEnd(analyseDesignSteps(built));
    const [a, b] = [ours.circuits[0]!, before.circuits[0]!];
    expect(a.classification.network.components).toBe(b.classification.network.components);
    expect(a.plan.phases.length).toBeGreaterThan(b.plan.phases.length);
    let taken = 0;
    a.plan.phases.forEach((phase, p) => {
      const k = phaseWithValues(b.plan, phase);
      if (k < 0) return;
      expect(a.classification.perPhase[p]).toBe(b.classification.perPhase[k]);
      taken++;
    });
    expect(taken).toBeGreaterThan(1);
    expect(checkEdit(ours, text)).toBe(true);
  });

  it('an edit of another kind (a width) is not this path', () => {
    const edited = text.replace('Mna dyn a n1 vss bn w=0.6u', 'Mna dyn a n1 vss bn w=0.7u');
    expect(reelaborate(before, readDeck(memoryHost({ [FILE]: edited }), FILE))).toBeUndefined();
  });
});
