// The card-value path (circuit/valueEdit.ts, engine `reanalyse`): after a value on a `.param` or
// `.model` card is edited, the analysis built from the previous one (a model card with plain
// numbers put in place of the old one, else the deck elaborated afresh; the phases and
// classification kept, the estimates of the nodes that read a changed device redone) must equal
// a fresh analysis of the new text, finding for finding and figure for figure.
// Random value edits over every sample (its own cards and the model library it reads), the
// fixtures and a generated datapath, one and two in a row; edits that reach a supply or a
// capacitor are declined.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');
const LIBRARY = path.join(SAMPLES, 'models', 'tern45.lib');
const FACTORS = [0.5, 0.8, 0.97, 1.25, 2, 10];

/** Where the plain numbers on `.param` and `.model` cards (and their continuation lines) are. */
function cardValues(lines: string[]): Array<{ line: number; start: number; end: number; value: number }> {
  const out: Array<{ line: number; start: number; end: number; value: number }> = [];
  let onCard = false;
  lines.forEach((l, i) => {
    const head = l.trimStart().toLowerCase();
    onCard = head.startsWith('+') ? onCard : /^\.(param|params|model)\b/.test(head);
    if (!onCard) return;
    for (const m of l.matchAll(/=\s*(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(?![\d.e])/gi)) {
      const start = m.index! + m[0].length - m[1]!.length;
      out.push({ line: i, start, end: start + m[1]!.length, value: Number(m[1]) });
    }
  });
  return out;
}

/** One value on a card scaled by a factor (its unit suffix, if any, kept). */
function editValue(text: string, pick: number, factor: number): string {
  const lines = text.split('\n');
  const spots = cardValues(lines);
  if (spots.length === 0) return text;
  const s = spots[pick % spots.length]!;
  const next = Number((s.value * FACTORS[factor % FACTORS.length]!).toPrecision(4));
  const l = lines[s.line]!;
  lines[s.line] = l.slice(0, s.start) + String(next) + l.slice(s.end);
  return lines.join('\n');
}

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 23, [fc.nat(5000), fc.nat(50)], (t, [pick, factor]) => editValue(t, pick!, factor!));
}

describe('values on parameter and model cards reuse the previous analysis and equal a fresh one', () => {
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random values on its cards and on the model library's`, () => {
      const file = path.join(SAMPLES, name);
      const text = fs.readFileSync(file, 'utf8');
      if (cardValues(text.split('\n')).length) total += check(file, text, (t) => overlay(file, t), 12);
      // the library is another file of the same deck
      total += check(file, fs.readFileSync(LIBRARY, 'utf8'), (t) => overlay(LIBRARY, t), 12);
    }, 120_000);
  }
  for (const kind of ['classify', 'electrical', 'frontend']) {
    const dir = path.join(__dirname, 'fixtures', kind);
    it(`the ${kind} fixtures: random values on their cards`, () => {
      for (const name of fs.readdirSync(dir).filter((f) => /\.(sp|cdl)$/.test(f))) {
        const file = path.join(dir, name);
        const text = fs.readFileSync(file, 'utf8');
        if (cardValues(text.split('\n')).length) total += check(file, text, (t) => overlay(file, t), 6);
      }
    }, 120_000);
  }
  it('a generated hierarchical datapath (2k transistors): its model cards and the latch length parameter', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    total += check(file, text, (t) => memoryHost({ [file]: t }), 8);
    const before = analyse(memoryHost({ [file]: text }), file);
    // the benchmark's edit: the parameter every latch's pass gates read
    const edited = text.replace(/^\.param lpass=0\.05u$/m, '.param lpass=0.06u');
    expect(edited).not.toBe(text);
    const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'a length parameter edited is answered from the previous analysis').toBeDefined();
    same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    expect(total).toBeGreaterThan(60);
  }, 120_000);
  it('a parameter that sets a supply or a capacitor is declined (the caller analyses afresh); one that makes a width implausible brings the elaborator finding with it', () => {
    const file = '/held.sp';
    const text = ['held node', '.param vsup=1.0 cst=5f wk=0.2u', '.model n1 nmos level=1 vto=0.4 kp=200u', 'vdd vdd 0 {vsup}', 'vclk clk 0 pulse(0 1 0 10p 10p 1n 2n)', 'Mp st clk d 0 n1 w={wk} l=0.1u', 'Cst st 0 {cst}', 'Mr q st 0 0 n1 w=0.2u l=0.1u', '.end'].join('\n');
    const before = analyse(memoryHost({ [file]: text }), file);
    for (const [from, to, quick] of [
      ['vsup=1.0', 'vsup=1.1', false],
      ['cst=5f', 'cst=8f', false],
      ['wk=0.2u', 'wk=0.3u', true],
      // 2 m: the elaborator's finding about implausible sizes comes with the new text
      ['wk=0.2u', 'wk=2', true],
    ] as const) {
      const edited = text.replace(from, to);
      const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
      expect(fast !== undefined, `${from} -> ${to}`).toBe(quick);
      if (fast) same(file, fast, analyse(memoryHost({ [file]: edited }), file));
    }
  });
});
