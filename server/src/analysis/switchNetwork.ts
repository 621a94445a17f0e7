// The switch-level view of a circuit (Bryant's model): each MOSFET is a switch controlled by its
// gate (n conducts on 1, p on 0), resistors and inductors always conduct, and nets are split into
// strong sources (rails, inputs, clocks) and the channel-connected components between them.
// Built once per circuit; phase-independent.

import type { Circuit } from '../circuit/circuit';
import type { Clock } from '../phases/clocks';
import type { MosfetRenumbering } from '../circuit/splice';
import { composeRenumberings, firstMovedNet, movedNets, renumbered, splicedList, withNetCells, withNetRows, type NetRenumbering } from '../core/renumber';
import { LIST_ITEMS_PER_SLICE, runToEnd, type Steps } from '../core/steps';

export const enum NetRole {
  Internal = 0,
  Rail0 = 1,
  Rail1 = 2,
  /** Driven from outside with a value the analysis does not fix (a free input). */
  Input = 3,
  /** A clock: constant in each phase (free in standby for the clocks not held). */
  Clock = 4,
}

export const enum SwitchKind {
  N = 0,
  P = 1,
  /** Always conducting (resistor, short, inductor). */
  On = 2,
}

export interface Switch {
  a: number;
  b: number;
  /** Gate net, or -1 for an always-on element. */
  gate: number;
  kind: SwitchKind;
  /** Index into circuit.resistors / inductors for an always-on element, else -1. */
  other: number;
}

export interface Component {
  id: number;
  /** Internal nets of the component. */
  nodes: number[];
  /** Switches with at least one terminal on a node of the component. */
  switches: number[];
  /** Distinct gate nets of those switches (any role). */
  gates: number[];
}

export interface SwitchNetwork {
  circuit: Circuit;
  role: Uint8Array;
  switches: Switch[];
  /** Component of each internal net; -1 for strong nets. */
  componentOf: Int32Array;
  components: Component[];
  /** Components whose switches a net gates (for propagation). */
  gatedComponents: number[][];
  /** True when the net is the gate of at least one MOSFET. */
  drivesGate: Uint8Array;
  /** Internal nets with no channel path to any strong source, whatever the gates do. */
  unreachable: Uint8Array;
}

export function buildSwitchNetwork(c: Circuit, clocks: Clock[]): SwitchNetwork {
  return runToEnd(buildSwitchNetworkSteps(c, clocks));
}

/** `buildSwitchNetwork` in slices: it yields between its passes and inside the long ones. */
export function* buildSwitchNetworkSteps(c: Circuit, clocks: Clock[]): Steps<SwitchNetwork> {
  const n = c.nets.length;
  const role = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const kind = c.nets[i]!.kind;
    if (kind === 'ground') role[i] = NetRole.Rail0;
    else if (kind === 'supply') role[i] = NetRole.Rail1;
  }
  for (const s of c.sources) {
    if (role[s.p] !== NetRole.Internal) continue;
    if (s.letter === 'v' && role[s.n] !== NetRole.Internal) role[s.p] = NetRole.Input;
  }
  for (const id of c.inputs) if (role[id] === NetRole.Internal) role[id] = NetRole.Input;
  for (const k of clocks) if (role[k.net] !== NetRole.Rail0 && role[k.net] !== NetRole.Rail1) role[k.net] = NetRole.Clock;

  const switches: Switch[] = [];
  const drivesGate = new Uint8Array(n);
  for (let i = 0; i < c.mosfets.length; i++) {
    const m = c.mosfets[i]!;
    switches.push({ a: m.d, b: m.s, gate: m.g, kind: m.polarity === 'n' ? SwitchKind.N : SwitchKind.P, other: -1 });
    drivesGate[m.g] = 1;
    if (i % LIST_ITEMS_PER_SLICE === LIST_ITEMS_PER_SLICE - 1) yield;
  }
  c.resistors.forEach((r, i) => switches.push({ a: r.a, b: r.b, gate: -1, kind: SwitchKind.On, other: i }));
  c.inductors.forEach((l, i) => switches.push({ a: l.a, b: l.b, gate: -1, kind: SwitchKind.On, other: i }));

  // Channel-connected components over internal nets.
  const parent = new Int32Array(n);
  for (let i = 0; i < n; i++) parent[i] = i;
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]!]!;
      x = parent[x]!;
    }
    return x;
  };
  for (const s of switches) {
    if (s.a === s.b) continue;
    if (role[s.a] === NetRole.Internal && role[s.b] === NetRole.Internal) parent[find(s.a)] = find(s.b);
  }
  yield;
  const componentOf = new Int32Array(n).fill(-1);
  const components: Component[] = [];
  for (let i = 0; i < n; i++) {
    if (role[i] !== NetRole.Internal) continue;
    const r = find(i);
    let id = componentOf[r]!;
    if (id < 0) {
      id = components.length;
      components.push({ id, nodes: [], switches: [], gates: [] });
      componentOf[r] = id;
    }
    componentOf[i] = id;
  }
  for (let i = 0; i < n; i++) if (role[i] === NetRole.Internal) components[componentOf[i]!]!.nodes.push(i);
  yield;
  const gatedComponents: number[][] = Array.from({ length: n }, () => []);
  yield;
  for (let si = 0; si < switches.length; si++) {
    if (si % LIST_ITEMS_PER_SLICE === LIST_ITEMS_PER_SLICE - 1) yield;
    const s = switches[si]!;
    const ca = componentOf[s.a]!;
    const cb = componentOf[s.b]!;
    const owner = ca >= 0 ? ca : cb;
    if (owner < 0) continue; // rail-to-rail device (a decap, a tie): no internal node
    const comp = components[owner]!;
    comp.switches.push(si);
    if (s.gate >= 0 && !comp.gates.includes(s.gate)) {
      comp.gates.push(s.gate);
      gatedComponents[s.gate]!.push(owner);
    }
  }
  yield;

  // Structural reachability from strong nets, ignoring gates.
  // (the neighbours as compressed rows: one array for all, not one per net)
  const unreachable = new Uint8Array(n);
  const start = new Int32Array(n + 1);
  for (const s of switches) {
    start[s.a + 1]!++;
    start[s.b + 1]!++;
  }
  for (let i = 0; i < n; i++) start[i + 1]! += start[i]!;
  const fill = start.slice(0, n);
  const adj = new Int32Array(start[n]!);
  for (const s of switches) {
    adj[fill[s.a]!++] = s.b;
    adj[fill[s.b]!++] = s.a;
  }
  yield;
  const seen = new Uint8Array(n);
  const queue = new Int32Array(n);
  let tail = 0;
  for (let i = 0; i < n; i++) if (role[i] !== NetRole.Internal) (seen[i] = 1), (queue[tail++] = i);
  for (let q = 0; q < tail; q++) {
    const x = queue[q]!;
    for (let k = start[x]!; k < start[x + 1]!; k++) {
      const y = adj[k]!;
      if (!seen[y]) (seen[y] = 1), (queue[tail++] = y);
    }
  }
  for (let i = 0; i < n; i++) if (!seen[i]) unreachable[i] = 1;

  return { circuit: c, role, switches, componentOf, components, gatedComponents, drivesGate, unreachable };
}

/** A network after some switches took other terminals, and how its groups relate to the old ones. */
export interface NetworkPatch {
  network: SwitchNetwork;
  /** Groups (ids, ascending) rebuilt because they hold or held a moved switch, and those emptied. */
  rebuilt: number[];
  /** Group id -> the old id of the same group (its own id), or -1 for a rebuilt or emptied one. */
  previousId: Int32Array;
}

/**
 * The switch network of `c`, which is the previous network's circuit with the switches `moved`
 * (indices into `switches`: MOSFETs first, then resistors, then inductors) on other terminals
 * and every net's role the same. Only the groups those switches touch, before and after, are
 * rebuilt. The result is `buildSwitchNetwork(c, clocks)` up to the groups' ids (a fresh build
 * numbers them by first net; here the rebuilt ones reuse the ids they had, and a group an edit
 * merged away stays as an empty one): the same groups, switches, gates, order of gated groups
 * and reachability (the tests hold it). No later stage's results depend on the ids.
 */
export function patchSwitchNetwork(prev: SwitchNetwork, c: Circuit, moved: readonly number[], renumbering?: MosfetRenumbering): NetworkPatch {
  const n = c.nets.length;
  const role = prev.role;
  const internal = (x: number) => role[x] === NetRole.Internal;
  const nm = c.mosfets.length;
  const nr = c.resistors.length;
  // devices put in or taken out: the switches after them take new indices
  const nmBefore = prev.circuit.mosfets.length;
  let switchMap: Int32Array | undefined;
  let switches: Switch[];
  if (!renumbering) switches = prev.switches.slice();
  else {
    switchMap = new Int32Array(prev.switches.length);
    switchMap.set(renumbering.oldToNew);
    for (let si = nmBefore; si < switchMap.length; si++) switchMap[si] = si + nm - nmBefore;
    // a switch names no index of its own, so the kept ones are carried as they are
    switches = splicedList(prev.switches, renumbering.deleted, renumbering.added, (j) => addedSwitch(c, j));
  }
  const toNew = (si: number) => (switchMap ? switchMap[si]! : si);
  for (const si of moved) {
    const old = prev.switches[si]!;
    if (si < nm) {
      const m = c.mosfets[si]!;
      switches[si] = { a: m.d, b: m.s, gate: m.g, kind: old.kind, other: -1 };
    } else {
      const e = si < nm + nr ? c.resistors[si - nm]! : c.inductors[si - nm - nr]!;
      switches[si] = { a: e.a, b: e.b, gate: -1, kind: SwitchKind.On, other: old.other };
    }
  }
  // each change as the switch before and after it (a moved one, an added one, a deleted one)
  const changes: Array<[Switch | undefined, Switch | undefined]> = moved.map((si) => [prev.switches[si]!, switches[si]!]);
  if (renumbering) {
    for (const j of renumbering.added) changes.push([undefined, switches[j]!]);
    for (const i of renumbering.deleted) changes.push([prev.switches[i]!, undefined]);
  }
  // how many gates each net drives, carried from network to network
  let counts = gateCounts.get(prev);
  if (!counts) {
    counts = new Int32Array(n);
    for (const m of prev.circuit.mosfets) counts[m.g]!++;
    gateCounts.set(prev, counts);
  }
  counts = counts.slice();
  const drivesGate = prev.drivesGate.slice();
  for (const [before, after] of changes) {
    if (before && before.gate >= 0 && --counts[before.gate]! === 0) drivesGate[before.gate] = 0;
    if (after && after.gate >= 0 && counts[after.gate]!++ === 0) drivesGate[after.gate] = 1;
  }

  // the old groups a changed switch touched, before or after: their nets are regrouped
  const touched = new Set<number>();
  const oldGates = new Set<number>();
  for (const pair of changes) {
    for (const s of pair) {
      if (!s) continue;
      for (const x of [s.a, s.b]) if (internal(x)) touched.add(prev.componentOf[x]!);
      if (s.gate >= 0) oldGates.add(s.gate);
    }
  }
  const regionNets: number[] = [];
  const regionSwitches = new Set<number>(moved);
  for (const j of renumbering?.added ?? []) regionSwitches.add(j);
  for (const id of touched) {
    const comp = prev.components[id]!;
    for (const x of comp.nodes) regionNets.push(x);
    for (const si of comp.switches) {
      const j = toNew(si);
      if (j >= 0) regionSwitches.add(j);
    }
  }
  regionNets.sort((x, y) => x - y);
  const parent = new Map<number, number>();
  for (const x of regionNets) parent.set(x, x);
  const find = (x: number): number => {
    let r = x;
    while (parent.get(r) !== r) r = parent.get(r)!;
    while (parent.get(x) !== r) {
      const next = parent.get(x)!;
      parent.set(x, r);
      x = next;
    }
    return r;
  };
  const sortedSwitches = [...regionSwitches].sort((x, y) => x - y);
  for (const si of sortedSwitches) {
    const s = switches[si]!;
    if (s.a !== s.b && internal(s.a) && internal(s.b)) parent.set(find(s.a), find(s.b));
  }
  // the rebuilt groups, each by its first net, as a fresh build meets them
  const groupOfRoot = new Map<number, Component>();
  const rebuiltGroups: Component[] = [];
  for (const x of regionNets) {
    const r = find(x);
    let g = groupOfRoot.get(r);
    if (!g) {
      groupOfRoot.set(r, (g = { id: -1, nodes: [], switches: [], gates: [] }));
      rebuiltGroups.push(g);
    }
    g.nodes.push(x);
  }
  const groupOfNet = (x: number) => groupOfRoot.get(find(x))!;
  for (const si of sortedSwitches) {
    const s = switches[si]!;
    const owner = internal(s.a) ? groupOfNet(s.a) : internal(s.b) ? groupOfNet(s.b) : undefined;
    if (!owner) continue;
    owner.switches.push(si);
    if (s.gate >= 0 && !owner.gates.includes(s.gate)) owner.gates.push(s.gate);
  }

  // the rebuilt groups take the old groups' ids (extra ones are added at the end, ids left over
  // stay as empty groups): every other group keeps its id, so nothing else is renumbered
  let components: Component[];
  if (!renumbering) components = prev.components.slice();
  else {
    components = renumberedGroups(prev.components, switchMap!);
  }
  const componentOf = prev.componentOf.slice();
  const freed = [...touched].sort((x, y) => x - y);
  const rebuilt: number[] = [];
  rebuiltGroups.forEach((g, k) => {
    g.id = k < freed.length ? freed[k]! : components.length;
    components[g.id] = g;
    for (const x of g.nodes) componentOf[x] = g.id;
    rebuilt.push(g.id);
  });
  for (let k = rebuiltGroups.length; k < freed.length; k++) {
    components[freed[k]!] = { id: freed[k]!, nodes: [], switches: [], gates: [] };
    rebuilt.push(freed[k]!);
  }
  rebuilt.sort((x, y) => x - y);
  const previousId = new Int32Array(components.length);
  for (let id = 0; id < previousId.length; id++) previousId[id] = id < prev.components.length ? id : -1;
  for (const id of touched) previousId[id] = -1;

  // each net's gated groups, in the order a fresh build lists them (by the first switch it gates)
  const gatesToRedo = new Set<number>(oldGates);
  for (const g of rebuiltGroups) for (const x of g.gates) gatesToRedo.add(x);
  const gatedComponents = prev.gatedComponents.slice();
  const firstGated = (comp: Component, g: number) => {
    for (const si of comp.switches) if (switches[si]!.gate === g) return si;
    return Infinity;
  };
  // the rebuilt groups each net gates (an edit in a cell with thousands of copies rebuilds
  // thousands of groups, most gating only their own copy's nets)
  const rebuiltGatedBy = new Map<number, Component[]>();
  for (const comp of rebuiltGroups) {
    for (const g of comp.gates) {
      const list = rebuiltGatedBy.get(g);
      if (list) list.push(comp);
      else rebuiltGatedBy.set(g, [comp]);
    }
  }
  for (const g of gatesToRedo) {
    // the kept groups stay in their order; the rebuilt ones go in at their places, by the first
    // switch each group has on the net (a clock's list holds thousands of groups, and an edit in
    // a repeated cell puts thousands back)
    const kept = prev.gatedComponents[g]!.filter((id) => !touched.has(id));
    const added = (rebuiltGatedBy.get(g) ?? []).map((comp): [number, number] => [firstGated(comp, g), comp.id]).sort((x, y) => x[0] - y[0]);
    if (added.length === 0) {
      gatedComponents[g] = kept;
      continue;
    }
    // each rebuilt group's place among the kept ones by bisection (reading few kept groups'
    // switch lists), then one pass
    const owners: number[] = [];
    let from = 0;
    for (const [key, id] of added) {
      let lo = from;
      let hi = kept.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (firstGated(components[kept[mid]!]!, g) < key) lo = mid + 1;
        else hi = mid;
      }
      for (let k = from; k < lo; k++) owners.push(kept[k]!);
      owners.push(id);
      from = lo;
    }
    for (let k = from; k < kept.length; k++) owners.push(kept[k]!);
    gatedComponents[g] = owners;
  }

  // a group is reachable when one of its switches touches a strong net
  const unreachable = prev.unreachable.slice();
  for (const comp of rebuiltGroups) {
    const strong = comp.switches.some((si) => !internal(switches[si]!.a) || !internal(switches[si]!.b));
    for (const x of comp.nodes) unreachable[x] = strong ? 0 : 1;
  }
  const network: SwitchNetwork = { circuit: c, role, switches, componentOf, components, gatedComponents, drivesGate, unreachable };
  gateCounts.set(network, counts);
  return { network, rebuilt, previousId };
}

function addedSwitch(c: Circuit, i: number): Switch {
  const m = c.mosfets[i]!;
  return { a: m.d, b: m.s, gate: m.g, kind: m.polarity === 'n' ? SwitchKind.N : SwitchKind.P, other: -1 };
}

/** The MOSFET a switch is (MOSFETs come first, each its own switch index), or -1 for an always-on element. */
export function mosfetOfSwitch(s: Switch, si: number): number {
  return s.kind === SwitchKind.On ? -1 : si;
}

/**
 * A kept group whose switch list is read under a renumbering of the switches (old index to new,
 * -1 for a deleted one), worked out when first read: an edit reads a few groups' lists. A
 * group renumbered again composes the two renumberings over the list it started from.
 */
class RenumberedGroup implements Component {
  private list: number[] | undefined;

  constructor(
    readonly id: number,
    readonly nodes: number[],
    readonly gates: number[],
    readonly root: readonly number[],
    readonly map: Int32Array,
  ) {}

  get switches(): number[] {
    return (this.list ??= renumbered(this.root, this.map));
  }

  /** The same group with other nets (a net insertion moved them). */
  withNets(nodes: number[], gates: number[]): RenumberedGroup {
    return new RenumberedGroup(this.id, nodes, gates, this.root, this.map);
  }
}

function renumberedGroups(groups: readonly Component[], map: Int32Array): Component[] {
  const composed = new Map<Int32Array, Int32Array>();
  const over = (earlier: Int32Array) => {
    let c = composed.get(earlier);
    if (!c) composed.set(earlier, (c = composeRenumberings(earlier, map)));
    return c;
  };
  return groups.map((g) => (g instanceof RenumberedGroup ? new RenumberedGroup(g.id, g.nodes, g.gates, g.root, over(g.map)) : new RenumberedGroup(g.id, g.nodes, g.gates, g.switches, map)));
}

/** Gates driven by each net (the counts behind `drivesGate`), for the next patch. */
const gateCounts = new WeakMap<SwitchNetwork, Int32Array>();


/**
 * The network of `c`, the previous network's circuit with nets put in (`ins`) and nothing on
 * them: every net under its new number, each new net an internal one in a group of its own
 * (added after the others), unreachable and gating nothing. What `buildSwitchNetwork(c)` gives
 * up to the groups' ids, for `patchSwitchNetwork` to start from.
 */
export function widenNetwork(prev: SwitchNetwork, c: Circuit, ins: NetRenumbering): SwitchNetwork {
  const map = ins.oldToNew;
  const at = (x: number) => map[x]!;
  // nets below the first moved one keep their numbers (one comparison per terminal for most)
  const first = firstMovedNet(ins);
  let switches: Switch[] | undefined;
  for (let i = 0; i < prev.switches.length; i++) {
    const s = prev.switches[i]!;
    if (s.a < first && s.b < first && s.gate < first) continue;
    const gate = s.gate < 0 ? s.gate : at(s.gate);
    if (at(s.a) !== s.a || at(s.b) !== s.b || gate !== s.gate) (switches ??= prev.switches.slice())[i] = { a: at(s.a), b: at(s.b), gate, kind: s.kind, other: s.other };
  }
  const componentOf = withNetCells(prev.componentOf, ins, -1);
  const components = prev.components.map((g): Component => {
    const nodes = movedNets(g.nodes, ins);
    const gates = movedNets(g.gates, ins);
    if (nodes === g.nodes && gates === g.gates) return g;
    return g instanceof RenumberedGroup ? g.withNets(nodes, gates) : { id: g.id, nodes, switches: g.switches, gates };
  });
  for (const x of ins.added) {
    componentOf[x] = components.length;
    components.push({ id: components.length, nodes: [x], switches: [], gates: [] });
  }
  const network: SwitchNetwork = {
    circuit: c,
    role: withNetCells(prev.role, ins, NetRole.Internal),
    // the same list when no switch moved (a list is never changed once made)
    switches: switches ?? prev.switches,
    componentOf,
    components,
    gatedComponents: withNetRows(prev.gatedComponents, ins, () => []),
    drivesGate: withNetCells(prev.drivesGate, ins, 0),
    unreachable: withNetCells(prev.unreachable, ins, 1),
  };
  const counts = gateCounts.get(prev);
  if (counts) gateCounts.set(network, withNetCells(counts, ins, 0));
  return network;
}
