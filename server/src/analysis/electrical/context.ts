// What every electrical mechanism reads: the circuit, its switch network, the phase plan and the
// classification, the models of the devices, the supply, the corners and the droop budget.

import type { Circuit, Mosfet } from '../../circuit/circuit';
import type { Classification } from '../classify';
import type { SwitchNetwork } from '../switchNetwork';
import { NetRole } from '../switchNetwork';
import type { PhasePlan } from '../../phases/phases';
import { modelFor } from '../devices/catalogue';
import type { MosModel } from '../devices/mosModel';

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
  /** MOSFET indices with a drain or source on each net, and with the gate on each net. */
  channelOf: number[][];
  gateOf: number[][];
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
    channelOf,
    gateOf,
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
  const redo = (lists: number[][], indices: readonly number[], netsOf: (i: number, c: Circuit) => number[]): number[][] => {
    if (indices.length === 0) return lists;
    const out = lists.slice();
    const movedSet = new Set(indices);
    const nets = new Set<number>();
    for (const i of indices) for (const c of [before, circuit]) for (const x of netsOf(i, c)) nets.add(x);
    for (const x of nets) {
      const kept = lists[x]!.filter((i) => !movedSet.has(i));
      for (const i of indices) if (netsOf(i, circuit).includes(x)) kept.push(i);
      out[x] = kept.sort((a, b) => a - b);
    }
    return out;
  };
  const channelOf = redo(ctx.channelOf, moved.mosfets, (i, c) => [c.mosfets[i]!.d, c.mosfets[i]!.s]);
  const gateOf = redo(ctx.gateOf, moved.mosfets, (i, c) => [c.mosfets[i]!.g]);
  const capsOf = redo(ctx.capsOf, moved.capacitors, (i, c) => [c.capacitors[i]!.a, c.capacitors[i]!.b]);
  return { ...ctx, circuit, network, classification, channelOf, gateOf, capsOf };
}
