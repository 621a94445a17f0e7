// Fixture-driven checks: a fixture is a netlist whose expected findings are written beside the
// lines they belong to, as comment lines that every simulator ignores:
//
//   M1 d g s b nmos w={wx}
//   *^ param-error: unknown parameter 'wx'
//
// `*^ <rule>[: <text the message must contain>]` expects a finding on the nearest line above
// that is not itself an expectation. Every finding must be expected and every expectation met.
// A `<name>.expect.json` beside the netlist, if present, must match (as a subset) the summary
// that `summarise` returns. Set UPDATE_FIXTURES=1 to write missing .expect.json files.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { expect } from 'vitest';
import type { AnalysisResult } from '../../server/src/engine';

export interface Expectation {
  line: number;
  rule: string;
  text: string | undefined;
}

export function readExpectations(text: string): Expectation[] {
  const lines = text.split(/\r\n|\r|\n/);
  const out: Expectation[] = [];
  let target = -1;
  lines.forEach((l, i) => {
    const m = /^\*\^\s*([a-z-]+)\s*(?::\s*(.*))?$/.exec(l.trim());
    if (m) out.push({ line: target, rule: m[1]!, text: m[2]?.trim() || undefined });
    else target = i;
  });
  return out;
}

/** Compares the findings of `result` in `file` with the expectations written in it. */
export function checkExpectations(file: string, text: string, result: AnalysisResult, otherFiles: Record<string, string> = {}): void {
  const expected: Array<Expectation & { file: string }> = readExpectations(text).map((e) => ({ ...e, file }));
  for (const [f, t] of Object.entries(otherFiles)) expected.push(...readExpectations(t).map((e) => ({ ...e, file: f })));
  const actual = result.diagnostics.map((d) => ({ file: d.file, line: d.range.start.line, rule: d.rule as string, message: d.message }));
  const unmatched = [...actual];
  const missing: string[] = [];
  for (const e of expected) {
    const i = unmatched.findIndex((a) => a.file === e.file && a.line === e.line && a.rule === e.rule && (!e.text || a.message.includes(e.text)));
    if (i < 0) missing.push(`${path.basename(e.file)}:${e.line + 1} ${e.rule}${e.text ? `: ${e.text}` : ''}`);
    else unmatched.splice(i, 1);
  }
  const extra = unmatched.map((a) => `${path.basename(a.file)}:${a.line + 1} ${a.rule}: ${a.message}`);
  expect({ missing, unexpected: extra }).toEqual({ missing: [], unexpected: [] });
}

export function checkSummary(expectFile: string, summary: unknown): void {
  if (!fs.existsSync(expectFile)) {
    if (process.env['UPDATE_FIXTURES']) fs.writeFileSync(expectFile, JSON.stringify(summary, null, 2) + '\n');
    return;
  }
  expect(summary).toMatchObject(JSON.parse(fs.readFileSync(expectFile, 'utf8')));
}

/** A compact, stable view of the elaborated design for .expect.json files. */
export function summarise(result: AnalysisResult): unknown {
  return round({
    circuits: result.design.circuits.map((c) => ({
      name: c.name,
      nets: Object.fromEntries(c.nets.map((n) => [n.name, n.kind])),
      mosfets: Object.fromEntries(
        c.mosfets.map((m) => [m.name, { polarity: m.polarity, d: c.nets[m.d]!.name, g: c.nets[m.g]!.name, s: c.nets[m.s]!.name, b: c.nets[m.b]!.name, wM: m.wM, lM: m.lM, m: m.m, nf: m.nf, model: m.card?.name ?? m.model }]),
      ),
      ports: Object.fromEntries(c.ports.map((p) => [p.name, p.direction])),
      supplies: Object.fromEntries(c.supplies.map((s) => [c.nets[s.net]!.name, s.volts])),
      capacitors: Object.fromEntries(c.capacitors.map((x) => [x.name, x.capacitanceF])),
    })),
    geometryScale: result.design.geometryScale,
  });
}

/** Nine significant digits, so float noise (0.42 * 1e-6) does not fail a comparison. */
function round(v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) ? Number(v.toPrecision(9)) : v;
  if (Array.isArray(v)) return v.map(round);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, round(x)]));
  return v;
}

/** Every sample netlist and every electrical fixture (the netlists with estimates worth a fix). */
export function samplesAndElectricalFixtures(): string[] {
  const list = (dir: string) => fs.readdirSync(dir).filter((f) => f.endsWith('.sp')).map((f) => path.join(dir, f));
  return [...list(path.join(__dirname, '..', '..', 'samples')), ...list(path.join(__dirname, '..', 'fixtures', 'electrical'))];
}
