// Leakage of a floating node (DOMAIN 5). Under the phase's constants and the witness's gate
// values, the devices of the node's channel-connected group are on or off; the node's island
// (what conducting devices join it to) sits at the stored voltage; groups driven from a rail or
// input sit at that voltage (an input at the level that hurts most); groups that float between
// off devices (the middle of a stack) take the voltage at which their currents balance, which
// is what makes a stack of off devices leak far less than one. The result sums, for every
// device with a terminal on the island, the subthreshold current through it and the reverse
// current of its junctions, signed so that a positive total moves the node away from its level.

import type { Mosfet } from '../../circuit/circuit';
import { siliconBandGapEv, thermalVoltage } from '../devices/physics';
import type { MosModel } from '../devices/mosModel';
import { NetRole, SwitchKind } from '../switchNetwork';
import type { ElectricalContext } from './context';
import { diffusionGeometry } from './context';

export interface LeakageContributor {
  device: number;
  mechanism: 'subthreshold' | 'junction' | 'gate' | 'keeper';
  /** Positive when it moves the node away from its stored level. */
  currentA: number;
}

/** The node groups of one phase and assignment, ready to be solved at any island voltage. */
export interface LeakageNetwork {
  island: Set<number>;
  /** Floating groups between off devices, whose voltages are solved. */
  floatingGroups: number[][];
  /** Net -> group index (island -1, fixed -2, floating >= 0). */
  groupOf: Map<number, number>;
  /** Net voltages of driven nets (rails, inputs at their worst level, driven groups). */
  fixedVolts: Map<number, number>;
  /** Off devices with a terminal on the island or a floating group. */
  devices: number[];
  /** Devices held on only by feedback (keepers), which supply current rather than leak. */
  keepers: number[];
  /** Devices whose gate is on the island and whose model tunnels (gate leakage). */
  gateDevices: number[];
  /** An on channel joins the island to a driven net: the node does not float under these inputs. */
  driven: boolean;
  /** Floating groups beyond the solve's bound, held at the worst-case level instead (0 in any usual cell). */
  heldGroups: number;
}

/**
 * The floating groups whose voltages are solved, nearest the island first (by off devices
 * between them). Cells have a few (a stack's inner nodes; two at most in the samples and
 * fixtures); a net wired across a whole block (a data net on a cell's supply port) made
 * networks of 60-80, each solve reading all of them for every node, which took a 2k-transistor
 * netlist about 20 s. Farther ones are held at the worst-case level, a conservative bound.
 */
export const MAX_SOLVED_GROUPS = 8;

function gateVolts(ctx: ElectricalContext, net: number, phaseValues: Uint8Array, assignment: Map<number, 0 | 1>): number | undefined {
  const rail = ctx.railVolts[net]!;
  if (Number.isFinite(rail)) return rail;
  const a = assignment.get(net);
  if (a !== undefined) return a * ctx.vddV;
  const v = phaseValues[net]!;
  return v === 2 ? undefined : v * ctx.vddV;
}

/**
 * Builds the leakage network of node `node` for a phase (its propagated values) and an
 * assignment of the group's free gates. `storedLevel` decides the worst-case level of inputs.
 */
export function buildLeakageNetwork(ctx: ElectricalContext, node: number, phaseValues: Uint8Array, assignment: Map<number, 0 | 1>, storedLevel: 0 | 1, keepers: number[] = []): LeakageNetwork {
  const net = ctx.network;
  const c = ctx.circuit;
  const comp = net.components[net.componentOf[node]!]!;
  const keeperSet = new Set(keepers);
  // which switches conduct
  const on = (si: number): boolean => {
    const s = net.switches[si]!;
    if (s.kind === SwitchKind.On) return true;
    if (keeperSet.has(si)) return false;
    const gv = gateVolts(ctx, s.gate, phaseValues, assignment);
    if (gv === undefined) return false;
    const high = gv > ctx.vddV / 2;
    return s.kind === SwitchKind.N ? high : !high;
  };
  const parent = new Map<number, number>();
  const find = (x: number): number => {
    let r = x;
    while (parent.has(r) && parent.get(r) !== r) r = parent.get(r)!;
    return r;
  };
  for (const n of comp.nodes) parent.set(n, n);
  const offDevices: number[] = [];
  const strongOf = new Map<number, number[]>();
  for (const si of comp.switches) {
    const s = net.switches[si]!;
    const aInt = net.role[s.a] === NetRole.Internal;
    const bInt = net.role[s.b] === NetRole.Internal;
    if (on(si)) {
      if (aInt && bInt) parent.set(find(s.a), find(s.b));
      else if (aInt) (strongOf.get(s.a) ?? strongOf.set(s.a, []).get(s.a)!).push(s.b);
      else if (bInt) (strongOf.get(s.b) ?? strongOf.set(s.b, []).get(s.b)!).push(s.a);
    } else if (s.kind !== SwitchKind.On) offDevices.push(si);
  }
  const worstInput = storedLevel === 1 ? 0 : ctx.vddV;
  const strongVolts = (n: number): number => {
    const r = ctx.railVolts[n]!;
    if (Number.isFinite(r)) return r;
    const v = phaseValues[n]!;
    return v === 2 ? worstInput : v * ctx.vddV;
  };
  const groups = new Map<number, number[]>();
  for (const n of comp.nodes) {
    const r = find(n);
    (groups.get(r) ?? groups.set(r, []).get(r)!).push(n);
  }
  const islandRoot = find(node);
  const island = new Set(groups.get(islandRoot)!);
  const groupOf = new Map<number, number>();
  const fixedVolts = new Map<number, number>();
  const floatingGroups: number[][] = [];
  for (const [root, members] of groups) {
    if (root === islandRoot) {
      for (const m of members) groupOf.set(m, -1);
      continue;
    }
    const drivers = members.flatMap((m) => strongOf.get(m) ?? []);
    if (drivers.length > 0) {
      const v = drivers.map(strongVolts).reduce((a, b) => a + b, 0) / drivers.length;
      for (const m of members) {
        groupOf.set(m, -2);
        fixedVolts.set(m, v);
      }
    } else {
      for (const m of members) groupOf.set(m, floatingGroups.length);
      floatingGroups.push(members);
    }
  }
  let heldGroups = 0;
  if (floatingGroups.length > MAX_SOLVED_GROUPS) {
    // hops from the island over off devices, group to group; the nearest are kept, in their order
    const hops = new Map<number, number>([[-1, 0]]);
    const queue = [-1];
    const membersOf = (g: number) => (g === -1 ? [...island] : floatingGroups[g]!);
    const neighbours = new Map<number, number[]>();
    for (const si of offDevices) {
      const sw = net.switches[si]!;
      for (const [x, y] of [[sw.a, sw.b], [sw.b, sw.a]] as const) {
        const list = neighbours.get(x) ?? neighbours.set(x, []).get(x)!;
        list.push(y);
      }
    }
    for (let q = 0; q < queue.length; q++) {
      const g = queue[q]!;
      for (const n of membersOf(g)) {
        for (const y of neighbours.get(n) ?? []) {
          const h = groupOf.get(y);
          if (h === undefined || h === -2 || hops.has(h)) continue;
          hops.set(h, hops.get(g)! + 1);
          queue.push(h);
        }
      }
    }
    const order = floatingGroups.map((_, k) => k).sort((a, b) => (hops.get(a) ?? Infinity) - (hops.get(b) ?? Infinity) || a - b);
    const kept = new Set(order.slice(0, MAX_SOLVED_GROUPS));
    const solved: number[][] = [];
    floatingGroups.forEach((members, k) => {
      if (kept.has(k)) {
        for (const m of members) groupOf.set(m, solved.length);
        solved.push(members);
      } else {
        for (const m of members) {
          groupOf.set(m, -2);
          fixedVolts.set(m, worstInput);
        }
      }
    });
    heldGroups = floatingGroups.length - solved.length;
    floatingGroups.length = 0;
    floatingGroups.push(...solved);
  }
  for (const i of offDevices) {
    const m = c.mosfets[i]!;
    for (const t of [m.d, m.s, m.g, m.b]) if (!groupOf.has(t)) fixedVolts.set(t, gateOrStrong(ctx, t, phaseValues, assignment, worstInput));
  }
  for (const k of keepers) {
    const m = c.mosfets[k]!;
    for (const t of [m.d, m.s, m.b]) if (!groupOf.has(t)) fixedVolts.set(t, strongVolts(t));
  }
  // every device touching the island or a floating group (off ones leak; their junctions too)
  const devices = new Set<number>(offDevices.filter((i) => {
    const m = c.mosfets[i]!;
    return isActive(groupOf, m.d) || isActive(groupOf, m.s);
  }));
  for (const n of island) for (const i of ctx.channelOf(n)) devices.add(i);
  for (const g of floatingGroups) for (const n of g) for (const i of ctx.channelOf(n)) devices.add(i);
  for (const i of devices) {
    const m = c.mosfets[i]!;
    for (const t of [m.d, m.s, m.g, m.b]) if (!groupOf.has(t) && !fixedVolts.has(t)) fixedVolts.set(t, gateOrStrong(ctx, t, phaseValues, assignment, worstInput));
  }
  const gateDevices: number[] = [];
  for (const n of island) {
    for (const i of ctx.gateOf(n)) {
      const m = c.mosfets[i]!;
      if (!ctx.model(m).gateLeakage) continue;
      gateDevices.push(i);
      for (const t of [m.d, m.s, m.b]) if (!groupOf.has(t) && !fixedVolts.has(t)) fixedVolts.set(t, gateOrStrong(ctx, t, phaseValues, assignment, worstInput));
    }
  }
  const driven = [...island].some((m) => strongOf.has(m));
  return { island, floatingGroups, groupOf, fixedVolts, devices: [...devices].filter((i) => !keeperSet.has(i)), keepers, gateDevices, driven, heldGroups };
}

function isActive(groupOf: Map<number, number>, n: number): boolean {
  const g = groupOf.get(n);
  return g !== undefined && g !== -2;
}

function gateOrStrong(ctx: ElectricalContext, n: number, phaseValues: Uint8Array, assignment: Map<number, 0 | 1>, worst: number): number {
  const g = gateVolts(ctx, n, phaseValues, assignment);
  return g ?? worst;
}

/**
 * Root of a decreasing function on [lo, hi]: secant steps inside a shrinking bracket, with a
 * bisection step whenever the secant would leave the bracket's middle or stall. Currents here
 * are exponential in voltage, so plain regula falsi can creep from one side; this cannot.
 */
function solveMonotone(f: (x: number) => number, lo: number, hi: number): number {
  let a = lo;
  let b = hi;
  let fa = f(a);
  let fb = f(b);
  if (fa <= 0) return a;
  if (fb >= 0) return b;
  for (let it = 0; it < 60 && b - a > 1e-5; it++) {
    let x = (a * fb - b * fa) / (fb - fa);
    const margin = 0.1 * (b - a);
    if (!(x > a + margin && x < b - margin) || it % 3 === 2) x = (a + b) / 2;
    const fx = f(x);
    if (fx === 0) return x;
    if (fx > 0) {
      a = x;
      fa = fx;
    } else {
      b = x;
      fb = fx;
    }
  }
  return (a * fb - b * fa) / (fb - fa);
}

/** Temperature-scaled junction saturation current of one diffusion (SPICE diode law, XTI, EG). */
function junctionSaturation(model: MosModel, m: Mosfet, t: 'd' | 's', tempK: number): number {
  const j = model.junction;
  const g = diffusionGeometry(m, t);
  const is0 = j.jsAPerM2 * g.areaM2 + j.jswAPerM * g.perimeterM;
  if (is0 <= 0) return 0;
  const vt0 = thermalVoltage(j.tnomK);
  const vt = thermalVoltage(tempK);
  const arg = siliconBandGapEv(j.tnomK) / vt0 - siliconBandGapEv(tempK) / vt + j.xti * Math.log(tempK / j.tnomK);
  return is0 * Math.exp(arg / j.nj);
}

/** Current from drain to source of a MOSFET at terminal voltages (physical frame), times M. */
export function channelCurrent(ctx: ElectricalContext, m: Mosfet, vd: number, vg: number, vs: number, vb: number, tempK: number): number {
  const model = ctx.model(m);
  if (m.polarity === 'n') return model.drainCurrent(vg - vs, vd - vs, vb - vs, tempK, m.wM / m.nf, m.lM) * m.m * m.nf;
  return -model.drainCurrent(vs - vg, vs - vd, vs - vb, tempK, m.wM / m.nf, m.lM) * m.m * m.nf;
}

/** Current flowing from bulk into a diffusion (physical), reverse-biased junctions give -Is. */
function junctionCurrent(ctx: ElectricalContext, m: Mosfet, t: 'd' | 's', v: number, vb: number, tempK: number): number {
  const model = ctx.model(m);
  const is = junctionSaturation(model, m, t, tempK);
  if (is === 0) return 0;
  const nvt = model.junction.nj * thermalVoltage(tempK);
  // n+ in p: anode is the bulk; p+ in n: anode is the diffusion
  const vf = m.polarity === 'n' ? vb - v : v - vb;
  const i = is * (Math.exp(Math.min(vf / nvt, 40)) - 1);
  return m.polarity === 'n' ? i : -i;
}

/** Tunnelling currents from the gate into source and drain, physical frame, times M. */
function gateCurrents(ctx: ElectricalContext, m: Mosfet, vd: number, vg: number, vs: number, tempK: number): { igsA: number; igdA: number } {
  const model = ctx.model(m);
  const w = m.wM / m.nf;
  if (m.polarity === 'n') {
    const r = model.gateLeakage!(vg - vs, vd - vs, tempK, w, m.lM);
    return { igsA: r.igs * m.m * m.nf, igdA: r.igd * m.m * m.nf };
  }
  const r = model.gateLeakage!(vs - vg, vs - vd, tempK, w, m.lM);
  return { igsA: -r.igs * m.m * m.nf, igdA: -r.igd * m.m * m.nf };
}

export interface LeakageAt {
  /** Net current leaving the island (A); positive discharges it. */
  outA: number;
  contributors: LeakageContributor[];
}

/** Devices whose currents a set of nets can receive: by channel and junction, and by gate tunnelling. */
interface Near {
  channels: readonly number[];
  gates: readonly number[];
}

/** The devices of `all` with a terminal on `members`, in their order. */
function nearDevices(c: ElectricalContext['circuit'], members: ReadonlySet<number>, all: Near): Near {
  const on = (i: number, gate: boolean) => {
    const m = c.mosfets[i]!;
    return members.has(m.d) || members.has(m.s) || (gate && members.has(m.g));
  };
  return { channels: all.channels.filter((i) => on(i, false)), gates: all.gates.filter((i) => on(i, true)) };
}

/** Devices of a prepared network by their local numbers: those whose channel, and those whose gate tunnelling, a balance reads. */
interface SlotLists {
  channels: Int32Array;
  gates: Int32Array;
}

/**
 * A leakage network laid out for its balances, which a node's figures evaluate thousands of
 * times: each device (by a local number) with the slot of each terminal's voltage in `vol`
 * (0 the island, 1 + k floating group k, then one per fixed net, holding its volts), and the
 * device lists of the island and of each group in the order the sums take them.
 */
interface PreparedNetwork {
  mosfet: Int32Array;
  /** Four per device: drain, gate, source, bulk. */
  slots: Int32Array;
  vol: Float64Array;
  all: SlotLists;
  near: SlotLists[];
  junctions: Map<number, Junctions>;
  /**
   * The floating groups' voltages from the last solve, where the next one starts: the calls for
   * one node come in one order (estimateNode, which builds the network), so the figures do not
   * depend on what was estimated before.
   */
  lastSolved?: number[];
}

/** Per device of a prepared network at one temperature: junction saturation currents and n Vt. */
interface Junctions {
  isD: Float64Array;
  isS: Float64Array;
  nvt: Float64Array;
}

const preparedNetworks = new WeakMap<LeakageNetwork, PreparedNetwork>();

function prepared(ctx: ElectricalContext, ln: LeakageNetwork): PreparedNetwork {
  const known = preparedNetworks.get(ln);
  if (known) return known;
  const c = ctx.circuit;
  const groups = ln.floatingGroups.length;
  const fixed: number[] = [];
  const fixedSlot = new Map<number, number>();
  const slotOf = (n: number): number => {
    const g = ln.groupOf.get(n);
    if (g === -1) return 0;
    if (g !== undefined && g >= 0) return 1 + g;
    let at = fixedSlot.get(n);
    if (at === undefined) {
      fixedSlot.set(n, (at = 1 + groups + fixed.length));
      fixed.push(ln.fixedVolts.get(n) ?? 0);
    }
    return at;
  };
  const local = new Map<number, number>();
  const mosfet: number[] = [];
  const slots: number[] = [];
  const localOf = (i: number): number => {
    let li = local.get(i);
    if (li === undefined) {
      local.set(i, (li = mosfet.length));
      mosfet.push(i);
      const m = c.mosfets[i]!;
      slots.push(slotOf(m.d), slotOf(m.g), slotOf(m.s), slotOf(m.b));
    }
    return li;
  };
  const lists = (near: Near): SlotLists => ({ channels: Int32Array.from(near.channels, localOf), gates: Int32Array.from(near.gates, localOf) });
  const allDevices: Near = { channels: ln.devices, gates: [...new Set([...ln.gateDevices, ...ln.devices])] };
  // each group's balance reads only the devices on it (the same ones in the same order: the same sums)
  const nearOf = ln.floatingGroups.map((g) => nearDevices(c, new Set(g), allDevices));
  const all = lists(allDevices);
  const near = nearOf.map(lists);
  const vol = new Float64Array(1 + groups + fixed.length);
  vol.set(fixed, 1 + groups);
  const p: PreparedNetwork = { mosfet: Int32Array.from(mosfet), slots: Int32Array.from(slots), vol, all, near, junctions: new Map() };
  preparedNetworks.set(ln, p);
  return p;
}

function junctionsAt(ctx: ElectricalContext, net: PreparedNetwork, tempK: number): Junctions {
  let j = net.junctions.get(tempK);
  if (j) return j;
  const count = net.mosfet.length;
  j = { isD: new Float64Array(count), isS: new Float64Array(count), nvt: new Float64Array(count) };
  for (let li = 0; li < count; li++) {
    const m = ctx.circuit.mosfets[net.mosfet[li]!]!;
    const model = ctx.model(m);
    j.isD[li] = junctionSaturation(model, m, 'd', tempK);
    j.isS[li] = junctionSaturation(model, m, 's', tempK);
    j.nvt[li] = model.junction.nj * thermalVoltage(tempK);
  }
  net.junctions.set(tempK, j);
  return j;
}

/** junctionCurrent with its saturation current and n Vt worked out before. */
function junctionFlow(is: number, nvt: number, polarity: Mosfet['polarity'], v: number, vb: number): number {
  if (is === 0) return 0;
  const vf = polarity === 'n' ? vb - v : v - vb;
  const i = is * (Math.exp(Math.min(vf / nvt, 40)) - 1);
  return polarity === 'n' ? i : -i;
}

/** Currents at island voltage `v`, after solving the floating groups' voltages. */
export function leakageAt(ctx: ElectricalContext, ln: LeakageNetwork, v: number, tempK: number, storedLevel: 0 | 1, withContributors: boolean): LeakageAt {
  const c = ctx.circuit;
  const volts = (n: number, groupV: number[]): number => {
    const g = ln.groupOf.get(n);
    if (g === -1) return v;
    if (g !== undefined && g >= 0) return groupV[g]!;
    return ln.fixedVolts.get(n) ?? 0;
  };
  const groups = ln.floatingGroups.length;
  const groupV = ln.floatingGroups.map(() => v / 2);
  let gateContributors: LeakageContributor[] = [];
  // the balances read voltages by slot (prepared once per network) and junction constants per corner
  const net = prepared(ctx, ln);
  const { vol, slots, mosfet } = net;
  const junction = junctionsAt(ctx, net, tempK);
  const load = (gv: readonly number[]) => {
    vol[0] = v;
    for (let k = 0; k < gv.length; k++) vol[1 + k] = gv[k]!;
  };
  // one device's currents into the nets of each slot at its terminals (`into`, by slot), at `vol`
  const flows = (li: number, channel: boolean, into: Float64Array): void => {
    const m = c.mosfets[mosfet[li]!]!;
    const o = li * 4;
    const sd = slots[o]!;
    const sg = slots[o + 1]!;
    const ss = slots[o + 2]!;
    if (channel) {
      const vd = vol[sd]!;
      const vs = vol[ss]!;
      const vb = vol[slots[o + 3]!]!;
      if (sd !== ss) {
        const ids = channelCurrent(ctx, m, vd, vol[sg]!, vs, vb, tempK);
        into[ss]! += ids;
        into[sd]! -= ids;
      }
      into[sd]! += junctionFlow(junction.isD[li]!, junction.nvt[li]!, m.polarity, vd, vb);
      if (m.s !== m.d) into[ss]! += junctionFlow(junction.isS[li]!, junction.nvt[li]!, m.polarity, vs, vb);
      return;
    }
    // tunnelling: out through the gate, in at drain and source
    if (!ctx.model(m).gateLeakage) return;
    const { igsA, igdA } = gateCurrents(ctx, m, vol[sd]!, vol[sg]!, vol[ss]!, tempK);
    into[sg]! -= igsA + igdA;
    into[ss]! += igsA;
    into[sd]! += igdA;
  };
  const sums = new Float64Array(vol.length);
  // net current into the nets of one slot (the island 0, floating group k 1 + k) from the listed devices, at `vol`
  const inflowAt = (slot: number, list: SlotLists): number => {
    sums.fill(0);
    for (const li of list.channels) flows(li, true, sums);
    for (const li of list.gates) flows(li, false, sums);
    return sums[slot]!;
  };
  // the balances' Jacobian by each device's own differences: a device is evaluated once, and
  // once more per floating group at its terminals (not every balance once per group)
  const atPoint = new Float64Array(vol.length);
  const nudged = new Float64Array(vol.length);
  const stampJacobian = (gv: number[], jac: Float64Array[]): void => {
    load(gv);
    for (const [list, channel] of [[net.all.channels, true], [net.all.gates, false]] as const) {
      for (const li of list) {
        atPoint.fill(0);
        flows(li, channel, atPoint);
        const o = li * 4;
        for (let t = 0; t < 4; t++) {
          const j = slots[o + t]!;
          // each group once (a device may have two terminals on it)
          if (j < 1 || j > groups || (t > 0 && slots[o] === j) || (t > 1 && slots[o + 1] === j) || (t > 2 && slots[o + 2] === j)) continue;
          const keep = vol[j]!;
          vol[j] = keep + NEWTON_DIFFERENCE_V;
          nudged.fill(0);
          flows(li, channel, nudged);
          vol[j] = keep;
          for (let k = 1; k <= groups; k++) if (nudged[k] !== atPoint[k]) jac[k - 1]![j - 1]! += (nudged[k]! - atPoint[k]!) / NEWTON_DIFFERENCE_V;
        }
      }
    }
  };
  const lo = Math.min(0, v) - 0.2;
  const hi = Math.max(ctx.vddV, v) + 0.2;
  // one pass of bracketed solves, one group at a time (Gauss-Seidel); the largest move
  const seidelPass = (): number => {
    let moved = 0;
    for (let k = 0; k < groups; k++) {
      load(groupV);
      const root = solveMonotone((x) => {
        vol[1 + k] = x;
        return inflowAt(1 + k, net.near[k]!);
      }, lo, hi);
      moved = Math.max(moved, Math.abs(groupV[k]! - root));
      groupV[k] = root;
    }
    return moved;
  };
  const warm = net.lastSolved;
  if (groups === 1) seidelPass();
  else {
    // several groups: Newton on all balances together, from the last solve of this network or
    // from one Gauss-Seidel pass (which brackets each group's exponential balance, where Newton
    // from afar creeps); Gauss-Seidel alone when Newton does not converge
    if (warm) groupV.splice(0, groupV.length, ...warm);
    else seidelPass();
    const balance = (k: number, gv: number[]) => {
      load(gv);
      return inflowAt(1 + k, net.near[k]!);
    };
    if (!solveGroupsNewton(groups, balance, stampJacobian, groupV, lo, hi, seidelPass)) {
      groupV.fill(v / 2);
      for (let pass = 0; pass < 12; pass++) if (seidelPass() < 1e-4) break;
    }
  }
  if (groups > 1) net.lastSolved = groupV.slice();
  load(groupV);
  const outA = -inflowAt(0, net.all) - keeperInflow(ctx, ln, v, tempK, volts, groupV);
  if (withContributors) {
    // gate tunnelling, per device
    const sign = storedLevel === 1 ? 1 : -1;
    const at = (n: number) => volts(n, groupV);
    const gc: LeakageContributor[] = [];
    for (const i of new Set([...ln.gateDevices, ...ln.devices])) {
      const m = c.mosfets[i]!;
      if (!ctx.model(m).gateLeakage) continue;
      const { igsA, igdA } = gateCurrents(ctx, m, at(m.d), at(m.g), at(m.s), tempK);
      let out = 0;
      if (ln.island.has(m.g)) out += igsA + igdA;
      if (ln.island.has(m.s)) out -= igsA;
      if (ln.island.has(m.d)) out -= igdA;
      if (out !== 0) gc.push({ device: i, mechanism: 'gate', currentA: sign * out });
    }
    gateContributors = gc;
  }
  const contributors: LeakageContributor[] = [...gateContributors];
  if (withContributors) {
    const sign = storedLevel === 1 ? 1 : -1;
    for (const i of ln.devices) {
      const m = c.mosfets[i]!;
      const inD = ln.island.has(m.d);
      const inS = ln.island.has(m.s);
      if (!inD && !inS) continue;
      const vd = volts(m.d, groupV);
      const vs = volts(m.s, groupV);
      const vg = volts(m.g, groupV);
      const vb = volts(m.b, groupV);
      if (inD !== inS) {
        const ids = channelCurrent(ctx, m, vd, vg, vs, vb, tempK);
        const out = inD ? ids : -ids;
        if (out !== 0) contributors.push({ device: i, mechanism: 'subthreshold', currentA: sign * out });
      }
      let j = 0;
      if (inD) j += junctionCurrent(ctx, m, 'd', vd, vb, tempK);
      if (inS && m.s !== m.d) j += junctionCurrent(ctx, m, 's', vs, vb, tempK);
      if (j !== 0) contributors.push({ device: i, mechanism: 'junction', currentA: -sign * j });
    }
    for (const k of ln.keepers) {
      const i = keeperCurrentInto(ctx, c.mosfets[k]!, ln, v, tempK, volts, groupV);
      if (i !== 0) contributors.push({ device: k, mechanism: 'keeper', currentA: -sign * i });
    }
    contributors.sort((x, y) => Math.abs(y.currentA) - Math.abs(x.currentA));
  }
  return { outA, contributors };
}

/**
 * Newton's settings for the floating groups' balances. A step is scaled down to at most 0.3 V
 * (the currents are exponential in voltage, about 26 mV per e-fold at room temperature); every
 * fourth iteration a Gauss-Seidel pass (`relax`) is put in, because a balance that is one
 * exponential against a far smaller counter-current makes Newton creep by one e-fold per
 * step, which the bracketed solve of one group does not. The tolerance is on the largest move
 * (V); the difference step gives the Jacobian (V).
 */
const NEWTON_MAX_STEP_V = 0.3;
const NEWTON_RELAX_EVERY = 4;
const NEWTON_TOLERANCE_V = 1e-7;
const NEWTON_MAX_ITERATIONS = 40;
const NEWTON_DIFFERENCE_V = 1e-6;

/**
 * The floating groups' voltages (`groupV`, updated in place) at which every group's net inflow
 * (`balance`) is zero: Newton's method with a finite-difference Jacobian (`jacobian`, device by
 * device), steps limited and kept inside [lo, hi]. A block of off devices with several floating
 * groups between them (a long stack, a slice whose supply port is on a signal) took Gauss-Seidel
 * alone a dozen passes of bracketed solves, and it often stopped short of the balance
 * (retention 0.5% off on the buses sample). False when it does not converge (the caller falls
 * back on Gauss-Seidel alone).
 */
function solveGroupsNewton(count: number, balance: (k: number, gv: number[]) => number, jacobian: (gv: number[], jac: Float64Array[]) => void, groupV: number[], lo: number, hi: number, relax: () => void): boolean {
  const f = new Float64Array(count);
  for (let k = 0; k < count; k++) f[k] = balance(k, groupV);
  const jac = Array.from({ length: count }, () => new Float64Array(count));
  const step = new Float64Array(count);
  for (let it = 0; it < NEWTON_MAX_ITERATIONS; it++) {
    if (it > 0 && it % NEWTON_RELAX_EVERY === 0) {
      relax();
      for (let k = 0; k < count; k++) f[k] = balance(k, groupV);
    }
    for (const row of jac) row.fill(0);
    jacobian(groupV, jac);
    for (let k = 0; k < count; k++) {
      step[k] = -f[k]!;
      // a balance no voltage moves (no current reaches the group, as with level-1 cards, which
      // have no subthreshold conduction): the group stays where Gauss-Seidel or the last solve
      // put it
      if (jac[k]!.every((x) => x === 0)) {
        jac[k]![k] = 1;
        step[k] = 0;
      }
    }
    if (!solveLinear(jac, step)) return false;
    let largest = 0;
    for (let k = 0; k < count; k++) largest = Math.max(largest, Math.abs(step[k]!));
    if (!Number.isFinite(largest)) return false;
    const scale = largest > NEWTON_MAX_STEP_V ? NEWTON_MAX_STEP_V / largest : 1;
    let moved = 0;
    for (let k = 0; k < count; k++) {
      const next = Math.min(hi, Math.max(lo, groupV[k]! + scale * step[k]!));
      moved = Math.max(moved, Math.abs(next - groupV[k]!));
      groupV[k] = next;
    }
    for (let k = 0; k < count; k++) f[k] = balance(k, groupV);
    if (moved < NEWTON_TOLERANCE_V) return true;
  }
  return false;
}

/** Solves a x = b in place (b becomes x): rows scaled to their largest entry, partial pivoting. False when singular. */
function solveLinear(a: Float64Array[], b: Float64Array): boolean {
  const n = b.length;
  for (let r = 0; r < n; r++) {
    let big = 0;
    for (let k = 0; k < n; k++) big = Math.max(big, Math.abs(a[r]![k]!));
    if (!(big > 0)) return false;
    for (let k = 0; k < n; k++) a[r]![k]! /= big;
    b[r]! /= big;
  }
  for (let col = 0; col < n; col++) {
    let p = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r]![col]!) > Math.abs(a[p]![col]!)) p = r;
    if (!(Math.abs(a[p]![col]!) > 1e-300)) return false;
    if (p !== col) {
      [a[p], a[col]] = [a[col]!, a[p]!];
      [b[p], b[col]] = [b[col]!, b[p]!];
    }
    const pivot = a[col]!;
    for (let r = col + 1; r < n; r++) {
      const row = a[r]!;
      const factor = row[col]! / pivot[col]!;
      if (factor === 0) continue;
      for (let k = col; k < n; k++) row[k]! -= factor * pivot[k]!;
      b[r]! -= factor * b[col]!;
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let sum = b[r]!;
    for (let k = r + 1; k < n; k++) sum -= a[r]![k]! * b[k]!;
    b[r] = sum / a[r]![r]!;
  }
  return true;
}

function keeperInflow(ctx: ElectricalContext, ln: LeakageNetwork, v: number, tempK: number, volts: (n: number, g: number[]) => number, groupV: number[]): number {
  let total = 0;
  for (const k of ln.keepers) total += keeperCurrentInto(ctx, ctx.circuit.mosfets[k]!, ln, v, tempK, volts, groupV);
  return total;
}

/** A keeper is on (its gate is driven by the node's own inverter at the stored level). */
function keeperCurrentInto(ctx: ElectricalContext, m: Mosfet, ln: LeakageNetwork, v: number, tempK: number, volts: (n: number, g: number[]) => number, groupV: number[]): number {
  const vgOn = m.polarity === 'p' ? 0 : ctx.vddV;
  const vd = volts(m.d, groupV);
  const vs = volts(m.s, groupV);
  const vb = volts(m.b, groupV);
  const ids = channelCurrent(ctx, m, vd, vgOn, vs, vb, tempK);
  const inD = ln.island.has(m.d);
  const inS = ln.island.has(m.s);
  if (inD === inS) return 0;
  return inS ? ids : -ids;
}

/**
 * A string that is equal for two leakage problems with the same devices, sizes, models and
 * terminal conditions (two instances of one cell in the same surroundings), so one solve serves
 * both. Devices are listed in network order, terminals by role (island, floating group k,
 * fixed voltage).
 */
export function leakageSignature(ctx: ElectricalContext, ln: LeakageNetwork): string {
  const c = ctx.circuit;
  const term = (n: number): string => {
    const g = ln.groupOf.get(n);
    if (g === -1) return 'I';
    if (g !== undefined && g >= 0) return 'F' + g;
    return 'V' + (ln.fixedVolts.get(n) ?? 0).toFixed(4);
  };
  const parts: string[] = [];
  for (const i of [...ln.devices, ...ln.keepers, ...ln.gateDevices.map((g) => -1 - g)]) {
    if (i < 0) {
      const m = c.mosfets[-1 - i]!;
      parts.push(`G${m.card?.name ?? m.model}:${m.polarity}:${m.wM}:${m.lM}:${m.m}:${term(m.d)}${term(m.s)}`);
      continue;
    }
    const m = c.mosfets[i]!;
    parts.push(`${m.card?.name ?? m.model}:${m.polarity}:${m.wM}:${m.lM}:${m.m}:${m.nf}:${m.adM2}:${m.asM2}:${m.pdM}:${m.psM}:${term(m.d)}${term(m.g)}${term(m.s)}${term(m.b)}${ln.keepers.includes(i) ? 'K' : ''}`);
  }
  return parts.join(';');
}

export { isActive };
