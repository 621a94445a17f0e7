// Long chains of mixed edits (sizes, reconnections, new nets, transistor lines added and deleted,
// source, directive, card and parameter values, directive lines), answered as the editor answers them: each edit from the previous
// answer (engine `reanalyse`; when it declines, the later stages on the design `reelaborate`
// builds; else a fresh analysis), so quick answers pile up on quick answers, over the depth at
// which their derived maps are squashed. Every answer must equal a fresh analysis of its text
// (support/sameAnalysis `same`). The edits are drawn from a seeded generator, so a failure names
// the seed and step that reproduce it.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, analyseDesignSteps, readDeck, reanalyse, reelaborate, type AnalysisResult } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { runToEnd } from '../server/src/core/steps';
import { cardValues, overlay, report, scaleNumber, type NumberSpot } from './support/edits';
import { same } from './support/sameAnalysis';
import { addDevice, addDeviceOnNewNet, deleteDevice } from './support/deviceEdits';
import { reconnect, reconnectToNewNet } from './support/reconnect';
import { editDirectiveLine, editElectricalValue } from './support/electricalEdits';
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
];

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
 * Runs `steps` edits from `original`; returns how many were answered each way. Each answer's
 * findings and whole report are compared with a fresh analysis's; every sixth answer, the last,
 * and any that differ go through the whole check (`same`: also the patched network and each
 * stage's revised findings), which names what differs.
 */
function chain(file: string, original: string, hostFor: (t: string) => FileHost, seed: number, steps: number): Record<string, number> {
  const d = draws(seed);
  let text = original;
  let previous = analyse(hostFor(text), file);
  const ways: Record<string, number> = { quick: 0, design: 0, fresh: 0 };
  let answered = 0;
  for (let step = 0; step < steps; step++) {
    const [kind, edit] = EDITS[d() % EDITS.length]!;
    const next = edit(text, d);
    if (next === text) continue;
    text = next;
    const host = hostFor(text);
    const { result, way } = answer(previous, host, file);
    ways[way]!++;
    answered++;
    const fresh = analyse(host, file);
    const differs = JSON.stringify(result.diagnostics) !== JSON.stringify(fresh.diagnostics) || JSON.stringify(report(file, result)) !== JSON.stringify(report(file, fresh));
    if (differs || answered % 6 === 0 || step === steps - 1) {
      try {
        same(file, result, fresh);
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

describe('long chains of mixed edits, each answered from the previous answer, equal fresh analyses', () => {
  it('a generated hierarchical datapath (2k transistors)', () => {
    const ways = chain('/d.sp', hierarchicalNetlist(2_000), (t) => memoryHost({ '/d.sp': t }), seedFrom(6), stepsOr(24));
    expect(ways.quick).toBeGreaterThan(5);
  }, 300_000);
  for (const name of ['tern_domino_adder.sp', 'tern_dynamic_flop.sp', 'tern_buses.sp', 'tern_dram_array.sp']) {
    it(`samples/${name}`, () => {
      const file = path.join(SAMPLES, name);
      const ways = chain(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), seedFrom(2), stepsOr(30));
      expect(ways.quick).toBeGreaterThan(5);
    }, 300_000);
  }
});
