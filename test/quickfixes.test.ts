// Every quick fix, applied: over the bundled samples (in process, every fix of every finding) the
// edited netlist still parses and the finding the fix answers is gone; over the real protocol,
// the bus holder on a complete tri-state bus makes the node kept, and ngspice (eecircuit-engine)
// shows the fixed bus holding both levels where the bare bus droops.

import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import type { FileHost } from '../server/src/core/host';
import { quickFixes, type TextEdit } from '../server/src/service/fixes';
import { runNgspice } from './support/ngspice';
import { applyEdits, TestLspClient } from './support/lspClient';

const SAMPLES = path.join(__dirname, '..', 'samples');
const FRONT_END = ['syntax', 'param-error', 'include-missing', 'unknown-subckt', 'pin-count', 'unknown-model', 'directive'];

/** The disk, with one file's text replaced (as an editor buffer would). */
function overlay(file: string, text: string): FileHost {
  const disk = diskHost();
  return { ...disk, readFile: (p) => (path.resolve(p) === path.resolve(file) ? text : disk.readFile(p)) };
}

function applyTextEdits(text: string, edits: TextEdit[]): string {
  return applyEdits(text, edits.map((e) => ({ range: e.range, newText: e.newText })));
}

describe('every quick fix on the samples', () => {
  const samples = fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'));
  for (const f of samples) {
    it(`${f}: each fix parses and removes the finding it answers`, () => {
      const file = path.join(SAMPLES, f);
      const text = fs.readFileSync(file, 'utf8');
      const before = analyse(diskHost(), file);
      let applied = 0;
      for (const d of before.diagnostics.filter((x) => x.file === file)) {
        for (const fix of quickFixes(before, d)) {
          const edited = applyTextEdits(text, fix.edits.filter((e) => e.file === file));
          const after = analyse(overlay(file, edited), file);
          const front = after.diagnostics.filter((x) => FRONT_END.includes(x.rule));
          expect({ fix: fix.title, front }).toEqual({ fix: fix.title, front: [] });
          const still = after.diagnostics.filter((x) => !x.accepted && x.rule === d.rule && x.node === d.node);
          if (fix.title.startsWith('Accept')) expect(after.diagnostics.some((x) => x.accepted && x.rule === d.rule && x.node === d.node), fix.title).toBe(true);
          expect({ fix: fix.title, still: still.map((x) => x.message) }).toEqual({ fix: fix.title, still: [] });
          applied++;
        }
      }
      if (f !== 'tern_static_block.sp') expect(applied).toBeGreaterThan(0);
    });
  }
  it('offers a bus holder, a latch feedback inverter and a keeper where each belongs', () => {
    const titles = samples.flatMap((f) => {
      const r = analyse(diskHost(), path.join(SAMPLES, f));
      return r.diagnostics.flatMap((d) => quickFixes(r, d).map((q) => q.title));
    });
    expect(titles.some((t) => t.startsWith('Insert a keeper'))).toBe(true);
    expect(titles.some((t) => /^Insert a weak feedback inverter on st from/.test(t))).toBe(true);
    expect(titles.some((t) => t.startsWith('Declare dbg_clk as a clock'))).toBe(true);
  });
});

const MODELS = fs.readFileSync(path.join(__dirname, 'fixtures', 'electrical', 'models.inc'), 'utf8');
// a tri-state driver with nothing to hold the bus when it lets go; the receiver inverter is
// there, so the fix is the weak feedback inverter from its output
const BUS = `tri-state bus for the holder test
.include models.inc
* tidemark: input d en
Men_n enb en 0 0 n45 w=0.2u l=0.05u
Men_p enb en vdd vdd p45 w=0.4u l=0.05u
Mp1 pu d vdd vdd p45 w=0.6u l=0.05u
Mp2 bus enb pu vdd p45 w=0.6u l=0.05u
Mn2 bus en pd 0 n45 w=0.3u l=0.05u
Mn1 pd d 0 0 n45 w=0.3u l=0.05u
Mrx_n rout bus 0 0 n45 w=0.2u l=0.05u
Mrx_p rout bus vdd vdd p45 w=0.4u l=0.05u
vdd vdd 0 1
.end
`;

/**
 * Drives the bus to `level` (the driver inverts d), lets go at 1 ns, then at 2 ns turns d to the
 * value that leaks the bus hardest (Tidemark's worst case: the pull-down stack on under a 1, the
 * pull-up stack on under a 0). Returns the time and bus voltage vectors.
 */
async function busAfterRelease(deck: string, level: 0 | 1, stopS: number): Promise<{ t: number[]; v: number[] }> {
  const inline = deck.replace('.include models.inc', MODELS).replace(/^\.end\s*$/m, '');
  const d = `vd d 0 PWL(0 ${1 - level} 2n ${1 - level} 2.02n ${level})`;
  const sim = await runNgspice(`${inline}\n${d}\nven en 0 PWL(0 1 1n 1 1.02n 0)\n.options gmin=1e-18\n.temp 110\n.tran ${stopS / 1000} ${stopS}\n.end\n`);
  return { t: sim.get('time')!, v: sim.get('v(bus)') ?? sim.get('bus')! };
}

describe('the bus holder quick fix over the real protocol, checked in ngspice', () => {
  let client: TestLspClient;
  let dir: string;
  let uri: string;
  let fixed = '';
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-qf-'));
    fs.writeFileSync(path.join(dir, 'models.inc'), MODELS);
    fs.writeFileSync(path.join(dir, 'bus.sp'), BUS);
    uri = pathToFileURL(path.join(dir, 'bus.sp')).toString();
    client = new TestLspClient();
    await client.initialize(pathToFileURL(dir).toString());
  });
  afterAll(async () => {
    await client.shutdown();
  });

  it('inserts the feedback inverter, and the bus becomes kept', async () => {
    const first = client.diagnosticsFor(uri);
    await client.open(uri, BUS);
    const d = await first;
    const floating = d.diagnostics.find((x) => x.code === 'floating-node' && /^bus /.test(x.message))!;
    expect(floating).toBeDefined();
    const actions = (await client.conn.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: floating.range, context: { diagnostics: [floating] } })) as Array<{ title: string; edit: { changes: Record<string, Array<{ range: never; newText: string }>> } }>;
    const holder = actions.find((a) => a.title.startsWith('Insert a weak feedback inverter on bus from rout'));
    expect(holder, actions.map((a) => a.title).join('\n')).toBeDefined();
    fixed = applyEdits(BUS, holder!.edit.changes[uri]!);
    expect(fixed).toMatch(/^Mhold_bp_bus bus rout vdd vdd p45 w=\S+ l=\S+$/m);
    expect(fixed).toMatch(/^Mhold_bn_bus bus rout 0 0 n45 w=\S+ l=\S+$/m);
    const after = client.diagnosticsFor(uri, (p) => !p.diagnostics.some((x) => x.code === 'floating-node'));
    await client.change(uri, fixed, 2);
    const diags = await after;
    expect(diags.diagnostics.filter((x) => x.code === 'floating-node' || x.code === 'retention-short')).toEqual([]);
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: 6, character: 5 } })) as { contents: { value: string } };
    // the bus and its receiver now form a loop that drives it in every phase (a static latch)
    expect(hover.contents.value).toMatch(/\| steady \| driven \|/);
  });

  // reference: ngspice (eecircuit-engine) transients at 110 C on the same BSIM4 cards
  it('ngspice: the bare bus loses a 1 about as fast as estimated and keeps a 0; the held bus keeps both', async () => {
    expect(fixed).not.toBe('');
    const est = analyse(overlay(path.join(dir, 'bus.sp'), BUS), path.join(dir, 'bus.sp'));
    const a = est.circuits[0]!;
    const bus = a.estimates!.get(a.circuit.netByName.get('bus')!)!;
    const hot = (level: 0 | 1) => bus.stored.find((s) => s.level === level)!.corners.find((k) => k.tempC === 110)!;
    const retention1 = hot(1).retentionS!;
    expect(hot(0).held).toBe(true);
    // bare, holding a 1, with the worst input from 2.02 ns: the time from the full level (1 V) to
    // the budget (0.9 V); the enable edge first kicks the bus above the supply (coupling, which
    // Tidemark reports separately), so the clock starts when it comes back down through 1 V
    const bare1 = await busAfterRelease(BUS, 1, 50e-9);
    const crossing = (at: number) => bare1.t[bare1.v.findIndex((x, i) => bare1.t[i]! > 2.02e-9 && x <= at)]!;
    const simulated = crossing(0.9) - crossing(1.0);
    // a screening estimate: on the safe side, and within a factor of 2 of the simulator
    expect(simulated).toBeGreaterThan(retention1);
    expect(simulated).toBeLessThan(2 * retention1);
    // bare, holding a 0: settles within the budget (Tidemark: held)
    const bare0 = await busAfterRelease(BUS, 0, 2e-6);
    expect(Math.max(...bare0.v.filter((_, i) => bare0.t[i]! > 1.1e-9))).toBeLessThan(0.1);
    // held: both levels stay within the budget for 2 us
    const held1 = await busAfterRelease(fixed, 1, 2e-6);
    const held0 = await busAfterRelease(fixed, 0, 2e-6);
    expect(Math.min(...held1.v.filter((_, i) => held1.t[i]! > 1.1e-9))).toBeGreaterThan(0.9);
    expect(Math.max(...held0.v.filter((_, i) => held0.t[i]! > 1.1e-9))).toBeLessThan(0.1);
  });
});
