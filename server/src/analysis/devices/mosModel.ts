// What the electrical estimates need from a MOSFET model card, whatever its level. Voltages are
// in the n-channel convention (a p-channel model is evaluated with every voltage negated and
// returns the current's magnitude in that frame); currents in amperes, per device of width wM
// and length lM (multipliers are applied by the caller).

export interface JunctionParams {
  /** Zero-bias bottom capacitance per area (F/m^2), grading, built-in potential (V). */
  cjFPerM2: number;
  mj: number;
  pbV: number;
  /** Zero-bias sidewall capacitance per length (F/m), grading, built-in potential (V). */
  cjswFPerM: number;
  mjsw: number;
  pbswV: number;
  /** Saturation current densities at the model's nominal temperature (A/m^2, A/m). */
  jsAPerM2: number;
  jswAPerM: number;
  /** Temperature exponent and emission coefficient of the junction diode. */
  xti: number;
  nj: number;
  tnomK: number;
}

export interface MosModel {
  /** How the card was read: the family and anything approximated or missing. */
  family: 'level1' | 'level2' | 'level3' | 'bsim3' | 'bsim4' | 'fallback';
  notes: string[];
  polarity: 'n' | 'p';
  /** Channel current from drain to source (n-channel frame), A. */
  drainCurrent(vgs: number, vds: number, vbs: number, tempK: number, wM: number, lM: number): number;
  /** Threshold voltage magnitude at the given bias (n-channel frame), V. */
  threshold(vbs: number, vds: number, tempK: number, wM: number, lM: number): number;
  /** Gate oxide capacitance per area, F/m^2. */
  coxFPerM2: number;
  /**
   * Fraction of Cox*W*L the gate presents when the channel is off (depletion: the oxide in
   * series with the depletion capacitance, Cdep0 / (Cox + Cdep0)).
   */
  offGateCapFraction: number;
  /** Gate-drain and gate-source overlap capacitance per width, F/m. */
  cgdoFPerM: number;
  cgsoFPerM: number;
  junction: JunctionParams;
  /**
   * Gate tunnelling currents (n-channel frame, A, positive from the gate into the terminal) when
   * the card enables them; undefined otherwise. `igs`/`igd` include the gate-to-channel current
   * split to each side and the overlap (edge) currents.
   */
  gateLeakage?(vgs: number, vds: number, tempK: number, wM: number, lM: number): { igs: number; igd: number };
  /** Effective channel length and width (after LINT/WINT), for capacitance. */
  effectiveLength(lM: number): number;
  effectiveWidth(wM: number): number;
}

/** Reads a parameter with a default, case already folded by the parser. */
export function param(p: Readonly<Record<string, number>>, name: string, dflt: number): number {
  const v = p[name];
  return v === undefined || !Number.isFinite(v) ? dflt : v;
}

export function given(p: Readonly<Record<string, number>>, name: string): boolean {
  return p[name] !== undefined;
}
