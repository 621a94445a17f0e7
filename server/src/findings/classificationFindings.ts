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
import { originKey, revisedNodes } from './perNode';
import { movedNets, withNetCells, type NetRenumbering } from '../core/renumber';

function describeWhen(w: Record<string, 0 | 1> | undefined): string {
  if (!w || Object.keys(w).length === 0) return '';
  return ' when ' + Object.entries(w).map(([k, v]) => `${k}=${v}`).join(' ');
}

interface Group {
  first: number;
  count: number;
}

function instances(g: Group, c: Circuit): string {
  return g.count > 1 ? ` (${g.count} instances, e.g. ${c.nets[g.first]!.name})` : '';
}

/** What a node contributes to this stage's findings (bits), worked out from its results alone. */
const FLOATS = 1;
const CONTENDS = 2;
const UNDRIVEN = 4;
const UNKNOWN_CLOCK = 8;

/**
 * Per node, what it contributes, and the nodes that contribute anything in node order: kept with
 * each classification so an edit that changed a few nodes' results revises only theirs.
 */
interface NodeFacts {
  flags: Uint8Array;
  listed: number[];
  clockPattern: string | undefined;
}
const factsOf = new WeakMap<Classification, NodeFacts>();

function nodeFlags(c: Circuit, cl: Classification, n: number, clockPattern: string | undefined): number {
  const net = cl.network;
  let f = 0;
  if (net.role[n] === 0 && !net.unreachable[n] && cl.storage[n]) {
    for (const m of cl.perPhase) {
      const r = m.get(n);
      if (!r) continue;
      if (floatsIn(r)) f |= FLOATS;
      if (r.state === 'contention') f |= CONTENDS;
    }
  }
  if (net.unreachable[n] && net.drivesGate[n]) f |= clockNamed(c.nets[n]!.name, clockPattern) ? UNKNOWN_CLOCK : UNDRIVEN;
  return f;
}

export function classificationFindings(c: Circuit, cl: Classification, options: EngineOptions): Diagnostic[] {
  const flags = new Uint8Array(c.nets.length);
  const listed: number[] = [];
  for (let n = 0; n < c.nets.length; n++) {
    flags[n] = nodeFlags(c, cl, n, options.clockNamePattern);
    if (flags[n]) listed.push(n);
  }
  const facts: NodeFacts = { flags, listed, clockPattern: options.clockNamePattern };
  factsOf.set(cl, facts);
  return render(c, cl, facts);
}

/**
 * The findings of `cl` from those of `previous`, the classification before an edit that changed
 * the results, storage flags, reachability or gate loads of the nets `touched` only: their
 * contributions are worked out again and the rest are kept. Equal to
 * `classificationFindings` on `cl` (the tests hold it).
 */
export function reviseClassificationFindings(c: Circuit, cl: Classification, previous: Classification, touched: Iterable<number>, options: EngineOptions): Diagnostic[] {
  const before = factsOf.get(previous);
  if (!before || before.clockPattern !== options.clockNamePattern || before.flags.length !== c.nets.length) return classificationFindings(c, cl, options);
  const flags = before.flags.slice();
  const added: number[] = [];
  for (const n of touched) {
    const f = nodeFlags(c, cl, n, options.clockNamePattern);
    if (f && !flags[n]) added.push(n);
    flags[n] = f;
  }
  added.sort((x, y) => x - y);
  const facts: NodeFacts = { flags, listed: revisedNodes(before.listed, added, (n) => flags[n] !== 0), clockPattern: before.clockPattern };
  factsOf.set(cl, facts);
  return render(c, cl, facts);
}

/** The findings from the nodes' contributions: one per defining line and kind, led by its first node. */
function render(c: Circuit, cl: Classification, facts: NodeFacts): Diagnostic[] {
  const out: Diagnostic[] = [];
  const phases = cl.plan.phases;
  const mos = (i: number) => c.mosfets[i]!.name;
  const floating = new Map<string, Group>();
  const contended = new Map<string, Group>();
  const undriven = new Map<string, Group>();
  const unknownClocks = new Map<string, Group>();
  const count = (groups: Map<string, Group>, key: string, n: number) => {
    const g = groups.get(key);
    if (g) g.count++;
    else groups.set(key, { first: n, count: 1 });
  };
  for (const n of facts.listed) {
    const f = facts.flags[n]!;
    const key = originKey(c.nets[n]!.origin);
    if (f & FLOATS) count(floating, key, n);
    if (f & CONTENDS) count(contended, key, n);
    if (f & UNDRIVEN) count(undriven, key, n);
    if (f & UNKNOWN_CLOCK) count(unknownClocks, key, n);
  }
  for (const g of floating.values()) {
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

  for (const g of contended.values()) {
    const n = g.first;
    const o = c.nets[n]!.origin;
    const i = cl.perPhase.findIndex((m) => m.get(n)?.state === 'contention');
    const r = cl.perPhase[i]!.get(n)!;
    const d = diag('contention', o.file, o.range, `${c.nets[n]!.name}: drivers fight in phase ${phases[i]!.name}${describeWhen(r.contentionWhen)}${instances(g, c)}`);
    d.node = c.nets[n]!.name;
    out.push(d);
  }

  for (const g of undriven.values()) {
    const o = c.nets[g.first]!.origin;
    const d = diag('undriven-net', o.file, o.range, `${c.nets[g.first]!.name} drives transistor gates but no channel path reaches it from any supply, input or driven net (a misspelt name?)${instances(g, c)}`);
    d.node = c.nets[g.first]!.name;
    out.push(d);
  }
  for (const g of unknownClocks.values()) {
    const n = c.nets[g.first]!;
    const d = diag('clock-unknown', n.origin.file, n.origin.range, `${n.name} looks like a clock but has no waveform; declare it: \`* tidemark: clock ${n.name} period=1n high=0.5n\``);
    d.node = n.name;
    out.push(d);
  }
  // clock-named nets driven by a source that does not repeat
  const pattern = facts.clockPattern;
  const clockNets = new Set(cl.plan.clocks.map((k) => k.net));
  for (const s of c.sources) {
    const n = c.nets[s.p]!;
    if (clockNets.has(s.p) || s.waveform.kind === 'dc' || !clockNamed(n.name, pattern) || periodicHigh(s.waveform)) continue;
    out.push(diag('clock-unknown', s.origin.file, s.origin.range, `${n.name} looks like a clock but its ${s.waveform.kind} source does not repeat; it is analysed as a free input`, 'info'));
  }
  return out;
}

/** Carries the node facts of `previous` to `next`, its classification under a net insertion (nets with nothing on them contribute nothing). */
export function widenClassificationFacts(previous: Classification, next: Classification, ins: NetRenumbering): void {
  const before = factsOf.get(previous);
  if (before) factsOf.set(next, { flags: withNetCells(before.flags, ins, 0), listed: movedNets(before.listed, ins), clockPattern: before.clockPattern });
}
