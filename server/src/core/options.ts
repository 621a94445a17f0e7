// What the user sets outside the netlist (editor settings, CLI flags). Netlist directives win.

import type { DeviceKind } from '../circuit/directives';

export interface EngineOptions {
  /** Metres per written unit of W and L when the netlist has no `.option scale` or directive. */
  geometryScale?: number;
  /** Extra supply nets with their voltages, and ground nets. */
  supplies?: Record<string, number>;
  grounds?: string[];
  /** Name rules for supplies and grounds (regular expressions, case-insensitive). */
  supplyNamePattern?: string;
  groundNamePattern?: string;
  /** Voltage assumed for a supply found only by its name. */
  defaultSupplyVolts?: number;
  /** Rules mapping undefined subcircuit names to primitive devices (globs), tried before the defaults. */
  deviceRules?: { pattern: string; kind: DeviceKind }[];
  /** Elaborate only this subcircuit, standalone. */
  top?: string;
  includePaths?: string[];
  /** Clocks for netlists with no periodic sources (a bare subcircuit): times in seconds. */
  clocks?: { net: string; periodS?: number; highS?: number; delayS?: number; inverseOf?: string }[];
  standby?: { net: string; level: 0 | 1; forS: number }[];
  /** Temperature corners in degrees C (default 25 and 110). */
  tempsC?: number[];
  /** Droop budget: a fraction of the supply, volts, or derived from the receiving gate. */
  budget?: { fraction?: number; volts?: number; receiver?: boolean };
  /** Skip the electrical estimates (classification only). */
  skipEstimates?: boolean;
  /** Stop after elaboration (very large files in the editor). */
  frontEndOnly?: boolean;
  /** Name rule for nets that are clocks (regular expression, case-insensitive). */
  clockNamePattern?: string;
}

/** Applied to a net's leaf name (after the last '.'): clk..., ...clock..., phi1, ph2, ck, pre, prech_b. */
export const DEFAULT_CLOCK_PATTERN = '^(.*clk.*|.*clock.*|phi[0-9]*[a-z_]*|ph[0-9]+[a-z_]*|ck[0-9]*[bn]?|pre(ch|charge)?(_?[bn]|_?[0-9]+)?)$';

export const DEFAULT_SUPPLY_PATTERN = '^(vdd|vcc|vpwr|vpb|kapwr|lowlvpwr|vpwrin|avdd|dvdd|vddio|vdda|vddd|vcca|vccd)[a-z0-9_]*!?$';
export const DEFAULT_GROUND_PATTERN = '^(0|gnd|vss|vgnd|vnb|agnd|dgnd|vssa|vssd|vssio)[a-z0-9_]*!?$';
