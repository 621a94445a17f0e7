// The real CLI as a subprocess (dist/cli.js, built by the global setup), on real files.

import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const ROOT = path.join(__dirname, '..');
const CLI = path.join(ROOT, 'dist', 'cli.js');

function tidemark(args: string[], cwd = ROOT): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

// every directory tempDir made, removed when the file's tests are done
const made: string[] = [];
afterAll(() => {
  for (const dir of made) fs.rmSync(dir, { recursive: true, force: true });
});

function tempDir(files: Record<string, string>): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-cli-'));
  made.push(dir);
  for (const [name, text] of Object.entries(files)) {
    fs.mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
    fs.writeFileSync(path.join(dir, name), text);
  }
  return dir;
}

describe('tidemark check', () => {
  it('prints the JSON contract for a sample and exits 0', () => {
    const r = tidemark(['check', 'samples/tern_dynamic_latch.sp', '--format', 'json', '--all-nodes']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.schema).toBe(1);
    expect(j.supplies).toContainEqual(expect.objectContaining({ net: 'vdd', volts: 1 }));
    expect(j.corners).toEqual([{ temp_C: 25 }, { temp_C: 110 }]);
    expect(Array.isArray(j.phases)).toBe(true);
    expect(Array.isArray(j.diagnostics)).toBe(true);
    const st = j.nodes.find((n: { name: string }) => n.name === 'xcap0.st');
    expect(st).toMatchObject({ subckt: 'capture_latch', local: 'st', file: 'samples/tern_dynamic_latch.sp', line: 8 });
    // a net that crosses levels takes its name at the highest level
    expect(j.nodes.find((n: { name: string }) => n.name === 'xcap0.q')).toBeUndefined();
    expect(j.nodes.find((n: { name: string }) => n.name === 'bit0_q')).toBeDefined();
  });

  it('shows phases, states and witnesses in the JSON', () => {
    const dir = tempDir({
      'dom.sp': [
        'domino AND',
        '.model nch nmos level=1',
        '.model pch pmos level=1',
        '* tidemark: input a b',
        'Mpre dyn clk vdd vdd pch w=1u l=0.1u',
        'Mna dyn a n1 0 nch w=1u l=0.1u',
        'Mnb n1 b ft 0 nch w=1u l=0.1u',
        'Mft ft clk 0 0 nch w=1u l=0.1u',
        'Mi out dyn 0 0 nch w=1u l=0.1u',
        'Mj out dyn vdd vdd pch w=1u l=0.1u',
        'vdd vdd 0 1',
        'vclk clk 0 PULSE(0 1 0 0 0 0.5n 1n)',
        '.end',
      ].join('\n'),
    });
    const r = tidemark(['check', 'dom.sp', '--format', 'json'], dir);
    const j = JSON.parse(r.stdout);
    expect(j.phases.map((p: { name: string; duration_s: number }) => [p.name, p.duration_s])).toEqual([
      ['clk=1', 5e-10],
      ['clk=0', 5e-10],
    ]);
    const dyn = j.nodes.find((n: { name: string }) => n.name === 'dyn');
    expect(dyn).toMatchObject({ role: 'storage', float_window_s: 5e-10, states: [{ phase: 'clk=1', state: 'conditional' }, { phase: 'clk=0', state: 'driven' }] });
    expect(dyn.states[0].when).toBeDefined();
    expect(Object.values(dyn.states[0].when).every((v) => v === 0)).toBe(true);
    expect(j.diagnostics).toContainEqual(expect.objectContaining({ rule: 'floating-node', node: 'dyn', severity: 'warning', line: 5 }));
    expect(r.code).toBe(0);
  });

  it('exits 1 on an error finding, 0 with --fail-on never, and reports file:line', () => {
    const dir = tempDir({ 'bad.sp': 'bad deck\r\nM1 a b 0 0 nch w={1u\r\n.end\r\n' });
    const r = tidemark(['check', 'bad.sp', '--no-colour'], dir);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/bad\.sp:2:\d+: error \[syntax\]/);
    expect(tidemark(['check', 'bad.sp', '--fail-on', 'never'], dir).code).toBe(0);
  });

  it('names the phases of each netlist on its line of the text output', () => {
    const r = tidemark(['check', 'samples/tern_dynamic_flop.sp', 'samples/tern_buses.sp', '--no-colour', '--fail-on', 'never']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^samples\/tern_dynamic_flop\.sp {2}circuit \(top\), \d+ transistors, \d+ nets; phases clk=1, clk=0, standby clk=0$/m);
    expect(r.stdout).toMatch(/^samples\/tern_buses\.sp {2}.*; phases pclk=1, pclk=0$/m);
  });

  it('--fail-on warning counts warnings', () => {
    const dir = tempDir({ 'w.sp': 'w\nM1 y a 0 0 nch w=0.4 l=0.15\nva a 0 1\n.end\n' });
    expect(tidemark(['check', 'w.sp'], dir).code).toBe(0);
    expect(tidemark(['check', 'w.sp', '--fail-on', 'warning'], dir).code).toBe(1);
    expect(tidemark(['check', 'w.sp', '--scale', '1u', '--fail-on', 'warning', '--format', 'json'], dir).stdout).not.toMatch(/geometry-scale/);
  });

  it('exits 2 with a usage message for bad usage and missing input', () => {
    const a = tidemark([]);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/usage: tidemark check/);
    expect(tidemark(['check', '--format', 'xml', 'x.sp']).code).toBe(2);
    expect(tidemark(['check', '--bogus', 'x.sp']).code).toBe(2);
    // corners and budgets that no analysis could use
    for (const bad of [['--temps', ''], ['--temps', '25,,110'], ['--temps', '-300'], ['--budget', '0%'], ['--budget', '150%'], ['--budget', '10 %']]) {
      const r = tidemark(['check', ...bad, 'x.sp']);
      expect(r.code, bad.join(' ')).toBe(2);
      expect(r.stderr).toMatch(new RegExp(bad[0]!));
    }
    const m = tidemark(['check', 'no/such/file.sp']);
    expect(m.code).toBe(2);
    expect(m.stderr).toMatch(/cannot read 'no\/such\/file.sp'/);
  });

  it('accept: listed with its reason, not failed on; SARIF suppression; scoped to the cell; stale accepts reported', () => {
    const src = fs.readFileSync(path.join(ROOT, 'samples', 'tern_dynamic_latch.sp'), 'utf8');
    // written inside the cell, the local name covers both instances
    const accepted = src.replace(/^(\.subckt capture_latch.*)$/m, '$1\n* tidemark: accept st floating-node reason="refreshed every frame"\n* tidemark: accept st combined-droop reason="refreshed every frame"\n* tidemark: accept nosuch contention reason="stale"');
    const dir = tempDir({ 'latch.sp': accepted });
    fs.cpSync(path.join(ROOT, 'samples', 'models'), path.join(dir, 'models'), { recursive: true });
    const j = JSON.parse(tidemark(['check', 'latch.sp', '--format', 'json'], dir).stdout);
    const marked = j.diagnostics.filter((d: { accepted?: unknown }) => d.accepted);
    expect(marked.map((d: { rule: string }) => d.rule).sort()).toEqual(['combined-droop', 'floating-node']);
    expect(marked[0].accepted).toMatchObject({ reason: 'refreshed every frame', file: 'latch.sp' });
    expect(j.diagnostics.some((d: { rule: string; message: string }) => d.rule === 'directive' && /accept nosuch contention matches no finding/.test(d.message))).toBe(true);
    expect(tidemark(['check', 'latch.sp', '--fail-on', 'warning'], dir).code).toBe(0);
    expect(tidemark(['check', path.join(ROOT, 'samples', 'tern_dynamic_latch.sp'), '--fail-on', 'warning']).code).toBe(1);
    const text = tidemark(['check', 'latch.sp'], dir).stdout;
    expect(text).toMatch(/accepted \[floating-node\] xcap0\.st: "refreshed every frame"/);
    expect(text).toMatch(/, 2 accepted/);
    const sarif = JSON.parse(tidemark(['check', 'latch.sp', '--format', 'sarif'], dir).stdout);
    const suppressed = sarif.runs[0].results.filter((r: { suppressions?: unknown[] }) => r.suppressions);
    expect(suppressed).toHaveLength(2);
    expect(suppressed[0].suppressions[0]).toEqual({ kind: 'inSource', justification: 'refreshed every frame' });
  });

  it('writes SARIF 2.1.0 with rules and regions', () => {
    const dir = tempDir({ 'bad.sp': 'bad\nX1 a b nothere\n.end\n' });
    const r = tidemark(['check', 'bad.sp', '--format', 'sarif'], dir);
    const s = JSON.parse(r.stdout);
    expect(s.version).toBe('2.1.0');
    const run = s.runs[0];
    expect(run.tool.driver.name).toBe('Tidemark');
    expect(run.tool.driver.rules.map((x: { id: string }) => x.id)).toContain('unknown-subckt');
    expect(run.results[0]).toMatchObject({ ruleId: 'unknown-subckt', level: 'error', locations: [{ physicalLocation: { artifactLocation: { uri: 'bad.sp' }, region: { startLine: 2, startColumn: 8 } } }] });
  });

  it('checks every netlist in a folder and follows includes relative to each file', () => {
    const dir = tempDir({
      'lib/m.inc': '.model nch nmos level=1\n',
      'a/deck.sp': 'deck\n.include ../lib/m.inc\nM1 y a 0 0 nch w=1u l=0.1u\nva a 0 1\n.end\n',
      'a/notes.txt': 'not a netlist',
    });
    const r = tidemark(['check', '.', '--format', 'json'], dir);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.netlists.map((n: { file: string }) => n.file)).toEqual([path.join('a', 'deck.sp')]);
    expect(j.diagnostics).toEqual([]);
  });

  it('--top elaborates one subcircuit standalone', () => {
    const dir = tempDir({ 'lib.sp': '* lib\n.subckt inv a y vdd vss\nM1 y a vss vss nch w=1u l=1u\nM2 y a vdd vdd pch w=1u l=1u\n.ends\n.subckt other a\n.ends\nX1 p q vdd 0 inv\n' });
    const j = JSON.parse(tidemark(['check', 'lib.sp', '--top', 'inv', '--format', 'json'], dir).stdout);
    expect(j.netlists[0].circuits).toEqual([expect.objectContaining({ name: 'inv', standalone: true, mosfets: 2 })]);
  });
});
