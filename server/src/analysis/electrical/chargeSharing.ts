// Charge sharing (DOMAIN 6): a floating storage node at its level, joined by an input change
// that does not complete a path to a rail, to internal nodes that sit at the other level.
// Worst case over the assignments of the group's free gates under which the node still floats.
// Internal nodes driven to the stored level in another phase (their own precharge) share
// nothing. Droop, after Rabaey, Chandrakasan and Nikolic (Digital Integrated Circuits, 2nd ed.,
// dynamic logic): if the droop stays below the threshold of the joining device,
// dV = (Ca/CL)(VDD - VTn); otherwise the charge spreads fully, dV = VDD * Ca / (CL + Ca).
// Both cases are solved together here by charge conservation with bias-dependent capacitance;
// `textbookChargeSharing` gives the two closed forms for comparison.

import { NetRole, SwitchKind } from '../switchNetwork';
import { evaluateComponent, newScratch, type Scratch } from '../constants';
import type { ElectricalContext } from './context';
import { islandCapacitance } from './capacitance';
import { channelCurrent } from './leakage';
import { newRecord } from '../classify';

export interface ChargeSharingResult {
  droopV: number;
  /** Free gate values of the worst assignment. */
  gates: Map<number, 0 | 1>;
  /** The gate values of the worst assignment, and the internal nodes it joins. */
  when: Record<string, 0 | 1>;
  joined: number[];
  sharedF: number;
  exact: boolean;
}

const MAX_GATES = 12;

/**
 * Working copies of a phase's values, one per phase value array (a node's enumeration changes
 * only its free gates and their driving stages, and puts them back), so a node costs no
 * allocation proportional to the circuit.
 */
const phaseBuffers = new WeakMap<Uint8Array, { work: Uint8Array; out: Uint8Array; scratch: Scratch }>();
function buffersFor(phaseValues: Uint8Array): { work: Uint8Array; out: Uint8Array; scratch: Scratch } {
  let b = phaseBuffers.get(phaseValues);
  if (!b) phaseBuffers.set(phaseValues, (b = { work: phaseValues.slice(), out: new Uint8Array(phaseValues.length), scratch: newScratch(phaseValues.length) }));
  return b;
}

/** The textbook's closed forms (Rabaey et al.), for a node CL at VDD joined to Ca at 0 V. */
export function textbookChargeSharing(vdd: number, vtn: number, cl: number, ca: number): number {
  const limited = (ca / cl) * (vdd - vtn);
  return limited < vtn ? limited : (vdd * ca) / (cl + ca);
}

export function chargeSharing(ctx: ElectricalContext, node: number, phaseIndex: number, phaseValues: Uint8Array, otherPhaseValues: Uint8Array[], storedLevel: 0 | 1, loadF: number, keepers: number[] = []): ChargeSharingResult {
  const net = ctx.network;
  const comp = net.components[net.componentOf[node]!]!;
  // a keeper is too weak to stop sharing as it happens: it joins nothing here, and its gate
  // (the node's own inverter) is not a free input
  const keeperSet = new Set(keepers);
  const keeperGates = new Set(keepers.map((k) => ctx.circuit.mosfets[k]!.g));
  const free = comp.gates.filter((g) => phaseValues[g] === 2 && !keeperGates.has(g));
  const none: ChargeSharingResult = { droopV: 0, gates: new Map(), when: {}, joined: [], sharedF: 0, exact: true };
  if (comp.nodes.length === 1) return none;
  if (free.length > MAX_GATES) return { ...none, exact: false };
  const pos = new Map(free.map((g, i) => [g, i]));
  let best = none;
  const precharged = (n: number) => otherPhaseValues.some((vals) => vals[n] === storedLevel);
  // one level of witness checking: a free gate driven by logic from the other free gates (an
  // inverted or buffered copy) must agree with what that logic gives
  const { work, out, scratch } = buffersFor(phaseValues);
  const drivers = free.map((g) => (net.role[g] === NetRole.Internal ? net.components[net.componentOf[g]!]! : undefined));
  for (let a = 0; a < 1 << free.length; a++) {
    const gate = (g: number) => (pos.has(g) ? (a >> pos.get(g)!) & 1 : phaseValues[g]!);
    free.forEach((g, i) => (work[g] = (a >> i) & 1));
    let consistent = true;
    for (let i = 0; i < free.length && consistent; i++) {
      const d = drivers[i];
      if (!d || d.id === comp.id) continue;
      const saved = d.nodes.map((x) => work[x]!);
      d.nodes.forEach((x) => {
        if (!pos.has(x)) work[x] = 2;
      });
      evaluateComponent(net, d, work, out, scratch);
      const v = out[free[i]!]!;
      if (v !== 2 && v !== ((a >> i) & 1)) consistent = false;
      d.nodes.forEach((x, k) => (work[x] = saved[k]!));
    }
    if (!consistent) continue;
    // the node's island under this assignment, and whether it touches a strong net
    const island = new Set<number>([node]);
    const stack = [node];
    let driven = false;
    while (stack.length && !driven) {
      const x = stack.pop()!;
      for (const si of comp.switches) {
        const s = net.switches[si]!;
        if (s.a !== x && s.b !== x) continue;
        if (s.kind !== SwitchKind.On && keeperSet.has(si)) continue;
        if (s.kind !== SwitchKind.On) {
          const g = gate(s.gate);
          if (g === 2 || (s.kind === SwitchKind.N) !== (g === 1)) continue;
        }
        const y = s.a === x ? s.b : s.a;
        if (net.role[y] !== NetRole.Internal) {
          driven = true;
          break;
        }
        if (!island.has(y)) {
          island.add(y);
          stack.push(y);
        }
      }
    }
    if (driven || island.size === 1) continue;
    const joined = [...island].filter((n) => n !== node && !precharged(n));
    if (joined.length === 0) continue;
    const sharedF = islandCapacitance(ctx, new Set(joined), storedLevel === 1 ? 0 : ctx.vddV).totalF;
    if (sharedF > best.sharedF) {
      const when = newRecord();
      free.forEach((g, i) => (when[ctx.circuit.nets[g]!.name] = ((a >> i) & 1) as 0 | 1));
      best = { droopV: 0, gates: new Map(free.map((g, i) => [g, ((a >> i) & 1) as 0 | 1])), when, joined, sharedF, exact: true };
    }
  }
  for (const g of free) work[g] = phaseValues[g]!;
  if (best.sharedF === 0) return best;
  // The sharing itself is integrated in time over the phase: the node (CL) and the joined
  // nodes (their bias-dependent capacitance, lumped) exchange charge through the joining
  // devices' model current. This covers both textbook cases (see textbookChargeSharing): the
  // joined node stops near the gate drive less a threshold, or the two settle together; and
  // since the joining device keeps conducting just above and below threshold, the droop at
  // the end of the phase is what counts.
  const vdd = ctx.vddV;
  const c = ctx.circuit;
  const joinedSet = new Set(best.joined);
  const tempK = ctx.corners[0]!.tempK;
  const gateV = (g: number): number => {
    const rail = ctx.railVolts[g]!;
    if (Number.isFinite(rail)) return rail;
    const a = best.gates.get(g);
    if (a !== undefined) return a * vdd;
    const v = phaseValues[g]!;
    return v === 2 ? 0 : v * vdd;
  };
  const joiners = ctx.channelOf(node).map((i) => c.mosfets[i]!).filter((m) => {
    const other = m.d === node ? m.s : m.d;
    if (!joinedSet.has(other)) return false;
    const g = gateV(m.g);
    return m.polarity === 'n' ? g > vdd / 2 : g < vdd / 2;
  });
  const bodyV = (m: (typeof joiners)[number]) => (Number.isFinite(ctx.railVolts[m.b]!) ? ctx.railVolts[m.b]! : m.polarity === 'n' ? 0 : vdd);
  const capJoined = (v: number) => islandCapacitance(ctx, joinedSet, v).totalF;
  const capNode = (v: number) => Math.max(loadF + 0 * v, 1e-18);
  const phaseS = ctx.plan.phases[phaseIndex]?.durationS;
  const horizon = phaseS && Number.isFinite(phaseS) ? Math.min(phaseS, 1e-3) : 1e-6;
  let vNode = storedLevel === 1 ? vdd : 0;
  let vJoined = storedLevel === 1 ? 0 : vdd;
  let t = 0;
  let dt = 1e-15;
  for (let step = 0; step < 5000 && t < horizon; step++) {
    let i = 0; // current from the node into the joined nodes
    for (const m of joiners) {
      const nodeIsDrain = m.d === node;
      const ids = channelCurrent(ctx, m, nodeIsDrain ? vNode : vJoined, gateV(m.g), nodeIsDrain ? vJoined : vNode, bodyV(m), tempK);
      i += nodeIsDrain ? ids : -ids;
    }
    if (i === 0) break;
    // at most a few millivolts per step on either side
    const cj = capJoined(vJoined);
    const cn = capNode(vNode);
    dt = Math.min(dt * 2, (0.003 * Math.min(cj, cn)) / Math.abs(i), horizon - t);
    vNode -= (i * dt) / cn;
    vJoined += (i * dt) / cj;
    t += dt;
    if ((storedLevel === 1 && vJoined >= vNode) || (storedLevel === 0 && vJoined <= vNode)) break;
  }
  const droopV = Math.abs((storedLevel === 1 ? vdd : 0) - vNode);
  return { ...best, droopV };
}
