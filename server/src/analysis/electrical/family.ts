// Nodes of repeated cells: when two nodes have the same structure (equal structure keys) and
// their surroundings are wired alike (the same nets at the same places, checked here), the
// estimate of one is the estimate of the other with its nets and devices put in. A size edit
// uses this to re-estimate one node per family of a storage node and carry it to the rest.

import type { NodeEstimate } from './estimate';
import type { ElectricalContext } from './context';
import type { KeeperSuggestion, HolderSuggestion } from './keeper';

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

/** Position-for-position correspondence of two lists, or undefined when they are not wired alike. */
function correspondence(a: readonly number[], b: readonly number[]): Map<number, number> | undefined {
  if (a.length !== b.length) return undefined;
  const fwd = new Map<number, number>();
  const back = new Map<number, number>();
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!;
    const y = b[i]!;
    const f = fwd.get(x);
    const r = back.get(y);
    if (f === undefined && r === undefined) {
      fwd.set(x, y);
      back.set(y, x);
    } else if (f !== y || r !== x) return undefined;
  }
  return fwd;
}

/**
 * `from` (the estimate of node `fromNode`, devices `fromDevices`) carried to node `n` with
 * devices `devices`, or undefined when the two are not wired alike.
 */
export function carryToTwin(ctx: ElectricalContext, from: NodeEstimate, n: number, devices: number[]): NodeEstimate | undefined {
  const nets = correspondence(netsAround(ctx, from.node, from.devices), netsAround(ctx, n, devices));
  const devs = correspondence(from.devices, devices);
  if (!nets || !devs) return undefined;
  const c = ctx.circuit;
  const net = (x: number) => nets.get(x)!;
  const dev = (x: number) => devs.get(x)!;
  // names of the other node's nets and devices, looked up only for the words that need them
  let deviceNames: Map<string, string> | undefined;
  let clash = false;
  const rename = (s: string): string | undefined => {
    if (!deviceNames) {
      deviceNames = new Map();
      for (const [x, y] of devs) deviceNames.set(c.mosfets[x]!.name, c.mosfets[y]!.name);
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
  if (from.coupling.aggressors.some((a) => rename(a.net) === undefined)) return undefined;
  const words = (s: string) => s.replace(/[^\s,+()]+/g, (w) => rename(w) ?? w);
  const suggestion = (k: KeeperSuggestion): KeeperSuggestion | undefined => {
    const out: KeeperSuggestion = { ...k, inverter: { ...k.inverter }, reasoning: k.reasoning.map(words) };
    if (k.inverter.existingOutput !== undefined) {
      const o = rename(k.inverter.existingOutput);
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
  const est: NodeEstimate = {
    ...from,
    node: n,
    devices,
    // written out field by field: spreading these small records is far slower in V8
    capacitance: { ...from.capacitance, aggressors: from.capacitance.aggressors.map((a) => (a.device === undefined ? { net: net(a.net), capacitanceF: a.capacitanceF, via: a.via } : { net: net(a.net), capacitanceF: a.capacitanceF, via: a.via, device: dev(a.device) })) },
    coupling: { droopV: from.coupling.droopV, aggressors: from.coupling.aggressors.map((a) => ({ net: rename(a.net)!, capacitanceF: a.capacitanceF, droopV: a.droopV, via: a.via })) },
  };
  if (from.chargeSharing) {
    const cs = from.chargeSharing;
    const gates = new Map([...cs.gates].map(([g, v]) => [net(g), v] as const));
    const when: Record<string, 0 | 1> = {};
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
