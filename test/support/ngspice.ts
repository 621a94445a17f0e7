// ngspice as a reference simulator, through its WebAssembly build on npm (eecircuit-engine, MIT),
// so `npm test` needs nothing beyond `npm ci`. Models must be passed inline: it reads no files.

import { Simulation } from 'eecircuit-engine';

let sim: Promise<Simulation> | undefined;

async function simulator(): Promise<Simulation> {
  sim ??= (async () => {
    const s = new Simulation();
    await s.start();
    return s;
  })();
  return sim;
}

/** Runs a netlist and returns each output vector by lower-case name. */
export async function runNgspice(netlist: string): Promise<Map<string, number[]>> {
  const s = await simulator();
  s.setNetList(netlist);
  const r = await s.runSim();
  const out = new Map<string, number[]>();
  if (r.dataType === 'real') for (const d of r.data) out.set(d.name.toLowerCase(), d.values as number[]);
  // model-parameter warnings are not failures; anything else, or no output at all, is
  const errors = s
    .getError()
    .flatMap((e) => e.split('\n'))
    .map((e) => e.trim())
    .filter((e) => e && !/^warning/i.test(e) && !/^checking parameters/i.test(e));
  if (errors.length || out.size === 0) throw new Error('ngspice: ' + (errors.join('\n') || 'no output'));
  return out;
}

/** The text ngspice printed during the last run (for .meas results). */
export async function ngspiceInfo(): Promise<string> {
  return (await simulator()).getInfo();
}
