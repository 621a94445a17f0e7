// Constant propagation per phase: clocks are constants in a phase, and a ternary switch-level
// evaluation (0, 1, X) carries them through the network until nothing changes, so buffered and
// inverted clocks (and nets tied to rails through logic) are constants too.

import { NetRole, SwitchKind, type Component, type SwitchNetwork } from './switchNetwork';
import { withNetCells, type NetRenumbering } from '../core/renumber';

export const X = 2;
export type Ternary = 0 | 1 | 2;

/** Conduction of a switch for a gate value: 1 on, 0 off, 2 unknown. */
export function conducts(kind: SwitchKind, gate: number): Ternary {
  if (kind === SwitchKind.On) return 1;
  if (gate === X) return X;
  return (kind === SwitchKind.N ? gate === 1 : gate === 0) ? 1 : 0;
}

/** The value every strong net has in a phase (inputs and free clocks X). */
export function sourceValues(net: SwitchNetwork, clocks: Map<number, 0 | 1>): Uint8Array {
  const v = new Uint8Array(net.role.length).fill(X);
  for (let i = 0; i < v.length; i++) {
    const r = net.role[i];
    if (r === NetRole.Rail0) v[i] = 0;
    else if (r === NetRole.Rail1) v[i] = 1;
  }
  for (const [k, val] of clocks) v[k] = val;
  return v;
}

const B0 = 1;
const B1 = 2;
const BX = 4;

/** Scratch masks indexed by net, reused across evaluations (reset per component). */
export interface Scratch {
  definite: Uint8Array;
  possible: Uint8Array;
}

export function newScratch(netCount: number): Scratch {
  return { definite: new Uint8Array(netCount), possible: new Uint8Array(netCount) };
}

/**
 * Ternary values of a component's nodes given the current values of every net, written to
 * `out[node]`. A node is 1 when a definitely conducting path reaches a 1 and no possibly
 * conducting path reaches a 0 or an unknown driver; likewise 0; otherwise X (floating,
 * contended or unknown).
 */
export function evaluateComponent(net: SwitchNetwork, comp: Component, values: Uint8Array, out: Uint8Array, scratch: Scratch): void {
  const sw = net.switches;
  const role = net.role;
  const { definite, possible } = scratch;
  for (const node of comp.nodes) definite[node] = possible[node] = 0;
  const maskOf = (v: number) => (v === 0 ? B0 : v === 1 ? B1 : BX);
  // Relax masks over switches until stable (bounded by the component's size).
  let changed = true;
  for (let pass = 0; changed && pass < comp.nodes.length + 2; pass++) {
    changed = false;
    for (const si of comp.switches) {
      const s = sw[si]!;
      const c = conducts(s.kind, s.gate >= 0 ? values[s.gate]! : 1);
      if (c === 0) continue;
      const aInt = role[s.a] === NetRole.Internal;
      const bInt = role[s.b] === NetRole.Internal;
      const da = aInt ? definite[s.a]! : maskOf(values[s.a]!);
      const pa = aInt ? possible[s.a]! : da;
      const db = bInt ? definite[s.b]! : maskOf(values[s.b]!);
      const pb = bInt ? possible[s.b]! : db;
      if (bInt) {
        const nd = c === 1 ? db | da : db;
        const np = pb | pa;
        if (nd !== db || np !== pb) (definite[s.b] = nd), (possible[s.b] = np), (changed = true);
      }
      if (aInt) {
        const nd = c === 1 ? definite[s.a]! | db : definite[s.a]!;
        const np = possible[s.a]! | pb;
        if (nd !== definite[s.a] || np !== possible[s.a]) (definite[s.a] = nd), (possible[s.a] = np), (changed = true);
      }
    }
  }
  for (const node of comp.nodes) {
    const d = definite[node]!;
    const p = possible[node]!;
    out[node] = p === B1 && d & B1 ? 1 : p === B0 && d & B0 ? 0 : X;
  }
}

/** Results of a propagation that ran out of budget before its fixpoint (not a base for another). */
const unsettled = new WeakSet<Uint8Array>();

/** Net values in a phase after propagating the phase's constants to a fixpoint. */
export function propagateConstants(net: SwitchNetwork, clocks: Map<number, 0 | 1>, scratch: Scratch = newScratch(net.role.length)): Uint8Array {
  const values = sourceValues(net, clocks);
  const queue = net.components.map((comp) => comp.id);
  if (!settle(net, values, queue, scratch)) unsettled.add(values);
  return values;
}

/**
 * Evaluates the queued components, and again each one whose gate changed, until nothing
 * changes. False when the budget runs out first (pathological feedback, an oscillating ring).
 */
function settle(net: SwitchNetwork, values: Uint8Array, queue: number[], scratch: Scratch): boolean {
  const out = new Uint8Array(values.length);
  const queued = new Uint8Array(net.components.length);
  for (const id of queue) queued[id] = 1;
  let budget = queue.length * 8 + 100;
  for (let head = 0; head < queue.length; head++) {
    if (budget-- <= 0) return false;
    const id = queue[head]!;
    queued[id] = 0;
    const comp = net.components[id]!;
    evaluateComponent(net, comp, values, out, scratch);
    for (const node of comp.nodes) {
      const v = out[node]!;
      if (values[node] === v) continue;
      values[node] = v;
      for (const g of net.gatedComponents[node]!) {
        if (!queued[g]) {
          queued[g] = 1;
          queue.push(g);
        }
      }
    }
  }
  return true;
}

/**
 * A phase's values after an edit rebuilt some groups (`rebuilt`, ids in `net`), from the values
 * before it: only nets a rebuilt group can reach through gates may change, so those start
 * again from unknown and the rest keep their values; the fixpoint is the one a full
 * `propagateConstants` reaches (the least one: values only ever go from X to 0 or 1).
 * Undefined when the work budget runs out (oscillating feedback), where the caller starts afresh.
 */
export function repropagateConstants(net: SwitchNetwork, previous: Uint8Array, rebuilt: readonly number[], scratch: Scratch = newScratch(net.role.length)): Uint8Array | undefined {
  if (unsettled.has(previous)) return undefined;
  if (rebuiltKeepTheirValues(net, previous, rebuilt, scratch)) return previous.slice();
  const values = previous.slice();
  const reached = new Uint8Array(net.components.length);
  const queue: number[] = [];
  for (const id of rebuilt) if (!reached[id]) (reached[id] = 1), queue.push(id);
  for (let head = 0; head < queue.length; head++) {
    for (const x of net.components[queue[head]!]!.nodes) {
      values[x] = X;
      for (const g of net.gatedComponents[x]!) if (!reached[g]) (reached[g] = 1), queue.push(g);
    }
  }
  return settle(net, values, queue, scratch) ? values : undefined;
}

/**
 * True when every rebuilt group's nodes come out as they were both with its gates at their
 * values before the edit and with every internal gate unknown. Evaluation is monotone, so the
 * nodes come out so for any gate values between those two, which is all a propagation from
 * unknown can pass through: the rebuilt nodes hold their old values from the start, everything
 * they gate sees what it saw before, and the old fixpoint is still the least one.
 */
function rebuiltKeepTheirValues(net: SwitchNetwork, previous: Uint8Array, rebuilt: readonly number[], scratch: Scratch): boolean {
  const out = new Uint8Array(previous.length);
  for (const id of rebuilt) {
    const comp = net.components[id]!;
    if (comp.nodes.length === 0) continue;
    evaluateComponent(net, comp, previous, out, scratch);
    for (const x of comp.nodes) if (out[x] !== previous[x]) return false;
  }
  const unknown = previous.slice();
  for (const id of rebuilt) for (const g of net.components[id]!.gates) if (net.role[g] === NetRole.Internal) unknown[g] = X;
  for (const id of rebuilt) {
    const comp = net.components[id]!;
    if (comp.nodes.length === 0) continue;
    evaluateComponent(net, comp, unknown, out, scratch);
    for (const x of comp.nodes) if (out[x] !== previous[x]) return false;
  }
  return true;
}

/** A phase's values with nets put in (core/renumber), each unknown, as a net with nothing on it comes out. */
export function widenValues(values: Uint8Array, ins: NetRenumbering): Uint8Array {
  const out = withNetCells(values, ins, X);
  if (unsettled.has(values)) unsettled.add(out);
  return out;
}
