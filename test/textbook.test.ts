// Worked checks against published formulas.
import { describe, expect, it } from 'vitest';
import { BOLTZMANN_J_PER_K, ELEMENTARY_CHARGE_C, thermalVoltage } from '../server/src/analysis/devices/physics';
import { textbookChargeSharing } from '../server/src/analysis/electrical/chargeSharing';
import { inverterThreshold } from '../server/src/analysis/electrical/budget';
import { retentionTime } from '../server/src/analysis/electrical/retention';

describe('physical constants (2019 SI, exact k and q)', () => {
  it('kT/q at 300 K is 25.852 mV', () => {
    expect(BOLTZMANN_J_PER_K).toBe(1.380649e-23);
    expect(ELEMENTARY_CHARGE_C).toBe(1.602176634e-19);
    expect(thermalVoltage(300)).toBeCloseTo(0.025852, 6);
  });
});

describe('charge sharing, Rabaey, Chandrakasan and Nikolic, Digital Integrated Circuits 2nd ed., dynamic logic', () => {
  it('small sharing: dV = (Ca/CL)(VDD - VTn) when that stays below VTn', () => {
    // VDD 2.5 V, VTn 0.5 V, CL 50 fF, Ca 5 fF: dV = 0.1 * 2.0 = 0.2 V (< VTn)
    expect(textbookChargeSharing(2.5, 0.5, 50e-15, 5e-15)).toBeCloseTo(0.2, 12);
  });
  it('large sharing: Vout = VDD CL / (CL + Ca), so dV = VDD Ca / (CL + Ca)', () => {
    // Ca = CL: the limited form would give 2.0 V > VTn, so full sharing: dV = 1.25 V
    expect(textbookChargeSharing(2.5, 0.5, 50e-15, 50e-15)).toBeCloseTo(1.25, 12);
  });
});

describe('CMOS inverter switching threshold, Rabaey et al. (VM = (VTn + r(VDD - |VTp|)) / (1 + r), r = sqrt(kp/kn))', () => {
  it('is VDD/2 for a symmetric inverter', () => {
    expect(inverterThreshold(1.8, 0.45, -0.45, 1e-4, 1e-4)).toBeCloseTo(0.9, 12);
  });
  it('moves toward the stronger side', () => {
    // r = sqrt(1/4) = 0.5: VM = (0.4 + 0.5 * (1.2 - 0.4)) / 1.5 = 0.5333
    expect(inverterThreshold(1.2, 0.4, -0.4, 4e-4, 1e-4)).toBeCloseTo(0.8 / 1.5, 12);
  });
});

describe('retention integral', () => {
  it('is C dV / I for constant C and I', () => {
    const r = retentionTime(1.0, 0.1, -1, () => 5e-15, () => 1e-12);
    expect(r.seconds).toBeCloseTo((5e-15 * 0.1) / 1e-12, 12);
  });
  it('is held when the net current reverses within the budget', () => {
    expect(retentionTime(1.0, 0.1, -1, () => 5e-15, (v) => (v > 0.95 ? 1e-12 : -1e-12))).toEqual({ seconds: null, held: true });
  });
});
