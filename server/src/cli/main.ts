// `tidemark check <netlist>...`: the command line for people and CI. Exit codes: 0 when nothing
// at or above --fail-on was found, 1 when something was, 2 for usage or input errors.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { analyse } from '../engine';
import { parseBudget, readClockSpec, validTemps, type EngineOptions } from '../core/options';
import { addToReport, emptyReport } from '../findings/report';
import { formatSarif, formatText } from './format';
import { diskHost } from './diskHost';
import { parseSpiceNumber } from '../circuit/numbers';

const NETLIST_EXTENSIONS = new Set(['.sp', '.spi', '.spice', '.cir', '.ckt', '.net', '.cdl']);

const USAGE = `usage: tidemark check <netlist|folder>... [options]

  --format text|json|sarif   output format (default text)
  --all-nodes                list every node in the JSON, not only those at risk
  --top <subckt>             analyse only this subcircuit, standalone
  --temps 25,110             temperature corners in degrees C
  --budget 10%|0.12V         droop budget
  --fail-on error|warning|never   exit 1 when a finding at or above this level exists (default error)
  --scale <m>                metres per written unit of W and L when the netlist does not say (e.g. 1u)
  --supply <net>=<volts>     declare a supply (repeatable)
  --include-path <dir>       search folder for .include and .lib (repeatable)
  --clock <net>,period=<t>,high=<t>[,delay=<t>] | <net>,inverse=<net>   declare a clock (repeatable)
  --standby <net>=<0|1>,for=<t>   a scenario with that clock held (repeatable)
  --no-colour                plain text even on a terminal
`;

class UsageError extends Error {}

interface CliArgs {
  files: string[];
  format: 'text' | 'json' | 'sarif';
  allNodes: boolean;
  failOn: 'error' | 'warning' | 'never';
  colour: boolean;
  options: EngineOptions;
  tempsC?: number[];
  budget?: string;
}

function parseArgs(argv: string[]): CliArgs {
  if (argv[0] !== 'check') throw new UsageError(argv.length ? `unknown command '${argv[0]}'` : 'no command given');
  const a: CliArgs = { files: [], format: 'text', allNodes: false, failOn: 'error', colour: process.stdout.isTTY === true, options: {} };
  const value = (i: number, flag: string): string => {
    const v = argv[i + 1];
    if (v === undefined || v.startsWith('--')) throw new UsageError(`${flag} needs a value`);
    return v;
  };
  for (let i = 1; i < argv.length; i++) {
    const arg = argv[i]!;
    const [flag, inline] = arg.startsWith('--') && arg.includes('=') ? [arg.slice(0, arg.indexOf('=')), arg.slice(arg.indexOf('=') + 1)] : [arg, undefined];
    const take = () => {
      if (inline !== undefined) return inline;
      const v = value(i, flag);
      i++;
      return v;
    };
    switch (flag) {
      case '--format': {
        const f = take();
        if (f !== 'text' && f !== 'json' && f !== 'sarif') throw new UsageError(`--format must be text, json or sarif, not '${f}'`);
        a.format = f;
        break;
      }
      case '--all-nodes':
        a.allNodes = true;
        break;
      case '--top':
        a.options.top = take();
        break;
      case '--temps': {
        const text = take();
        const t = validTemps(text.split(',').map((x) => (x.trim() === '' ? NaN : Number(x.trim()))));
        if (!t) throw new UsageError(`--temps needs degrees C above absolute zero such as 25,110, not '${text}'`);
        a.tempsC = t;
        a.options.tempsC = t;
        break;
      }
      case '--budget': {
        const b = take();
        const budget = parseBudget(b);
        if (!budget) throw new UsageError(`--budget needs a percentage between 0 and 100 (10%), volts (0.12V) or receiver, not '${b}'`);
        a.budget = b;
        a.options.budget = budget;
        break;
      }
      case '--fail-on': {
        const f = take();
        if (f !== 'error' && f !== 'warning' && f !== 'never') throw new UsageError(`--fail-on must be error, warning or never, not '${f}'`);
        a.failOn = f;
        break;
      }
      case '--scale': {
        const s = parseSpiceNumber(take());
        if (s === undefined || s <= 0) throw new UsageError('--scale needs a positive number such as 1u');
        a.options.geometryScale = s;
        break;
      }
      case '--supply': {
        const m = /^([^=]+)=(.+)$/.exec(take());
        const v = m ? parseSpiceNumber(m[2]!) : undefined;
        if (!m || v === undefined) throw new UsageError('--supply needs <net>=<volts>');
        (a.options.supplies ??= {})[m[1]!.toLowerCase()] = v;
        break;
      }
      case '--clock': {
        // --clock clk,period=1n,high=0.5n[,delay=0.1n]  or  --clock clkb,inverse=clk
        const { clock, unread } = readClockSpec(take().split(','));
        if (unread.length) throw new UsageError(`--clock: cannot read '${unread[0]}' (use period=, high=, delay= or inverse=)`);
        if (!clock) throw new UsageError('--clock needs <net>,period=<t>,high=<t> or <net>,inverse=<net>');
        (a.options.clocks ??= []).push(clock);
        break;
      }
      case '--standby': {
        // --standby clk=0,for=1m
        const m = /^([^=,]+)=([01]),for=(.+)$/.exec(take());
        const forS = m ? parseSpiceNumber(m[3]!.replace(/s$/i, '')) : undefined;
        if (!m || forS === undefined) throw new UsageError('--standby needs <net>=<0|1>,for=<t>');
        (a.options.standby ??= []).push({ net: m[1]!.toLowerCase(), level: m[2] === '1' ? 1 : 0, forS });
        break;
      }
      case '--include-path':
        (a.options.includePaths ??= []).push(take());
        break;
      case '--no-colour':
      case '--no-color':
        a.colour = false;
        break;
      case '--help':
      case '-h':
        throw new UsageError('');
      default:
        if (arg.startsWith('-')) throw new UsageError(`unknown option '${arg}'`);
        a.files.push(arg);
    }
  }
  if (a.files.length === 0) throw new UsageError('no netlist given');
  return a;
}

function expandInputs(inputs: string[]): string[] {
  const out: string[] = [];
  for (const p of inputs) {
    let st: fs.Stats;
    try {
      st = fs.statSync(p);
    } catch {
      throw new InputError(`cannot read '${p}': no such file or folder`);
    }
    if (st.isDirectory()) {
      const walk = (dir: string) => {
        for (const e of fs.readdirSync(dir, { withFileTypes: true }).sort((x, y) => x.name.localeCompare(y.name))) {
          const full = path.join(dir, e.name);
          if (e.isDirectory()) walk(full);
          else if (NETLIST_EXTENSIONS.has(path.extname(e.name).toLowerCase())) out.push(full);
        }
      };
      walk(p);
    } else out.push(p);
  }
  return out;
}

class InputError extends Error {}

export function main(argv: string[]): number {
  let args: CliArgs;
  try {
    args = parseArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write((e.message ? `tidemark: ${e.message}\n\n` : '') + USAGE);
      return 2;
    }
    throw e;
  }
  let files: string[];
  try {
    files = expandInputs(args.files);
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`tidemark: ${e.message}\n`);
      return 2;
    }
    throw e;
  }
  if (files.length === 0) {
    process.stderr.write('tidemark: no netlist files found (extensions: ' + [...NETLIST_EXTENSIONS].join(' ') + ')\n');
    return 2;
  }
  const host = diskHost();
  const report = emptyReport();
  for (const f of files) {
    const result = analyse(host, f, args.options);
    addToReport(report, f, result, { allNodes: args.allNodes });
  }
  if (report.corners.length === 0) report.corners = (args.tempsC ?? [25, 110]).map((t) => ({ temp_C: t }));
  const out = args.format === 'json' ? JSON.stringify(report, null, 2) + '\n' : args.format === 'sarif' ? formatSarif(report) : formatText(report, args.colour);
  process.stdout.write(out);
  const levels = args.failOn === 'never' ? [] : args.failOn === 'warning' ? ['error', 'warning'] : ['error'];
  return report.diagnostics.some((d) => !d.accepted && levels.includes(d.severity)) ? 1 : 0;
}

if (require.main === module) {
  try {
    process.exitCode = main(process.argv.slice(2));
  } catch (e) {
    process.stderr.write(`tidemark: internal error: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`);
    process.exitCode = 2;
  }
}
