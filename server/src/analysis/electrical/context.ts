// What every electrical mechanism reads: the circuit, its switch network, the phase plan and the
// classification, the models of the devices, the supply, the corners and the droop budget.

import type { Circuit, Mosfet } from '../../circuit/circuit';
import type { Classification } from '../classify';
import type { SwitchNetwork } from '../switchNetwork';
import { NetRole } from '../switchNetwork';
import type { PhasePlan } from '../../phases/phases';
import { modelFor } from '../devices/catalogue';
import type { MosModel } from '../devices/mosModel';
import type { MosfetRenumbering } from '../../circuit/splice';
import { composeRenumberings, renumbered, withNetCells, withNetRows, type NetRenumbering } from '../../core/renumber';
import { LIST_ITEMS_PER_SLICE, runToEnd, type Steps } from '../../core/steps';

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

export type ContextOptions = { vddV: number; vddFrom: ElectricalContext['vddFrom']; corners: Corner[]; budgetV: number };

export function buildContext(circuit: Circuit, network: SwitchNetwork, plan: PhasePlan, classification: Classification, opts: ContextOptions): ElectricalContext {
  return runToEnd(buildContextSteps(circuit, network, plan, classification, opts));
}

/** `buildContext` in slices: the per-net device lists are long loops on a large circuit. */
export function* buildContextSteps(circuit: Circuit, network: SwitchNetwork, plan: PhasePlan, classification: Classification, opts: ContextOptions): Steps<ElectricalContext> {
  const railVolts = railVoltsOf(circuit, network, opts.vddV);
  const channelOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  yield;
  const gateOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  yield;
  for (let i = 0; i < circuit.mosfets.length; i++) {
    const m = circuit.mosfets[i]!;
    channelOf[m.d]!.push(i);
    if (m.s !== m.d) channelOf[m.s]!.push(i);
    gateOf[m.g]!.push(i);
    if (i % LIST_ITEMS_PER_SLICE === LIST_ITEMS_PER_SLICE - 1) yield;
  }
  const capsOf: number[][] = Array.from({ length: circuit.nets.length }, () => []);
  yield;
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
    ...deviceLists({ channels: new NetDeviceLists(channelOf, undefined, new Map(), new Map()), gates: new NetDeviceLists(gateOf, undefined, new Map(), new Map()) }),
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

/** Volts of each rail net (NaN for the others): a supply's own volts, else `vddV`. */
export function railVoltsOf(circuit: Circuit, network: SwitchNetwork, vddV: number): Float64Array {
  const railVolts = new Float64Array(circuit.nets.length).fill(NaN);
  for (let i = 0; i < circuit.nets.length; i++) {
    const r = network.role[i];
    if (r === NetRole.Rail0) railVolts[i] = 0;
    else if (r === NetRole.Rail1) railVolts[i] = vddV;
  }
  for (const s of circuit.supplies) if (s.volts !== null) railVolts[s.net] = s.volts;
  return railVolts;
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
    // each net the moved elements were or are on, with those now on it (in one pass: a cell
    // of a hundred copies moves hundreds of elements)
    const nowOn = new Map<number, number[]>();
    for (const i of indices) for (const x of netsOf(i, before)) if (!nowOn.has(x)) nowOn.set(x, []);
    for (const i of indices) {
      for (const x of netsOf(i, circuit)) {
        const on = nowOn.get(x);
        if (on === undefined) nowOn.set(x, [i]);
        else if (on[on.length - 1] !== i) on.push(i);
      }
    }
    for (const [x, on] of nowOn) {
      const kept = lists(x).filter((i) => !movedSet.has(i));
      for (const i of on) kept.push(i);
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
  const lists = listsOf(ctx);
  return { ...ctx, circuit, network, classification, ...deviceLists({ channels: lists.channels.with(channels), gates: lists.gates.with(gates) }), capsOf };
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
  const lists = listsOf(ctx);
  return { ...ctx, circuit, network, classification, ...deviceLists({ channels: lists.channels.renumbered(r, addedOn((m) => [m.d, m.s])), gates: lists.gates.renumbered(r, addedOn((m) => [m.g])) }) };
}

/**
 * The context of `circuit` (the previous one's with nets put in, nothing on them: see
 * circuit/newNets) with every per-net list under the new numbers.
 */
export function widenedContext(ctx: ElectricalContext, circuit: Circuit, network: SwitchNetwork, plan: PhasePlan, classification: Classification, ins: NetRenumbering): ElectricalContext {
  const lists = listsOf(ctx);
  return {
    ...ctx,
    circuit,
    network,
    plan,
    classification,
    railVolts: withNetCells(ctx.railVolts, ins, NaN),
    ...deviceLists({ channels: lists.channels.withNets(ins), gates: lists.gates.withNets(ins) }),
    capsOf: withNetRows(ctx.capsOf, ins, () => []),
  };
}

/**
 * One kind of per-net device list after edits: the lists a full pass built, the renumbering
 * from their numbers to the current ones (composed over every splice since), devices added
 * since (current numbers) and lists rebuilt since (current numbers). Never more than one level
 * deep, so lookups stay short after any number of edits; each net's list is worked out once.
 */
class NetDeviceLists {
  /** Each net's list once worked out (only when renumbered: otherwise a list is read as it is). */
  private readonly seen: Array<readonly number[] | undefined> | undefined;

  constructor(
    private readonly root: readonly (readonly number[])[],
    private readonly oldToNew: Int32Array | undefined,
    private readonly added: ReadonlyMap<number, readonly number[]>,
    private readonly rebuilt: ReadonlyMap<number, readonly number[]>,
  ) {
    this.seen = oldToNew ? new Array<readonly number[] | undefined>(root.length) : undefined;
  }

  at(x: number): readonly number[] {
    if (!this.seen) return (this.rebuilt.size ? this.rebuilt.get(x) : undefined) ?? this.root[x]!;
    let l = this.seen[x];
    if (!l) {
      l = this.rebuilt.get(x);
      if (!l) {
        const base = renumbered(this.root[x]!, this.oldToNew!);
        const more = this.added.get(x);
        l = more ? [...base, ...more].sort((a, b) => a - b) : base;
      }
      this.seen[x] = l;
    }
    return l;
  }

  /** With some nets' lists rebuilt (current numbers). */
  with(rebuilt: ReadonlyMap<number, readonly number[]>): NetDeviceLists {
    if (rebuilt.size === 0) return this;
    const all = new Map(this.rebuilt);
    for (const [x, l] of rebuilt) all.set(x, l);
    return new NetDeviceLists(this.root, this.oldToNew, this.added, all);
  }

  /** The same lists under a net insertion: a net put in has none. */
  withNets(ins: NetRenumbering): NetDeviceLists {
    const rekey = (m: ReadonlyMap<number, readonly number[]>) => new Map([...m].map(([x, l]) => [ins.oldToNew[x]!, l]));
    return new NetDeviceLists(withNetRows(this.root, ins, () => []), this.oldToNew, rekey(this.added), rekey(this.rebuilt));
  }

  /** Under a further renumbering, with devices added on some nets (new numbers). */
  renumbered(r: MosfetRenumbering, addedOn: ReadonlyMap<number, readonly number[]>): NetDeviceLists {
    const oldToNew = this.oldToNew ? composeRenumberings(this.oldToNew, r.oldToNew) : r.oldToNew;
    const added = new Map<number, readonly number[]>();
    for (const [x, l] of this.added) {
      const m = renumbered(l, r.oldToNew);
      if (m.length) added.set(x, m);
    }
    for (const [x, l] of addedOn) added.set(x, [...(added.get(x) ?? []), ...l].sort((a, b) => a - b));
    const rebuilt = new Map<number, readonly number[]>();
    // a rebuilt net's list takes the added devices in itself
    for (const [x, l] of this.rebuilt) {
      const m = renumbered(l, r.oldToNew);
      const more = addedOn.get(x);
      rebuilt.set(x, more ? [...m, ...more].sort((a, b) => a - b) : m);
    }
    for (const x of rebuilt.keys()) added.delete(x);
    return new NetDeviceLists(this.root, oldToNew, added, rebuilt);
  }
}

const listsOfContext = new WeakMap<(x: number) => readonly number[], { channels: NetDeviceLists; gates: NetDeviceLists }>();

function listsOf(ctx: ElectricalContext): { channels: NetDeviceLists; gates: NetDeviceLists } {
  return listsOfContext.get(ctx.channelOf)!;
}

/** A context's `channelOf` and `gateOf`, read from its lists (kept for the next edit's context). */
function deviceLists(lists: { channels: NetDeviceLists; gates: NetDeviceLists }): Pick<ElectricalContext, 'channelOf' | 'gateOf'> {
  const channelOf = (x: number) => lists.channels.at(x);
  listsOfContext.set(channelOf, lists);
  return { channelOf, gateOf: (x) => lists.gates.at(x) };
}
