// The droop budget (DOMAIN 6): by default 10% of the supply (a common rule of thumb, no
// source); or stated in volts or percent; or derived from the receiving inverter's switching
// threshold VM = (VTn + r (VDD - |VTp|)) / (1 + r), r = sqrt(kp / kn) (Rabaey, Chandrakasan,
// Nikolic, Digital Integrated Circuits, 2nd ed.), less a noise margin of 10% of the supply
// (common practice), taking the closer of VM to either level.

import type { Mosfet } from '../../circuit/circuit';
import type { MosModel } from '../devices/mosModel';

export const DEFAULT_BUDGET_FRACTION = 0.1;
export const RECEIVER_NOISE_MARGIN_FRACTION = 0.1;

export function inverterThreshold(vdd: number, vtn: number, vtp: number, kn: number, kp: number): number {
  const r = Math.sqrt(kp / kn);
  return (vtn + r * (vdd - Math.abs(vtp))) / (1 + r);
}

/** Budget from a receiving inverter made of devices n and p, at the nominal corner. */
export function receiverBudget(vdd: number, n: { m: Mosfet; model: MosModel }, p: { m: Mosfet; model: MosModel }, tempK: number): number {
  // transconductance factors from the on current in saturation, k = 2 I / (VDD - VT)^2
  const vtn = n.model.threshold(0, vdd / 2, tempK, n.m.wM, n.m.lM);
  const vtp = p.model.threshold(0, vdd / 2, tempK, p.m.wM, p.m.lM);
  const ion = n.model.drainCurrent(vdd, vdd, 0, tempK, n.m.wM, n.m.lM) * n.m.m;
  const iop = p.model.drainCurrent(vdd, vdd, 0, tempK, p.m.wM, p.m.lM) * p.m.m;
  const kn = (2 * ion) / Math.max(vdd - vtn, 0.05) ** 2;
  const kp = (2 * iop) / Math.max(vdd - Math.abs(vtp), 0.05) ** 2;
  const vm = inverterThreshold(vdd, vtn, vtp, kn, kp);
  return Math.max(0.01, Math.min(vm, vdd - vm) - RECEIVER_NOISE_MARGIN_FRACTION * vdd);
}
