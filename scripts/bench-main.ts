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
import { analyseSteps, readDeck } from '../server/src/engine';
import { flatNetlist, hierarchicalNetlist } from './netlists';

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

/**
 * The full analysis as the editor runs it, in slices between protocol messages: the longest
 * stretch between two yields is how long an edit can wait behind an analysis under way. The
 * text is parsed first, as the editor's quick path has parsed it when that analysis starts
 * (the parse of a file just opened is one step: about 1 s for 100k flat lines).
 */
function measureSteps(label: string, text: string): void {
  const host = memoryHost({ '/bench.sp': text });
  readDeck(host, '/bench.sp');
  const steps = analyseSteps(host, '/bench.sp');
  const gaps: number[] = [];
  let t = performance.now();
  const t0 = t;
  for (let r = steps.next(); ; r = steps.next()) {
    const now = performance.now();
    gaps.push(now - t);
    t = now;
    if (r.done) break;
  }
  gaps.sort((a, b) => a - b);
  const at = (q: number) => gaps[Math.min(gaps.length - 1, Math.floor(q * gaps.length))]!.toFixed(0);
  console.log(`${label.padEnd(13)} full analysis in steps: ${(t - t0).toFixed(0)} ms in ${gaps.length} steps | longest step ${at(1)} ms, 99th percentile ${at(0.99)} ms, median ${at(0.5)} ms`);
}

function main(): void {
  const large = process.argv.includes('--large');
  const sizes = large ? [100_000, 1_000_000] : [100_000];
  // warm up the JIT and chevrotain's caches on a small case first, as an editor session would be
  measure('warm-up', hierarchicalNetlist(2_000));
  for (const n of sizes) {
    measure('hierarchical', hierarchicalNetlist(n));
    measure('flat', flatNetlist(n));
    measureSteps('hierarchical', hierarchicalNetlist(n));
    measureSteps('flat', flatNetlist(n));
  }
  console.log(`peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (node ${process.version}, ${require('node:os').cpus().length} cores)`);
}

main();
