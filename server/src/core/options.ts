// What the user sets outside the netlist (editor settings, CLI flags). Netlist directives win.

import type { DeviceKind } from '../circuit/directives';
import { parseSpiceNumber } from '../circuit/numbers';

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

/**
 * A droop budget as written in a setting or on the command line: a percentage of the supply
 * (`10%`), volts (`0.12V`, `80mV`) or `receiver`; undefined for anything else, and for a
 * percentage not between 0 and 100 or volts not above 0.
 */
export function parseBudget(text: string): EngineOptions['budget'] | undefined {
  const b = text.trim();
  if (/^receiver$/i.test(b)) return { receiver: true };
  const pct = /^(\d+(?:\.\d*)?|\.\d+)%$/.exec(b);
  if (pct) {
    const f = Number(pct[1]) / 100;
    return f > 0 && f < 1 ? { fraction: f } : undefined;
  }
  const v = /^(\d+(?:\.\d*)?(?:e-?\d+)?|\.\d+(?:e-?\d+)?)(m?)v$/i.exec(b);
  if (v) {
    const volts = Number(v[1]) * (v[2] ? 1e-3 : 1);
    return volts > 0 && Number.isFinite(volts) ? { volts } : undefined;
  }
  return undefined;
}

/** Temperature corners in degrees C: a non-empty list of numbers above absolute zero, or undefined. */
export function validTemps(list: unknown): number[] | undefined {
  if (!Array.isArray(list) || list.length === 0) return undefined;
  return list.every((t) => typeof t === 'number' && Number.isFinite(t) && t > -273.15) ? (list as number[]) : undefined;
}

/**
 * A clock as the command line (`clk,period=1n,high=0.5n`) and the settings (`clk period=1n
 * high=0.5n`) write it, split into words: the net, then `period=`, `high=`, `delay=` (times, an
 * `s` allowed) or `inverse=<net>`. `clock` is undefined unless it has its period and high time,
 * or an inverse; `unread` lists the words that are none of those (the CLI refuses them).
 */
export function readClockSpec(words: readonly string[]): { clock: NonNullable<EngineOptions['clocks']>[number] | undefined; unread: string[] } {
  const [net, ...pairs] = words;
  if (!net) return { clock: undefined, unread: [] };
  const k: NonNullable<EngineOptions['clocks']>[number] = { net: net.toLowerCase() };
  const unread: string[] = [];
  for (const kv of pairs) {
    const [key, val] = kv.split('=');
    if (key === 'inverse' && val) {
      k.inverseOf = val.toLowerCase();
      continue;
    }
    const v = val === undefined ? undefined : parseSpiceNumber(val.replace(/s$/i, ''));
    if (v === undefined || (key !== 'period' && key !== 'high' && key !== 'delay')) unread.push(kv);
    else if (key === 'period') k.periodS = v;
    else if (key === 'high') k.highS = v;
    else k.delayS = v;
  }
  return { clock: k.inverseOf || (k.periodS !== undefined && k.highS !== undefined) ? k : undefined, unread };
}
