// Findings of the classification stage: floating-node, undriven-net, contention, clock-unknown.
// A node defined inside a subcircuit is reported once on its defining line, with the number of
// instances, so a cell used 10,000 times gives one squiggle, not 10,000.

import type { Circuit } from '../circuit/circuit';
import { diag, type Diagnostic } from '../core/diagnostics';
import { formatEng } from '../circuit/numbers';
import type { Classification, NodePhaseResult } from '../analysis/classify';
import { floatsIn, nodeFloatWindow } from '../analysis/classify';
import { clockNamed } from '../phases/clocks';
import { periodicHigh } from '../phases/clocks';
import type { EngineOptions } from '../core/options';

function describeWhen(w: Record<string, 0 | 1> | undefined): string {
  if (!w || Object.keys(w).length === 0) return '';
  return ' when ' + Object.entries(w).map(([k, v]) => `${k}=${v}`).join(' ');
}

interface Group {
  first: number;
  count: number;
}

/** The defining line of a net, as text; worked out once per origin (every instance shares it). */
const originKeys = new WeakMap<object, string>();
function originKey(o: Circuit['nets'][number]['origin']): string {
  let k = originKeys.get(o);
  if (k === undefined) originKeys.set(o, (k = `${o.file}|${o.range.start.line}|${o.range.start.character}|${o.subckt}|${o.local}`));
  return k;
}

function groupByOrigin(c: Circuit, nodes: number[]): Map<string, Group> {
  const groups = new Map<string, Group>();
  for (const n of nodes) {
    const key = originKey(c.nets[n]!.origin);
    const g = groups.get(key);
    if (g) g.count++;
    else groups.set(key, { first: n, count: 1 });
  }
  return groups;
}

function instances(g: Group, c: Circuit): string {
  return g.count > 1 ? ` (${g.count} instances, e.g. ${c.nets[g.first]!.name})` : '';
}

export function classificationFindings(c: Circuit, cl: Classification, options: EngineOptions): Diagnostic[] {
  const out: Diagnostic[] = [];
  const net = cl.network;
  const phases = cl.plan.phases;
  const mos = (i: number) => c.mosfets[i]!.name;

  // floating storage nodes
  const floating: number[] = [];
  const contended: number[] = [];
  // 1: floats in some phase, 2: contends in some phase (read from the results, in node order)
  const seen = new Uint8Array(c.nets.length);
  for (const m of cl.perPhase) {
    for (const [n, r] of m) {
      if (floatsIn(r)) seen[n]! |= 1;
      if (r.state === 'contention') seen[n]! |= 2;
    }
  }
  for (let n = 0; n < c.nets.length; n++) {
    if (!seen[n] || net.role[n] !== 0 || net.unreachable[n] || !cl.storage[n]) continue;
    if (seen[n]! & 1) floating.push(n);
    if (seen[n]! & 2) contended.push(n);
  }
  for (const g of groupByOrigin(c, floating).values()) {
    const n = g.first;
    const o = c.nets[n]!.origin;
    const where: Array<{ phase: string; r: NodePhaseResult }> = [];
    cl.perPhase.forEach((m, i) => {
      const r = m.get(n);
      if (floatsIn(r)) where.push({ phase: phases[i]!.name, r: r! });
    });
    const first = where[0]!;
    const window = nodeFloatWindow(cl, n);
    const never = window === Infinity;
    const cut = first.r.cutOff?.length ? `; cut off by ${first.r.cutOff.slice(0, 4).map(mos).join(', ')}${first.r.cutOff.length > 4 ? ', ...' : ''}` : '';
    const more = where.length > 1 ? ` (and in ${where.length - 1} more phase${where.length > 2 ? 's' : ''})` : '';
    const windowText = never ? 'it is never restored' : window !== null ? `it holds its level only as charge for up to ${formatEng(window, 's')}` : '';
    const exact = where.every((w) => w.r.exact) ? '' : ' [component too wide to check every input; witness not verified]';
    const d = diag(
      'floating-node',
      o.file,
      o.range,
      `${c.nets[n]!.name} floats in phase ${first.phase}${describeWhen(first.r.when)}${more}${cut}; ${windowText}${instances(g, c)}${exact}`,
      never ? 'error' : 'warning',
    );
    d.node = c.nets[n]!.name;
    const related = (first.r.cutOff ?? []).slice(0, 8).map((i) => ({ file: c.mosfets[i]!.origin.file, range: c.mosfets[i]!.origin.range, message: `${mos(i)} is off` }));
    if (related.length) d.related = related;
    out.push(d);
  }

  for (const g of groupByOrigin(c, contended).values()) {
    const n = g.first;
    const o = c.nets[n]!.origin;
    const i = cl.perPhase.findIndex((m) => m.get(n)?.state === 'contention');
    const r = cl.perPhase[i]!.get(n)!;
    const d = diag('contention', o.file, o.range, `${c.nets[n]!.name}: drivers fight in phase ${phases[i]!.name}${describeWhen(r.contentionWhen)}${instances(g, c)}`);
    d.node = c.nets[n]!.name;
    out.push(d);
  }

  // undriven nets and clocks without a waveform
  const pattern = options.clockNamePattern;
  const undriven: number[] = [];
  const unknownClocks: number[] = [];
  for (let n = 0; n < c.nets.length; n++) {
    if (!net.unreachable[n] || !net.drivesGate[n]) continue;
    (clockNamed(c.nets[n]!.name, pattern) ? unknownClocks : undriven).push(n);
  }
  for (const g of groupByOrigin(c, undriven).values()) {
    const o = c.nets[g.first]!.origin;
    const d = diag('undriven-net', o.file, o.range, `${c.nets[g.first]!.name} drives transistor gates but no channel path reaches it from any supply, input or driven net (a misspelt name?)${instances(g, c)}`);
    d.node = c.nets[g.first]!.name;
    out.push(d);
  }
  for (const g of groupByOrigin(c, unknownClocks).values()) {
    const n = c.nets[g.first]!;
    const d = diag('clock-unknown', n.origin.file, n.origin.range, `${n.name} looks like a clock but has no waveform; declare it: \`* tidemark: clock ${n.name} period=1n high=0.5n\``);
    d.node = n.name;
    out.push(d);
  }
  // clock-named nets driven by a source that does not repeat
  const clockNets = new Set(cl.plan.clocks.map((k) => k.net));
  for (const s of c.sources) {
    const n = c.nets[s.p]!;
    if (clockNets.has(s.p) || s.waveform.kind === 'dc' || !clockNamed(n.name, pattern) || periodicHigh(s.waveform)) continue;
    out.push(diag('clock-unknown', s.origin.file, s.origin.range, `${n.name} looks like a clock but its ${s.waveform.kind} source does not repeat; it is analysed as a free input`, 'info'));
  }
  return out;
}
