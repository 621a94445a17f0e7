// Electrical estimates for every node that is not always driven: capacitance, leakage at each
// stored level and corner, retention to the droop budget, charge sharing, coupling, critical
// charge and, where one is needed, a sized keeper. Pure: reads the context, returns records.

import { newToOldNets, renumbered, withNetCells, type NetRenumbering } from '../../core/renumber';
import { floatsIn, nodeFloatWindow, type NodePhaseResult } from '../classify';
import { evaluateComponent, newScratch, type Scratch } from '../constants';
import { firstWithSameValues } from '../../phases/phases';
import { mosfetOfSwitch, NetRole, SwitchKind } from '../switchNetwork';
import { carryToTwin, estimateRecord, familyOf, type Family } from './family';
import { stepDue, runToEnd, type Steps } from '../../core/steps';
import { NetKeyedMap, OverlayMap, RenumberedMap } from '../../core/overlay';
import type { ElectricalContext } from './context';
import type { Mosfet } from '../../circuit/circuit';
import { capacitanceSignature, islandCapacitance, type CapacitanceBreakdown } from './capacitance';
import { buildLeakageNetwork, leakageAt, leakageSignature, MAX_SOLVED_GROUPS, type LeakageContributor } from './leakage';
import { retentionTime } from './retention';
import { chargeSharing, type ChargeSharingResult } from './chargeSharing';
import { couplingDroop, type CouplingResult } from './coupling';
import { HOLD_MARGIN, keeperHoldCurrent, keeperRatio, sizeHolder, sizeKeeper, type HolderSuggestion, type KeeperSuggestion } from './keeper';

/** A leaking device of the node's estimate: `pos` indexes the estimate's `devices`. */
export interface NodeContributor {
  pos: number;
  mechanism: LeakageContributor['mechanism'];
  /** Positive when it moves the node away from its stored level. */
  currentA: number;
}

export interface CornerEstimate {
  tempC: number;
  leakageA: number;
  contributors: NodeContributor[];
  retentionS: number | null;
  held: boolean;
}

export interface StoredEstimate {
  level: 0 | 1;
  volts: number;
  phase: string;
  corners: CornerEstimate[];
}

export interface NodeEstimate {
  node: number;
  /**
   * The node's group devices (in switch order) and its gate loads (MOSFET indices). Identical
   * nodes of repeated cells list theirs in the same order, so they share the figures below
   * and differ only here.
   */
  devices: number[];
  storage: boolean;
  capacitance: CapacitanceBreakdown;
  stored: StoredEstimate[];
  /** The level the node is meant to hold (its precharge or kept level), for the findings. */
  primaryLevel: 0 | 1;
  chargeSharing: ChargeSharingResult | undefined;
  coupling: CouplingResult;
  qcritC: number;
  floatWindowS: number | null;
  /** Clock frequency below which leakage exceeds the budget within the float window. */
  minClockHz: number | null;
  /** Longest time the node can float (standby) at the hot corner before the budget is used. */
  maxFloatS: number | null;
  keeper?: { devices: number[]; holdCurrentA: number; hotLeakageA: number; ratio: number; against: number[] };
  suggestedKeeper?: KeeperSuggestion;
  /**
   * For a node that stores data (a tri-state bus, a dynamic latch) rather than one precharged
   * level: a weak inverter pair that holds either level. `feedback` when the node already drives
   * an inverter (a latch: only the weak feedback inverter is new), `holder` otherwise.
   */
  suggestedHolder?: HolderSuggestion;
  notes: string[];
}

/** Results of identical leakage problems (repeated cells), keyed by their structure. */
type LeakCache = Map<string, { corners: Array<{ leakageA: number; retentionS: number | null; held: boolean; contributors: Array<{ pos: number; mechanism: LeakageContributor['mechanism']; currentA: number }> }> }>;

/**
 * `twins: false` estimates every storage node on its own even when an identically wired node of
 * the same structure was estimated already; `shared: false` also takes nothing from another
 * node of the same structure key (for the tests that hold the ways equal).
 */
export function estimateNodes(ctx: ElectricalContext, how: EstimateHow = {}): Map<number, NodeEstimate> {
  return runToEnd(estimateNodeSteps(ctx, how));
}

interface EstimateHow {
  twins?: boolean;
  shared?: boolean;
}

/** `estimateNodes` in slices (see core/steps). */
export function* estimateNodeSteps(ctx: ElectricalContext, how: EstimateHow = {}): Steps<Map<number, NodeEstimate>> {
  const run = new EstimateRun(ctx, how.twins !== false && how.shared !== false, how.shared !== false);
  const out = new Map<number, NodeEstimate>();
  const due = stepDue();
  // only a node some phase lists (not driven there) can have an estimate: the others are not
  // asked for, which was a look-up per net and phase
  const listed = new Uint8Array(ctx.circuit.nets.length);
  for (const results of new Set(ctx.classification.perPhase)) for (const n of results.keys()) listed[n] = 1;
  // every listed node asks each phase for its results: read once in order into arrays by node,
  // as a look-up per node and phase in maps of tens of thousands was a quarter of the pass
  run.readResultsByNode();
  for (let n = 0; n < listed.length; n++) {
    if (!listed[n]) continue;
    if (due()) yield;
    const e = run.estimate(n);
    if (e) out.set(n, e);
  }
  sharedSolves.set(out, run.shareOf);
  return out;
}

/**
 * Which node's solve each estimate copies (itself when it was solved), per estimate map: a later
 * size edit solves each such family once again and copies the rest.
 */
const sharedSolves = new WeakMap<ReadonlyMap<number, NodeEstimate>, Int32Array>();

/**
 * The estimates after an edit that changed only device sizes: the nodes in `affected` (every
 * node whose group, or whose gate loads, hold a changed device), in node order, are estimated
 * again; every other node keeps its previous estimate, which read nothing that changed. Nodes
 * that shared one solve before share one again (their groups changed alike), so each family
 * is solved once; the result equals a full pass (the tests compare them).
 */
export function updateEstimates(ctx: ElectricalContext, previous: ReadonlyMap<number, NodeEstimate>, affected: readonly number[] | 'all'): Map<number, NodeEstimate> {
  const run = new EstimateRun(ctx);
  const every = affected === 'all';
  // the redone nodes laid over the previous map (no node comes or goes: the classification
  // stands), or, when every node is redone (an edit of the supply, the corners or a clock's
  // times), a map of their own
  const changes = new Map<number, NodeEstimate | undefined>();
  const before = sharedSolves.get(previous);
  const shareOf = before ? before.slice() : new Int32Array(ctx.circuit.nets.length).fill(-1);
  const affectedSet = every ? undefined : new Set(affected);
  // the family's first affected node is solved; the others copy it when they are internal nodes
  const solvedFor = new Map<number, { estimate: NodeEstimate; family?: Family }>();
  const unchangedFamilies = new Set<number>();
  // more nodes affected than estimated (an edit of a card every device of a kind reads): walk
  // the estimated ones in node order and skip the rest, instead of asking the map for each
  const walk = every ? previous.keys() : affected.length > previous.size ? [...previous.keys()].filter((n) => affectedSet!.has(n)) : affected;
  for (const n of walk) {
    // the classification did not change, so neither did which nodes have an estimate
    if (!every && walk === affected && !previous.has(n)) continue;
    const family = before && before[n]! >= 0 ? before[n]! : undefined;
    const first = family !== undefined && (every || affectedSet!.has(family)) ? solvedFor.get(family) : undefined;
    if (first && unchangedFamilies.has(family!)) {
      if (every) changes.set(n, previous.get(n));
      continue;
    }
    if (first) {
      // an internal node's figures carry over as they are; a storage node's name its own nets
      const devices = canonicalDevices(ctx, n);
      let twin: NodeEstimate | undefined;
      if (ctx.classification.storage[n]) twin = carryToTwin(ctx, (first.family ??= familyOf(ctx, first.estimate)), n, devices);
      else twin = copyEstimate(first.estimate, n, devices);
      if (twin) {
        changes.set(n, twin);
        shareOf[n] = first.estimate.node;
        continue;
      }
    }
    const e = run.estimate(n);
    if (e) {
      changes.set(n, e);
      shareOf[n] = run.shareOf[n]! >= 0 ? run.shareOf[n]! : n;
      if (family !== undefined && !solvedFor.has(family)) {
        solvedFor.set(family, { estimate: e });
        // the edit did not reach this family's figures: its twins keep theirs as they are
        if (family === n && sameValue(e, previous.get(n))) unchangedFamilies.add(family);
      }
    } else {
      changes.set(n, undefined);
      shareOf[n] = -1;
    }
  }
  const whole = changes.size === previous.size && ![...changes.values()].includes(undefined);
  const out = whole ? (changes as Map<number, NodeEstimate>) : OverlayMap.over(previous, changes);
  sharedSolves.set(out, shareOf);
  return out;
}

/** Structural equality of two estimates (maps, arrays, records; numbers exactly). */
function sameValue(a: unknown, b: unknown): boolean {
  if (Object.is(a, b)) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (a instanceof Map) {
    if (!(b instanceof Map) || a.size !== b.size) return false;
    for (const [k, v] of a) if (!b.has(k) || !sameValue(v, b.get(k))) return false;
    return true;
  }
  if (Array.isArray(a)) return Array.isArray(b) && a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (const k of ka) if (!sameValue((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  return true;
}

/** Estimates with net names replaced (a rename keeps the graph and every figure). */
export function renameEstimates(estimates: Map<number, NodeEstimate>, names: ReadonlyMap<string, string>): Map<number, NodeEstimate> {
  const name = (s: string) => names.get(s) ?? s;
  const inverter = (k: KeeperSuggestion['inverter']) => (k.existingOutput !== undefined && names.has(k.existingOutput) ? { ...k, existingOutput: name(k.existingOutput) } : k);
  const keeper = (k: KeeperSuggestion): KeeperSuggestion => {
    const inv = inverter(k.inverter);
    return inv === k.inverter ? k : { ...k, inverter: inv };
  };
  let out: Map<number, NodeEstimate> | undefined;
  for (const [n, e] of estimates) {
    const cs = e.chargeSharing;
    const csChanged = cs !== undefined && Object.keys(cs.when).some((k) => names.has(k));
    const coupChanged = e.coupling.aggressors.some((a) => names.has(a.net));
    const sk = e.suggestedKeeper && keeper(e.suggestedKeeper);
    const sh = e.suggestedHolder;
    const up = sh && keeper(sh.pullUp);
    const down = sh && keeper(sh.pullDown);
    const holderChanged = sh !== undefined && (up !== sh.pullUp || down !== sh.pullDown || inverter(sh.forward) !== sh.forward);
    if (!csChanged && !coupChanged && sk === e.suggestedKeeper && !holderChanged) continue;
    out ??= new Map(estimates);
    const next = estimateRecord(e, e.node, e.devices);
    if (csChanged) next.chargeSharing = { ...cs!, when: Object.fromEntries(Object.entries(cs!.when).map(([k, v]) => [name(k), v])) };
    if (coupChanged) next.coupling = { droopV: e.coupling.droopV, aggressors: e.coupling.aggressors.map((a) => ({ net: name(a.net), capacitanceF: a.capacitanceF, droopV: a.droopV, via: a.via })) };
    if (sk) next.suggestedKeeper = sk;
    if (sh && holderChanged) next.suggestedHolder = { ...sh, pullUp: up!, pullDown: down!, forward: up!.inverter };
    out.set(n, next);
  }
  // a map of its own even when no figure quotes a renamed net: the findings keep what each node
  // emits with the map, and the renamed analysis's messages quote the new names
  out ??= new Map(estimates);
  const shares = sharedSolves.get(estimates);
  if (shares) sharedSolves.set(out, shares);
  return out;
}

/**
 * Estimates with their device indices under new numbers (devices put in or taken out ahead of
 * them), each node's figures kept; the shared solves carry over (they are by node).
 */
export function renumberEstimates(estimates: ReadonlyMap<number, NodeEstimate>, oldToNew: Int32Array): Map<number, NodeEstimate> {
  const out = RenumberedMap.over(estimates, oldToNew, renumberEstimate);
  const shares = sharedSolves.get(estimates);
  if (shares) sharedSolves.set(out, shares);
  return out;
}

function renumberEstimate(e: NodeEstimate, oldToNew: Int32Array): NodeEstimate {
  const devices = renumbered(e.devices, oldToNew);
  const k = e.keeper;
  const keeperDevices = k && renumbered(k.devices, oldToNew);
  const against = k && renumbered(k.against, oldToNew);
  const aggressorsMove = e.capacitance.aggressors.some((x) => x.device !== undefined && oldToNew[x.device] !== x.device);
  if (devices === e.devices && keeperDevices === k?.devices && against === k?.against && !aggressorsMove) return e;
  const next = estimateRecord(e, e.node, devices);
  if (k) next.keeper = { ...k, devices: keeperDevices!, against: against! };
  if (aggressorsMove) next.capacitance = { ...e.capacitance, aggressors: e.capacitance.aggressors.map((x) => (x.device === undefined ? x : { ...x, device: oldToNew[x.device]! })) };
  return next;
}

/** Estimates under a net insertion (core/renumber): the same figures, their nets under the new numbers. */
export function widenEstimates(estimates: ReadonlyMap<number, NodeEstimate>, ins: NetRenumbering): Map<number, NodeEstimate> {
  const map = ins.oldToNew;
  const out = NetKeyedMap.over(estimates, map, newToOldNets(ins), widenEstimate, ins.removed);
  const shares = sharedSolves.get(estimates);
  if (shares) {
    const moved = withNetCells(shares, ins, -1);
    for (let j = 0; j < moved.length; j++) if (moved[j]! >= 0) moved[j] = map[moved[j]!]!;
    sharedSolves.set(out, moved);
  }
  return out;
}

function widenEstimate(e: NodeEstimate, map: Int32Array): NodeEstimate {
  const next = estimateRecord(e, map[e.node]!, e.devices);
  if (e.capacitance.aggressors.some((a) => map[a.net] !== a.net)) next.capacitance = { ...e.capacitance, aggressors: e.capacitance.aggressors.map((a) => ({ ...a, net: map[a.net]! })) };
  const cs = e.chargeSharing;
  if (cs) next.chargeSharing = { ...cs, gates: new Map([...cs.gates].map(([g, v]) => [map[g]!, v])), joined: cs.joined.map((x) => map[x]!) };
  return next;
}

/** The nodes whose estimates can read a device: those of the groups on its drain, gate and source. */
export function nodesReading(ctx: ElectricalContext, mosfets: Iterable<number>): Set<number> {
  const net = ctx.network;
  const seen = new Uint8Array(net.components.length);
  const mark = new Uint8Array(ctx.circuit.nets.length);
  for (const i of mosfets) {
    const m = ctx.circuit.mosfets[i]!;
    for (const t of [m.d, m.g, m.s]) {
      const comp = net.componentOf[t]!;
      if (comp < 0 || seen[comp]) continue;
      seen[comp] = 1;
      for (const x of net.components[comp]!.nodes) mark[x] = 1;
    }
  }
  // in node order, as a full pass meets them, so the same node seeds each shared solve
  const out = new Set<number>();
  for (let x = 0; x < mark.length; x++) if (mark[x]) out.add(x);
  return out;
}

/**
 * An internal node's estimate from another node of identical structure: its own node and
 * devices, and its own keeper devices found by position (undefined if one is not among them).
 */
function copyEstimate(from: NodeEstimate, n: number, devices: number[]): NodeEstimate | undefined {
  const k = from.keeper;
  if (!k) return estimateRecord(from, n, devices);
  const own = (d: number) => devices[from.devices.indexOf(d)];
  const keeperDevices = k.devices.map(own);
  const against = k.against.map(own);
  if (keeperDevices.some((d) => d === undefined) || against.some((d) => d === undefined)) return undefined;
  const out = estimateRecord(from, n, devices);
  out.keeper = { ...k, devices: keeperDevices as number[], against: against as number[] };
  return out;
}

/** One pass of estimates over a circuit, with the caches that let repeated cells share solves. */
class EstimateRun {
  private readonly cache: LeakCache = new Map();
  private readonly internalCache = new KeyTable<{ estimate: NodeEstimate; position: Map<number, number> }>();
  private readonly storageCache = new KeyTable<{ estimate: NodeEstimate; position: Map<number, number>; family?: Family }>();
  private readonly keys: StructureKeys;
  /** The node's results per phase, while it is estimated. */
  private readonly results: Array<NodePhaseResult | undefined> = [];
  /** For a pass over every node: each phase's results by node (the first of each set of clock values only). */
  private byNode: Array<Array<NodePhaseResult | undefined> | undefined> | undefined;
  private readonly constantEverywhere: (n: number) => boolean;
  /** Node -> the node whose solve its estimate copies (itself when solved; -1 not estimated). */
  readonly shareOf: Int32Array;

  constructor(
    private readonly ctx: ElectricalContext,
    private readonly twins = true,
    private readonly shared = true,
  ) {
    const keys = (this.keys = new StructureKeys(ctx));
    this.shareOf = new Int32Array(ctx.circuit.nets.length).fill(-1);
    this.constantEverywhere = (n: number) => keys.constantEverywhere(n);
  }

  /** Reads every phase's results into arrays by node, for a pass that asks for most nodes. */
  readResultsByNode(): void {
    const first = this.keys.firstPhase;
    const nets = this.ctx.circuit.nets.length;
    this.byNode = this.ctx.classification.perPhase.map((results, i) => {
      if (first[i] !== i) return undefined;
      const list = new Array<NodePhaseResult | undefined>(nets).fill(undefined);
      for (const [n, s] of results) list[n] = s;
      return list;
    });
  }

  /** The node's estimate, or undefined when it never floats (nothing to estimate). */
  estimate(n: number): NodeEstimate | undefined {
    const ctx = this.ctx;
    const cl = ctx.classification;
    const values = cl.phaseValues;
    if (ctx.network.role[n] !== NetRole.Internal || ctx.network.unreachable[n]) return undefined;
    // most nets are driven in every phase: nothing is built for them
    let floating: Array<{ s: NodePhaseResult; i: number }> | undefined;
    // a phase with an earlier one's clock values has its results: asked once
    const first = this.keys.firstPhase;
    const results = this.results;
    const byNode = this.byNode;
    for (let i = 0; i < cl.perPhase.length; i++) {
      const s = (results[i] = first[i] === i ? (byNode ? byNode[i]![n] : cl.perPhase[i]!.get(n)) : results[first[i]!]);
      if (s && (floatsIn(s) || s.state === 'kept')) (floating ??= []).push({ s, i });
    }
    if (!floating) return undefined;
    // Nodes repeat with every instance of a cell: one leakage solve serves all instances whose
    // group has the same devices, sizes and surroundings (checked by structureKey).
    const { key, devices } = this.keys.of(n, floating);
    const written = key.written;
    if (cl.storage[n]) {
      const prior = this.shared ? this.storageCache.get(key) : undefined;
      // an identically wired twin takes the first node's estimate with its own nets put in
      const twin = prior && this.twins ? carryToTwin(ctx, (prior.family ??= familyOf(ctx, prior.estimate)), n, devices) : undefined;
      if (twin) {
        this.shareOf[n] = prior!.estimate.node;
        return twin;
      }
      const remap = (d: number) => devices[prior!.position.get(d)!]!;
      // the figures are positional (see NodeEstimate.devices): they carry over as they are
      const reuse = prior
        ? {
            capacitance: prior.estimate.capacitance,
            stored: prior.estimate.stored,
            notes: prior.estimate.notes,
            keeper: prior.estimate.keeper ? { ...prior.estimate.keeper, devices: prior.estimate.keeper.devices.map(remap), against: [] as number[] } : undefined,
          }
        : undefined;
      const e = estimateNode(ctx, n, devices, floating, values, this.constantEverywhere, this.cache, reuse);
      if (!prior) this.storageCache.set(key, written, { estimate: e, position: new Map(devices.map((d, k) => [d, k])) });
      // partly its own work (not wired like its twin): a family of its own for later edits
      this.shareOf[n] = n;
      return e;
    }
    const hit = this.shared ? this.internalCache.get(key) : undefined;
    const copy = hit && copyEstimate(hit.estimate, n, devices);
    if (copy) {
      this.shareOf[n] = hit!.estimate.node;
      return copy;
    }
    const e = estimateNode(ctx, n, devices, floating, values, this.constantEverywhere, this.cache);
    if (!hit) this.internalCache.set(key, written, { estimate: e, position: new Map(devices.map((d, k) => [d, k])) });
    this.shareOf[n] = n;
    return e;
  }
}

interface Reuse {
  capacitance: CapacitanceBreakdown;
  stored: StoredEstimate[];
  notes: readonly string[];
  keeper: NodeEstimate['keeper'] | undefined;
}

function estimateNode(ctx: ElectricalContext, n: number, devices: number[], floating: Array<{ s: NodePhaseResult; i: number }>, values: Uint8Array[], constantEverywhere: (n: number) => boolean, cache: LeakCache, reuse?: Reuse): NodeEstimate {
  const c = ctx.circuit;
  const cl = ctx.classification;
  const vdd = ctx.vddV;
  const storage = cl.storage[n] === 1;
  const positionOf = new Map(devices.map((d, k) => [d, k]));
  const positional = (list: readonly LeakageContributor[]): NodeContributor[] => list.map((x) => ({ pos: positionOf.get(x.device)!, mechanism: x.mechanism, currentA: x.currentA }));
  // a twin's figures come with the notes they were worked out under (the same wiring gives the same ones)
  const notes: string[] = reuse ? [...reuse.notes] : [];
  const note = (x: string) => notes.includes(x) || notes.push(x);
  const keptState = floating.find((f) => f.s.state === 'kept')?.s;
  // the level a dynamic node is meant to keep: what other phases drive it to, else its keeper's
  const driven = drivenLevel(n, floating, values);
  const drivenTo = driven === 2 ? undefined : driven;
  const primaryLevel: 0 | 1 = keptState?.keptLevel ?? (drivenTo === 0 ? 0 : 1);
  const island = new Set<number>([n]);
  const capAt = (v: number) => islandCapacitance(ctx, island, v).totalF;
  // the aggressors are this node's own (a reused breakdown's name another instance's nets); they
  // feed a storage node's coupling droop and nothing else, so an internal node keeps none (and a
  // copy of its estimate quotes no other node's devices or nets)
  const breakdown = islandCapacitance(ctx, island, primaryLevel * vdd);
  const aggressors = storage ? breakdown.aggressors : [];
  const capacitance = reuse ? { ...reuse.capacitance, aggressors } : aggressors === breakdown.aggressors ? breakdown : { ...breakdown, aggressors };
  const stored: StoredEstimate[] = reuse ? reuse.stored : [];
  const hotIndex = ctx.corners.reduce((b, k, i) => (k.tempK > ctx.corners[b]!.tempK ? i : b), 0);
  let keeperInfo: NodeEstimate['keeper'] = reuse?.keeper;
  if (keeperInfo && reuse) keeperInfo = { ...keeperInfo, against: keeperRatio(ctx, c.mosfets[keeperInfo.devices[0]!]!, n, primaryLevel, ctx.corners[hotIndex]!.tempK).against };
  for (const level of reuse ? [] : ([1, 0] as const)) {
    const vs = level * vdd;
    const hot = ctx.corners[hotIndex]!;
    // the worst floating phase for this level: the largest leakage at the hot corner
    let pick: { i: number; ln: ReturnType<typeof buildLeakageNetwork>; keepers: number[]; assignment: Map<number, 0 | 1> } | undefined;
    let pickLeak = -Infinity;
    for (const { s, i } of floating) {
      const keepers = s.state === 'kept' && s.keptLevel === level ? (s.keepers ?? []) : [];
      const variants = inputVariants(ctx, n, values[i]!, new Map<number, 0 | 1>(s.gateAssignment ?? []), s.when);
      for (const [vi, assignment] of variants.entries()) {
        const ln = buildLeakageNetwork(ctx, n, values[i]!, assignment, level, keepers);
        // a variant that drives the node is not a way for it to float (the witness always is)
        if (vi > 0 && ln.driven) continue;
        // with one candidate there is nothing to compare
        const o = floating.length === 1 && variants.length === 1 ? 0 : leakageAt(ctx, ln, vs, hot.tempK, level, false).outA;
        const leak = level === 1 ? o : -o;
        if (!pick || leak > pickLeak) {
          pickLeak = leak;
          pick = { i, ln, keepers, assignment };
        }
      }
    }
    const { i, ln, keepers, assignment } = pick!;
    if (ln.heldGroups > 0) note(`its leakage network has ${ln.heldGroups + ln.floatingGroups.length} floating groups: the ${MAX_SOLVED_GROUPS} nearest are solved, the other ${ln.heldGroups} held at the worst-case level (a bound, conservative)`);
    const key = `${storage ? 'S' : 'I'}${level}|${leakageSignature(ctx, ln)}|${capacitanceSignature(ctx, island)}`;
    const hit = cache.get(key);
    if (hit) {
      stored.push({
        level,
        volts: vs,
        phase: ctx.plan.phases[i]!.name,
        corners: hit.corners.map((k, ci) => {
          const listed = [...ln.devices, ...ln.keepers, ...ln.gateDevices];
          return { tempC: ctx.corners[ci]!.tempC, leakageA: k.leakageA, retentionS: k.retentionS, held: k.held, contributors: positional(k.contributors.map((x) => ({ device: listed[x.pos]!, mechanism: x.mechanism, currentA: x.currentA }))) };
        }),
      });
      continue;
    }
    const solved: Array<CornerEstimate & { leaking: LeakageContributor[] }> = ctx.corners.map((k) => {
      const at = leakageAt(ctx, ln, vs, k.tempK, level, true);
      const leak = level === 1 ? at.outA : -at.outA;
      let ret: { seconds: number | null; held: boolean };
      if (storage) {
        const harmful = (v: number) => {
          const o = leakageAt(ctx, ln, v, k.tempK, level, false).outA;
          return level === 1 ? o : -o;
        };
        ret = retentionTime(vs, ctx.budgetV, level === 1 ? -1 : 1, capAt, harmful);
      } else {
        // an internal node: first order, C dV / I at the stored level
        ret = leak > 0 ? { seconds: (capAt(vs) * ctx.budgetV) / leak, held: false } : { seconds: null, held: true };
      }
      const leaking = at.contributors.slice(0, 8);
      return { tempC: k.tempC, leakageA: leak, contributors: positional(leaking), leaking, retentionS: ret.seconds, held: ret.held };
    });
    const corners: CornerEstimate[] = solved.map(({ leaking: _, ...k }) => k);
    stored.push({ level, volts: vs, phase: ctx.plan.phases[i]!.name, corners });
    if (!keepers.length) {
      const pos = new Map<number, number>();
      [...ln.devices, ...ln.keepers, ...ln.gateDevices].forEach((d, k) => pos.has(d) || pos.set(d, k));
      cache.set(key, { corners: solved.map((k) => ({ leakageA: k.leakageA, retentionS: k.retentionS, held: k.held, contributors: k.leaking.map((x) => ({ pos: pos.get(x.device)!, mechanism: x.mechanism, currentA: x.currentA })) })) });
    }
    if (keepers.length && !keeperInfo) {
      const km = c.mosfets[keepers[0]!]!;
      const noKeeper = buildLeakageNetwork(ctx, n, values[i]!, assignment, level, []);
      const hotLeak = Math.abs(leakageAt(ctx, noKeeper, vs, hot.tempK, level, false).outA);
      const r = keeperRatio(ctx, km, n, level, hot.tempK);
      keeperInfo = { devices: keepers, holdCurrentA: keeperHoldCurrent(ctx, km, level, ctx.budgetV, hot.tempK), hotLeakageA: hotLeak, ratio: r.ratio, against: r.against };
    }
  }
  const primary = stored.find((s) => s.level === primaryLevel)!;
  const floatWindowS = nodeFloatWindow(cl, n);
  const hotRet = primary.corners[hotIndex]!.retentionS;
  const hyper = ctx.plan.hyperperiodS;
  const minClockHz = hotRet !== null && floatWindowS !== null && Number.isFinite(floatWindowS) && hyper ? floatWindowS / hotRet / hyper : null;
  let sharing: ChargeSharingResult | undefined;
  let coupling: CouplingResult = { droopV: 0, aggressors: [] };
  let suggested: KeeperSuggestion | undefined;
  let holder: HolderSuggestion | undefined;
  if (storage) {
    const fi = floating.find((f) => f.s.state !== 'kept') ?? floating[0]!;
    const others = values.filter((_, i) => i !== fi.i);
    sharing = chargeSharing(ctx, n, fi.i, values[fi.i]!, others, primaryLevel, capacitance.totalF, keptState?.keepers ?? []);
    coupling = couplingDroop(ctx, capacitance, constantEverywhere);
    // all droop mechanisms together over the float window at the hot corner (as the findings add them)
    const overBudget = (hot: CornerEstimate) => {
      const windowS = floatWindowS ?? Infinity;
      const leakDroopV = Number.isFinite(windowS) && hot.leakageA > 0 ? (hot.leakageA * windowS) / capacitance.totalF : hot.leakageA > 0 ? Infinity : 0;
      return leakDroopV + sharing!.droopV + coupling.droopV > ctx.budgetV;
    };
    const needsKeeper = !keptState && (hotRet === null ? false : floatWindowS === null || hotRet < 3 * floatWindowS || overBudget(primary.corners[hotIndex]!));
    // no phase drives it to a constant: it holds data, so one-level keeping is the wrong remedy
    const holdsData = !keptState && drivenTo === undefined;
    if (holdsData) {
      const hotOf = (level: 0 | 1) => stored.find((s) => s.level === level)!.corners[hotIndex]!;
      const shortest = Math.min(...([0, 1] as const).map((l) => hotOf(l).retentionS ?? Infinity));
      const needsHolder = Number.isFinite(shortest) && (floatWindowS === null || shortest < 3 * floatWindowS || overBudget(hotOf(0)) || overBudget(hotOf(1)));
      if (needsHolder) holder = sizeHolder(ctx, n, hotOf(1).leakageA, hotOf(0).leakageA, ctx.corners[hotIndex]!.tempK);
    } else if (needsKeeper) suggested = sizeKeeper(ctx, n, primaryLevel, primary.corners[hotIndex]!.leakageA, ctx.corners[hotIndex]!.tempK);
  }
  if (capacitance.estimatedGeometry) note('drain/source areas not given: estimated as W x 2.5L (common practice)');
  for (const i of ctx.channelOf(n)) for (const x of ctx.model(c.mosfets[i]!).notes) note(x);
  const est: NodeEstimate = {
    node: n,
    devices,
    storage,
    capacitance,
    stored,
    primaryLevel,
    chargeSharing: sharing,
    coupling,
    qcritC: capacitance.totalF * Math.abs(primaryLevel * vdd - vdd / 2),
    floatWindowS,
    minClockHz,
    maxFloatS: hotRet,
    notes,
  };
  if (keeperInfo) est.keeper = keeperInfo;
  if (suggested) est.suggestedKeeper = suggested;
  if (holder) est.suggestedHolder = holder;
  return est;
}

const originIds = new WeakMap<object, number>();
let nextOriginId = 0;
function originId(o: object): number {
  let id = originIds.get(o);
  if (id === undefined) originIds.set(o, (id = nextOriginId++));
  return id;
}

/**
 * A witness's inputs (`when`, by net name) as net numbers and values, pairwise. Looked up each
 * time: a record a pass reads is nearly always new to it, and keeping each one's numbers (a
 * WeakMap entry per record) cost more than the look-ups.
 */
function whenNets(c: ElectricalContext['circuit'], when: Record<string, 0 | 1>): number[] {
  const list: number[] = [];
  for (const name in when) {
    const id = c.netByName.get(name);
    if (id !== undefined) list.push(id, when[name]!);
  }
  return list;
}

/**
 * A key equal for two nodes whose estimates are necessarily equal: the same defining lines,
 * sizes and models for every device of the node's group and every gate on the node, the same
 * position of the node in the group, and the same phase values and witness gate values around
 * it. Also gives the group's devices in a canonical order, to carry contributor indices over.
 * The key is a list of small integers (KeyWriter), with the numbers and devices it quotes
 * numbered by the pass (`ids`): every floating node of the circuit gets one, so it is kept
 * cheap. One per pass: its buffers are reused from node to node (marks stamped with the node's
 * turn, so nothing is cleared between nodes).
 */
class StructureKeys {
  private readonly key = new KeyWriter();
  private readonly ids: KeyNumbers;
  /** For each phase, the first with its clock values (so with its results and values). */
  readonly firstPhase: number[];
  /** Net -> its turn's stamp when it is in the node's group (`localAt`: its position there). */
  private readonly localTurn: Int32Array;
  private readonly localAt: Int32Array;
  /** Net -> its turn's stamp when met outside the group (`outsideAt`: the order it was met in). */
  private readonly outsideTurn: Int32Array;
  private readonly outsideAt: Int32Array;
  private outsideCount = 0;
  /** Group id -> its turn's stamp once listed among the node's driving groups. */
  private readonly driverTurn: Int32Array;
  /** Net -> 1 a constant in every phase, 0 not, -1 not worked out yet. */
  private readonly constant: Int8Array;
  /** Net -> the number of a rail's volts (`ids.number`); -2 not a rail, -1 not worked out yet. */
  private readonly railNumber: Int32Array;
  /**
   * Per floating phase written (by its place in `distinct`): net -> its turn's stamp when the
   * phase's witness sets it (`assignedValue`: the value), so a terminal is not looked up in it.
   */
  private readonly assignedTurn: Int32Array[] = [];
  private readonly assignedValue: Uint8Array[] = [];
  private turn = 0;
  private n = -1;
  private distinct: ReadonlyArray<{ s: NodePhaseResult; i: number }> = [];
  private values: readonly Uint8Array[] = [];

  constructor(private readonly ctx: ElectricalContext) {
    const nets = ctx.circuit.nets.length;
    this.ids = new KeyNumbers(ctx.circuit.mosfets);
    this.firstPhase = firstWithSameValues(ctx.plan);
    this.localTurn = new Int32Array(nets);
    this.localAt = new Int32Array(nets);
    this.outsideTurn = new Int32Array(nets);
    this.outsideAt = new Int32Array(nets);
    this.driverTurn = new Int32Array(ctx.network.components.length);
    this.constant = new Int8Array(nets).fill(-1);
    this.railNumber = new Int32Array(nets).fill(-1);
  }

  /** Whether the net holds one constant value in every phase (a rail, or a tie-off). */
  constantEverywhere(x: number): boolean {
    let k = this.constant[x]!;
    if (k < 0) {
      const values = this.ctx.classification.phaseValues;
      this.constant[x] = k = Number.isFinite(this.ctx.railVolts[x]!) || values.every((v) => v[x] !== 2 && v[x] === values[0]![x]) ? 1 : 0;
    }
    return k === 1;
  }

  /** The node's key (valid until the next node's is written) and its devices in canonical order. */
  of(n: number, floating: Array<{ s: NodePhaseResult; i: number }>): { key: KeyWriter; devices: number[] } {
    const ctx = this.ctx;
    const values = ctx.classification.phaseValues;
    const net = ctx.network;
    const c = ctx.circuit;
    const key = this.key.reset();
    const turn = ++this.turn;
    const comp = net.components[net.componentOf[n]!]!;
    const nodes = comp.nodes;
    for (let k = 0; k < nodes.length; k++) {
      this.localTurn[nodes[k]!] = turn;
      this.localAt[nodes[k]!] = k;
    }
    this.n = n;
    this.outsideCount = 0;
    this.values = values;
    // a floating phase with an earlier one's clock values has its results and values (the phase
    // indices, written below, say which): only the first is written out
    this.distinct = floating.length > 1 ? floating.filter((f) => this.firstPhase[f.i] === f.i) : floating;
    for (let f = 0; f < this.distinct.length; f++) {
      if (f === this.assignedTurn.length) {
        this.assignedTurn.push(new Int32Array(c.nets.length));
        this.assignedValue.push(new Uint8Array(c.nets.length));
      }
      const stamp = this.assignedTurn[f]!;
      const value = this.assignedValue[f]!;
      const assignment = this.distinct[f]!.s.gateAssignment;
      for (let k = 0; assignment && k < assignment.length; k++) {
        const g = assignment[k]![0];
        stamp[g] = turn;
        value[g] = assignment[k]![1];
      }
    }
    key.int(floating.length);
    for (const f of floating) key.int(f.i).int(stateId(f.s.state));
    // the level the other phases drive it to (its primary level, and whether it holds data)
    key.int(drivenLevel(n, floating, values));
    key.int(originId(c.nets[n]!.origin));
    const devices = canonicalDevices(ctx, n);
    for (const si of comp.switches) {
      const s = net.switches[si]!;
      if (s.kind === SwitchKind.On) {
        key.tag(6);
        this.code(s.a);
        this.code(s.b);
        continue;
      }
      this.device(7, si);
    }
    // the gate loads of every node of the group, not only this one's: the capacitance of the
    // nodes it may be joined to (charge sharing) counts theirs
    for (const x of nodes) {
      for (const i of ctx.gateOf(x)) this.device(8, i);
    }
    for (const x of nodes) {
      for (const k of ctx.capsOf[x]!) {
        const cap = c.capacitors[k]!;
        key.tag(9).int(this.ids.number(cap.capacitanceF));
        this.code(cap.a);
        this.code(cap.b);
      }
    }
    // what the input variants read (inputVariants): the inputs each float needs, and the groups
    // driving the gates that come from logic, wired as they are
    for (const f of this.distinct) {
      const when = f.s.when;
      if (!when) {
        key.tag(10).int(0);
        continue;
      }
      const needed: number[] = [];
      const inputs = whenNets(c, when);
      for (let k = 0; k < inputs.length; k += 2) {
        const id = inputs[k]!;
        if (this.outsideTurn[id] === turn) needed.push(this.outsideAt[id]! * 2 + inputs[k + 1]!);
      }
      // a handful at most: sorted in place without a comparator call per pair
      for (let k = 1; k < needed.length; k++) {
        const x = needed[k]!;
        let j = k - 1;
        for (; j >= 0 && needed[j]! > x; j--) needed[j + 1] = needed[j]!;
        needed[j + 1] = x;
      }
      key.tag(10).int(needed.length);
      for (const x of needed) key.int(x);
    }
    // the driving groups in the order their first gate meets them (as a set would list them)
    const drivers: number[] = [];
    for (const si of comp.switches) {
      const g = net.switches[si]!.gate;
      if (g < 0 || net.role[g] !== NetRole.Internal) continue;
      const id = net.componentOf[g]!;
      if (id === comp.id || this.driverTurn[id] === turn) continue;
      this.driverTurn[id] = turn;
      drivers.push(id);
    }
    for (const id of drivers) {
      for (const si of net.components[id]!.switches) {
        const sw = net.switches[si]!;
        key.tag(11).int(sw.kind);
        if (sw.gate < 0) key.tag(0);
        else this.code(sw.gate);
        this.code(sw.a);
        this.code(sw.b);
      }
    }
    return { key, devices };
  }

  /** A MOSFET of the group (`tag` 7) or a gate load (8): its line and sizes, then its four nets. */
  private device(tag: number, i: number): void {
    const m = this.ctx.circuit.mosfets[i]!;
    this.key.tag(tag).int(this.ids.device(i));
    this.code(m.d);
    this.code(m.g);
    this.code(m.s);
    this.code(m.b);
  }

  /** One terminal's net: its place in the group, a rail's volts, or an outside net as first met. */
  private code(x: number): void {
    const key = this.key;
    const turn = this.turn;
    if (this.localTurn[x] === turn) {
      if (x === this.n) key.tag(1);
      else key.tag(2).int(this.localAt[x]!);
      return;
    }
    let rail = this.railNumber[x]!;
    if (rail === -1) this.railNumber[x] = rail = Number.isFinite(this.ctx.railVolts[x]!) ? this.ids.number(this.ctx.railVolts[x]!) : -2;
    if (rail >= 0) {
      key.tag(3).int(rail);
      return;
    }
    if (this.outsideTurn[x] === turn) {
      key.tag(4).int(this.outsideAt[x]!);
      return;
    }
    // whether it is a constant in every phase (a coupling aggressor only when it is not)
    key.tag(5).int(this.outsideCount).int(this.ctx.network.role[x]!).int(this.constantEverywhere(x) ? 1 : 0);
    this.outsideTurn[x] = turn;
    this.outsideAt[x] = this.outsideCount++;
    const distinct = this.distinct;
    for (let f = 0; f < distinct.length; f++) key.int(this.assignedTurn[f]![x] === turn ? this.assignedValue[f]![x]! : this.values[distinct[f]!.i]![x]!);
  }
}

/** The node's value in the first phase where it does not float and is not unknown; 2 for none. */
function drivenLevel(n: number, floating: ReadonlyArray<{ i: number }>, values: readonly Uint8Array[]): 0 | 1 | 2 {
  for (let i = 0; i < values.length; i++) {
    const v = values[i]![n]!;
    if (v !== 2 && !floating.some((f) => f.i === i)) return v as 0 | 1;
  }
  return 2;
}

/**
 * A key as 16-bit codes, one per 15 bits of each non-negative integer (the high bit marks a
 * continuation): equal code lists are equal lists of integers. The codes are hashed as they are
 * written, and a KeyTable compares them in place, so no text is made per node (making one and
 * hashing it was a tenth of an estimate pass).
 */
export class KeyWriter {
  codes = new Uint16Array(1024);
  length = 0;
  hash = 0;
  /** Counts the keys written, so a table can tell a finished key from one being written over. */
  written = 0;
  reset(): this {
    this.length = 0;
    this.hash = 0x811c9dc5;
    this.written++;
    return this;
  }
  tag(t: number): this {
    this.push(t);
    return this;
  }
  int(v: number): this {
    while (v >= 0x8000) {
      this.push((v & 0x7fff) | 0x8000);
      v = Math.floor(v / 0x8000);
    }
    this.push(v);
    return this;
  }
  private push(code: number): void {
    if (this.length === this.codes.length) {
      const wider = new Uint16Array(this.codes.length * 2);
      wider.set(this.codes);
      this.codes = wider;
    }
    this.codes[this.length++] = code;
    // FNV-1a over the codes
    this.hash = Math.imul(this.hash ^ code, 0x01000193);
  }
}

/** Values by key (a KeyWriter's codes): by the codes' hash, then the codes compared. */
export class KeyTable<V> {
  private readonly buckets = new Map<number, Array<{ codes: Uint16Array; value: V }>>();
  get(key: KeyWriter): V | undefined {
    const bucket = this.buckets.get(key.hash);
    if (!bucket) return undefined;
    for (const e of bucket) if (sameCodes(e.codes, key)) return e.value;
    return undefined;
  }
  /** Stores a copy of the key's codes; the key must be the one last written (not reset since). */
  set(key: KeyWriter, written: number, value: V): void {
    if (key.written !== written) throw new Error('KeyTable.set: the key was written over');
    const entry = { codes: key.codes.slice(0, key.length), value };
    const bucket = this.buckets.get(key.hash);
    if (bucket) bucket.push(entry);
    else this.buckets.set(key.hash, [entry]);
  }
}

function sameCodes(codes: Uint16Array, key: KeyWriter): boolean {
  if (codes.length !== key.length) return false;
  const k = key.codes;
  for (let i = 0; i < codes.length; i++) if (codes[i] !== k[i]) return false;
  return true;
}

const stateIds = new Map<string, number>();
function stateId(state: string): number {
  let id = stateIds.get(state);
  if (id === undefined) stateIds.set(state, (id = stateIds.size));
  return id;
}

/**
 * Small integers for what one pass's keys quote: numbers (volts, farads) and each MOSFET's
 * defining line, sizes, multiplier, fingers, areas and perimeters. Valid within the pass (keys
 * are compared only there), so nothing outlives it. The devices of one line nearly always have
 * one set of values: each line's first device is compared field by field, and only a device
 * with other values is written out.
 */
class KeyNumbers {
  private readonly devices: Int32Array;
  private readonly numbers = new Map<number | undefined, number>();
  private readonly tuples = new Map<string, number>();
  private readonly firstOfLine = new Map<object, { m: Mosfet; id: number }>();
  constructor(private readonly mosfets: readonly Mosfet[]) {
    this.devices = new Int32Array(mosfets.length).fill(-1);
  }
  number(v: number | undefined): number {
    let id = this.numbers.get(v);
    if (id === undefined) this.numbers.set(v, (id = this.numbers.size));
    return id;
  }
  device(i: number): number {
    let id = this.devices[i]!;
    if (id < 0) this.devices[i] = id = this.deviceOf(this.mosfets[i]!);
    return id;
  }
  private deviceOf(m: Mosfet): number {
    const first = this.firstOfLine.get(m.origin);
    if (first && sameValues(first.m, m)) return first.id;
    const tuple = [m.wM, m.lM, m.m, m.nf, m.adM2, m.pdM, m.asM2, m.psM].map((v) => this.number(v)).join(',');
    const at = `${originId(m.origin)}:${tuple}`;
    let id = this.tuples.get(at);
    if (id === undefined) this.tuples.set(at, (id = this.tuples.size));
    if (!first) this.firstOfLine.set(m.origin, { m, id });
    return id;
  }
}

/** The values a key quotes, compared as KeyNumbers.number tells them apart (NaN equal to NaN). */
function sameValues(a: Mosfet, b: Mosfet): boolean {
  const eq = (x: number | undefined, y: number | undefined) => x === y || (x !== x && y !== y);
  return eq(a.wM, b.wM) && eq(a.lM, b.lM) && eq(a.m, b.m) && eq(a.nf, b.nf) && eq(a.adM2, b.adM2) && eq(a.pdM, b.pdM) && eq(a.asM2, b.asM2) && eq(a.psM, b.psM);
}

/** The devices of a node's group (in switch order) and those its gate loads, as structureKey lists them. */
function canonicalDevices(ctx: ElectricalContext, n: number): number[] {
  const net = ctx.network;
  const comp = net.components[net.componentOf[n]!]!;
  const devices: number[] = [];
  for (const si of comp.switches) {
    const m = mosfetOfSwitch(net.switches[si]!, si);
    if (m >= 0) devices.push(m);
  }
  for (const i of ctx.gateOf(n)) devices.push(i);
  return devices;
}

export { HOLD_MARGIN };

/** Free inputs enumerated for the worst-case leakage (2^3 assignments at most per phase). */
const MAX_FREE_INPUTS = 3;

/** Working buffers for input variants, one set per circuit (restored after every use). */
const variantBuffers = new WeakMap<ElectricalContext, { work: Uint8Array; out: Uint8Array; scratch: Scratch }>();

/**
 * Gate assignments under which the node floats, for the worst-case leakage (DOMAIN 5): the
 * witness's inputs, then those with each combination of the free inputs (unknown in the phase,
 * not fixed by the witness) that gate the node's channel-connected component. The internal gate
 * nets of the component (an enable's inverted copy) are re-evaluated from their own driving
 * stage under each assignment, so no variant pairs a net with an impossible copy of it; where
 * that stage does not settle, the witness's value stands.
 */
function inputVariants(ctx: ElectricalContext, node: number, phaseValues: Uint8Array, witness: Map<number, 0 | 1>, when: Record<string, 0 | 1> | undefined): Array<Map<number, 0 | 1>> {
  const net = ctx.network;
  // the inputs the float needs (its minimal witness); the witness's other values were one choice
  const needed = new Map<number, 0 | 1>();
  for (const [name, v] of Object.entries(when ?? {})) {
    const id = ctx.circuit.netByName.get(name);
    if (id !== undefined && net.role[id] === NetRole.Input) needed.set(id, v);
  }
  const comp = net.components[net.componentOf[node]!]!;
  const free: number[] = [];
  const internalGates: number[] = [];
  for (const si of comp.switches) {
    const g = net.switches[si]!.gate;
    if (g < 0 || phaseValues[g] !== 2) continue;
    if (net.role[g] === NetRole.Internal) {
      if (net.componentOf[g] !== comp.id && !internalGates.includes(g)) internalGates.push(g);
      continue;
    }
    if (net.role[g] !== NetRole.Input || needed.has(g) || free.includes(g)) continue;
    free.push(g);
    if (free.length > MAX_FREE_INPUTS) return [witness];
  }
  if (free.length === 0 && internalGates.length === 0) return [witness];
  let buf = variantBuffers.get(ctx);
  if (!buf) variantBuffers.set(ctx, (buf = { work: new Uint8Array(net.role.length).fill(2), out: new Uint8Array(net.role.length), scratch: newScratch(net.role.length) }));
  const { work, out, scratch } = buf;
  const consistent = (inputs: Map<number, 0 | 1>): Map<number, 0 | 1> => {
    const touched: number[] = [];
    const set = (k: number, v: number) => {
      touched.push(k);
      work[k] = v;
    };
    // the phase's known values on the driving stages' gates, then the inputs of this variant
    const a = new Map(witness);
    for (const [k, v] of inputs) a.set(k, v);
    for (const g of internalGates) {
      const driver = net.components[net.componentOf[g]!]!;
      for (const si of driver.switches) {
        const sw = net.switches[si]!;
        for (const t of [sw.gate, sw.a, sw.b]) if (t >= 0 && net.role[t] !== NetRole.Internal) set(t, a.get(t) ?? (net.role[t] === NetRole.Rail0 ? 0 : net.role[t] === NetRole.Rail1 ? 1 : phaseValues[t]!));
      }
      evaluateComponent(net, driver, work, out, scratch);
      if (out[g] === 0 || out[g] === 1) a.set(g, out[g] as 0 | 1);
    }
    for (const k of touched) work[k] = 2;
    return a;
  };
  const inputsOf = new Map([...witness].filter(([g]) => net.role[g] === NetRole.Input && (needed.size === 0 || needed.has(g) || !free.includes(g))));
  const variants = [witness, consistent(inputsOf)];
  if (free.length === 0) return variants;
  for (let bits = 0; bits < 1 << free.length; bits++) {
    const inputs = new Map(inputsOf);
    free.forEach((g, k) => inputs.set(g, ((bits >> k) & 1) as 0 | 1));
    variants.push(consistent(inputs));
  }
  return variants;
}

/**
 * The nodes whose estimates can read one of the `seeds` nets: those of a seed's group and of the
 * groups joined to it by a gate or a capacitor. A node's estimate reads its own group, the groups
 * driving its gates (evaluated from their inputs' values, which are seeds when they change), the
 * devices its nodes gate, and the nets coupled to it.
 */
export function nodesAround(ctx: ElectricalContext, seeds: Iterable<number>): number[] {
  const net = ctx.network;
  const reached = new Uint8Array(net.components.length);
  let frontier: number[] = [];
  const add = (x: number, into: number[]) => {
    const id = net.componentOf[x]!;
    if (id >= 0 && !reached[id]) (reached[id] = 1), into.push(id);
  };
  for (const x of seeds) add(x, frontier);
  for (let step = 0; step < 1; step++) {
    const next: number[] = [];
    for (const id of frontier) {
      const comp = net.components[id]!;
      for (const g of comp.gates) add(g, next);
      for (const x of comp.nodes) {
        for (const k of net.gatedComponents[x]!) if (!reached[k]) (reached[k] = 1), next.push(k);
        for (const ci of ctx.capsOf[x]!) {
          const cap = ctx.circuit.capacitors[ci]!;
          add(cap.a === x ? cap.b : cap.a, next);
        }
      }
    }
    frontier = next;
  }
  const out: number[] = [];
  for (let x = 0; x < net.componentOf.length; x++) if (net.componentOf[x]! >= 0 && reached[net.componentOf[x]!]) out.push(x);
  return out;
}

/**
 * The estimates after an edit that changed connections: the `affected` nodes (node order) are
 * estimated afresh, each on its own (instances of a cell may now be wired differently), and
 * every other node keeps its estimate; the map stays in node order, as a full pass builds it.
 * A family whose first node was re-estimated is led by its first kept node from now on.
 */
export function reestimate(ctx: ElectricalContext, previous: ReadonlyMap<number, NodeEstimate>, affected: readonly number[]): Map<number, NodeEstimate> {
  const run = new EstimateRun(ctx);
  const netCount = ctx.circuit.nets.length;
  const redone = new Uint8Array(netCount);
  const fresh: Array<NodeEstimate | undefined> = [];
  let added = false;
  for (const n of affected) {
    redone[n] = 1;
    const e = run.estimate(n);
    fresh.push(e);
    if (e && !previous.has(n)) added = true;
  }
  // replacing and deleting keep every other node where it was, and new nodes are merged in by
  // node order when the map is walked: still in node order
  const changes = new Map<number, NodeEstimate | undefined>();
  affected.forEach((n, k) => (previous.has(n) || fresh[k]) && changes.set(n, fresh[k]));
  const out = added ? OverlayMap.mergeInOrder(previous, changes) : OverlayMap.over(previous, changes);
  const before = sharedSolves.get(previous);
  const shareOf = before ? before.slice() : new Int32Array(netCount).fill(-1);
  // a kept node that copied a re-estimated one follows the first kept node of its family
  const leader = new Map<number, number>();
  for (let n = 0; n < netCount; n++) {
    if (redone[n]) {
      shareOf[n] = out.has(n) ? (run.shareOf[n]! >= 0 ? run.shareOf[n]! : n) : -1;
      continue;
    }
    const head = shareOf[n]!;
    if (head < 0 || !redone[head]) continue;
    let l = leader.get(head);
    if (l === undefined) leader.set(head, (l = n));
    shareOf[n] = l;
  }
  sharedSolves.set(out, shareOf);
  return out;
}
