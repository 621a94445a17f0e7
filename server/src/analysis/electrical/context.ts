// What every electrical mechanism reads: the circuit, its switch network, the phase plan and the
// classification, the models of the devices, the supply, the corners and the droop budget.

import type { Circuit, Mosfet } from '../../circuit/circuit';
import type { Classification } from '../classify';
import type { SwitchNetwork } from '../switchNetwork';
import { NetRole } from '../switchNetwork';
import type { PhasePlan } from '../../phases/phases';
import { modelFor } from '../devices/catalogue';
import type { MosModel } from '../devices/mosModel';
import { renumbered, type MosfetRenumbering } from '../../circuit/splice';

export interface Corner {
  tempC: number;
  tempK: number;
}

export interface ElectricalContext {
  circuit: Circuit;
  network: SwitchNetwork;
  plan: PhasePlan;
  classification: Classification;
  /** The supply the estimates assume (V), and where it came from. */
  vddV: number;
  vddFrom: 'netlist' | 'setting' | 'fallback';
  corners: Corner[];
  budgetV: number;
  /** Volts of each rail net (NaN for others). */
  railVolts: Float64Array;
  model(m: Mosfet): MosModel;
  /** MOSFET indices (ascending) with a drain or source on a net, and with the gate on a net. */
  channelOf(net: number): readonly number[];
  gateOf(net: number): readonly number[];
  /** Capacitor indices on each net. */
  capsOf: number[][];
}

export function buildContext(circuit: Circuit, network: SwitchNetwork, plan: PhasePlan, classification: Classification, opts: { vddV: number; vddFrom: ElectricalContext['vddFrom']; corners: Corner[]; budgetV: number }): ElectricalContext {
  const railVolts = new Float64Array(circuit.nets.length).fill(NaN);
  for (let i = 0; i < circuit.nets.length; i++) {
    const r = network.role[i];
    if (r === NetRole.Rail0) railVolts[i] = 0;
    else if (r === NetRole.Rail1) railVolts[i] = opts.vddV;
  }
  for (const s of circuit.supplies) if (s.volts !== null) railVolts[s.net] = s.volts;
  const channelOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  const gateOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  circuit.mosfets.forEach((m, i) => {
    channelOf[m.d]!.push(i);
    if (m.s !== m.d) channelOf[m.s]!.push(i);
    gateOf[m.g]!.push(i);
  });
  const capsOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  circuit.capacitors.forEach((cap, i) => {
    capsOf[cap.a]!.push(i);
    if (cap.b !== cap.a) capsOf[cap.b]!.push(i);
  });
  const models = new WeakMap<object, MosModel>();
  return {
    circuit,
    network,
    plan,
    classification,
    ...opts,
    railVolts,
    ...deviceLists(channelOf, gateOf),
    capsOf,
    model(m) {
      let x = models.get(m);
      if (!x) {
        x = modelFor(m.card, m.polarity);
        models.set(m, x);
      }
      return x;
    },
  };
}

/** Drain/source diffusion geometry: AD/AS/PD/PS when given, else W times an assumed diffusion
 *  length of 2.5 L (common practice, no source), with perimeter around three sides. */
export function diffusionGeometry(m: Mosfet, terminal: 'd' | 's'): { areaM2: number; perimeterM: number; estimated: boolean } {
  const a = terminal === 'd' ? m.adM2 : m.asM2;
  const p = terminal === 'd' ? m.pdM : m.psM;
  if (a !== undefined || p !== undefined) return { areaM2: (a ?? 0) * m.m, perimeterM: (p ?? 0) * m.m, estimated: false };
  const ldiff = 2.5 * m.lM;
  return { areaM2: m.wM * ldiff * m.m, perimeterM: (m.wM + 2 * ldiff) * m.m, estimated: true };
}

/**
 * The context after an edit moved the terminals of some devices (`mosfets`, `capacitors`:
 * indices, the same in both circuits): only the per-net lists of the nets they left or joined
 * are rebuilt, each in index order as buildContext lists them.
 */
export function rewiredContext(ctx: ElectricalContext, circuit: Circuit, network: SwitchNetwork, classification: Classification, moved: { mosfets: readonly number[]; capacitors: readonly number[] }): ElectricalContext {
  const before = ctx.circuit;
  const redo = (lists: (x: number) => readonly number[], indices: readonly number[], netsOf: (i: number, c: Circuit) => number[]): Map<number, number[]> => {
    const out = new Map<number, number[]>();
    if (indices.length === 0) return out;
    const movedSet = new Set(indices);
    const nets = new Set<number>();
    for (const i of indices) for (const c of [before, circuit]) for (const x of netsOf(i, c)) nets.add(x);
    for (const x of nets) {
      const kept = lists(x).filter((i) => !movedSet.has(i));
      for (const i of indices) if (netsOf(i, circuit).includes(x)) kept.push(i);
      out.set(x, kept.sort((a, b) => a - b));
    }
    return out;
  };
  const channels = redo(ctx.channelOf, moved.mosfets, (i, c) => [c.mosfets[i]!.d, c.mosfets[i]!.s]);
  const gates = redo(ctx.gateOf, moved.mosfets, (i, c) => [c.mosfets[i]!.g]);
  const caps = redo((x) => ctx.capsOf[x]!, moved.capacitors, (i, c) => [c.capacitors[i]!.a, c.capacitors[i]!.b]);
  let capsOf = ctx.capsOf;
  if (caps.size) {
    capsOf = capsOf.slice();
    for (const [x, l] of caps) capsOf[x] = l;
  }
  return { ...ctx, circuit, network, classification, ...overDeviceLists(ctx, circuit.nets.length, (x) => channels.get(x), (x) => gates.get(x)), capsOf };
}

/**
 * The context after devices were put in or taken out (`r`, circuit/splice.ts): each net's device
 * lists under the new numbers, the added devices put in at their places (index order, as
 * buildContext lists them), worked out for a net when it is first read.
 */
export function renumberedContext(ctx: ElectricalContext, circuit: Circuit, network: SwitchNetwork, classification: Classification, r: MosfetRenumbering): ElectricalContext {
  const addedOn = (pick: (m: Circuit['mosfets'][number]) => number[]) => {
    const on = new Map<number, number[]>();
    for (const i of r.added) for (const x of new Set(pick(circuit.mosfets[i]!))) on.set(x, [...(on.get(x) ?? []), i]);
    return on;
  };
  const channelsAdded = addedOn((m) => [m.d, m.s]);
  const gatesAdded = addedOn((m) => [m.g]);
  const renumber = (list: readonly number[], added: number[] | undefined): number[] => {
    const out = renumbered(list, r.oldToNew);
    return added ? [...out, ...added].sort((a, b) => a - b) : out;
  };
  return { ...ctx, circuit, network, classification, ...overDeviceLists(ctx, circuit.nets.length, (x) => renumber(ctx.channelOf(x), channelsAdded.get(x)), (x) => renumber(ctx.gateOf(x), gatesAdded.get(x))) };
}

/** Device lists read from per-net arrays. */
function deviceLists(channels: number[][], gates: number[][]): Pick<ElectricalContext, 'channelOf' | 'gateOf'> {
  return { channelOf: (x) => channels[x]!, gateOf: (x) => gates[x]! };
}

/** How many contexts a context's `channelOf` reads through (absent: none, it reads arrays). */
const listDepth = new WeakMap<(x: number) => readonly number[], number>();
/** Lists read through this many contexts are copied out whole (lookups stay short after many edits). */
const MAX_LIST_DEPTH = 24;

/**
 * Device lists made from an earlier context's: `channels` and `gates` give a net's new list, or
 * undefined for the earlier one. Each net's list is worked out once, when first read.
 */
function overDeviceLists(ctx: ElectricalContext, netCount: number, channels: (x: number) => number[] | undefined, gates: (x: number) => number[] | undefined): Pick<ElectricalContext, 'channelOf' | 'gateOf'> {
  const depth = (listDepth.get(ctx.channelOf) ?? 0) + 1;
  const memo = (next: (x: number) => number[] | undefined, earlier: (x: number) => readonly number[]) => {
    const seen: Array<readonly number[] | undefined> = [];
    return (x: number) => (seen[x] ??= next(x) ?? earlier(x));
  };
  const channelOf = memo(channels, ctx.channelOf);
  const gateOf = memo(gates, ctx.gateOf);
  if (depth > MAX_LIST_DEPTH) {
    const c: number[][] = [];
    const g: number[][] = [];
    for (let x = 0; x < netCount; x++) {
      c.push(channelOf(x) as number[]);
      g.push(gateOf(x) as number[]);
    }
    return deviceLists(c, g);
  }
  listDepth.set(channelOf, depth);
  return { channelOf, gateOf };
}
