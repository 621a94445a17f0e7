// Per-phase classification of every node (DOMAIN 3): for each channel-connected component, the
// gate nets that are not constants in the phase are free Boolean variables; enumerating them
// tells, for each node, under which inputs a conducting path reaches a strong source. Candidate
// witnesses (a float or a contention) are then checked against the logic that drives those gate
// nets, traced back a few levels, so a net and its inverted or buffered copy are not treated as
// independent, and feedback from the node itself (keepers, static latches) is recognised.

import { movedNets, newToOldNets, renumbered, withNetCells, type NetRenumbering } from '../core/renumber';
import type { PhasePlan, Phase } from '../phases/phases';
import { firstWithSameValues, floatWindow, phaseWithValues } from '../phases/phases';
import { evaluateComponent, newScratch, propagateConstants, repropagateConstants, widenValues, X, type Scratch } from './constants';
import { mosfetOfSwitch, NetRole, SwitchKind, type Component, type SwitchNetwork } from './switchNetwork';
import { stepDue, runToEnd, type Steps } from '../core/steps';
import { NetKeyedMap, OverlayMap, RenumberedMap } from '../core/overlay';

export type NodeStateName = 'driven' | 'conditional' | 'floating' | 'kept' | 'contention' | 'undriven';

export interface NodePhaseResult {
  state: NodeStateName;
  /** A minimal assignment of the free inputs under which the node floats (or contends). */
  when?: Record<string, 0 | 1>;
  /** Assignments (cubes) that together cover every input combination under which it floats. */
  floatCover?: Array<Record<string, 0 | 1>>;
  /** For contention: the input values that make two drivers fight. */
  contentionWhen?: Record<string, 0 | 1>;
  /** The level a keeper holds, for `kept`. */
  keptLevel?: 0 | 1;
  /** False when the component was too wide to enumerate or to check the witness exactly. */
  exact: boolean;
  /** MOSFETs (indices into circuit.mosfets) that are off around the floating node under `when`. */
  cutOff?: number[];
  /** Feedback devices holding a kept node. */
  keepers?: number[];
  /** Values of the group's free gate nets in one assignment under which the node floats. */
  gateAssignment?: Array<[number, 0 | 1]>;
}

export interface Classification {
  network: SwitchNetwork;
  plan: PhasePlan;
  /** Per phase (same order as plan.phases): non-driven nodes only. */
  perPhase: Array<Map<number, NodePhaseResult>>;
  /** Net values (0, 1, 2 = X) after constant propagation, per phase. */
  phaseValues: Uint8Array[];
  /** 1 for storage (drives a gate or is an output), 0 for internal. */
  storage: Uint8Array;
  /** Components too wide to enumerate, and components whose witnesses could not be checked. */
  wideComponents: number;
  uncheckedComponents: number;
  /** Per phase, by component id: WIDE and UNCHECKED bits (what the two counts are made of). */
  componentFlags: Uint8Array[];
  /**
   * Per phase, by component id: the other groups its check looked into (traced through, or
   * read the gates of), when it did; for `reclassify` to find the checks an edit reaches.
   * Absent on a classification made some other way (reclassify then reads back by gate levels).
   */
  groupsRead?: Array<ReadonlyArray<Int32Array | undefined>>;
}

const WIDE = 1;
const UNCHECKED = 2;

/** Enumeration limits: free gate variables of one component, and leaves of a witness check. */
export const MAX_FREE_GATES = 16;
export const MAX_LEAVES = 14;
const MAX_TRACE_DEPTH = 4;
/** A driving component with more free gates than this is not traced through. */
const MAX_TRACE_GATES = 10;
/** Explicit capacitance that makes a node a storage node by itself (common practice, no source). */
export const STORAGE_CAPACITOR_F = 5e-15;

const B0 = 1;
const B1 = 2;
const BX = 4;
/** Set when two different free drivers reach a node. */
const BMULTI = 8;

/**
 * Source masks of the component's nodes for one assignment `a` of the free gates (gate net g has
 * bit gatePos[g] of `a`; other gates take their phase value), through ON switches. Written to
 * out[outBase + local index]; driverId tracks which free driver reached a node.
 */
function reachOnce(
  net: SwitchNetwork,
  comp: Component,
  gatePos: Int32Array,
  a: number,
  skipSwitch: Uint8Array | undefined,
  local: Int32Array,
  values: Uint8Array,
  out: Uint8Array,
  outBase: number,
  driverId: Int32Array,
): void {
  const sw = net.switches;
  const role = net.role;
  const nodes = comp.nodes;
  for (let i = 0; i < nodes.length; i++) {
    out[outBase + i] = 0;
    driverId[i] = -1;
  }
  let changed = true;
  for (let pass = 0; changed && pass < nodes.length + 2; pass++) {
    changed = false;
    for (let k = 0; k < comp.switches.length; k++) {
      if (skipSwitch !== undefined && skipSwitch[k]) continue;
      const s = sw[comp.switches[k]!]!;
      if (s.kind !== SwitchKind.On) {
        const gp = gatePos[s.gate]!;
        const g = gp >= 0 ? (a >> gp) & 1 : values[s.gate]!;
        if (g === X) continue; // unknown gate: not a definite path
        if ((s.kind === SwitchKind.N) !== (g === 1)) continue;
      }
      const la = role[s.a] === NetRole.Internal ? local[s.a]! : -1;
      const lb = role[s.b] === NetRole.Internal ? local[s.b]! : -1;
      let ma: number, ia: number, mb: number, ib: number;
      if (la >= 0) {
        ma = out[outBase + la]!;
        ia = driverId[la]!;
      } else {
        const v = values[s.a]!;
        ma = v === 0 ? B0 : v === 1 ? B1 : BX;
        ia = v === X ? s.a : -1;
      }
      if (lb >= 0) {
        mb = out[outBase + lb]!;
        ib = driverId[lb]!;
      } else {
        const v = values[s.b]!;
        mb = v === 0 ? B0 : v === 1 ? B1 : BX;
        ib = v === X ? s.b : -1;
      }
      if (lb >= 0 && mergeInto(out, outBase, driverId, lb, ma, ia)) changed = true;
      if (la >= 0 && mergeInto(out, outBase, driverId, la, mb, ib)) changed = true;
    }
  }
}

function mergeInto(out: Uint8Array, outBase: number, driverId: Int32Array, tl: number, m: number, id: number): boolean {
  let nm = out[outBase + tl]! | m;
  let nid = driverId[tl]!;
  if (id >= 0) {
    if (nid === -1) nid = id;
    else if (nid !== id && nid !== -2) {
      nid = -2;
      nm |= BMULTI;
    }
  } else if (id === -2) {
    nid = -2;
    nm |= BMULTI;
  }
  if (nm === out[outBase + tl] && nid === driverId[tl]) return false;
  out[outBase + tl] = nm;
  driverId[tl] = nid;
  return true;
}

function contends(mask: number): boolean {
  const rails = mask & (B0 | B1);
  if (rails === (B0 | B1)) return true;
  if (mask & BMULTI) return true;
  return rails !== 0 && (mask & BX) !== 0;
}

interface TraceNode {
  net: number;
  comp: Component;
}

interface Trace {
  leaves: number[];
  leafKind: Array<'input' | 'opaque' | 'state'>;
  /** Components to evaluate, children before parents. */
  order: TraceNode[];
  /** Gate nets whose value depends on a state leaf (feedback from the component itself). */
  dependsOnState: Set<number>;
}

function trace(net: SwitchNetwork, comp: Component, free: number[], values: Uint8Array, depth: number, reads: GroupsRead): Trace {
  const leaves: number[] = [];
  const leafKind: Trace['leafKind'] = [];
  const leafOf = new Map<number, number>();
  const order: TraceNode[] = [];
  const expanded = new Set<number>();
  const dependsOnState = new Set<number>();
  const onStack = new Set<number>();
  const addLeaf = (g: number, kind: 'input' | 'opaque' | 'state') => {
    if (!leafOf.has(g)) {
      leafOf.set(g, leaves.length);
      leaves.push(g);
      leafKind.push(kind);
    }
    if (kind === 'state') dependsOnState.add(g);
  };
  // returns whether g depends on a state leaf
  const visit = (g: number, d: number): boolean => {
    if (values[g] !== X) return false;
    if (net.role[g] !== NetRole.Internal) {
      addLeaf(g, 'input');
      return false;
    }
    const cid = net.componentOf[g]!;
    if (cid === comp.id) {
      addLeaf(g, 'state');
      return true;
    }
    if (expanded.has(g)) return dependsOnState.has(g);
    reads.add(cid);
    const d2 = net.components[cid]!;
    // gates that are nodes of the same component are computed with it, not leaves
    const dGates = d2.gates.filter((h) => values[h] === X && net.componentOf[h] !== cid);
    if (d >= depth || onStack.has(cid) || dGates.length > MAX_TRACE_GATES) {
      addLeaf(g, 'opaque');
      return false;
    }
    onStack.add(cid);
    let dep = false;
    for (const h of dGates) dep = visit(h, d + 1) || dep;
    onStack.delete(cid);
    expanded.add(g);
    order.push({ net: g, comp: d2 });
    if (dep) dependsOnState.add(g);
    return dep;
  };
  for (const g of free) visit(g, 0);
  return { leaves, leafKind, order, dependsOnState };
}


/** Classifies every node of a circuit in every phase of the plan. */
/** `twins: false` checks every group's witnesses itself (for the test that holds the two ways equal). */
export function classify(net: SwitchNetwork, plan: PhasePlan, how: { twins?: boolean } = {}): Classification {
  return runToEnd(classifySteps(net, plan, how));
}

/**
 * `classify` in slices (see core/steps). `earlier`: a classification of a network with the same
 * groups (an edit of sources' values or electrical directives): each phase with the clock values
 * of one of its phases takes that phase's results, and the others start from its checked witnesses.
 */
export function* classifySteps(net: SwitchNetwork, plan: PhasePlan, how: { twins?: boolean } = {}, earlier?: Classification): Steps<Classification> {
  const c = net.circuit;
  const storage = storageNodes(net);
  const scratch = newScratch(c.nets.length);
  const local = new Int32Array(c.nets.length).fill(-1);
  const result: Classification = { network: net, plan, perPhase: [], phaseValues: [], storage, wideComponents: 0, uncheckedComponents: 0, componentFlags: [], groupsRead: [] };
  const buffers = newBuffers(c.nets.length, net.components.length, how.twins !== false);
  if (earlier) buffers.witnesses = witnessMemos.get(earlier) ?? buffers.witnesses;
  const due = stepDue();
  const first = firstWithSameValues(plan);
  for (let p = 0; p < plan.phases.length; p++) {
    // a phase with an earlier one's clock values has its results (shared, never changed)
    if (first[p] !== p) {
      takePhase(result, result, first[p]!);
      continue;
    }
    const k = earlier?.groupsRead ? phaseWithValues(earlier.plan, plan.phases[p]!) : -1;
    if (k >= 0) {
      takePhase(result, earlier!, k);
      continue;
    }
    const values = propagateConstants(net, plan.phases[p]!.clocks, scratch);
    result.phaseValues.push(values);
    const states = new Map<number, NodePhaseResult>();
    const flags = new Uint8Array(net.components.length);
    // `work` is the phase's values, changed by a witness check and restored after it
    const work = values.slice();
    const out = new Uint8Array(values.length);
    const pass: PhasePass = { net, values, local, scratch, states, flags, work, out, storage, buffers };
    const read = new Array<Int32Array | undefined>(net.components.length);
    for (let k = 0; k < net.components.length; k++) {
      read[k] = checkGroup(pass, net.components[k]!);
      if (due()) yield;
    }
    for (let i = 0; i < c.nets.length; i++) if (net.unreachable[i]) states.set(i, { state: 'undriven', exact: true });
    result.perPhase.push(states);
    result.componentFlags.push(flags);
    result.groupsRead!.push(read);
  }
  countFlags(result);
  witnessMemos.set(result, buffers.witnesses);
  return result;
}

/**
 * Phase `k`'s results, values, flags and record of reads in `from` (the classification being
 * made, or an earlier one with a record) appended to `into` for its next phase, which has the
 * same clock values: shared, never changed.
 */
function takePhase(into: Classification, from: Classification, k: number): void {
  into.phaseValues.push(from.phaseValues[k]!);
  into.perPhase.push(from.perPhase[k]!);
  into.componentFlags.push(from.componentFlags[k]!);
  if (into.groupsRead) into.groupsRead.push(from.groupsRead![k]!);
}

/**
 * The witness checks a classification did, by key (see witnessKey): valid for any circuit with
 * the same net names and numbers, so a reclassification after a reconnection starts from them.
 */
const witnessMemos = new WeakMap<Classification, Map<string, WitnessMemo>>();

function newBuffers(netCount: number, groupCount: number, twins: boolean): Buffers {
  return { gatePos: new Int32Array(netCount).fill(-1), masks: new Uint8Array(1024), driverId: new Int32Array(64), witnesses: new Map(), twins, reads: new GroupsRead(groupCount), numbering: { at: new Int32Array(netCount), stamps: new Int32Array(netCount), current: 0 } };
}

/** The other groups one check looks into (trace, independentGates), each listed once. */
class GroupsRead {
  private readonly stamp: Int32Array;
  private current = 0;
  private readonly list: number[] = [];
  constructor(groups: number) {
    this.stamp = new Int32Array(groups);
  }
  /** Before each group's check. */
  start(): void {
    this.current++;
    this.list.length = 0;
  }
  add(id: number): void {
    if (this.stamp[id] === this.current) return;
    this.stamp[id] = this.current;
    this.list.push(id);
  }
  /** What the check since `start` looked into, or undefined for nothing. */
  taken(): Int32Array | undefined {
    return this.list.length ? Int32Array.from(this.list) : undefined;
  }
}

/** The two counts: components wide, or unchecked, in at least one phase (set on `cl`). */
export function countFlags(cl: Classification): void {
  const n = cl.network.components.length;
  let wide = 0;
  let unchecked = 0;
  for (let k = 0; k < n; k++) {
    let f = 0;
    for (const flags of cl.componentFlags) f |= flags[k]!;
    if (f & WIDE) wide++;
    if (f & UNCHECKED) unchecked++;
  }
  cl.wideComponents = wide;
  cl.uncheckedComponents = unchecked;
}

/**
 * Storage nodes: those that drive a gate or are declared outputs, and those with a deliberate
 * storage capacitor (DRAM-style) even if they drive no gate; the threshold keeps an extracted
 * netlist's small parasitics from making every node storage.
 */
export function storageNodes(net: SwitchNetwork): Uint8Array {
  const c = net.circuit;
  const storage = new Uint8Array(c.nets.length);
  for (let i = 0; i < c.nets.length; i++) if (net.drivesGate[i]) storage[i] = 1;
  for (const o of c.outputs) storage[o] = 1;
  const explicitF = new Float64Array(c.nets.length);
  for (const cap of c.capacitors) {
    if (cap.capacitanceF === undefined || cap.a === cap.b) continue;
    explicitF[cap.a] += cap.capacitanceF;
    explicitF[cap.b] += cap.capacitanceF;
  }
  for (let i = 0; i < c.nets.length; i++) if (explicitF[i]! >= STORAGE_CAPACITOR_F) storage[i] = 1;
  return storage;
}

/** How far a group's check reads back through the gates that drive it (trace depth, plus the leaves' groups). */
const READ_DEPTH = MAX_TRACE_DEPTH + 1;

/**
 * The classification after an edit that rebuilt some groups of the network (see
 * patchSwitchNetwork), from the one before it: per phase, the values are propagated again from
 * the rebuilt groups, and only the groups whose check can read something that changed are
 * checked again: a rebuilt group, one whose storage flag or reachability changed, one whose
 * check looked into a rebuilt group (the groups each check read are recorded), and one that can
 * read a net whose value changed (within READ_DEPTH gate levels back). Every other group keeps
 * its results, which name the same nets and devices. Without the record of what the checks read,
 * every group reading a rebuilt one within READ_DEPTH gate levels is checked again.
 * Equal to `classify` on the new network (the tests hold it); undefined when a phase's values
 * cannot be found that way. `changedNets`: the nets whose storage flag, value in some phase or
 * results in some phase differ from before, for the stages after this one.
 */
export function reclassify(previous: Classification, net: SwitchNetwork, rebuilt: readonly number[], previousId: Int32Array): { classification: Classification; changedNets: number[] } | undefined {
  const c = net.circuit;
  const storage = storageNodes(net);
  const scratch = newScratch(c.nets.length);
  const local = new Int32Array(c.nets.length).fill(-1);
  const plan = previous.plan;
  const groupCount = net.components.length;
  const recorded = previous.groupsRead;
  const result: Classification = { network: net, plan, perPhase: [], phaseValues: [], storage, wideComponents: 0, uncheckedComponents: 0, componentFlags: [], ...(recorded ? { groupsRead: [] } : {}) };
  const buffers = newBuffers(c.nets.length, groupCount, true);
  buffers.witnesses = witnessMemos.get(previous) ?? buffers.witnesses;
  const seeds = new Set<number>(rebuilt);
  const isRebuilt = new Uint8Array(groupCount);
  for (const id of rebuilt) isRebuilt[id] = 1;
  // nets whose storage flag, value or results may differ (for the stages after this one)
  const changed = new Uint8Array(c.nets.length);
  for (let x = 0; x < c.nets.length; x++) {
    if (storage[x] === previous.storage[x]) continue;
    changed[x] = 1;
    if (net.componentOf[x]! >= 0) seeds.add(net.componentOf[x]!);
  }
  // the checks of a group's gated groups read whether it is reachable (independentGates)
  const wasUnreachable = previous.network.unreachable;
  for (let x = 0; x < c.nets.length; x++) {
    if (net.unreachable[x] === wasUnreachable[x]) continue;
    if (net.componentOf[x]! >= 0) seeds.add(net.componentOf[x]!);
    for (const g of net.gatedComponents[x]!) seeds.add(g);
  }
  // the checks that looked into a rebuilt group, per phase
  const readers = recorded?.map((read) => {
    const out: number[] = [];
    for (let id = 0; id < read.length; id++) {
      const r = read[id];
      if (r === undefined || isRebuilt[id]) continue;
      for (let k = 0; k < r.length; k++) {
        if (isRebuilt[r[k]!]) {
          out.push(id);
          break;
        }
      }
    }
    return out;
  });
  const first = firstWithSameValues(plan);
  for (let p = 0; p < plan.phases.length; p++) {
    if (first[p] !== p) {
      takePhase(result, result, first[p]!);
      continue;
    }
    const before = previous.phaseValues[p]!;
    const values = repropagateConstants(net, before, rebuilt, scratch);
    if (!values) return undefined;
    const dirty = new Uint8Array(net.components.length);
    const queue: number[] = [];
    const mark = (id: number) => {
      if (id >= 0 && !dirty[id]) (dirty[id] = 1), queue.push(id);
    };
    for (const id of seeds) mark(id);
    for (const id of readers?.[p] ?? []) mark(id);
    // the groups followed by gate levels below: with the record, those holding a changed value
    // (what the rebuilt groups' readers read is known); without it, every dirty one
    const swept = new Uint8Array(groupCount);
    let frontier: number[] = [];
    const sweep = (id: number, into: number[]) => {
      if (id >= 0 && !swept[id]) (swept[id] = 1), into.push(id);
    };
    if (!readers) for (const id of queue) sweep(id, frontier);
    for (let x = 0; x < values.length; x++) {
      if (values[x] === before[x]) continue;
      changed[x] = 1;
      mark(net.componentOf[x]!);
      sweep(net.componentOf[x]!, frontier);
    }
    // groups reading a swept one through their gates, READ_DEPTH levels on; a check reads no
    // further through a gate that is a constant in the phase (the same one as before)
    for (let level = 0; level < READ_DEPTH; level++) {
      const next: number[] = [];
      for (const id of frontier) {
        for (const x of net.components[id]!.nodes) {
          if (values[x] !== X && values[x] === before[x]) continue;
          for (const g of net.gatedComponents[x]!) mark(g), sweep(g, next);
        }
      }
      frontier = next;
    }
    queue.sort((x, y) => x - y);

    const old = previous.perPhase[p]!;
    // the dirty groups' results, checked into a map of their own and laid over the old ones
    const states = new Map<number, NodePhaseResult>();
    const flags = new Uint8Array(net.components.length);
    const oldFlags = previous.componentFlags[p]!;
    for (let id = 0; id < flags.length; id++) if (!dirty[id]) flags[id] = oldFlags[previousId[id]!]!;
    const work = values.slice();
    const out = new Uint8Array(values.length);
    const pass: PhasePass = { net, values, local, scratch, states, flags, work, out, storage, buffers };
    // what each check reads: the kept groups' as recorded, the dirty ones' anew
    const read = recorded ? recorded[p]!.slice() : undefined;
    if (read) read.length = groupCount;
    for (const id of queue) {
      const comp = net.components[id]!;
      const looked = checkGroup(pass, comp);
      if (read) read[id] = looked;
      for (const x of comp.nodes) {
        if (net.unreachable[x]) states.set(x, { state: 'undriven', exact: true });
        if (!changed[x] && !sameResult(old.get(x), states.get(x))) changed[x] = 1;
      }
    }
    const replaced = new Map<number, NodePhaseResult | undefined>();
    let added = false;
    for (const id of queue) {
      for (const x of net.components[id]!.nodes) {
        const r = states.get(x);
        if (old.has(x)) replaced.set(x, r);
        else if (r) added = true;
      }
    }
    result.phaseValues.push(values);
    if (!added) result.perPhase.push(OverlayMap.over(old, replaced));
    else {
      // the nodes new to the map go after the others, as a copy with them set would have them
      for (const [x, r] of states) if (!old.has(x)) replaced.set(x, r);
      result.perPhase.push(OverlayMap.extend(old, replaced));
    }
    result.componentFlags.push(flags);
    if (read) result.groupsRead!.push(read);
  }
  countFlags(result);
  witnessMemos.set(result, buffers.witnesses);
  const changedNets: number[] = [];
  for (let x = 0; x < changed.length; x++) if (changed[x]) changedNets.push(x);
  return { classification: result, changedNets };
}

/**
 * The classification with the device indices in its results (and in its memo of checked
 * witnesses) under their new numbers (devices were put in or taken out ahead of them), for
 * `reclassify` to start from. Each result is renumbered when it is first read.
 */
export function renumberDevices(cl: Classification, oldToNew: Int32Array): Classification {
  const out: Classification = { ...cl, perPhase: cl.perPhase.map((m) => RenumberedMap.over(m, oldToNew, renumberResult)) };
  // the checked witnesses carry over under the new numbers (a group with a deleted device
  // no longer exists in that shape); -1 in a memo's list is an always-on element
  const memo = witnessMemos.get(cl);
  if (memo) {
    const next = new Map<string, WitnessMemo>();
    for (const [key, w] of memo) {
      const mosfets = w.mosfets.map((i) => (i < 0 ? i : oldToNew[i]!));
      if (mosfets.some((j, k) => j < 0 && w.mosfets[k]! >= 0)) continue;
      next.set(key, { nets: w.nets, mosfets, results: w.results.map((r) => r && renumberResult(r, oldToNew)) });
    }
    witnessMemos.set(out, next);
  }
  return out;
}

/**
 * The classification of `net` (the previous network with nets put in, nothing on them, or with
 * nets that have nothing on them taken out: see widenNetwork) from the previous one: every
 * result under the new net numbers, each new net unknown in every phase, undriven and no
 * storage node, for `reclassify` to start from.
 */
export function widenClassification(cl: Classification, net: SwitchNetwork, plan: PhasePlan, ins: NetRenumbering): Classification {
  const map = ins.oldToNew;
  const newToOld = newToOldNets(ins);
  const result = (r: NodePhaseResult) => widenResult(r, map);
  // (widenResult itself, so a later renumbering composes with this one)
  const undriven: NodePhaseResult = { state: 'undriven', exact: true };
  const perPhase = cl.perPhase.map((m) => {
    const moved = NetKeyedMap.over(m, map, newToOld, widenResult, ins.removed);
    // a net with nothing on it is undriven, as a full pass finds it
    return OverlayMap.extend(moved, new Map(ins.added.map((x) => [x, undriven])));
  });
  const added = net.components.length - cl.network.components.length;
  const componentFlags = cl.componentFlags.map((f) => {
    const out = new Uint8Array(f.length + added);
    out.set(f);
    return out;
  });
  const out: Classification = { ...cl, network: net, plan, perPhase, phaseValues: cl.phaseValues.map((v) => widenValues(v, ins)), storage: withNetCells(cl.storage, ins, 0), componentFlags };
  const memo = witnessMemos.get(cl);
  if (memo) {
    const next = new Map<string, WitnessMemo>();
    for (const [key, w] of memo) {
      const nets = movedNets(w.nets, ins);
      // a check that read a net taken out no longer exists in that shape
      if (nets.length !== w.nets.length) continue;
      let results = w.results;
      for (let k = 0; k < results.length; k++) {
        const r = results[k];
        const moved = r && result(r);
        if (moved !== r) (results === w.results ? (results = results.slice()) : results)[k] = moved;
      }
      // an entry on nets that kept their numbers is shared (most, with the nets numbered by definition)
      next.set(key, nets === w.nets && results === w.results ? w : { nets, mosfets: w.mosfets, results });
    }
    witnessMemos.set(out, next);
  }
  return out;
}

function widenResult(r: NodePhaseResult, oldToNew: Int32Array): NodePhaseResult {
  const g = r.gateAssignment;
  if (!g) return r;
  let k = 0;
  while (k < g.length && oldToNew[g[k]![0]] === g[k]![0]) k++;
  if (k === g.length) return r;
  return { ...r, gateAssignment: g.map(([x, v]) => [oldToNew[x]!, v]) };
}

function renumberResult(r: NodePhaseResult, oldToNew: Int32Array): NodePhaseResult {
  const cutOff = r.cutOff && renumbered(r.cutOff, oldToNew);
  const keepers = r.keepers && renumbered(r.keepers, oldToNew);
  if (cutOff === r.cutOff && keepers === r.keepers) return r;
  const next: NodePhaseResult = { ...r };
  if (cutOff) next.cutOff = cutOff;
  if (keepers) next.keepers = keepers;
  return next;
}

/** Two results of a node read the same (field by field, in the same order, as the findings and estimates read them). */
function sameResult(a: NodePhaseResult | undefined, b: NodePhaseResult | undefined): boolean {
  if (a === b) return true;
  if (!a || !b) return false;
  return samePlain(a, b);
}

function samePlain(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a)) {
    if (!Array.isArray(b) || a.length !== b.length) return false;
    for (let i = 0; i < a.length; i++) if (!samePlain(a[i], b[i])) return false;
    return true;
  }
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (let i = 0; i < ka.length; i++) {
    const k = ka[i]!;
    if (k !== kb[i] || !samePlain((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  }
  return true;
}

/**
 * An input assignment keyed by net names. Made without a prototype: V8 keeps such objects as
 * hash tables from the start, where a plain literal would get a hidden class per distinct set of
 * names (one per instance of a cell), which made building them the slowest part of a pass.
 */
export function newRecord(): Record<string, 0 | 1> {
  return Object.create(null) as Record<string, 0 | 1>;
}

function name(net: SwitchNetwork, n: number): string {
  return net.circuit.nets[n]!.name;
}

/** One group's check in a phase's pass, and the other groups it looked into (undefined: none). */
function checkGroup(pass: PhasePass, comp: Component): Int32Array | undefined {
  for (let i = 0; i < comp.nodes.length; i++) pass.local[comp.nodes[i]!] = i;
  pass.buffers.reads.start();
  classifyComponent(pass, comp);
  return pass.buffers.reads.taken();
}

function classifyComponent(pass: PhasePass, comp: Component): void {
  const { net, values, scratch, states, flags, out, buffers } = pass;
  const free = comp.gates.filter((g) => values[g] === X);
  const nodes = comp.nodes;
  if (free.length > MAX_FREE_GATES) {
    // Too wide to enumerate: only what is certain without the free gates is reported as driven.
    flags[comp.id]! |= WIDE;
    evaluateComponent(net, comp, values, out, scratch);
    for (const node of nodes) if (out[node] === X) states.set(node, { state: 'conditional', exact: false });
    return;
  }
  const gatePos = buffers.gatePos;
  free.forEach((g, i) => (gatePos[g] = i));
  try {
    classifyEnumerated(pass, comp, free);
  } finally {
    for (const g of free) gatePos[g] = -1;
  }
}

/** What every group's check in one phase shares: the network, the phase's values, the results so far, the buffers. */
interface PhasePass {
  net: SwitchNetwork;
  values: Uint8Array;
  /** Net -> its index in the group being checked. */
  local: Int32Array;
  scratch: Scratch;
  states: Map<number, NodePhaseResult>;
  /** By component id: WIDE, UNCHECKED in this phase. */
  flags: Uint8Array;
  /** The phase's values, changed by a witness check and restored after it. */
  work: Uint8Array;
  out: Uint8Array;
  storage: Uint8Array;
  buffers: Buffers;
}

/** Buffers reused across components (grown on demand) so the inner loops allocate nothing. */
interface Buffers {
  gatePos: Int32Array;
  masks: Uint8Array;
  driverId: Int32Array;
  /** Witness checks done in this pass, by the key of what they read (see witnessKey). */
  witnesses: Map<string, WitnessMemo>;
  twins: boolean;
  /** The groups the current check looked into. */
  reads: GroupsRead;
  numbering: KeyNumbering;
}

interface WitnessMemo {
  /** The first group's nets and MOSFETs in key order, and its results per node of the group. */
  nets: number[];
  mosfets: number[];
  results: Array<NodePhaseResult | undefined>;
  /** Filled in on the first carry in a circuit. */
  carry?: CarryPlan;
}

/**
 * Everything a witness check reads, with nets numbered in the order met (the group's nodes
 * first): the group's switches, the traced driving groups' switches, the leaves and their
 * kinds, the feedback set, each net's value in the phase and role, and the group's storage
 * flags. Two groups with equal keys get equal results up to that numbering.
 */
function witnessKey(net: SwitchNetwork, comp: Component, values: Uint8Array, storage: Uint8Array, free: number[], tr: Trace, unchecked: boolean, numbering: KeyNumbering): { key: string; nets: number[]; mosfets: number[] } {
  const nets: number[] = [];
  const mosfets: number[] = [];
  // each key numbers the nets afresh: a stamp per net tells this key's numbers from older ones
  const stamp = ++numbering.current;
  const { at, stamps } = numbering;
  const code = (x: number): number => {
    if (stamps[x] === stamp) return at[x]!;
    stamps[x] = stamp;
    at[x] = nets.length;
    nets.push(x);
    return nets.length - 1;
  };
  for (const x of comp.nodes) code(x);
  const parts: number[] = [unchecked ? 1 : 0, comp.nodes.length];
  const switches = (c: Component) => {
    parts.push(-1, c.nodes.length);
    for (const x of c.nodes) parts.push(code(x));
    for (const si of c.switches) {
      const sw = net.switches[si]!;
      if (c === comp) mosfets.push(mosfetOfSwitch(sw, si));
      parts.push(sw.kind, code(sw.a), code(sw.b), sw.gate < 0 ? -2 : code(sw.gate), sw.kind === SwitchKind.On ? 0 : 1);
    }
  };
  switches(comp);
  parts.push(-3);
  for (const g of free) parts.push(code(g));
  parts.push(-4);
  tr.leaves.forEach((l, i) => parts.push(code(l), tr.leafKind[i] === 'input' ? 0 : tr.leafKind[i] === 'opaque' ? 1 : 2));
  for (const t of tr.order) {
    parts.push(-5, code(t.net));
    switches(t.comp);
  }
  parts.push(-6);
  for (const g of tr.dependsOnState) parts.push(code(g));
  parts.push(-7);
  for (let i = 0; i < nets.length; i++) {
    const x = nets[i]!;
    parts.push(values[x]!, net.role[x]!, net.componentOf[x] === comp.id ? 1 : 0, i < comp.nodes.length ? storage[x]! : 0);
  }
  // one character per part (all are small): much faster to build and hash than decimal text
  let small = parts.length <= 8192;
  for (let i = 0; i < parts.length && small; i++) {
    const x = parts[i]!;
    if (x < -16 || x > 0xffef) small = false;
    else parts[i] = x + 16;
  }
  const key = small ? 'c' + String.fromCharCode(...parts) : 'j' + parts.join(',');
  return { key, nets, mosfets };
}

/** A net's number in the key being written, valid where its stamp is the current one. */
interface KeyNumbering {
  at: Int32Array;
  stamps: Int32Array;
  current: number;
}

/**
 * How a memo's results carry to a twin: each name its records quote, each net and each MOSFET
 * by its position in the memo's lists (the twin's lists have the same positions). Worked out
 * once per memo and circuit (names are the circuit's), not once per twin.
 */
interface CarryPlan {
  circuit: SwitchNetwork['circuit'];
  nameAt: Map<string, number>;
  netAt: Map<number, number>;
  deviceAt: Map<number, number>;
}

function carryPlan(net: SwitchNetwork, seen: WitnessMemo): CarryPlan {
  if (seen.carry?.circuit === net.circuit) return seen.carry;
  const names = net.circuit.nets;
  const nameAt = new Map<string, number>();
  const netAt = new Map<number, number>();
  seen.nets.forEach((x, i) => {
    netAt.set(x, i);
    nameAt.set(names[x]!.name, i);
  });
  const deviceAt = new Map<number, number>();
  seen.mosfets.forEach((d, i) => deviceAt.set(d, i));
  return (seen.carry = { circuit: net.circuit, nameAt, netAt, deviceAt });
}

/** A twin's results from the first group's, with the twin's nets, names and devices put in. */
function carryWitness(net: SwitchNetwork, comp: Component, seen: WitnessMemo, twin: { nets: number[]; mosfets: number[] }, states: Map<number, NodePhaseResult>): void {
  const plan = carryPlan(net, seen);
  const nets = net.circuit.nets;
  const netOf = (x: number) => twin.nets[plan.netAt.get(x)!]!;
  const devOf = (d: number) => twin.mosfets[plan.deviceAt.get(d)!]!;
  const nameOf = (s: string): string => {
    const i = plan.nameAt.get(s);
    return i === undefined ? s : nets[twin.nets[i]!]!.name;
  };
  const record = (r: Record<string, 0 | 1>): Record<string, 0 | 1> => {
    const o = newRecord();
    for (const k in r) o[nameOf(k)] = r[k]!;
    return o;
  };
  seen.results.forEach((r, i) => {
    if (!r) return;
    // field by field in the first result's order, so the two read the same
    const c: Record<string, unknown> = {};
    for (const k of Object.keys(r) as Array<keyof NodePhaseResult>) {
      const v = r[k];
      if (k === 'when' || k === 'contentionWhen') c[k] = record(v as Record<string, 0 | 1>);
      else if (k === 'floatCover') c[k] = (v as Array<Record<string, 0 | 1>>).map(record);
      else if (k === 'cutOff' || k === 'keepers') c[k] = (v as number[]).map(devOf);
      else if (k === 'gateAssignment') c[k] = (v as Array<[number, 0 | 1]>).map(([g, b]) => [netOf(g), b]);
      else c[k] = v;
    }
    states.set(comp.nodes[i]!, c as unknown as NodePhaseResult);
  });
}

function classifyEnumerated(pass: PhasePass, comp: Component, free: number[]): void {
  const { net, values, local, states, flags, storage, buffers } = pass;
  const nodes = comp.nodes;
  const nn = nodes.length;
  const gatePos = buffers.gatePos;
  const assignments = 1 << free.length;
  if (buffers.masks.length < assignments * nn) buffers.masks = new Uint8Array(Math.max(assignments * nn, buffers.masks.length * 2));
  const masks = buffers.masks;
  if (buffers.driverId.length < nn) buffers.driverId = new Int32Array(Math.max(nn, buffers.driverId.length * 2));
  const driverId = buffers.driverId;
  let anyProblem = false;
  let storageProblem = false;
  for (let a = 0; a < assignments; a++) {
    reachOnce(net, comp, gatePos, a, undefined, local, values, masks, a * nn, driverId);
    for (let i = 0; i < nn; i++) {
      const m = masks[a * nn + i]!;
      if (m === 0 || contends(m)) {
        anyProblem = true;
        if (storage[nodes[i]!] || m !== 0) storageProblem = true;
      }
    }
  }
  if (!anyProblem) return;
  if (!storageProblem) {
    // Only internal stack nodes float (a NAND's middle node with both inputs low): harmless by
    // themselves, so the float condition over the gate nets is kept without the deeper check.
    fromGateEnumeration(net, comp, free, masks, states, free.every((g) => net.role[g] !== NetRole.Internal), storage);
    return;
  }
  if (independentGates(net, comp, free, values, MAX_TRACE_DEPTH, buffers.reads)) {
    // The free gates depend on disjoint inputs and not on this component: every assignment of
    // them can happen, so the enumeration over the gates is already exact.
    fromGateEnumeration(net, comp, free, masks, states, true, storage);
    return;
  }

  // Check the candidate witnesses against the driving logic, as deep as the leaf budget allows.
  let tr: Trace | undefined;
  for (let depth = MAX_TRACE_DEPTH; depth >= 0; depth--) {
    const t = trace(net, comp, free, values, depth, buffers.reads);
    if (t.leaves.length <= MAX_LEAVES) {
      tr = t;
      break;
    }
  }
  const wasUnchecked = !tr;
  if (!tr) {
    flags[comp.id]! |= UNCHECKED;
    tr = { leaves: free, leafKind: free.map((g) => (net.componentOf[g] === comp.id ? 'state' : 'opaque')), order: [], dependsOnState: new Set(free.filter((g) => net.componentOf[g] === comp.id)) };
  }
  // Repeated cells: a group wired like one already checked, with the same values around it and
  // the same driving logic, has the same results with its own nets and devices put in.
  const twin = witnessKey(net, comp, values, storage, free, tr, wasUnchecked, buffers.numbering);
  const seen = buffers.twins ? buffers.witnesses.get(twin.key) : undefined;
  if (seen) {
    carryWitness(net, comp, seen, twin, states);
    return;
  }
  witnessCheck(pass, comp, free, tr, masks, gatePos, driverId);
  buffers.witnesses.set(twin.key, { nets: twin.nets, mosfets: twin.mosfets, results: comp.nodes.map((x) => states.get(x)) });
}

/** The witness check of a group whose candidate floats need it (the rest of classifyEnumerated). */
function witnessCheck(pass: PhasePass, comp: Component, free: number[], tr: Trace, masks: Uint8Array, gatePos: Int32Array, driverId: Int32Array): void {
  const { net, values, local, scratch, states, work, out } = pass;
  const nodes = comp.nodes;
  const nn = nodes.length;
  const feedback = new Uint8Array(comp.switches.length);
  comp.switches.forEach((si, k) => {
    const g = net.switches[si]!.gate;
    if (g >= 0 && tr!.dependsOnState.has(g)) feedback[k] = 1;
  });
  const hasFeedback = feedback.some((x) => x === 1);
  const noFbMasks = new Map<number, Uint8Array>();
  const noFb = (a: number): Uint8Array => {
    let m = noFbMasks.get(a);
    if (!m) {
      m = new Uint8Array(nn);
      reachOnce(net, comp, gatePos, a, feedback, local, values, m, 0, driverId);
      noFbMasks.set(a, m);
    }
    return m;
  };

  const leaves = tr.leaves;
  const stateLeafPos = new Map<number, number>(); // node -> leaf position
  leaves.forEach((l, i) => tr!.leafKind[i] === 'state' && stateLeafPos.set(l, i));
  const inputPositions = leaves.map((_, i) => i).filter((i) => tr!.leafKind[i] !== 'state');
  const keyCount = 1 << inputPositions.length;
  // per (node, key): bit0/1 floats holding 0/1, bit2/3 held by feedback at 0/1, bit4 contention
  const flags = new Uint8Array(nn * keyCount);
  const touched = [...leaves, ...tr.order.flatMap((t) => t.comp.nodes)];
  const leafCount = 1 << leaves.length;
  for (let la = 0; la < leafCount; la++) {
    for (let i = 0; i < leaves.length; i++) work[leaves[i]!] = (la >> i) & 1;
    for (const t of tr.order) settle(net, t.comp, work, out, scratch);
    let key = 0;
    inputPositions.forEach((p, k) => (key |= ((la >> p) & 1) << k));
    // The free gates' values; X ones (driven by a floating or contended net) take both values.
    let base = 0;
    const wild: number[] = [];
    free.forEach((g, i) => {
      const v = work[g]!;
      if (v === X) wild.push(i);
      else base |= v << i;
    });
    for (let w = 0; w < 1 << wild.length; w++) {
      // w > 0 only for completions of unknown gates
      let a = base;
      wild.forEach((i, k) => (a |= ((w >> k) & 1) << i));
      // consistency: a node standing for its own stored value must not be driven to the other
      let consistent = true;
      for (const [node, pos] of stateLeafPos) {
        const m = masks[a * nn + local[node]!]! & (B0 | B1);
        const s = (la >> pos) & 1;
        if ((m === B0 && s === 1) || (m === B1 && s === 0)) consistent = false;
      }
      if (!consistent) continue;
      const nf = hasFeedback ? noFb(a) : undefined;
      for (let i = 0; i < nn; i++) {
        const node = nodes[i]!;
        const full = masks[a * nn + i]!;
        const pos = stateLeafPos.get(node);
        const level = pos === undefined ? 3 : 1 << ((la >> pos) & 1);
        const fi = i * keyCount + key;
        if (full === 0) flags[fi]! |= level;
        else if (nf && nf[i] === 0) flags[fi]! |= full & B1 ? 8 : 4;
        // a gate of unknown value (X) may float the node, but is no proof of a fight
        if (w === 0 && contends(nf ? nf[i]! : full)) flags[fi]! |= 16;
      }
    }
  }

  for (const n of touched) work[n] = values[n]!;
  const inputNames = inputPositions.map((p) => name(net, leaves[p]!));
  const cube = (key: number, mask: number): Record<string, 0 | 1> => {
    const r = newRecord();
    inputNames.forEach((n, k) => {
      if ((mask >> k) & 1) r[n] = ((key >> k) & 1) as 0 | 1;
    });
    return r;
  };
  // whether this phase's check was done (each phase is judged on its own)
  const exact = !(pass.flags[comp.id]! & UNCHECKED);
  for (let i = 0; i < nn; i++) {
    const node = nodes[i]!;
    const fl = flags.subarray(i * keyCount, (i + 1) * keyCount);
    const floats = Array.from(fl, (f) => (f & 3) !== 0 && (f & 12) === 0);
    const kept = Array.from(fl, (f) => (f & 3) !== 0 && (f & 12) !== 0);
    const contentionKey = fl.findIndex((f) => (f & 16) !== 0);
    const floatCount = floats.filter(Boolean).length;
    let res: NodePhaseResult | undefined;
    if (floatCount > 0) {
      const cover = minimalCover(floats, inputNames.length).map(([k, m]) => cube(k, m));
      res = { state: floatCount === keyCount ? 'floating' : 'conditional', exact, floatCover: cover };
      if (floatCount !== keyCount) res.when = cover[0]!;
      const fa = firstAssignmentFloating(masks, nn, i, free.length);
      res.gateAssignment = free.map((g, b) => [g, ((fa >> b) & 1) as 0 | 1]);
      res.cutOff = cutOffDevices(net, comp, masks, nn, fa);
    } else if (kept.some(Boolean)) {
      const levels = fl.reduce((acc, f) => acc | f, 0);
      res = { state: 'kept', exact, keptLevel: levels & 8 ? 1 : 0, keepers: comp.switches.filter((_, k) => feedback[k]).map((si) => mosfetOfSwitch(net.switches[si]!, si)).filter((m) => m >= 0) };
      // an assignment with the keeper off: the leakage the keeper has to supply
      const fa = firstAssignmentFloating(masks, nn, i, free.length);
      res.gateAssignment = free.map((g, b) => [g, ((fa >> b) & 1) as 0 | 1]);
    }
    if (contentionKey >= 0) {
      const cw = cube(contentionKey, (1 << inputNames.length) - 1);
      res = res ? { ...res, state: 'contention', contentionWhen: cw } : { state: 'contention', exact, contentionWhen: cw };
    }
    if (res) states.set(node, res);
  }
}

/**
 * Evaluates a component whose own nodes may gate its devices (pass-gate logic, an inverter
 * output feeding a transmission gate in the same group): repeat until its nodes stop changing.
 */
function settle(net: SwitchNetwork, comp: Component, work: Uint8Array, out: Uint8Array, scratch: Scratch): void {
  for (const n of comp.nodes) work[n] = X;
  for (let pass = 0; pass <= comp.nodes.length; pass++) {
    evaluateComponent(net, comp, work, out, scratch);
    let changed = false;
    for (const n of comp.nodes) {
      if (work[n] !== out[n]) {
        work[n] = out[n]!;
        changed = true;
      }
    }
    if (!changed) return;
  }
}

/** States straight from the enumeration over the free gates (no deeper witness check needed). */
function fromGateEnumeration(net: SwitchNetwork, comp: Component, free: number[], masks: Uint8Array, states: Map<number, NodePhaseResult>, exact: boolean, storage: Uint8Array): void {
  const nn = comp.nodes.length;
  const assignments = 1 << free.length;
  const names = free.map((g) => name(net, g));
  const cube = (k: number, m: number) => {
    const r = newRecord();
    names.forEach((n, b) => {
      if ((m >> b) & 1) r[n] = ((k >> b) & 1) as 0 | 1;
    });
    return r;
  };
  for (let i = 0; i < nn; i++) {
    let count = 0;
    let contentionAt = -1;
    for (let a = 0; a < assignments; a++) {
      const m = masks[a * nn + i]!;
      if (m === 0) count++;
      else if (contentionAt < 0 && contends(m)) contentionAt = a;
    }
    if (count === 0 && contentionAt < 0) continue;
    let res: NodePhaseResult | undefined;
    if (count > 0) {
      const table: boolean[] = new Array(assignments);
      for (let a = 0; a < assignments; a++) table[a] = masks[a * nn + i] === 0;
      const cover = minimalCover(table, free.length).map(([k, m]) => cube(k, m));
      res = { state: count === assignments ? 'floating' : 'conditional', exact, floatCover: cover };
      if (count !== assignments) res.when = cover[0]!;
      // the devices that cut it off matter for the findings, which are about storage nodes
      const fa = firstAssignmentFloating(masks, nn, i, free.length);
      res.gateAssignment = free.map((g, b) => [g, ((fa >> b) & 1) as 0 | 1]);
      if (storage[comp.nodes[i]!]) res.cutOff = cutOffDevices(net, comp, masks, nn, fa);
    }
    if (contentionAt >= 0) {
      const cw = cube(contentionAt, assignments - 1);
      res = res ? { ...res, state: 'contention', contentionWhen: cw } : { state: 'contention', exact, contentionWhen: cw };
    }
    if (res) states.set(comp.nodes[i]!, res);
  }
}

/**
 * True when each free gate's logic, traced back `depth` levels, reaches inputs no other free gate
 * reaches and none of the component's own nodes: then the gates are independent variables.
 */
function independentGates(net: SwitchNetwork, comp: Component, free: number[], values: Uint8Array, depth: number, reads: GroupsRead): boolean {
  const owner = new Map<number, number>();
  // an undriven gate has no value at all: leave it to the full check, which treats it as unknown
  if (free.some((g) => net.unreachable[g])) return false;
  for (let gi = 0; gi < free.length; gi++) {
    const seen = new Set<number>();
    const stack: Array<[number, number]> = [[free[gi]!, 0]];
    while (stack.length) {
      const [g, d] = stack.pop()!;
      if (values[g] !== X || seen.has(g)) continue;
      seen.add(g);
      const o = owner.get(g);
      if (o !== undefined && o !== gi) return false;
      owner.set(g, gi);
      if (net.role[g] !== NetRole.Internal) continue;
      const cid = net.componentOf[g]!;
      if (cid === comp.id) return false;
      if (d >= depth) continue;
      reads.add(cid);
      const d2 = net.components[cid]!;
      for (const n of d2.nodes) {
        if (n === g) continue;
        const on = owner.get(n);
        if (on !== undefined && on !== gi) return false;
        owner.set(n, gi);
      }
      for (const h of d2.gates) if (values[h] === X) stack.push([h, d + 1]);
    }
  }
  return true;
}

function firstAssignmentFloating(masks: Uint8Array, nn: number, i: number, freeCount: number): number {
  for (let a = 0; a < 1 << freeCount; a++) if (masks[a * nn + i] === 0) return a;
  return 0;
}

/** The MOSFETs on the boundary of the floating island around `node` that are off under `a`. */
function cutOffDevices(net: SwitchNetwork, comp: Component, masks: Uint8Array, nn: number, a: number): number[] {
  const island = new Set<number>();
  for (let i = 0; i < nn; i++) if (masks[a * nn + i] === 0) island.add(comp.nodes[i]!);
  const out: number[] = [];
  for (const si of comp.switches) {
    const s = net.switches[si]!;
    if (s.kind !== SwitchKind.On && island.has(s.a) !== island.has(s.b)) out.push(si);
  }
  return out;
}

/**
 * A small set of cubes (value key, care mask) covering the true entries of a truth table over
 * `vars` variables: greedy, each cube grown by dropping variables while it stays inside the set.
 */
export function minimalCover(table: boolean[], vars: number): Array<[number, number]> {
  const covered = new Array<boolean>(table.length).fill(false);
  const cubes: Array<[number, number]> = [];
  const full = (1 << vars) - 1;
  const inside = (key: number, mask: number): boolean => {
    const freeBits = full & ~mask;
    // every assignment of the dropped bits must be true
    for (let sub = freeBits; ; sub = (sub - 1) & freeBits) {
      if (!table[(key & mask) | sub]) return false;
      if (sub === 0) break;
    }
    return true;
  };
  for (let k = 0; k < table.length && cubes.length < 16; k++) {
    if (!table[k] || covered[k]) continue;
    let mask = full;
    for (let b = 0; b < vars; b++) {
      const m2 = mask & ~(1 << b);
      if (inside(k, m2)) mask = m2;
    }
    cubes.push([k & mask, mask]);
    const freeBits = full & ~mask;
    for (let sub = freeBits; ; sub = (sub - 1) & freeBits) {
      covered[(k & mask) | sub] = true;
      if (sub === 0) break;
    }
  }
  return cubes;
}

/** Whether a node is left unrestored in a phase (floating, conditional, or floating while contended). */
export function floatsIn(r: NodePhaseResult | undefined): boolean {
  if (!r) return false;
  return r.state === 'floating' || r.state === 'conditional' || r.state === 'undriven' || (r.state === 'contention' && r.floatCover !== undefined);
}

export function nodeFloatWindow(cl: Classification, node: number): number | null {
  const idx = new Map<Phase, number>(cl.plan.phases.map((p, i) => [p, i]));
  return floatWindow(cl.plan, (p) => floatsIn(cl.perPhase[idx.get(p)!]!.get(node)));
}

/** A phase's results with net names replaced (a rename keeps the graph; witnesses quote names). */
export function renameStates(states: Map<number, NodePhaseResult>, names: ReadonlyMap<string, string>): Map<number, NodePhaseResult> {
  const rename = (r: Record<string, 0 | 1> | undefined) => {
    if (!r) return r;
    let changed = false;
    for (const k in r) if (names.has(k)) changed = true;
    if (!changed) return r;
    const out = newRecord();
    for (const k in r) out[names.get(k) ?? k] = r[k]!;
    return out;
  };
  let out: Map<number, NodePhaseResult> | undefined;
  for (const [n, r] of states) {
    const when = rename(r.when);
    const contentionWhen = rename(r.contentionWhen);
    const cover = r.floatCover?.map((c) => rename(c)!);
    const coverChanged = cover !== undefined && cover.some((c, k) => c !== r.floatCover![k]);
    if (when === r.when && contentionWhen === r.contentionWhen && !coverChanged) continue;
    out ??= new Map(states);
    const next: NodePhaseResult = { ...r };
    if (when) next.when = when;
    if (contentionWhen) next.contentionWhen = contentionWhen;
    if (cover) next.floatCover = cover;
    out.set(n, next);
  }
  return out ?? states;
}
