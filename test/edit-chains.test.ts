// Long chains of mixed edits (sizes, reconnections, new nets, transistor lines added and deleted,
// source, directive, card and parameter values, directive lines, renames, quick fixes, accept,
// comment and blank lines taken out or put in), in the netlist or in a file it includes,
// answered as the editor answers them: each edit from the previous answer (engine `reanalyse`;
// when it declines, the later stages on the design `reelaborate` builds; else a fresh
// analysis), so quick answers pile up on quick answers, over the depth at which their derived
// maps are squashed. Every answer must equal a fresh analysis of its text (support/sameAnalysis
// `same`). The edits are drawn from a seeded generator, so a failure names the seed and step
// that reproduce it.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, analyseDesignSteps, readDeck, reanalyse, reelaborate, type AnalysisResult } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { runToEnd } from '../server/src/core/steps';
import { cardValues, report, scaleNumber, type NumberSpot } from './support/edits';
import { same } from './support/sameAnalysis';
import { addDevice, addDeviceOnNewNet, deleteDevice } from './support/deviceEdits';
import { reconnect, reconnectToNewNet } from './support/reconnect';
import { editDirectiveLine, editElectricalValue } from './support/electricalEdits';
import { rename } from './support/renames';
import { withFix } from './support/quickFixes';
import { CELLS_INC, topIncludingCells } from './support/included';
import { quickFixes } from '../server/src/service/fixes';
import { hierarchicalNetlist } from '../scripts/netlists';

/** A small, seeded generator of 32-bit draws (mulberry32), for chains that replay exactly. */
function draws(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  };
}

/** Where the sizes are on MOSFET lines (w=, l=, as plain numbers with a unit). */
function sizes(lines: string[]): NumberSpot[] {
  const out: NumberSpot[] = [];
  lines.forEach((l, i) => {
    if (!/^\s*m/i.test(l)) return;
    for (const m of l.matchAll(/\b[wl]=(\d+(?:\.\d+)?)(?=[a-z]*\b)/gi)) {
      const start = m.index! + 2;
      out.push({ line: i, start, end: start + m[1]!.length, value: Number(m[1]) });
    }
  });
  return out;
}

/** The lines of a text, changed in place by `f`. */
function onLines(text: string, f: (lines: string[]) => void): string {
  const lines = text.split('\n');
  f(lines);
  return lines.join('\n');
}

/** A line put in at `at` (a comment or a blank line), not between a statement and its continuation. */
function putLine(text: string, at: number, line: string): string {
  return onLines(text, (l) => {
    const k = 1 + (at % Math.max(1, l.length - 1));
    if (!l[k]?.trim().startsWith('+')) l.splice(k, 0, line);
  });
}

/** One of the lines `which` picks taken out (not one a continuation line follows). */
function takeLine(text: string, pick: number, which: (line: string) => boolean): string {
  return onLines(text, (l) => {
    const ks = l.flatMap((x, k) => (k > 0 && which(x) && !l[k + 1]?.trim().startsWith('+') ? [k] : []));
    if (ks.length) l.splice(ks[pick % ks.length]!, 1);
  });
}

const isNote = (l: string) => l.trim() === '' || (l.trim().startsWith('*') && !/tidemark:/i.test(l));

const EDITS: Array<[string, (text: string, d: () => number) => string]> = [
  ['size', (t, d) => scaleNumber(t, sizes, d(), [0.8, 1.25, 1.5][d() % 3]!)],
  ['reconnection', (t, d) => reconnect(t, d(), d())],
  ['new net', (t, d) => reconnectToNewNet(t, d(), d() % 50)],
  ['device added', (t, d) => addDevice(t, d(), d(), d())],
  ['device on a new node', (t, d) => addDeviceOnNewNet(t, d(), d(), d())],
  ['device deleted', (t, d) => deleteDevice(t, d(), d() % 2 === 0)],
  ['source or directive value', (t, d) => editElectricalValue(t, d(), d())],
  ['directive line', (t, d) => editDirectiveLine(t, d(), d())],
  ['card or parameter value', (t, d) => scaleNumber(t, cardValues, d(), [0.8, 1.25][d() % 2]!)],
  ['rename', (t, d) => rename(t, d(), d() % 3 !== 0)],
  ['comment or blank line put in', (t, d) => putLine(t, d(), d() % 2 ? '* a note' : '')],
  ['comment or blank line taken out', (t, d) => takeLine(t, d(), isNote)],
  ['accept taken out', (t, d) => takeLine(t, d(), (l) => /tidemark:\s*accept\b/i.test(l))],
];

/** One edit of the files: a quick fix of the previous answer's findings (one in ten), else an edit of one file (of an included one three in ten). */
function editFiles(files: Record<string, string>, top: string, previous: AnalysisResult, d: () => number): { kind: string; files: Record<string, string> } {
  const next = { ...files };
  if (d() % 10 === 0) {
    const fixes = previous.diagnostics.flatMap((x) => quickFixes(previous, x)).filter((f) => f.edits.every((e) => next[e.file] !== undefined));
    if (!fixes.length) return { kind: 'quick fix', files };
    const fix = fixes[d() % fixes.length]!;
    for (const f of new Set(fix.edits.map((e) => e.file))) next[f] = withFix(next[f]!, { ...fix, edits: fix.edits.filter((e) => e.file === f) });
    return { kind: `quick fix (${fix.title.split(' ')[0]})`, files: next };
  }
  const [kind, edit] = EDITS[d() % EDITS.length]!;
  const others = Object.keys(files).filter((f) => f !== top);
  const file = others.length && d() % 10 < 3 ? others[d() % others.length]! : top;
  next[file] = edit(files[file]!, d);
  return { kind: file === top ? kind : `${kind} (included file)`, files: next };
}

/** The editor's answer to `text` from the previous one, and which way it came. */
function answer(previous: AnalysisResult, host: FileHost, file: string): { result: AnalysisResult; way: 'quick' | 'design' | 'fresh' } {
  const deck = readDeck(host, file);
  const quick = reanalyse(previous, deck);
  if (quick) return { result: quick, way: 'quick' };
  const built = reelaborate(previous, deck);
  if (built) return { result: runToEnd(analyseDesignSteps(built)), way: 'design' };
  return { result: analyse(host, file), way: 'fresh' };
}

/**
 * Runs `steps` edits from `original` (file -> text; `top` the netlist analysed, the rest what it
 * includes); returns how many were answered each way. Each answer's findings and whole report
 * are compared with a fresh analysis's; every sixth answer, the last, and any that differ go
 * through the whole check (`same`: also the patched network and each stage's revised
 * findings), which names what differs.
 */
function chain(top: string, original: Record<string, string>, seed: number, steps: number): Record<string, number> {
  const d = draws(seed);
  let files = original;
  let previous = analyse(memoryHost(files), top);
  const ways: Record<string, number> = { quick: 0, design: 0, fresh: 0 };
  let answered = 0;
  for (let step = 0; step < steps; step++) {
    const edited = editFiles(files, top, previous, d);
    if (Object.keys(files).every((f) => edited.files[f] === files[f])) continue;
    const kind = edited.kind;
    files = edited.files;
    const host = memoryHost(files);
    const { result, way } = answer(previous, host, top);
    ways[way]!++;
    answered++;
    const fresh = analyse(host, top);
    const differs = JSON.stringify(result.diagnostics) !== JSON.stringify(fresh.diagnostics) || JSON.stringify(report(top, result)) !== JSON.stringify(report(top, fresh));
    if (differs || answered % 6 === 0 || step === steps - 1) {
      try {
        same(top, result, fresh);
        if (differs) throw new Error('the findings or the report differ');
      } catch (e) {
        throw new Error(`seed ${seed}, step ${step} (${kind}, answered ${way}): ${(e as Error).message.slice(0, 2000)}`);
      }
    }
    previous = result;
  }
  return ways;
}

const SAMPLES = path.join(__dirname, '..', 'samples');

// TIDEMARK_CHAIN_SEED and TIDEMARK_CHAIN_STEPS run other chains (a longer search for faults)
const seedFrom = (fallback: number) => Number(process.env.TIDEMARK_CHAIN_SEED ?? fallback);
const stepsOr = (fallback: number) => Number(process.env.TIDEMARK_CHAIN_STEPS ?? fallback);

/** A sample and the model library it reads, as files in memory (so the chain may edit both). */
function sampleFiles(name: string): Record<string, string> {
  const file = path.join(SAMPLES, name);
  const library = path.join(SAMPLES, 'models', 'tern45.lib');
  return { [file]: fs.readFileSync(file, 'utf8'), [library]: fs.readFileSync(library, 'utf8') };
}

describe('long chains of mixed edits, each answered from the previous answer, equal fresh analyses', () => {
  it('a generated hierarchical datapath (2k transistors)', () => {
    const ways = chain('/d.sp', { '/d.sp': hierarchicalNetlist(2_000) }, seedFrom(6), stepsOr(24));
    expect(ways.quick).toBeGreaterThan(5);
  }, 300_000);
  it('a netlist and the cells file it includes, edits in either', () => {
    const ways = chain('/t/top.sp', { '/t/top.sp': topIncludingCells(12), '/t/cells.inc': CELLS_INC }, seedFrom(1), stepsOr(40));
    expect(ways.quick).toBeGreaterThan(5);
  }, 300_000);
  for (const name of ['tern_domino_adder.sp', 'tern_dynamic_flop.sp', 'tern_buses.sp', 'tern_dram_array.sp']) {
    it(`samples/${name} and its model library`, () => {
      const files = sampleFiles(name);
      const ways = chain(Object.keys(files)[0]!, files, seedFrom(2), stepsOr(30));
      expect(ways.quick).toBeGreaterThan(5);
    }, 300_000);
  }
});
