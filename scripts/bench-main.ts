// Benchmark: generates netlists of a given transistor count and times each engine stage.
// Prints figures; asserts nothing (targets live in the README and the issue notes).

import { performance } from 'node:perf_hooks';
import { memoryHost } from '../server/src/core/host';
import { loadDeck } from '../server/src/circuit/deck';
import { elaborate } from '../server/src/circuit/elaborate';
import { parseNetlist } from '../server/src/syntax/parser';
import { findClocks } from '../server/src/phases/clocks';
import { buildPhases } from '../server/src/phases/phases';
import { buildSwitchNetwork } from '../server/src/analysis/switchNetwork';
import { classify } from '../server/src/analysis/classify';
import { buildContext } from '../server/src/analysis/electrical/context';
import { estimateNodes } from '../server/src/analysis/electrical/estimate';

const LEAF_CELLS = `
.subckt b_inv a y vdd vss
Mn y a vss vss bn w=0.3u l=0.05u
Mp y a vdd vdd bp w=0.6u l=0.05u
.ends
.subckt b_nand2 a b y vdd vss
Mn1 y a n1 vss bn w=0.4u l=0.05u
Mn2 n1 b vss vss bn w=0.4u l=0.05u
Mp1 y a vdd vdd bp w=0.6u l=0.05u
Mp2 y b vdd vdd bp w=0.6u l=0.05u
.ends
.subckt b_domino a b clk out vdd vss
Mpre dyn clk vdd vdd bp w=0.5u l=0.05u
Mna dyn a n1 vss bn w=0.6u l=0.05u
Mnb n1 b foot vss bn w=0.6u l=0.05u
Mft foot clk vss vss bn w=0.8u l=0.05u
Mkp dyn out vdd vdd bp w=0.15u l=0.1u
Xo dyn out vdd vss b_inv
.ends
.subckt b_dlatch d clk clkb q vdd vss
Mtn d clk st vss bn w=0.3u l=0.05u
Mtp d clkb st vdd bp w=0.6u l=0.05u
Xr st q vdd vss b_inv
.ends
`;

/** A slice of 48 transistors built from leaf cells: 2 domino (14), 3 latches (12), 5 nand2 (20), 1 inv (2). */
const SLICE = `
.subckt b_slice i0 i1 i2 i3 clk clkb o vdd vss
Xd0 i0 i1 clk d0 vdd vss b_domino
Xd1 i2 i3 clk d1 vdd vss b_domino
Xl0 d0 clk clkb l0 vdd vss b_dlatch
Xl1 d1 clk clkb l1 vdd vss b_dlatch
Xl2 i0 clk clkb l2 vdd vss b_dlatch
Xn0 l0 l1 n0 vdd vss b_nand2
Xn1 l1 l2 n1 vdd vss b_nand2
Xn2 n0 n1 n2 vdd vss b_nand2
Xn3 n2 i3 n3 vdd vss b_nand2
Xn4 n3 l0 n4 vdd vss b_nand2
Xi n4 o vdd vss b_inv
.ends
`;

export function hierarchicalNetlist(transistors: number): string {
  const slices = Math.ceil(transistors / 48);
  const perBlock = 20;
  const blocks = Math.ceil(slices / perBlock);
  const lines = ['benchmark: hierarchical datapath', '.model bn nmos level=1 vto=0.4 kp=200u', '.model bp pmos level=1 vto=-0.4 kp=80u', LEAF_CELLS, SLICE];
  lines.push('.subckt b_block ' + Array.from({ length: 4 }, (_, i) => `in${i}`).join(' ') + ' clk clkb out vdd vss');
  for (let s = 0; s < perBlock; s++) {
    const a = s === 0 ? 'in0' : `w${s - 1}`;
    lines.push(`Xs${s} ${a} in1 in2 in3 clk clkb ${s === perBlock - 1 ? 'out' : `w${s}`} vdd vss b_slice`);
  }
  lines.push('.ends');
  for (let b = 0; b < blocks; b++) lines.push(`Xb${b} a${b} a${b + 1} a${b + 2} a${b + 3} clk clkb y${b} vdd 0 b_block`);
  lines.push('vdd vdd 0 1.0', 'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)', 'vclkb clkb 0 PULSE(1 0 0 10p 10p 0.5n 1n)', '.end', '');
  return lines.join('\n');
}

export function flatNetlist(transistors: number): string {
  const lines = ['benchmark: flat extracted netlist', '.model bn nmos level=1', '.model bp pmos level=1'];
  for (let i = 0; i < transistors; i += 2) {
    const a = `n${i >> 1}`;
    const y = `n${(i >> 1) + 1}`;
    lines.push(`MN${i} ${y} ${a} vss vss bn w=0.3u l=0.05u ad=0.03p as=0.03p pd=0.8u ps=0.8u`);
    lines.push(`MP${i} ${y} ${a} vdd vdd bp w=0.6u l=0.05u ad=0.06p as=0.06p pd=1.4u ps=1.4u`);
  }
  lines.push('vdd vdd 0 1.0', 'vss vss 0 0', 'vin n0 0 PULSE(0 1 0 10p 10p 0.5n 1n)', '.end', '');
  return lines.join('\n');
}

function measure(label: string, text: string): void {
  const host = memoryHost({ '/bench.sp': text });
  const t0 = performance.now();
  const syntax = parseNetlist('/bench.sp', text, { hasTitle: true });
  const t1 = performance.now();
  const deck = loadDeck(host, [{ file: '/bench.sp', text }], () => syntax);
  const { design } = elaborate(deck);
  const t2 = performance.now();
  const c = design.circuits[0]!;
  const clocks = findClocks(c, design.directives, {});
  const plan = buildPhases(c, clocks.clocks, design.directives, {});
  const network = buildSwitchNetwork(c, clocks.clocks);
  const cl = classify(network, plan);
  const t3 = performance.now();
  const ctx = buildContext(c, network, plan, cl, { vddV: 1.0, vddFrom: 'netlist', corners: [{ tempC: 25, tempK: 298.15 }, { tempC: 110, tempK: 383.15 }], budgetV: 0.1 });
  const estimates = estimateNodes(ctx);
  const t4 = performance.now();
  const n = c.mosfets.length;
  let risky = 0;
  for (const m of cl.perPhase) risky += m.size;
  const mem = process.memoryUsage();
  const ms = (x: number) => x.toFixed(0).padStart(5);
  console.log(
    `${label.padEnd(13)} ${String(n).padStart(8)} transistors ${String(c.nets.length).padStart(7)} nets ${String(network.components.length).padStart(7)} groups ` +
      `${plan.phases.length} phases | parse ${ms(t1 - t0)} ms  elaborate ${ms(t2 - t1)} ms  classify ${ms(t3 - t2)} ms  estimate ${ms(t4 - t3)} ms (${estimates.size} nodes)  total ${ms(t4 - t0)} ms | ` +
      `${Math.round(n / ((t2 - t0) / 1000)).toLocaleString('en-US')} transistors/s to elaborate | heap ${(mem.heapUsed / 1048576).toFixed(0)} MB | ` +
      `non-driven (node, phase) pairs ${risky}, wide groups ${cl.wideComponents}, unchecked ${cl.uncheckedComponents}`,
  );
}


function main(): void {
  const large = process.argv.includes('--large');
  const sizes = large ? [100_000, 1_000_000] : [100_000];
  // warm up the JIT and chevrotain's caches on a small case first, as an editor session would be
  measure('warm-up', hierarchicalNetlist(2_000));
  for (const n of sizes) {
    measure('hierarchical', hierarchicalNetlist(n));
    measure('flat', flatNetlist(n));
  }
  console.log(`peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (node ${process.version}, ${require('node:os').cpus().length} cores)`);
}

main();
