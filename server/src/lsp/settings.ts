// The editor's tidemark.* settings as the server reads them. Each value is checked against what
// the analysis accepts: one that is not (a string where numbers go, an unknown device kind, a
// clock spec without its times) is left at its default and named in a warning, so a mistyped
// setting never stops the analysis.

import { parseBudget, readClockSpec, validTemps, type EngineOptions } from '../core/options';
import { DEVICE_KINDS, type DeviceKind } from '../circuit/directives';

export interface Settings {
  temps: number[];
  budget: string;
  supplies: Record<string, number>;
  clocks: string[];
  deviceRules: Array<{ pattern: string; kind: DeviceKind }>;
  includePaths: string[];
  geometryScale: number | null;
  maxAnalysisLines: number;
}

export const DEFAULT_SETTINGS: Settings = { temps: [25, 110], budget: '10%', supplies: {}, clocks: [], deviceRules: [], includePaths: [], geometryScale: null, maxAnalysisLines: 400_000 };

/**
 * The settings from the client's `tidemark` section (`raw`; missing keys take their defaults),
 * and a sentence for each value that was not taken.
 */
export function readSettings(raw: unknown): { settings: Settings; problems: string[] } {
  const settings: Settings = { ...DEFAULT_SETTINGS };
  const problems: string[] = [];
  const given = raw !== null && typeof raw === 'object' ? (raw as Record<string, unknown>) : {};
  const shown = (v: unknown) => JSON.stringify(v)?.slice(0, 60) ?? String(v);
  const refuse = (key: string, value: unknown, wanted: string) => problems.push(`tidemark.${key} is ${shown(value)}, not ${wanted}; the default is used`);
  const has = (key: string) => given[key] !== undefined && given[key] !== null;

  if (has('temps')) {
    const t = validTemps(given.temps);
    if (t) settings.temps = t;
    else refuse('temps', given.temps, 'a list of temperatures in degrees C such as [25, 110]');
  }
  if (has('budget')) {
    if (typeof given.budget === 'string' && parseBudget(given.budget)) settings.budget = given.budget;
    else refuse('budget', given.budget, 'a percentage (10%), volts (0.12V, 80mV) or receiver');
  }
  if (has('supplies')) {
    const s = given.supplies;
    if (typeof s !== 'object' || Array.isArray(s)) refuse('supplies', s, 'an object of net names and volts such as {"vddq": 1.2}');
    else {
      const ok: Record<string, number> = {};
      for (const [net, v] of Object.entries(s as Record<string, unknown>)) {
        if (typeof v === 'number' && Number.isFinite(v)) ok[net] = v;
        else problems.push(`tidemark.supplies: ${net} is ${shown(v)}, not volts; it is left out`);
      }
      settings.supplies = ok;
    }
  }
  if (has('clocks')) {
    if (!Array.isArray(given.clocks)) refuse('clocks', given.clocks, 'a list of clock specs such as "clk period=1n high=0.5n"');
    else
      settings.clocks = given.clocks.filter((spec) => {
        if (typeof spec === 'string' && clockSetting(spec)) return true;
        problems.push(`tidemark.clocks: ${shown(spec)} is not "<net> period=<t> high=<t> [delay=<t>]" or "<net> inverse=<net>"; it is left out`);
        return false;
      }) as string[];
  }
  if (has('deviceRules')) {
    if (!Array.isArray(given.deviceRules)) refuse('deviceRules', given.deviceRules, 'a list of {"pattern", "kind"} rules');
    else
      settings.deviceRules = given.deviceRules.filter((r) => {
        const rule = r as { pattern?: unknown; kind?: unknown } | null;
        if (rule && typeof rule.pattern === 'string' && rule.pattern !== '' && typeof rule.kind === 'string' && DEVICE_KINDS.has(rule.kind)) return true;
        problems.push(`tidemark.deviceRules: ${shown(r)} needs a pattern and a kind (${[...DEVICE_KINDS].join(', ')}); it is left out`);
        return false;
      }) as Settings['deviceRules'];
  }
  if (has('includePaths')) {
    if (Array.isArray(given.includePaths) && given.includePaths.every((x) => typeof x === 'string')) settings.includePaths = given.includePaths as string[];
    else refuse('includePaths', given.includePaths, 'a list of folders');
  }
  if (has('geometryScale')) {
    const g = given.geometryScale;
    if (typeof g === 'number' && Number.isFinite(g) && g > 0) settings.geometryScale = g;
    else refuse('geometryScale', g, 'metres per unit above 0 (1e-6 for microns)');
  }
  if (has('maxAnalysisLines')) {
    const m = given.maxAnalysisLines;
    if (typeof m === 'number' && Number.isFinite(m) && m >= 1) settings.maxAnalysisLines = Math.floor(m);
    else refuse('maxAnalysisLines', m, 'a line count of 1 or more');
  }
  return { settings, problems };
}

/** A clock setting: "clk period=1n high=0.5n [delay=0.1n]" or "clkb inverse=clk"; undefined when it is neither (words it cannot read are passed over). */
export function clockSetting(spec: string): NonNullable<EngineOptions['clocks']>[number] | undefined {
  return readClockSpec(spec.trim().split(/\s+/)).clock;
}

/** The engine's options under these settings, for a root file of `lineCount` lines. */
export function engineOptionsFor(settings: Settings, lineCount: number): EngineOptions {
  const o: EngineOptions = { tempsC: settings.temps, includePaths: settings.includePaths, supplies: settings.supplies };
  const budget = parseBudget(settings.budget);
  if (budget) o.budget = budget;
  if (settings.geometryScale) o.geometryScale = settings.geometryScale;
  if (settings.deviceRules.length) o.deviceRules = settings.deviceRules;
  const clocks = settings.clocks.map(clockSetting).filter((k) => k !== undefined);
  if (clocks.length) o.clocks = clocks;
  if (lineCount > settings.maxAnalysisLines) o.frontEndOnly = true;
  return o;
}
