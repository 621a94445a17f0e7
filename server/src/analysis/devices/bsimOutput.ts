// The part of the BSIM3 and BSIM4 drain current the two share, from the effective gate drive
// on: the Lambda smoothing (A1, A2), saturation voltage with source/drain resistance, the
// smooth effective drain voltage (DELTA), the output-resistance terms (channel-length
// modulation PCLM, DIBL through thetaRout and PDIBLB, PVAG, substrate current PSCBE1/2) and the
// drain current itself. Voltages in the n-channel frame, normal mode (Vds >= 0).

const EXP_THRESHOLD = 34;
const MAX_EXP = 5.834617425e14;

export interface BsimOutputInputs {
  Vgsteff: number;
  Vds: number;
  Vbseff: number;
  vtm: number;
  Abulk: number;
  ueff: number;
  Weff: number;
  Leff: number;
  Rds: number;
  vsat: number;
  cox: number;
  a1: number;
  a2: number;
  delta: number;
  pclm: number;
  litl: number;
  thetaRout: number;
  pdiblb: number;
  pvag: number;
  pscbe1: number;
  pscbe2: number;
}

/** The output-conductance parameters, read from a size-dependent parameter set (both models). */
export function outputParams(s: Record<string, number | undefined>): Pick<BsimOutputInputs, 'vsat' | 'a1' | 'a2' | 'delta' | 'pclm' | 'litl' | 'thetaRout' | 'pdiblb' | 'pvag' | 'pscbe1' | 'pscbe2'> {
  return {
    vsat: s['vsattemp']!,
    a1: s['a1']!,
    a2: s['a2']!,
    delta: s['delta']!,
    pclm: s['pclm']!,
    litl: s['litl']!,
    thetaRout: s['thetaRout']!,
    pdiblb: s['pdiblb']!,
    pvag: s['pvag']!,
    pscbe1: s['pscbe1']!,
    pscbe2: s['pscbe2']!,
  };
}

export function bsimChannelCurrent(x: BsimOutputInputs): number {
  const { Vgsteff, Vds, Vbseff, vtm, Abulk, ueff, Weff, Leff, Rds, vsat, cox, a1, a2, delta } = x;
  const WVCoxRds = Weff * vsat * cox * Rds;
  const EsatL = ((2 * vsat) / ueff) * Leff;
  let Lambda: number;
  if (a1 === 0) Lambda = a2;
  else if (a1 > 0) {
    const T0 = 1 - a2;
    const T1 = T0 - a1 * Vgsteff - 0.0001;
    Lambda = a2 + T0 - 0.5 * (T1 + Math.sqrt(T1 * T1 + 0.0004 * T0));
  } else {
    const T1 = a2 + a1 * Vgsteff - 0.0001;
    Lambda = 0.5 * (T1 + Math.sqrt(T1 * T1 + 0.0004 * a2));
  }
  const Vgst2Vtm = Vgsteff + 2 * vtm;
  let Vdsat: number;
  if (Rds === 0 && Lambda === 1) Vdsat = (EsatL * Vgst2Vtm) / (Abulk * EsatL + Vgst2Vtm);
  else {
    const T9 = Abulk * WVCoxRds;
    const T7 = Vgst2Vtm * T9;
    const T6 = Vgst2Vtm * WVCoxRds;
    const T0 = 2 * Abulk * (T9 - 1 + 1 / Lambda);
    const T1 = Vgst2Vtm * (2 / Lambda - 1) + Abulk * EsatL + 3 * T7;
    const T2 = Vgst2Vtm * (EsatL + 2 * T6);
    Vdsat = (T1 - Math.sqrt(T1 * T1 - 2 * T0 * T2)) / T0;
  }
  const T1d = Vdsat - Vds - delta;
  let Vdseff = Vdsat - 0.5 * (T1d + Math.sqrt(T1d * T1d + 4 * delta * Vdsat));
  if (Vds === 0) Vdseff = 0;
  const tmp4 = 1 - (0.5 * Abulk * Vdsat) / Vgst2Vtm;
  const Vasat = (EsatL + Vdsat + 2 * WVCoxRds * Vgsteff * tmp4) / (2 / Lambda - 1 + WVCoxRds * Abulk);
  if (Vdseff > Vds) Vdseff = Vds;
  const diffVds = Vds - Vdseff;
  let VACLM = MAX_EXP;
  if (x.pclm > 0 && diffVds > 1e-10) VACLM = (Leff * (Abulk + Vgsteff / EsatL) * diffVds) / (x.pclm * Abulk * x.litl);
  let VADIBL = MAX_EXP;
  if (x.thetaRout > 0) {
    const T8 = Abulk * Vdsat;
    VADIBL = (Vgst2Vtm - (Vgst2Vtm * T8) / (Vgst2Vtm + T8)) / x.thetaRout;
    const T7 = x.pdiblb * Vbseff;
    VADIBL *= T7 >= -0.9 ? 1 / (1 + T7) : (17 + 20 * T7) / (0.8 + T7);
  }
  const T9p = (x.pvag / EsatL) * Vgsteff;
  const T0p = T9p > -0.9 ? 1 + T9p : (0.8 + T9p) / (17 + 20 * T9p);
  const Va = Vasat + (T0p * VACLM * VADIBL) / (VACLM + VADIBL);
  let VASCBE = MAX_EXP;
  if (x.pscbe2 > 0) {
    if (diffVds > (x.pscbe1 * x.litl) / EXP_THRESHOLD) VASCBE = (Leff * Math.exp((x.pscbe1 * x.litl) / diffVds)) / x.pscbe2;
    else VASCBE = (MAX_EXP * Leff) / x.pscbe2;
  }
  const beta = (ueff * cox * Weff) / Leff;
  const gche = (beta * Vgsteff * (1 - (0.5 * Abulk * Vdseff) / Vgst2Vtm)) / (1 + Vdseff / EsatL);
  const Idl = (gche * Vdseff) / (1 + gche * Rds);
  return Idl * (1 + diffVds / Va) * (1 + diffVds / VASCBE);
}
