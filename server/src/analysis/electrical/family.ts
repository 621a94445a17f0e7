// Nodes of repeated cells: when two nodes have the same structure (equal structure keys) and
// their surroundings are wired alike (the same nets at the same places, with the same values in
// every phase and the same rail voltages, checked here), the estimate of one is the estimate of
// the other with its nets and devices put in. The estimate pass uses this for storage nodes of
// repeated cells, and a size edit to carry one fresh estimate per family to the rest.

import type { NodeEstimate } from './estimate';
import type { ElectricalContext } from './context';
import type { KeeperSuggestion, HolderSuggestion } from './keeper';
import type { CapacitanceBreakdown } from './capacitance';
import { newRecord } from '../classify';

/** Every net a node's estimate can name, in an order that identical nodes share. */
export function netsAround(ctx: ElectricalContext, n: number, devices: readonly number[]): number[] {
  const net = ctx.network;
  const comp = net.components[net.componentOf[n]!]!;
  const out: number[] = [n, ...comp.nodes, ...comp.gates];
  for (const i of devices) {
    const m = ctx.circuit.mosfets[i]!;
    out.push(m.d, m.g, m.s, m.b);
  }
  for (const x of comp.nodes) for (const k of ctx.capsOf[x]!) out.push(ctx.circuit.capacitors[k]!.a, ctx.circuit.capacitors[k]!.b);
  return out;
}

/**
 * A list's wiring pattern: for each position, the first position holding the same value. Two
 * lists are wired alike when their patterns are equal.
 */
function patternOf(list: readonly number[]): Int32Array {
  const first = new Map<number, number>();
  const out = new Int32Array(list.length);
  list.forEach((x, i) => {
    const f = first.get(x);
    if (f === undefined) first.set(x, i);
    out[i] = f ?? i;
  });
  return out;
}

/** Per net/device id, the last check that saw it (so a check allocates nothing per id). */
let stamps = new Int32Array(1024);
let stampNow = 0;
function wiredAlike(pattern: Int32Array, list: readonly number[]): boolean {
  if (list.length !== pattern.length) return false;
  stampNow++;
  for (let i = 0; i < list.length; i++) {
    const x = list[i]!;
    if (pattern[i] !== i) {
      if (list[pattern[i]!] !== x) return false;
      continue;
    }
    // a first occurrence in the pattern: its value must be new here too
    if (x >= stamps.length) {
      const grown = new Int32Array(Math.max(x + 1, stamps.length * 2));
      grown.set(stamps);
      stamps = grown;
    }
    if (stamps[x] === stampNow) return false;
    stamps[x] = stampNow;
  }
  return true;
}

/** What carrying one node's estimate to its twins needs, worked out once per family. */
export interface Family {
  from: NodeEstimate;
  netPos: Map<number, number>;
  netPattern: Int32Array;
  /** Per phase, the value of each net around the first node (0, 1, 2 = X); rail voltages (NaN: none). */
  values: Uint8Array[];
  railVolts: Float64Array;
  devPos: Map<number, number>;
  devPattern: Int32Array;
}

export function familyOf(ctx: ElectricalContext, from: NodeEstimate): Family {
  const nets = netsAround(ctx, from.node, from.devices);
  const netPos = new Map<number, number>();
  nets.forEach((x, i) => netPos.has(x) || netPos.set(x, i));
  const devPos = new Map<number, number>();
  from.devices.forEach((x, i) => devPos.has(x) || devPos.set(x, i));
  const values = ctx.classification.phaseValues.map((v) => Uint8Array.from(nets, (x) => v[x]!));
  const railVolts = Float64Array.from(nets, (x) => ctx.railVolts[x]!);
  return { from, netPos, netPattern: patternOf(nets), values, railVolts, devPos, devPattern: patternOf(from.devices) };
}

/**
 * The family's estimate carried to node `n` with devices `devices`, or undefined when the two
 * are not wired alike (then the node is estimated on its own).
 */
export function carryToTwin(ctx: ElectricalContext, family: Family, n: number, devices: number[]): NodeEstimate | undefined {
  const from = family.from;
  const around = netsAround(ctx, n, devices);
  if (!wiredAlike(family.netPattern, around) || !wiredAlike(family.devPattern, devices)) return undefined;
  // the same values around it in every phase (the structure key holds only the phases it floats in)
  const phaseValues = ctx.classification.phaseValues;
  for (let i = 0; i < around.length; i++) {
    const x = around[i]!;
    const r = ctx.railVolts[x]!;
    const fr = family.railVolts[i]!;
    if (r !== fr && !(Number.isNaN(r) && Number.isNaN(fr))) return undefined;
    for (let p = 0; p < phaseValues.length; p++) if (phaseValues[p]![x] !== family.values[p]![i]) return undefined;
  }
  const nets = { has: (x: number) => family.netPos.has(x), get: (x: number) => around[family.netPos.get(x)!] };
  const devs = { has: (x: number) => family.devPos.has(x), get: (x: number) => devices[family.devPos.get(x)!] };
  const c = ctx.circuit;
  const net = (x: number) => nets.get(x)!;
  const dev = (x: number) => devs.get(x)!;
  // names of the other node's nets and devices, looked up only for the words that need them
  let deviceNames: Map<string, string> | undefined;
  let clash = false;
  const rename = (s: string): string | undefined => {
    if (!deviceNames) {
      deviceNames = new Map();
      for (const [x, k] of family.devPos) deviceNames.set(c.mosfets[x]!.name, c.mosfets[devices[k]!]!.name);
    }
    const id = c.netByName.get(s);
    const asNet = id !== undefined && nets.has(id) ? c.nets[nets.get(id)!]!.name : undefined;
    const asDevice = deviceNames.get(s);
    // a net and a device of the same name would make the words ambiguous
    if (asNet !== undefined && asDevice !== undefined && asNet !== asDevice) clash = true;
    return asDevice ?? asNet;
  };
  if ([...from.capacitance.aggressors].some((a) => !nets.has(a.net) || (a.device !== undefined && !devs.has(a.device)))) return undefined;
  if (from.chargeSharing && (from.chargeSharing.joined.some((j) => !nets.has(j)) || [...from.chargeSharing.gates.keys()].some((g) => !nets.has(g)))) return undefined;
  if (from.keeper && [...from.keeper.devices, ...from.keeper.against].some((d) => !devs.has(d))) return undefined;
  // a net of the first node's surroundings, by name, as the twin's net's name
  const netName = (s: string): string | undefined => {
    const id = c.netByName.get(s);
    return id !== undefined && nets.has(id) ? c.nets[nets.get(id)!]!.name : undefined;
  };
  if (from.coupling.aggressors.some((a) => netName(a.net) === undefined)) return undefined;
  const words = (s: string) => s.replace(/[^\s,+()]+/g, (w) => rename(w) ?? w);
  const suggestion = (k: KeeperSuggestion): KeeperSuggestion | undefined => {
    const out: KeeperSuggestion = { ...k, inverter: { ...k.inverter }, reasoning: k.reasoning.map(words) };
    if (k.inverter.existingOutput !== undefined) {
      const o = netName(k.inverter.existingOutput);
      if (o === undefined) return undefined;
      out.inverter.existingOutput = o;
    }
    if (k.fightsDevice !== undefined) {
      const f = rename(k.fightsDevice);
      if (f === undefined) return undefined;
      out.fightsDevice = f;
    }
    return out;
  };
  const est = estimateRecord(from, n, devices);
  // records built by constructors: object literals that outlive a hot loop are far slower in V8
  est.capacitance = withAggressors(from.capacitance, from.capacitance.aggressors.map((a) => new CapacitanceAggressor(net(a.net), a.capacitanceF, a.via, a.device === undefined ? undefined : dev(a.device))));
  est.coupling = { droopV: from.coupling.droopV, aggressors: from.coupling.aggressors.map((a) => new CouplingAggressor(netName(a.net)!, a.capacitanceF, a.droopV, a.via)) };
  if (from.chargeSharing) {
    const cs = from.chargeSharing;
    const gates = new Map([...cs.gates].map(([g, v]) => [net(g), v] as const));
    const when = newRecord();
    for (const [g, v] of gates) when[c.nets[g]!.name] = v;
    est.chargeSharing = { ...cs, gates, when, joined: cs.joined.map(net) };
  }
  if (from.keeper) est.keeper = { ...from.keeper, devices: from.keeper.devices.map(dev), against: from.keeper.against.map(dev) };
  if (from.suggestedKeeper) {
    const k = suggestion(from.suggestedKeeper);
    if (!k) return undefined;
    est.suggestedKeeper = k;
  }
  if (from.suggestedHolder) {
    const h: HolderSuggestion = from.suggestedHolder;
    const up = suggestion(h.pullUp);
    const down = suggestion(h.pullDown);
    if (!up || !down) return undefined;
    est.suggestedHolder = { ...h, pullUp: up, pullDown: down, forward: up.inverter };
  }
  return clash ? undefined : est;
}

function withAggressors(k: CapacitanceBreakdown, aggressors: CapacitanceBreakdown['aggressors']): CapacitanceBreakdown {
  return new Capacitance(k.totalF, k.gateF, k.diffusionF, k.overlapF, k.explicitF, k.couplingF, aggressors, k.estimatedGeometry);
}

class Capacitance implements CapacitanceBreakdown {
  constructor(
    readonly totalF: number,
    readonly gateF: number,
    readonly diffusionF: number,
    readonly overlapF: number,
    readonly explicitF: number,
    readonly couplingF: number,
    readonly aggressors: CapacitanceBreakdown['aggressors'],
    readonly estimatedGeometry: boolean,
  ) {}
}

class CapacitanceAggressor {
  declare device?: number;
  constructor(
    readonly net: number,
    readonly capacitanceF: number,
    readonly via: 'capacitor' | 'overlap',
    device: number | undefined,
  ) {
    if (device !== undefined) this.device = device;
  }
}

class CouplingAggressor {
  constructor(
    readonly net: string,
    readonly capacitanceF: number,
    readonly droopV: number,
    readonly via: string,
  ) {}
}

/**
 * An estimate's record with its own node and devices, the rest shared with `e`, in the shape
 * `estimateNode` builds: a spread of these records took V8's slow path (about 0.5 us each, 3x
 * this), and an edit that moves nets or devices copies up to every estimate of a circuit.
 */
export function estimateRecord(e: NodeEstimate, node: number, devices: number[]): NodeEstimate {
  const out: NodeEstimate = {
    node,
    devices,
    storage: e.storage,
    capacitance: e.capacitance,
    stored: e.stored,
    primaryLevel: e.primaryLevel,
    chargeSharing: e.chargeSharing,
    coupling: e.coupling,
    qcritC: e.qcritC,
    floatWindowS: e.floatWindowS,
    minClockHz: e.minClockHz,
    maxFloatS: e.maxFloatS,
    notes: e.notes,
  };
  if (e.keeper !== undefined) out.keeper = e.keeper;
  if (e.suggestedKeeper !== undefined) out.suggestedKeeper = e.suggestedKeeper;
  if (e.suggestedHolder !== undefined) out.suggestedHolder = e.suggestedHolder;
  return out;
}
