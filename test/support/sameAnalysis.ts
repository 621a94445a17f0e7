// The check every quick path of the editor answers to: its analysis equals a fresh one of the
// same text, finding for finding and figure for figure (the whole JSON report), its patched switch
// network equals a fresh build, and each stage's findings, revised from the previous ones, equal
// those written afresh from the same results.

import fc from 'fast-check';
import { expect } from 'vitest';
import { analyse, readDeck, reanalyse, type AnalysisResult } from '../../server/src/engine';
import type { FileHost } from '../../server/src/core/host';
import { buildSwitchNetwork, type SwitchNetwork } from '../../server/src/analysis/switchNetwork';
import { classificationFindings } from '../../server/src/findings/classificationFindings';
import { electricalFindings } from '../../server/src/findings/electricalFindings';
import { report } from './edits';

export function same(file: string, fast: AnalysisResult, full: AnalysisResult): void {
  expect(JSON.parse(JSON.stringify(fast.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
  expect(report(file, fast)).toEqual(report(file, full));
  // the patched network field for field against a fresh build (as text: much faster to compare)
  const text = (x: unknown) => JSON.stringify(x, (_, v) => (ArrayBuffer.isView(v) ? Array.from(v as Uint8Array) : v));
  fast.circuits.forEach((a, i) => {
    // the patched circuit against a fresh elaboration: nets, devices, spans and where each was written
    expect(circuitData(a.circuit)).toEqual(circuitData(full.circuits[i]!.circuit));
    const fresh = buildSwitchNetwork(a.circuit, a.plan.clocks);
    const net = a.classification.network;
    for (const k of ['switches', 'unreachable', 'drivesGate', 'role'] as const) expect(text(net[k]), k).toBe(text(fresh[k]));
    // groups named by their first net (the patch keeps ids where a fresh build renumbers)
    const byFirstNet = (x: SwitchNetwork) => {
      const first = (id: number) => x.components[id]!.nodes[0]!;
      const groups = x.components.filter((g) => g.nodes.length).sort((p, q) => p.nodes[0]! - q.nodes[0]!).map((g) => [g.nodes, g.switches, g.gates]);
      return { groups, componentOf: Array.from(x.componentOf, (id) => (id < 0 ? -1 : first(id))), gated: x.gatedComponents.map((l) => l.map(first)) };
    };
    expect(text(byFirstNet(net))).toBe(text(byFirstNet(fresh)));
    const counts = (c: AnalysisResult['circuits'][number]) => [c.classification.wideComponents, c.classification.uncheckedComponents];
    expect(counts(a)).toEqual(counts(full.circuits[i]!));
    expect(text(a.classification.phaseValues)).toBe(text(full.circuits[i]!.classification.phaseValues));
    // the derived maps hold the same nodes, walked and counted (the report reads them by node)
    const keys = (m: ReadonlyMap<number, unknown>) => [m.size, [...m.keys()].sort((x, y) => x - y)];
    a.classification.perPhase.forEach((m, p) => expect(text(keys(m)), `phase ${p} results`).toBe(text(keys(full.circuits[i]!.classification.perPhase[p]!))));
    expect(text(keys(a.estimates!))).toBe(text(keys(full.circuits[i]!.estimates!)));
    // each stage's revised findings against that stage's findings written afresh from the same results
    expect(text(a.findings.classification)).toBe(text(classificationFindings(a.circuit, a.classification, {})));
    expect(text(a.findings.electrical)).toBe(text(electricalFindings(a.electrical!, a.estimates!)));
  });
}

/**
 * A circuit as plain data: each device's model card by its name and values (a device left on a
 * stale copy of an edited card shows), the name index left out (it follows the nets).
 */
function circuitData(c: AnalysisResult['circuits'][number]['circuit']): unknown {
  const cardText = new Map<object, string>();
  const card = (v: { name: string; params: unknown } | undefined) => {
    if (!v) return undefined;
    let t = cardText.get(v);
    if (t === undefined) cardText.set(v, (t = `${v.name} ${JSON.stringify(v.params)}`));
    return t;
  };
  return JSON.parse(JSON.stringify(c, (k, v) => (k === 'card' ? card(v as { name: string; params: unknown } | undefined) : v instanceof Map ? undefined : v)));
}

/**
 * Random edits of `original` (`edit` makes each from numbers drawn by `draws`), each answered
 * by `reanalyse` from the previous analysis and checked with `same`, then a second edit from
 * the first one's quick answer. Returns how many first edits had a quick answer.
 */
export function checkRandomEdits(file: string, original: string, hostFor: (t: string) => FileHost, runs: number, seed: number, draws: Array<fc.Arbitrary<number>>, edit: (text: string, drawn: number[]) => string): number {
  const before = analyse(hostFor(original), file);
  let taken = 0;
  fc.assert(
    fc.property(fc.tuple(...draws), fc.tuple(...draws), (d1, d2) => {
      const first = edit(original, d1);
      if (first === original) return;
      const host = hostFor(first);
      const fast = reanalyse(before, readDeck(host, file));
      if (!fast) return;
      taken++;
      same(file, fast, analyse(host, file));
      // a second edit from the first one's quick answer
      const second = edit(first, d2);
      if (second === first) return;
      const host2 = hostFor(second);
      const fast2 = reanalyse(fast, readDeck(host2, file));
      if (fast2) same(file, fast2, analyse(host2, file));
    }),
    { numRuns: runs, seed },
  );
  return taken;
}
