// BSIM3v3 (ngspice levels 8 and 49) DC drain current, after the UC Berkeley BSIM3v3.3 manual's
// equations: threshold with body effect, short-channel, narrow-width and DIBL terms; the
// subthreshold slope factor n (NFACTOR, CDSC, CDSCD, CDSCB, CIT); the smooth effective gate drive
// through weak and strong inversion (VOFF); bulk charge, mobility degradation, velocity
// saturation, channel-length modulation and output resistance; temperature through TNOM, KT1,
// KT1L, KT2, UTE, UA1, UB1, UC1, AT, PRT. Manual defaults are used for parameters a card omits.
// Not modelled: poly depletion beyond NGATE's first-order form, substrate current, gate leakage
// (BSIM3 has none), non-quasi-static effects. Binned L/W/P parameter variants are honoured.

import { EPS_OX_F_PER_M, EPS_SI_F_PER_M, ELEMENTARY_CHARGE_C, intrinsicDensityPerCm3, siliconBandGapEv, thermalVoltage, ZERO_CELSIUS_K } from './physics';
import { bsimChannelCurrent, outputParams } from './bsimOutput';
import { param, given, type JunctionParams, type MosModel } from './mosModel';

const EXP_THRESHOLD = 34;
const MIN_EXP = 1.713908431e-15;

interface Sized {
  leff: number;
  weff: number;
  [k: string]: number;
}

/** Card names ngspice accepts for the manual's parameters (nch is NPEAK, pdiblc1 is PDIBL1...). */
const ALIASES: Record<string, string> = { nch: 'npeak', pdiblc1: 'pdibl1', pdiblc2: 'pdibl2', pdiblcb: 'pdiblb', vtho: 'vth0', uo: 'u0' };

export function createBsim3(card: Readonly<Record<string, number>>, polarity: 'n' | 'p'): MosModel {
  const p: Record<string, number> = {};
  for (const [k, v] of Object.entries(card)) {
    const bare = ALIASES[k] ?? k;
    // l/w/p-prefixed size variants follow their base name's alias
    const pre = /^[lwp]/.test(k) ? ALIASES[k.slice(1)] : undefined;
    p[pre ? k[0] + pre : bare] = v;
  }
  const notes: string[] = ['gate leakage not included: BSIM3 has no tunnelling model'];
  const type = 1; // evaluated in the n-channel frame
  // ngspice evaluates a p-channel device in the n-channel frame with TYPE * VTH0
  const sign = polarity === 'p' ? -1 : 1;
  const vth0Card = given(p, 'vth0') ? sign * p['vth0']! : undefined;
  const tox = param(p, 'tox', 150e-10);
  const toxm = param(p, 'toxm', tox);
  const cox = EPS_OX_F_PER_M / tox;
  const tnomK = (given(p, 'tnom') ? p['tnom']! : 27) + ZERO_CELSIUS_K;
  const mobMod = param(p, 'mobmod', 1);
  const lint = param(p, 'lint', 0);
  const wint = param(p, 'wint', 0);
  const xj0 = param(p, 'xj', 0.15e-6);
  const dlc = param(p, 'dlc', lint);
  const cgdo = given(p, 'cgdo') ? p['cgdo']! : dlc > 0 && given(p, 'dlc') ? dlc * cox - param(p, 'cgdl', 0) : 0.6 * xj0 * cox;
  const cgso = given(p, 'cgso') ? p['cgso']! : dlc > 0 && given(p, 'dlc') ? dlc * cox - param(p, 'cgsl', 0) : 0.6 * xj0 * cox;

  const defaults: Record<string, number> = {
    cdsc: 2.4e-4, cdscb: 0, cdscd: 0, cit: 0, nfactor: 1, xj: 0.15e-6, vsat: 8e4, at: 3.3e4, a0: 1, ags: 0, a1: 0, a2: 1,
    keta: -0.047, nsub: 6e16, npeak: 1.7e17, ngate: 0, vbm: -3, xt: 1.55e-7, kt1: -0.11, kt1l: 0, kt2: 0.022, k3: 80, k3b: 0,
    w0: 2.5e-6, nlx: 1.74e-7, dvt0: 2.2, dvt1: 0.53, dvt2: -0.032, dvt0w: 0, dvt1w: 5.3e6, dvt2w: -0.032, drout: 0.56,
    ua: 2.25e-9, ua1: 4.31e-9, ub: 5.87e-19, ub1: -7.61e-18, uc: mobMod === 3 ? -0.0465 : -0.0465e-9, uc1: mobMod === 3 ? -0.056 : -0.056e-9,
    u0: polarity === 'n' ? 0.067 : 0.025, ute: -1.5, voff: -0.08, delta: 0.01, rdsw: 0, prwg: 0, prwb: 0, prt: 0, eta0: 0.08, etab: -0.07,
    pclm: 1.3, pdibl1: 0.39, pdibl2: 0.0086, pdiblb: 0, pscbe1: 4.24e8, pscbe2: 1e-5, pvag: 0, wr: 1, dwg: 0, dwb: 0, b0: 0, b1: 0,
    gamma1: NaN, gamma2: NaN, vbx: NaN, k1: NaN, k2: NaN, vfb: NaN, vth0: NaN,
  };
  defaults['dsub'] = param(p, 'drout', 0.56);

  const cache = new Map<string, Sized>();
  let last: { w: number; l: number; t: number; s: Sized } | undefined;
  const sized = (wM: number, lM: number, tempK: number): Sized => {
    // most calls repeat the previous device's size and temperature
    if (last && last.w === wM && last.l === lM && last.t === tempK) return last.s;
    const key = `${wM}|${lM}|${tempK}`;
    const hit = cache.get(key);
    if (hit) {
      last = { w: wM, l: lM, t: tempK, s: hit };
      return hit;
    }
    const leff = lM - 2 * lint;
    const weff = wM - 2 * wint;
    const invL = 1e-6 / leff;
    const invW = 1e-6 / weff;
    const invLW = 1e-12 / (leff * weff);
    const s: Sized = { leff, weff };
    for (const [k, d] of Object.entries(defaults)) {
      const base = k === 'vth0' ? (vth0Card ?? NaN) : given(p, k) ? p[k]! : d;
      s[k] = base + param(p, 'l' + k, 0) * invL + param(p, 'w' + k, 0) * invW + param(p, 'p' + k, 0) * invLW;
    }
    if (s['u0']! > 1) s['u0'] = s['u0']! / 1e4;
    if (s['npeak']! > 1e20) s['npeak'] = s['npeak']! * 1e-6;
    if (s['nsub']! > 1e20) s['nsub'] = s['nsub']! * 1e-6;
    const tRatio = tempK / tnomK;
    const vtm0 = thermalVoltage(tnomK);
    const ni = intrinsicDensityPerCm3(tnomK);
    s['ua'] = s['ua']! + s['ua1']! * (tRatio - 1);
    s['ub'] = s['ub']! + s['ub1']! * (tRatio - 1);
    s['uc'] = s['uc']! + s['uc1']! * (tRatio - 1);
    s['u0temp'] = s['u0']! * Math.pow(tRatio, s['ute']!);
    s['vsattemp'] = s['vsat']! - s['at']! * (tRatio - 1);
    s['rds0'] = (s['rdsw']! + s['prt']! * (tRatio - 1)) / Math.pow(weff * 1e6, s['wr']!);
    if (!given(p, 'npeak') && given(p, 'gamma1')) s['npeak'] = 3.021e22 * (s['gamma1']! * cox) ** 2;
    const npeak = s['npeak']!;
    const phi = 2 * vtm0 * Math.log(npeak / ni);
    s['phi'] = phi;
    s['sqrtPhi'] = Math.sqrt(phi);
    s['phis3'] = s['sqrtPhi']! * phi;
    s['Xdep0'] = Math.sqrt((2 * EPS_SI_F_PER_M) / (ELEMENTARY_CHARGE_C * npeak * 1e6)) * s['sqrtPhi']!;
    s['litl'] = Math.sqrt(3 * s['xj']! * tox);
    s['vbi'] = vtm0 * Math.log((1e20 * npeak) / (ni * ni));
    s['cdep0'] = Math.sqrt((ELEMENTARY_CHARGE_C * EPS_SI_F_PER_M * npeak * 1e6) / 2 / phi);
    if (given(p, 'k1') || given(p, 'k2')) {
      if (!given(p, 'k1')) s['k1'] = 0.53;
      if (!given(p, 'k2')) s['k2'] = -0.0186;
    } else {
      let vbx = given(p, 'vbx') ? s['vbx']! : phi - 7.7348e-4 * npeak * s['xt']! * s['xt']!;
      if (vbx > 0) vbx = -vbx;
      let vbm = s['vbm']!;
      if (vbm > 0) vbm = -vbm;
      s['vbm'] = vbm;
      const g1 = given(p, 'gamma1') ? s['gamma1']! : (5.753e-12 * Math.sqrt(npeak)) / cox;
      const g2 = given(p, 'gamma2') ? s['gamma2']! : (5.753e-12 * Math.sqrt(s['nsub']!)) / cox;
      const t1 = Math.sqrt(phi - vbx) - s['sqrtPhi']!;
      const t2 = Math.sqrt(phi * (phi - vbm)) - phi;
      s['k2'] = ((g1 - g2) * t1) / (2 * t2 + vbm);
      s['k1'] = g2 - 2 * s['k2']! * Math.sqrt(phi - vbm);
    }
    if (s['k2']! < 0) {
      const t0 = (0.5 * s['k1']!) / s['k2']!;
      let vbsc = 0.9 * (phi - t0 * t0);
      if (vbsc > -3) vbsc = -3;
      else if (vbsc < -30) vbsc = -30;
      s['vbsc'] = vbsc;
    } else s['vbsc'] = -30;
    if (s['vbsc']! > s['vbm']!) s['vbsc'] = s['vbm']!;
    if (!Number.isFinite(s['vth0']!)) {
      const vfb = given(p, 'vfb') ? s['vfb']! : -1.0;
      s['vth0'] = vfb + phi + s['k1']! * s['sqrtPhi']!;
    }
    s['k1ox'] = (s['k1']! * tox) / toxm;
    s['k2ox'] = (s['k2']! * tox) / toxm;
    const t1 = Math.sqrt((EPS_SI_F_PER_M / EPS_OX_F_PER_M) * tox * s['Xdep0']!);
    let t0 = Math.exp((-0.5 * s['dsub']! * leff) / t1);
    s['theta0vb0'] = t0 + 2 * t0 * t0;
    t0 = Math.exp((-0.5 * s['drout']! * leff) / t1);
    s['thetaRout'] = s['pdibl1']! * (t0 + 2 * t0 * t0) + s['pdibl2']!;
    s['tRatio'] = tRatio;
    cache.set(key, s);
    last = { w: wM, l: lM, t: tempK, s };
    return s;
  };
  const factor1 = Math.sqrt((EPS_SI_F_PER_M / EPS_OX_F_PER_M) * tox);

  /** Threshold and the quantities the current needs, at one bias (normal mode). */
  const core = (s: Sized, Vds: number, Vbs: number, tempK: number) => {
    const vtm = thermalVoltage(tempK);
    const vbsc = s['vbsc']!;
    let T0 = Vbs - vbsc - 0.001;
    let Vbseff = vbsc + 0.5 * (T0 + Math.sqrt(T0 * T0 - 0.004 * vbsc));
    if (Vbseff < Vbs) Vbseff = Vbs;
    const phi = s['phi']!;
    let Phis: number;
    let sqrtPhis: number;
    if (Vbseff > 0) {
      T0 = phi / (phi + Vbseff);
      Phis = phi * T0;
      sqrtPhis = s['phis3']! / (phi + 0.5 * Vbseff);
    } else {
      Phis = phi - Vbseff;
      sqrtPhis = Math.sqrt(Phis);
    }
    void Phis;
    const Xdep = (s['Xdep0']! * sqrtPhis) / s['sqrtPhi']!;
    const Leff = s.leff;
    const V0 = s['vbi']! - phi;
    const T3x = Math.sqrt(Xdep);
    const smooth = (x: number) => (x >= -0.5 ? 1 + x : (1 + 3 * x) / (3 + 8 * x));
    const lt1 = factor1 * T3x * smooth(s['dvt2']! * Vbseff);
    const ltw = factor1 * T3x * smooth(s['dvt2w']! * Vbseff);
    T0 = (-0.5 * s['dvt1']! * Leff) / lt1;
    let T1 = T0 > -EXP_THRESHOLD ? Math.exp(T0) : MIN_EXP;
    const Theta0 = T1 * (1 + 2 * T1);
    const DeltVth = s['dvt0']! * Theta0 * V0;
    T0 = (-0.5 * s['dvt1w']! * s.weff * Leff) / ltw;
    T1 = T0 > -EXP_THRESHOLD ? Math.exp(T0) : MIN_EXP;
    const T2 = s['dvt0w']! * T1 * (1 + 2 * T1) * V0;
    const tempRatio = s['tRatio']! - 1;
    T0 = Math.sqrt(1 + s['nlx']! / Leff);
    const Tt = s['k1ox']! * (T0 - 1) * s['sqrtPhi']! + (s['kt1']! + s['kt1l']! / Leff + s['kt2']! * Vbseff) * tempRatio;
    const tmp2 = (tox * phi) / (s.weff + s['w0']!);
    let T3 = s['eta0']! + s['etab']! * Vbseff;
    if (T3 < 1e-4) T3 = (2e-4 - T3) / (3 - 2e4 * T3);
    const DIBL = T3 * s['theta0vb0']! * Vds;
    const Vth =
      type * s['vth0']! - s['k1']! * s['sqrtPhi']! + s['k1ox']! * sqrtPhis - s['k2ox']! * Vbseff - DeltVth - T2 + (s['k3']! + s['k3b']! * Vbseff) * tmp2 + Tt - DIBL;
    const tmpn = (s['nfactor']! * EPS_SI_F_PER_M) / Xdep;
    const tmp3 = s['cdsc']! + s['cdscb']! * Vbseff + s['cdscd']! * Vds;
    const tmp4 = (tmpn + tmp3 * Theta0 + s['cit']!) / cox;
    const n = tmp4 >= -0.5 ? 1 + tmp4 : (1 + 3 * tmp4) / (3 + 8 * tmp4);
    return { vtm, Vbseff, sqrtPhis, Xdep, Vth, n };
  };

  const currentNormal = (s: Sized, Vgs: number, Vds: number, Vbs: number, tempK: number): number => {
    const { vtm, Vbseff, sqrtPhis, Xdep, Vth, n } = core(s, Vds, Vbs, tempK);
    const Leff = s.leff;
    let VgsEff = Vgs;
    const ngate = s['ngate']!;
    const vfb = type * s['vth0']! - s['phi']! - s['k1']! * s['sqrtPhi']!;
    if (ngate > 1e18 && ngate < 1e25 && Vgs > vfb + s['phi']!) {
      const T1 = (1e6 * ELEMENTARY_CHARGE_C * EPS_SI_F_PER_M * ngate) / (cox * cox);
      const T4 = Math.sqrt(1 + (2 * (Vgs - vfb - s['phi']!)) / T1);
      const T2 = T1 * (T4 - 1);
      const T3 = (0.5 * T2 * T2) / T1;
      const T7 = 1.12 - T3 - 0.05;
      const T6 = Math.sqrt(T7 * T7 + 0.224);
      VgsEff = Vgs - (1.12 - 0.5 * (T7 + T6));
    }
    const Vgst = VgsEff - Vth;
    const T10 = 2 * n * vtm;
    const VgstNVt = Vgst / T10;
    const ExpArg = (2 * s['voff']! - Vgst) / T10;
    let Vgsteff: number;
    if (VgstNVt > EXP_THRESHOLD) Vgsteff = Vgst;
    else if (ExpArg > EXP_THRESHOLD) Vgsteff = ((vtm * s['cdep0']!) / cox) * Math.exp((Vgst - s['voff']!) / (n * vtm));
    else {
      const T1 = T10 * Math.log(1 + Math.exp(VgstNVt));
      const T2 = 1 + T10 * (cox / (vtm * s['cdep0']!)) * Math.exp(ExpArg);
      Vgsteff = T1 / T2;
    }
    const T9s = sqrtPhis - s['sqrtPhi']!;
    let Weff = s.weff - 2 * (s['dwg']! * Vgsteff + s['dwb']! * T9s);
    if (Weff < 2e-8) Weff = (2e-8 * (4e-8 - Weff)) / (6e-8 - 2 * Weff);
    const tr = s['prwg']! * Vgsteff + s['prwb']! * T9s;
    const Rds = tr >= -0.9 ? s['rds0']! * (1 + tr) : (s['rds0']! * (0.8 + tr)) / (17 + 20 * tr);
    // bulk charge factor
    const T1a = (0.5 * s['k1ox']!) / sqrtPhis;
    const T9 = Math.sqrt(s['xj']! * Xdep);
    const T5 = Leff / (Leff + 2 * T9);
    const T2a = s['a0']! * T5 + s['b0']! / (s.weff + s['b1']!);
    let Abulk0 = 1 + T1a * T2a;
    let Abulk = Abulk0 - T1a * s['ags']! * s['a0']! * T5 * T5 * T5 * Vgsteff;
    if (Abulk0 < 0.1) Abulk0 = (0.2 - Abulk0) / (3 - 20 * Abulk0);
    if (Abulk < 0.1) Abulk = (0.2 - Abulk) / (3 - 20 * Abulk);
    const T2k = s['keta']! * Vbseff;
    const Tk = T2k >= -0.9 ? 1 / (1 + T2k) : (17 + 20 * T2k) / (0.8 + T2k);
    Abulk *= Tk;
    // mobility
    let T5m: number;
    if (mobMod === 1) {
      const T3 = (Vgsteff + 2 * Vth) / tox;
      T5m = T3 * (s['ua']! + s['uc']! * Vbseff + s['ub']! * T3);
    } else if (mobMod === 2) {
      T5m = (Vgsteff / tox) * (s['ua']! + s['uc']! * Vbseff + (s['ub']! * Vgsteff) / tox);
    } else {
      const T3 = (Vgsteff + 2 * Vth) / tox;
      T5m = T3 * (s['ua']! + s['ub']! * T3) * (1 + s['uc']! * Vbseff);
    }
    const Denomi = T5m >= -0.8 ? 1 + T5m : (0.6 + T5m) / (7 + 10 * T5m);
    const ueff = s['u0temp']! / Denomi;
    // saturation voltage
    return bsimChannelCurrent({
      Vgsteff,
      Vds,
      Vbseff,
      vtm,
      Abulk,
      ueff,
      Weff,
      Leff,
      Rds,
      cox: cox,
      ...outputParams(s),
    });
  };

  const junction: JunctionParams = {
    cjFPerM2: param(p, 'cj', 5e-4),
    mj: param(p, 'mj', 0.5),
    pbV: Math.max(0.1, param(p, 'pb', 1.0)),
    cjswFPerM: param(p, 'cjsw', 5e-10),
    mjsw: param(p, 'mjsw', 0.33),
    pbswV: Math.max(0.1, param(p, 'pbsw', 1.0)),
    jsAPerM2: param(p, 'js', 1e-4),
    jswAPerM: param(p, 'jsw', 0),
    xti: param(p, 'xti', 3),
    nj: param(p, 'nj', 1),
    tnomK,
  };
  void siliconBandGapEv;
  return {
    family: 'bsim3',
    notes,
    polarity,
    coxFPerM2: cox,
    offGateCapFraction: (() => {
      const npeak = given(p, 'npeak') ? (p['npeak']! > 1e20 ? p['npeak']! * 1e-6 : p['npeak']!) : 1.7e17;
      const phi = 2 * thermalVoltage(tnomK) * Math.log(npeak / intrinsicDensityPerCm3(tnomK));
      const cdep0 = Math.sqrt((ELEMENTARY_CHARGE_C * EPS_SI_F_PER_M * npeak * 1e6) / 2 / phi);
      return cdep0 / (cox + cdep0);
    })(),
    cgdoFPerM: cgdo,
    cgsoFPerM: cgso,
    junction,
    effectiveLength: (l) => l - 2 * lint,
    effectiveWidth: (w) => w - 2 * wint,
    threshold(vbs, vds, tempK, wM, lM) {
      return core(sized(wM, lM, tempK), Math.abs(vds), vbs, tempK).Vth;
    },
    drainCurrent(vgs, vds, vbs, tempK, wM, lM) {
      const s = sized(wM, lM, tempK);
      if (vds >= 0) return currentNormal(s, vgs, vds, vbs, tempK);
      // inverse mode: source and drain swap roles
      return -currentNormal(s, vgs - vds, -vds, vbs - vds, tempK);
    },
  };
}
