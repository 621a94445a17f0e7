// The leakage solve's bound (analysis/electrical/leakage.ts MAX_SOLVED_GROUPS): a node whose
// leakage network has more floating groups than the bound solves the nearest ones and holds the
// rest at the worst-case level, and says so in its notes; a network within the bound is solved
// whole. (A data net wired to a cell's supply port once made networks of 60-80 groups and a
// 2k-transistor netlist took about 20 s; the bound takes it to about 8 s, in steps.)

import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { buildLeakageNetwork, MAX_SOLVED_GROUPS } from '../server/src/analysis/electrical/leakage';

/** A storage node s0 behind a chain of `length` pass gates that the same clock turns off. */
function chain(length: number): string {
  const lines = ['pass-gate chain', '.model n1 nmos level=1 vto=0.4 kp=200u', 'vdd vdd 0 1', 'vd d 0 0.5', 'vclk clk 0 pulse(0 1 0 10p 10p 1n 2n)', 'Mw s0 clk d 0 n1 w=0.2u l=0.1u', 'Mr q s0 0 0 n1 w=0.2u l=0.1u', 'Rl q vdd 10k'];
  for (let k = 1; k <= length; k++) lines.push(`M${k} s${k - 1} clk s${k} 0 n1 w=0.2u l=0.1u`);
  lines.push('.end');
  return lines.join('\n');
}

function s0Estimate(length: number) {
  const file = '/chain.sp';
  const r = analyse(memoryHost({ [file]: chain(length) }), file);
  const a = r.circuits[0]!;
  const s0 = a.circuit.netByName.get('s0')!;
  return { a, s0, estimate: a.estimates!.get(s0)! };
}

describe('the leakage solve is bounded to the nearest floating groups', () => {
  it(`a chain of 12: the ${MAX_SOLVED_GROUPS} nearest groups are solved, the rest held, and the note says so`, () => {
    const { a, s0, estimate } = s0Estimate(12);
    expect(estimate).toBeDefined();
    expect(estimate.notes.some((n) => n.includes(`12 floating groups: the ${MAX_SOLVED_GROUPS} nearest are solved, the other 4 held`))).toBe(true);
    const ctx = a.electrical!;
    const phase = a.classification.perPhase.findIndex((m) => m.has(s0));
    const ln = buildLeakageNetwork(ctx, s0, a.classification.phaseValues[phase]!, new Map(), 1);
    const solved = ln.floatingGroups.flat().map((n) => a.circuit.nets[n]!.name).sort();
    expect(solved).toEqual(['s1', 's2', 's3', 's4', 's5', 's6', 's7', 's8']);
    expect(ln.heldGroups).toBe(4);
    // held at the worst case for a stored 1: ground
    expect(ln.fixedVolts.get(a.circuit.netByName.get('s12')!)).toBe(0);
  });
  it('a chain within the bound is solved whole, with no note', () => {
    const { estimate } = s0Estimate(MAX_SOLVED_GROUPS);
    expect(estimate.notes.some((n) => n.includes('floating groups'))).toBe(false);
  });
});
