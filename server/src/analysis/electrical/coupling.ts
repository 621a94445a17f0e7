// Coupling (DOMAIN 6): each aggressor that can switch while the node floats moves it by
// dV_aggr * Cc / C_total; the adverse ones add up. Aggressors: explicit capacitors to signal
// nets, and the gate-drain/source overlap of devices on the node whose gate is a signal (clock
// feedthrough). Every aggressor is taken to swing the full supply against the stored level.

import type { ElectricalContext } from './context';
import type { CapacitanceBreakdown } from './capacitance';

export interface CouplingResult {
  droopV: number;
  aggressors: Array<{ net: string; capacitanceF: number; droopV: number; via: string }>;
}

export function couplingDroop(ctx: ElectricalContext, cap: CapacitanceBreakdown, constantNets: (net: number) => boolean): CouplingResult {
  const byNet = new Map<number, { c: number; via: Set<string> }>();
  for (const a of cap.aggressors) {
    if (constantNets(a.net)) continue;
    const e = byNet.get(a.net) ?? { c: 0, via: new Set<string>() };
    e.c += a.capacitanceF;
    e.via.add(a.via === 'capacitor' ? 'coupling capacitor' : 'gate overlap');
    byNet.set(a.net, e);
  }
  const aggressors = [...byNet].map(([n, e]) => ({ net: ctx.circuit.nets[n]!.name, capacitanceF: e.c, droopV: (ctx.vddV * e.c) / cap.totalF, via: [...e.via].join(', ') }));
  aggressors.sort((a, b) => b.droopV - a.droopV);
  return { droopV: aggressors.reduce((s, a) => s + a.droopV, 0), aggressors };
}
