// Phases from clock waveforms and directives (DOMAIN 2): the intervals where every clock is
// constant, non-overlap gaps included, standby scenarios, capping, and float windows that wrap.

import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { periodicHigh } from '../server/src/phases/clocks';
import { nodeFloatWindow } from '../server/src/analysis/classify';

function plan(text: string, options = {}) {
  const r = analyse(memoryHost({ '/t.sp': text }), '/t.sp', options);
  return { r, plan: r.circuits[0]!.plan };
}

const GATE = '.model nch nmos level=1\nM1 y clk 0 0 nch w=1u l=0.1u\n';

describe('phases', () => {
  it('splits a PULSE clock at its 50% crossings', () => {
    // v1=0 v2=1 td=0.1n tr=tf=20p pw=0.4n per=1n: high from 0.11n to 0.53n
    const { plan: p } = plan(`t\n${GATE}vclk clk 0 PULSE(0 1 0.1n 20p 20p 0.4n 1n)\n.end\n`);
    expect(p.hyperperiodS).toBeCloseTo(1e-9, 20);
    expect(p.phases.map((x) => [x.name, x.startS, x.durationS])).toEqual([
      ['clk=1', 1.1e-10, 4.2e-10],
      ['clk=0', 5.3e-10, 5.8e-10],
    ]);
  });

  it('builds the gap phases of two non-overlapping clocks, named apart', () => {
    const { plan: p } = plan(`t\n.model nch nmos level=1\nM1 y phi1 x 0 nch w=1u l=0.1u\nM2 x phi2 0 0 nch w=1u l=0.1u\nvp1 phi1 0 PULSE(0 1 0 0 0 0.8n 2n)\nvp2 phi2 0 PULSE(0 1 1n 0 0 0.8n 2n)\n.end\n`);
    expect(p.phases.map((x) => [x.name, x.durationS])).toEqual([
      ['phi1=1 phi2=0', 8e-10],
      ['phi1=0 phi2=0', 2e-10],
      ['phi1=0 phi2=1', 8e-10],
      ['phi1=0 phi2=0 #2', 2e-10],
    ]);
  });

  it('takes clocks from directives (period/high, duty, inverse) and standby scenarios', () => {
    const { plan: p, r } = plan(`t\n* tidemark: clock ck period=2n high=0.5n delay=0.5n\n* tidemark: clock ckb inverse=ck\n* tidemark: standby ck=0 for=1m\n.model nch nmos level=1\nM1 y ck x 0 nch w=1u l=0.1u\nM2 x ckb 0 0 nch w=1u l=0.1u\n.end\n`);
    expect(r.diagnostics.filter((d) => d.rule === 'directive')).toEqual([]);
    expect(p.phases.map((x) => [x.name, x.durationS, x.standby])).toEqual([
      ['ck=1 ckb=0', 5e-10, false],
      ['ck=0 ckb=1', 1.5e-9, false],
      ['standby ck=0', 1e-3, true],
    ]);
    expect([...p.phases[2]!.clocks.values()]).toEqual([0, 1]);
  });

  it('reads a periodic PWL (r=) as a clock', () => {
    const w = periodicHigh({ kind: 'pwl', points: [[0, 0], [1e-9, 0], [1.1e-9, 1], [2e-9, 1], [2.1e-9, 0], [3e-9, 0]], repeatFromS: 0 });
    expect(w?.periodS).toBeCloseTo(3e-9, 20);
    expect(w!.high[0]![0]).toBeCloseTo(1.05e-9, 20);
    expect(w!.high[0]![1]).toBeCloseTo(2.05e-9, 20);
  });

  it('is one steady phase without clocks, and periodic data stimuli are not clocks', () => {
    const { plan: p } = plan(`t\n.model nch nmos level=1\nM1 y data 0 0 nch w=1u l=0.1u\nvd data 0 PULSE(0 1 0 0 0 1n 2n)\n.end\n`);
    expect(p.phases.map((x) => x.name)).toEqual(['steady']);
  });

  it('caps an unwieldy hyperperiod and says so', () => {
    const { plan: p, r } = plan(`t\n.model nch nmos level=1\nM1 y clka x 0 nch w=1u l=0.1u\nM2 x clkb 0 0 nch w=1u l=0.1u\nva clka 0 PULSE(0 1 0 0 0 0.5n 1n)\nvb clkb 0 PULSE(0 1 0 0 0 0.5n 1.0001n)\n.end\n`);
    expect(p.capped).toBe(true);
    expect(r.diagnostics.some((d) => d.rule === 'hyperperiod-capped')).toBe(true);
  });

  it('reports a clock-named net with no waveform, with the directive to declare it', () => {
    const { r } = plan(`t\n.model nch nmos level=1\nM1 y clk 0 0 nch w=1u l=0.1u\nM2 y b 0 0 nch w=1u l=0.1u\nvb b 0 1\n.end\n`);
    expect(r.diagnostics).toMatchObject([{ rule: 'clock-unknown', message: expect.stringContaining('* tidemark: clock clk period=1n high=0.5n') }]);
  });

  it('takes clocks from settings for a bare subcircuit, and the float window wraps', () => {
    const lib = `* lib\n.subckt dl d clk q vdd vss\nMn d clk st vss nch w=1u l=0.1u\nMi q st vss vss nch w=1u l=0.1u\nMp q st vdd vdd pch w=1u l=0.1u\n.ends\n.model nch nmos level=1\n.model pch pmos level=1\n`;
    const r = analyse(memoryHost({ '/l.sp': lib }), '/l.sp', { clocks: [{ net: 'clk', periodS: 1e-9, highS: 0.25e-9, delayS: 0.5e-9 }] });
    const a = r.circuits[0]!;
    expect(a.plan.phases.map((x) => x.name)).toEqual(['clk=1', 'clk=0']);
    const st = a.circuit.netByName.get('st')!;
    // clk=0 runs from 0.75n round to 0.5n: one stretch of 0.75n
    expect(nodeFloatWindow(a.classification, st)).toBeCloseTo(0.75e-9, 20);
  });
});
