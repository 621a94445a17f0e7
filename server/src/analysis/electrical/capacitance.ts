// Node capacitance (DOMAIN 4): gate oxide and overlap of every gate on the node, junction
// capacitance of every drain/source diffusion at the node's voltage (the SPICE junction law
// CJ*A*(1+Vr/PB)^-MJ + CJSW*P*(1+Vr/PBSW)^-MJSW), overlap of those diffusions to their gates, and
// explicit capacitors; capacitors to other signal nets are listed as coupling.

import type { ElectricalContext } from './context';
import { diffusionGeometry } from './context';

export interface CapacitanceBreakdown {
  totalF: number;
  gateF: number;
  diffusionF: number;
  overlapF: number;
  explicitF: number;
  /** Explicit capacitance to signal nets (part of the total), by aggressor net. */
  couplingF: number;
  /** The nets coupled through a capacitor or a gate overlap (in an estimate: a storage node's only, for its coupling droop). */
  aggressors: Array<{ net: number; capacitanceF: number; via: 'capacitor' | 'overlap'; device?: number }>;
  estimatedGeometry: boolean;
}

/** Equal for two islands whose capacitance is computed from the same devices and capacitors. */
export function capacitanceSignature(ctx: ElectricalContext, island: ReadonlySet<number>): string {
  const c = ctx.circuit;
  const parts: string[] = [];
  for (const n of island) {
    for (const i of ctx.gateOf(n)) {
      const m = c.mosfets[i]!;
      // the gate's capacitance follows the channel's state, which reads the rails at its drain and source
      parts.push(`g${m.card?.name ?? m.model}:${m.polarity}:${m.wM}:${m.lM}:${m.m}:${ctx.railVolts[m.d]}:${ctx.railVolts[m.s]}`);
    }
    for (const i of ctx.channelOf(n)) {
      const m = c.mosfets[i]!;
      parts.push(`c${m.card?.name ?? m.model}:${m.polarity}:${m.wM}:${m.lM}:${m.m}:${m.d === n ? 'd' : ''}${m.s === n ? 's' : ''}:${m.adM2}:${m.asM2}:${m.pdM}:${m.psM}:${ctx.railVolts[m.b]}`);
    }
  }
  for (const n of island) {
    for (const k of ctx.capsOf[n]!) {
      const cap = c.capacitors[k]!;
      if (island.has(cap.a) !== island.has(cap.b)) parts.push(`C${cap.capacitanceF}:${ctx.railVolts[island.has(cap.a) ? cap.b : cap.a]}`);
    }
  }
  return parts.join(';');
}

function junctionCap(cj: number, area: number, mj: number, pb: number, cjsw: number, perim: number, mjsw: number, pbsw: number, reverseV: number): number {
  // forward bias is clamped at half the built-in potential, as SPICE linearises beyond FC=0.5
  const vr = Math.max(reverseV, -0.5 * Math.min(pb, pbsw));
  return cj * area * Math.pow(1 + vr / pb, -mj) + cjsw * perim * Math.pow(1 + vr / pbsw, -mjsw);
}

/** Capacitance of the node group `island` (nets joined by conducting devices) at voltage `v`. */
export function islandCapacitance(ctx: ElectricalContext, island: ReadonlySet<number>, v: number): CapacitanceBreakdown {
  const c = ctx.circuit;
  let gateF = 0;
  let diffusionF = 0;
  let overlapF = 0;
  let explicitF = 0;
  let couplingF = 0;
  let estimatedGeometry = false;
  const aggressors: CapacitanceBreakdown['aggressors'] = [];
  const seen = new Set<number>();
  for (const n of island) {
    for (const i of ctx.gateOf(n)) {
      const m = c.mosfets[i]!;
      const model = ctx.model(m);
      const w = model.effectiveWidth(m.wM);
      const l = model.effectiveLength(m.lM);
      // at this gate voltage the channel is on (full oxide) or off (oxide over depletion)
      const vs = Math.min(ctx.railVolts[m.s]!, ctx.railVolts[m.d]!);
      const src = Number.isFinite(vs) ? vs : m.polarity === 'n' ? 0 : ctx.vddV;
      const vgs = m.polarity === 'n' ? v - src : src - v;
      const onFraction = vgs > Math.abs(model.threshold(0, 0, 300, m.wM, m.lM)) ? 1 : model.offGateCapFraction;
      gateF += (model.coxFPerM2 * w * l * onFraction + (model.cgsoFPerM + model.cgdoFPerM) * w) * m.m;
    }
    for (const i of ctx.channelOf(n)) {
      if (seen.has(i)) continue;
      seen.add(i);
      const m = c.mosfets[i]!;
      const model = ctx.model(m);
      const j = model.junction;
      const vb = ctx.railVolts[m.b]!;
      const vbody = Number.isFinite(vb) ? vb : m.polarity === 'n' ? 0 : ctx.vddV;
      const w = model.effectiveWidth(m.wM);
      for (const t of ['d', 's'] as const) {
        if (!island.has(m[t])) continue;
        const g = diffusionGeometry(m, t);
        estimatedGeometry ||= g.estimated;
        const reverse = m.polarity === 'n' ? v - vbody : vbody - v;
        diffusionF += junctionCap(j.cjFPerM2, g.areaM2, j.mj, j.pbV, j.cjswFPerM, g.perimeterM, j.mjsw, j.pbswV, reverse);
        const ov = (t === 'd' ? model.cgdoFPerM : model.cgsoFPerM) * w * m.m;
        overlapF += ov;
        if (!island.has(m.g)) aggressors.push({ net: m.g, capacitanceF: ov, via: 'overlap', device: i });
      }
    }
  }
  // capacitors on the island's nets (a capacitor inside the island joins two of them: skipped below)
  let caps: Iterable<number>;
  if (island.size === 1) caps = ctx.capsOf[island.values().next().value!]!;
  else {
    const set = new Set<number>();
    for (const n of island) for (const k of ctx.capsOf[n]!) set.add(k);
    caps = set;
  }
  for (const k of caps) {
    const cap = c.capacitors[k]!;
    if (cap.capacitanceF === undefined) continue;
    const inA = island.has(cap.a);
    const inB = island.has(cap.b);
    if (inA === inB) continue;
    const other = inA ? cap.b : cap.a;
    explicitF += cap.capacitanceF;
    if (!Number.isFinite(ctx.railVolts[other]!)) {
      couplingF += cap.capacitanceF;
      aggressors.push({ net: other, capacitanceF: cap.capacitanceF, via: 'capacitor' });
    }
  }
  return { totalF: gateF + diffusionF + overlapF + explicitF, gateF, diffusionF, overlapF, explicitF, couplingF, aggressors, estimatedGeometry };
}
