// The switch-level view of a circuit (Bryant's model): each MOSFET is a switch controlled by its
// gate (n conducts on 1, p on 0), resistors and inductors always conduct, and nets are split into
// strong sources (rails, inputs, clocks) and the channel-connected components between them.
// Built once per circuit; phase-independent.

import type { Circuit } from '../circuit/circuit';
import type { Clock } from '../phases/clocks';

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
  /** Index into circuit.mosfets for a MOSFET, else -1. */
  mosfet: number;
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
  const n = c.nets.length;
  const role = new Uint8Array(n);
  for (const net of c.nets) {
    if (net.kind === 'ground') role[net.id] = NetRole.Rail0;
    else if (net.kind === 'supply') role[net.id] = NetRole.Rail1;
  }
  for (const s of c.sources) {
    if (role[s.p] !== NetRole.Internal) continue;
    if (s.letter === 'v' && role[s.n] !== NetRole.Internal) role[s.p] = NetRole.Input;
  }
  for (const id of c.inputs) if (role[id] === NetRole.Internal) role[id] = NetRole.Input;
  for (const k of clocks) if (role[k.net] !== NetRole.Rail0 && role[k.net] !== NetRole.Rail1) role[k.net] = NetRole.Clock;

  const switches: Switch[] = [];
  const drivesGate = new Uint8Array(n);
  c.mosfets.forEach((m, i) => {
    switches.push({ a: m.d, b: m.s, gate: m.g, kind: m.polarity === 'n' ? SwitchKind.N : SwitchKind.P, mosfet: i, other: -1 });
    drivesGate[m.g] = 1;
  });
  c.resistors.forEach((r, i) => switches.push({ a: r.a, b: r.b, gate: -1, kind: SwitchKind.On, mosfet: -1, other: i }));
  c.inductors.forEach((l, i) => switches.push({ a: l.a, b: l.b, gate: -1, kind: SwitchKind.On, mosfet: -1, other: i }));

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
  const gatedComponents: number[][] = Array.from({ length: n }, () => []);
  switches.forEach((s, si) => {
    const ca = componentOf[s.a]!;
    const cb = componentOf[s.b]!;
    const owner = ca >= 0 ? ca : cb;
    if (owner < 0) return; // rail-to-rail device (a decap, a tie): no internal node
    const comp = components[owner]!;
    comp.switches.push(si);
    if (s.gate >= 0 && !comp.gates.includes(s.gate)) {
      comp.gates.push(s.gate);
      gatedComponents[s.gate]!.push(owner);
    }
  });

  // Structural reachability from strong nets, ignoring gates.
  const unreachable = new Uint8Array(n);
  const adj: number[][] = Array.from({ length: n }, () => []);
  for (const s of switches) {
    adj[s.a]!.push(s.b);
    adj[s.b]!.push(s.a);
  }
  const seen = new Uint8Array(n);
  const queue: number[] = [];
  for (let i = 0; i < n; i++) if (role[i] !== NetRole.Internal) (seen[i] = 1), queue.push(i);
  for (let q = 0; q < queue.length; q++) for (const x of adj[queue[q]!]!) if (!seen[x]) (seen[x] = 1), queue.push(x);
  for (let i = 0; i < n; i++) if (!seen[i]) unreachable[i] = 1;

  return { circuit: c, role, switches, componentOf, components, gatedComponents, drivesGate, unreachable };
}
