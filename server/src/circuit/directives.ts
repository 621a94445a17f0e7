// `* tidemark:` directives read into typed records. Malformed ones are reported and skipped;
// the stages that use them (elaboration, phases, estimates, findings) read only these records.

import type { Diagnostic } from '../core/diagnostics';
import { diag } from '../core/diagnostics';
import type { Range } from '../core/source';
import type { DirectiveLine } from '../syntax/tree';
import { parseSpiceNumber } from './numbers';
import type { EngineOptions } from '../core/options';
import type { Deck, SubcktDefinition } from './deck';

export type DeviceKind = 'nmos' | 'pmos' | 'diode' | 'short' | 'resistor' | 'capacitor';

/** A reviewed finding; `subckt` when written inside a subcircuit (the node is then its local name). */
export interface AcceptDirective extends Sourced {
  node: string;
  rule: string;
  reason: string;
  subckt?: string;
}

export interface Sourced {
  file: string;
  range: Range;
}

export interface ClockDirective extends Sourced {
  net: string;
  periodS?: number;
  highS?: number;
  delayS?: number;
  duty?: number;
  inverseOf?: string;
}

export interface DirectiveSet {
  clocks: ClockDirective[];
  standby: (Sourced & { net: string; level: 0 | 1; forS: number })[];
  supplies: (Sourced & { net: string; volts: number })[];
  grounds: (Sourced & { net: string })[];
  inputs: (Sourced & { net: string })[];
  outputs: (Sourced & { net: string })[];
  tempsC: (Sourced & { values: number[] }) | undefined;
  budget: (Sourced & { fraction?: number; volts?: number; receiver?: boolean }) | undefined;
  accepts: AcceptDirective[];
  devices: (Sourced & { pattern: string; kind: DeviceKind })[];
  /** Geometry scale for W and L (metres per written unit). */
  scale: (Sourced & { value: number }) | undefined;
}

export function emptyDirectives(): DirectiveSet {
  return { clocks: [], standby: [], supplies: [], grounds: [], inputs: [], outputs: [], tempsC: undefined, budget: undefined, accepts: [], devices: [], scale: undefined };
}

/** The net names (lower case) directives and settings give a role to: clocks, standby, rails, inputs and outputs. */
export function roleNames(d: DirectiveSet, options: EngineOptions): Set<string> {
  const out = new Set<string>();
  const add = (n: string | undefined) => n !== undefined && out.add(n.toLowerCase());
  for (const c of d.clocks) (add(c.net), add(c.inverseOf));
  for (const list of [d.standby, d.supplies, d.grounds, d.inputs, d.outputs]) for (const x of list) add(x.net);
  for (const c of options.clocks ?? []) (add(c.net), add(c.inverseOf));
  for (const x of options.standby ?? []) add(x.net);
  for (const g of options.grounds ?? []) add(g);
  for (const s of Object.keys(options.supplies ?? {})) add(s);
  return out;
}

export const DIRECTIVE_VERBS = ['clock', 'standby', 'supply', 'ground', 'input', 'output', 'temps', 'budget', 'accept', 'device', 'scale'] as const;

/** The kinds a device rule may give (a `device` directive, the deviceRules setting). */
export const DEVICE_KINDS: ReadonlySet<string> = new Set<DeviceKind>(['nmos', 'pmos', 'diode', 'short', 'resistor', 'capacitor']);

/** Reads directives into `into`; `out` receives one diagnostic per malformed directive. */
export function readDirectives(lines: { file: string; item: DirectiveLine }[], into: DirectiveSet, out: Diagnostic[]): void {
  for (const { file, item } of lines) {
    const bad = (msg: string, range: Range = item.range) => out.push(diag('directive', file, range, msg));
    const src = { file, range: item.range };
    const args = item.args;
    const kv = (): Map<string, { text: string; range: Range }> => {
      const m = new Map<string, { text: string; range: Range }>();
      for (const a of args) {
        const i = a.text.indexOf('=');
        if (i > 0) m.set(a.text.slice(0, i).toLowerCase(), { text: a.text.slice(i + 1), range: a.range });
      }
      return m;
    };
    const time = (v: { text: string; range: Range } | undefined, what: string): number | undefined => {
      if (!v) return undefined;
      const n = parseSpiceNumber(v.text.replace(/s$/i, ''));
      if (n === undefined || n < 0) bad(`${what} must be a time such as 1n or 500p, not '${v.text}'`, v.range);
      return n;
    };
    switch (item.verb) {
      case 'clock': {
        const net = args[0]?.text;
        if (!net || net.includes('=')) {
          bad('clock needs a net: `clock <net> period=<t> high=<t> [delay=<t>]`, `duty=<fraction>` or `inverse=<net>`');
          break;
        }
        const m = kv();
        const c: ClockDirective = { ...src, net: net.toLowerCase() };
        if (m.has('inverse')) c.inverseOf = m.get('inverse')!.text.toLowerCase();
        else {
          c.periodS = time(m.get('period'), 'period');
          c.highS = time(m.get('high'), 'high');
          c.delayS = time(m.get('delay'), 'delay');
          const duty = m.get('duty');
          if (duty) {
            const d = parseSpiceNumber(duty.text);
            if (d === undefined || d <= 0 || d >= 1) bad(`duty must be a fraction between 0 and 1, not '${duty.text}'`, duty.range);
            else c.duty = d;
          }
          if (c.periodS === undefined || (c.highS === undefined && c.duty === undefined)) {
            bad(`clock ${net} needs period= and high= (or duty=), or inverse=<net>`);
            break;
          }
        }
        into.clocks.push(c);
        break;
      }
      case 'standby': {
        const a = args[0];
        const m = /^([^=]+)=([01])$/.exec(a?.text ?? '');
        const forS = time(kv().get('for'), 'for');
        if (!m || forS === undefined) {
          bad('standby needs `<net>=<0|1> for=<t>`');
          break;
        }
        into.standby.push({ ...src, net: m[1]!.toLowerCase(), level: m[2] === '1' ? 1 : 0, forS });
        break;
      }
      case 'supply': {
        if (args.length === 0) bad('supply needs `<net>=<volts>`');
        for (const a of args) {
          const m = /^([^=]+)=(.+)$/.exec(a.text);
          const v = m ? parseSpiceNumber(m[2]!) : undefined;
          if (!m || v === undefined) bad(`supply needs <net>=<volts>, not '${a.text}'`, a.range);
          else into.supplies.push({ file, range: a.range, net: m[1]!.toLowerCase(), volts: v });
        }
        break;
      }
      case 'ground':
      case 'input':
      case 'output': {
        if (args.length === 0) bad(`${item.verb} needs one or more nets`);
        const list = item.verb === 'ground' ? into.grounds : item.verb === 'input' ? into.inputs : into.outputs;
        for (const a of args) list.push({ file, range: a.range, net: a.text.toLowerCase() });
        break;
      }
      case 'temps': {
        const values = args.map((a) => parseSpiceNumber(a.text.replace(/c$/i, '')));
        if (values.length === 0 || values.some((v) => v === undefined)) bad('temps needs temperatures in degrees C, e.g. `temps 25 110`');
        else into.tempsC = { ...src, values: values as number[] };
        break;
      }
      case 'budget': {
        const t = args[0]?.text ?? '';
        const pct = /^([\d.]+)%$/.exec(t);
        const volts = /^([\d.]+(?:e-?\d+)?)(m?)v$/i.exec(t);
        if (t.toLowerCase() === 'receiver') into.budget = { ...src, receiver: true };
        else if (pct) into.budget = { ...src, fraction: Number(pct[1]) / 100 };
        else if (volts) into.budget = { ...src, volts: Number(volts[1]) * (volts[2] ? 1e-3 : 1) };
        else bad('budget needs a percentage of the supply (`10%`), volts (`0.12V`) or `receiver`');
        break;
      }
      case 'accept': {
        const node = args[0]?.text;
        const rule = args[1]?.text;
        const reason = /reason\s*=\s*"([^"]*)"/.exec(item.args.map((a) => a.text).join(' '));
        if (!node || !rule || !reason) bad('accept needs `<node> <rule> reason="..."`');
        else into.accepts.push({ ...src, node: node.toLowerCase(), rule: rule.toLowerCase(), reason: reason[1]! });
        break;
      }
      case 'device': {
        const pattern = args[0]?.text;
        const kind = args[1]?.text.toLowerCase() as DeviceKind | undefined;
        if (!pattern || !kind || !DEVICE_KINDS.has(kind)) bad('device needs `<subckt-name-pattern> nmos|pmos|diode|short|resistor|capacitor`');
        else into.devices.push({ ...src, pattern: pattern.toLowerCase(), kind });
        break;
      }
      case 'scale': {
        const v = args[0] ? parseSpiceNumber(args[0].text) : undefined;
        if (v === undefined || v <= 0) bad('scale needs the metres per written unit of W and L, e.g. `scale 1u`');
        else into.scale = { ...src, value: v };
        break;
      }
      default:
        bad(`unknown tidemark directive '${item.verb}'; known: ${DIRECTIVE_VERBS.join(', ')}`);
    }
  }
}

/**
 * A deck's directives (those `pick` takes) read into `into` as the elaborator reads them: the
 * top level's, then each definition's, nested ones after their parent's. An `accept` written
 * inside a subcircuit names the node as the cell knows it, so it is marked with the cell.
 */
export function readDeckDirectives(deck: Deck, into: DirectiveSet, out: Diagnostic[], pick: (d: DirectiveLine) => boolean = () => true): void {
  const picked = (lines: Deck['directives']) => (lines.every((l) => pick(l.item)) ? lines : lines.filter((l) => pick(l.item)));
  readDirectives(picked(deck.directives), into, out);
  const collect = (defs: Map<string, SubcktDefinition>) => {
    for (const d of defs.values()) {
      const before = into.accepts.length;
      readDirectives(picked(d.directives), into, out);
      for (let i = before; i < into.accepts.length; i++) into.accepts[i]!.subckt = d.name;
      collect(d.local);
    }
  };
  collect(deck.subckts);
}
