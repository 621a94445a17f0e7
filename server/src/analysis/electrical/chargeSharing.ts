// Charge sharing (DOMAIN 6): a floating storage node at its level, joined by an input change
// that does not complete a path to a rail, to internal nodes that sit at the other level.
// Worst case over the assignments of the group's free gates under which the node still floats.
// Internal nodes driven to the stored level in another phase (their own precharge) share
// nothing. Droop, after Rabaey, Chandrakasan and Nikolic (Digital Integrated Circuits, 2nd ed.,
// dynamic logic): if the droop stays below the threshold of the joining device,
// dV = (Ca/CL)(VDD - VTn); otherwise the charge spreads fully, dV = VDD * Ca / (CL + Ca).

import { NetRole, SwitchKind } from '../switchNetwork';
import type { ElectricalContext } from './context';
import { islandCapacitance } from './capacitance';

export interface ChargeSharingResult {
  droopV: number;
  /** The gate values of the worst assignment, and the internal nodes it joins. */
  when: Record<string, 0 | 1>;
  joined: number[];
  sharedF: number;
  exact: boolean;
}

const MAX_GATES = 12;

export function chargeSharing(ctx: ElectricalContext, node: number, phaseIndex: number, phaseValues: Uint8Array, otherPhaseValues: Uint8Array[], storedLevel: 0 | 1, loadF: number): ChargeSharingResult {
  const net = ctx.network;
  const comp = net.components[net.componentOf[node]!]!;
  const free = comp.gates.filter((g) => phaseValues[g] === 2);
  const none: ChargeSharingResult = { droopV: 0, when: {}, joined: [], sharedF: 0, exact: true };
  if (comp.nodes.length === 1) return none;
  if (free.length > MAX_GATES) return { ...none, exact: false };
  void phaseIndex;
  const pos = new Map(free.map((g, i) => [g, i]));
  let best = none;
  const precharged = (n: number) => otherPhaseValues.some((vals) => vals[n] === storedLevel);
  for (let a = 0; a < 1 << free.length; a++) {
    const gate = (g: number) => (pos.has(g) ? (a >> pos.get(g)!) & 1 : phaseValues[g]!);
    // the node's island under this assignment, and whether it touches a strong net
    const island = new Set<number>([node]);
    const stack = [node];
    let driven = false;
    while (stack.length && !driven) {
      const x = stack.pop()!;
      for (const si of comp.switches) {
        const s = net.switches[si]!;
        if (s.a !== x && s.b !== x) continue;
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
      const when: Record<string, 0 | 1> = {};
      free.forEach((g, i) => (when[ctx.circuit.nets[g]!.name] = ((a >> i) & 1) as 0 | 1));
      best = { droopV: 0, when, joined, sharedF, exact: true };
    }
  }
  if (best.sharedF === 0) return best;
  // threshold of the device that joins them, with its source near the shared voltage
  const vdd = ctx.vddV;
  const joiner = ctx.channelOf[node]!.map((i) => ctx.circuit.mosfets[i]!).find((m) => best.joined.includes(m.d) || best.joined.includes(m.s));
  let vt = 0;
  if (joiner) {
    const model = ctx.model(joiner);
    const vsb = vdd / 2;
    vt = Math.abs(model.threshold(joiner.polarity === 'n' ? -vsb : -vsb, 0, ctx.corners[0]!.tempK, joiner.wM, joiner.lM));
  }
  const limited = (best.sharedF / loadF) * (vdd - vt);
  const droopV = limited < vt ? limited : (vdd * best.sharedF) / (loadF + best.sharedF);
  return { ...best, droopV };
}
