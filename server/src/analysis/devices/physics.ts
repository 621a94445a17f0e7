// Physical constants (2019 SI: k and q are exact) and the permittivities the model manuals use.

export const BOLTZMANN_J_PER_K = 1.380649e-23;
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
export const EPS0_F_PER_M = 8.8541878128e-12;
/** SiO2 and Si relative permittivities as the BSIM manuals take them (3.9 and 11.7). */
export const EPS_OX_F_PER_M = 3.9 * EPS0_F_PER_M;
export const EPS_SI_F_PER_M = 11.7 * EPS0_F_PER_M;
export const ZERO_CELSIUS_K = 273.15;

/** Thermal voltage kT/q in volts. */
export function thermalVoltage(tempK: number): number {
  return (BOLTZMANN_J_PER_K * tempK) / ELEMENTARY_CHARGE_C;
}

export function celsiusToKelvin(c: number): number {
  return c + ZERO_CELSIUS_K;
}

/** Silicon band gap (eV) versus temperature, the form the BSIM manuals use. */
export function siliconBandGapEv(tempK: number): number {
  return 1.16 - (7.02e-4 * tempK * tempK) / (tempK + 1108.0);
}

/** Intrinsic carrier density (cm^-3) as in the BSIM3/BSIM4 manuals. */
export function intrinsicDensityPerCm3(tempK: number): number {
  const vt = thermalVoltage(tempK);
  return 1.45e10 * (tempK / 300.15) * Math.sqrt(tempK / 300.15) * Math.exp(21.5565981 - siliconBandGapEv(tempK) / (2 * vt));
}
