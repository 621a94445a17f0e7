// From a netlist's model card to a MosModel, with the fallback technology profile for devices
// whose card is missing or of a level Tidemark does not evaluate. The profile is a generic,
// invented 1.0 V, 45 nm-class BSIM4 pair (documented in the README); it is never applied
// silently: every node that depends on it says so.

import type { ModelCard } from '../../circuit/models';
import type { Polarity } from '../../circuit/circuit';
import { createBsim3 } from './bsim3';
import { createBsim4 } from './bsim4';
import { createLevel123 } from './level1';
import type { MosModel } from './mosModel';

const FALLBACK_N: Record<string, number> = {
  level: 54, toxe: 1.8e-9, toxm: 1.8e-9, vth0: 0.4, k1: 0.4, k2: 0.01, k3: 0, dvt0: 1, dvt1: 2, dvt2: 0, lpe0: 0, ndep: 3.4e18,
  xj: 1.4e-8, u0: 0.045, ua: 6e-10, ub: 1.2e-18, uc: 0, vsat: 1.5e5, keta: 0.04, rdsw: 150, rdswmin: 100, prwg: 0, nfactor: 2.1,
  cdsc: 0, voff: -0.13, minv: 0.05, eta0: 0.0055, etab: 0, dsub: 0.1, pclm: 0.02, pdibl1: 0.001, pdibl2: 0.001, cgso: 1.1e-10,
  cgdo: 1.1e-10, cjs: 6e-4, mjs: 0.3, pbs: 0.8, cjsws: 5e-10, mjsws: 0.3, pbsws: 0.8, jss: 1e-6, jsws: 1e-12,
};
const FALLBACK_P: Record<string, number> = { ...FALLBACK_N, vth0: -0.42, k2: -0.01, ndep: 2.4e18, u0: 0.0075, ua: 2e-9, ub: 5e-19, vsat: 7e4, keta: -0.047, voff: -0.126, dsub: 0.2, pclm: 0.12 };

/** Supply voltage the fallback profile is meant for. */
export const FALLBACK_SUPPLY_V = 1.0;
export const FALLBACK_PROFILE_NAME = 'tidemark-generic-45 (an invented 1.0 V BSIM4 profile)';

const cache = new WeakMap<ModelCard, MosModel>();
let fallbackN: MosModel | undefined;
let fallbackP: MosModel | undefined;

export function fallbackModel(polarity: Polarity): MosModel {
  if (polarity === 'n') return (fallbackN ??= withNote(createBsim4(FALLBACK_N, 'n'), 'fallback'));
  return (fallbackP ??= withNote(createBsim4(FALLBACK_P, 'p'), 'fallback'));
}

function withNote(m: MosModel, family: 'fallback'): MosModel {
  return { ...m, family, notes: [`no usable model card: the ${FALLBACK_PROFILE_NAME} is used`, ...m.notes] };
}

/** The model for a device: its card when Tidemark can evaluate it, else the fallback profile. */
export function modelFor(card: ModelCard | undefined, polarity: Polarity): MosModel {
  if (!card) return fallbackModel(polarity);
  const hit = cache.get(card);
  if (hit) return hit;
  let m: MosModel;
  switch (card.family) {
    case 'bsim3':
      m = createBsim3(card.params, polarity);
      break;
    case 'bsim4':
      m = createBsim4(card.params, polarity);
      break;
    case 'level1':
    case 'level2':
    case 'level3':
      m = createLevel123(card.params, polarity, card.family === 'level1' ? 1 : card.family === 'level2' ? 2 : 3);
      break;
    default:
      m = { ...fallbackModel(polarity), notes: [`model level ${card.level} of '${card.name}' is not evaluated: the ${FALLBACK_PROFILE_NAME} is used`] };
  }
  cache.set(card, m);
  return m;
}
