// SPICE levels 1-3 (Shichman-Hodges and its successors), as far as leakage estimates need them.
// Level 1 has no subthreshold conduction: an off device conducts nothing, and the notes say so.
// Levels 2 and 3 conduct below threshold only when the card gives NFS (fast surface states):
// then the current falls off exponentially below VON = VT + n vT with n = 1 + q NFS / COX +
// CD / COX (first-order, after the level-2 formulation; CD from the body factor).

import { EPS_OX_F_PER_M, ELEMENTARY_CHARGE_C, thermalVoltage, ZERO_CELSIUS_K } from './physics';
import { given, param, type JunctionParams, type MosModel } from './mosModel';

export function createLevel123(p: Readonly<Record<string, number>>, polarity: 'n' | 'p', level: 1 | 2 | 3): MosModel {
  const sign = polarity === 'p' ? -1 : 1;
  const notes: string[] = ['gate leakage not included: the card gives no tunnelling parameters'];
  const tox = given(p, 'tox') ? p['tox']! : undefined;
  const cox = tox ? EPS_OX_F_PER_M / tox : EPS_OX_F_PER_M / 1e-7;
  const u0 = param(p, 'uo', param(p, 'u0', 600)) * 1e-4; // cm^2/Vs -> m^2/Vs
  const kp = given(p, 'kp') ? p['kp']! : tox ? u0 * cox : 2e-5;
  const vto = sign * param(p, 'vto', param(p, 'vt0', 0));
  const gamma = param(p, 'gamma', 0);
  const phi = param(p, 'phi', 0.6);
  const lambda = param(p, 'lambda', 0);
  const nfs = param(p, 'nfs', 0);
  const ld = param(p, 'ld', 0);
  const tnomK = (given(p, 'tnom') ? p['tnom']! : 27) + ZERO_CELSIUS_K;
  if (level === 1) notes.push('level 1 has no subthreshold conduction: off devices leak only through their junctions here');
  else if (nfs === 0) notes.push(`level ${level} card without NFS: no subthreshold conduction is modelled`);
  else notes.push(`level ${level} subthreshold from NFS is a first-order estimate`);
  const vth = (vbs: number) => vto + gamma * (Math.sqrt(Math.max(phi - vbs, 0)) - Math.sqrt(phi));
  const strong = (vgs: number, vds: number, vbs: number, tempK: number, wM: number, lM: number) => {
    const leff = Math.max(lM - 2 * ld, 1e-9);
    const beta = kp * Math.pow(tempK / tnomK, -1.5) * (wM / leff);
    const vgst = vgs - vth(vbs);
    if (vgst <= 0) return 0;
    if (vds < vgst) return beta * (vgst - vds / 2) * vds * (1 + lambda * vds);
    return (beta / 2) * vgst * vgst * (1 + lambda * vds);
  };
  const current = (vgs: number, vds: number, vbs: number, tempK: number, wM: number, lM: number): number => {
    if (level === 1 || nfs === 0) return strong(vgs, vds, vbs, tempK, wM, lM);
    const vt = thermalVoltage(tempK);
    const cd = gamma > 0 ? (gamma * cox) / (2 * Math.sqrt(Math.max(phi - vbs, 1e-3))) : 0;
    const n = 1 + (ELEMENTARY_CHARGE_C * nfs * 1e4) / cox + cd / cox;
    const von = vth(vbs) + n * vt;
    if (vgs >= von) return strong(vgs, vds, vbs, tempK, wM, lM);
    return strong(von, vds, vbs, tempK, wM, lM) * Math.exp((vgs - von) / (n * vt));
  };
  const junction: JunctionParams = {
    cjFPerM2: param(p, 'cj', 0),
    mj: param(p, 'mj', 0.5),
    pbV: param(p, 'pb', 0.8),
    cjswFPerM: param(p, 'cjsw', 0),
    mjsw: param(p, 'mjsw', level === 1 ? 0.5 : 0.33),
    pbswV: param(p, 'pb', 0.8),
    jsAPerM2: param(p, 'js', 0),
    jswAPerM: 0,
    xti: 3,
    nj: 1,
    tnomK,
  };
  return {
    family: level === 1 ? 'level1' : level === 2 ? 'level2' : 'level3',
    notes,
    polarity,
    coxFPerM2: cox,
    // with a body factor, Cdep/Cox = gamma / (2 sqrt(phi)); without one, no depletion reduction
    offGateCapFraction: gamma > 0 ? 1 / (1 + (2 * Math.sqrt(phi)) / gamma) : 1,
    cgdoFPerM: param(p, 'cgdo', 0),
    cgsoFPerM: param(p, 'cgso', 0),
    junction,
    effectiveLength: (l) => l - 2 * ld,
    effectiveWidth: (w) => w,
    threshold: (vbs) => vth(vbs),
    drainCurrent(vgs, vds, vbs, tempK, wM, lM) {
      if (vds >= 0) return current(vgs, vds, vbs, tempK, wM, lM);
      return -current(vgs - vds, -vds, vbs - vds, tempK, wM, lM);
    },
  };
}
