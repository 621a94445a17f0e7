// Findings carried over edits that change no meaning (service/carryOver.ts): whenever the
// carry-over answers, it must equal a full re-analysis of the edited text, and for comment,
// blank-line and end-of-line white-space edits it must answer. Random edits over every sample.
// The whole analysis moved over such an edit at one place (engine `reanalyse`, which the editor's
// hovers and quick fixes then read): equal to a fresh analysis, stage by stage.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { carryOver } from '../server/src/service/carryOver';
import { memoryHost } from '../server/src/core/host';
import { sharedRuns } from '../server/src/syntax/parser';
import { overlay } from './support/edits';
import { same } from './support/sameAnalysis';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');
const samples = fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'));


/** Plain data, so ranges compare by value whatever class holds them. */
const plain = (x: unknown) => JSON.parse(JSON.stringify(x));

type Edit = { kind: 'comment' | 'blank' | 'trailing' | 'word'; at: number };

function apply(text: string, edits: Edit[]): { text: string; meaningless: boolean } {
  const lines = text.split('\n');
  let meaningless = true;
  for (const e of edits) {
    // line 0 is the title; a line inside a '+' continuation moves the statement's own lines
    const at = 1 + (e.at % Math.max(1, lines.length - 1));
    const continues = (lines[at] ?? '').trimStart().startsWith('+');
    if (e.kind === 'comment') lines.splice(at, 0, '* reviewed by the Tern bring-up team');
    else if (e.kind === 'blank') lines.splice(at, 0, '');
    else if (e.kind === 'trailing') {
      // a directive's range is its whole line: spaces after it move its end (not carried over)
      if ((lines[at] ?? '').startsWith('*')) meaningless = false;
      lines[at] = lines[at] + '   ';
    }
    else {
      // change one word of a statement: meaning changes (or the carry-over must decline)
      lines[at] = (lines[at] ?? '').replace(/\b(\d+(?:\.\d+)?)(u|n|p|f)\b/, (_m, v, u) => `${Number(v) * 2}${u}`);
      meaningless = false;
    }
    if (continues && e.kind !== 'trailing') meaningless = false;
  }
  return { text: lines.join('\n'), meaningless };
}

describe('carry-over of findings across edits that change no meaning', () => {
  for (const name of samples) {
    it(`${name}: equals a full re-analysis whenever it answers`, () => {
      const file = path.join(SAMPLES, name);
      const original = fs.readFileSync(file, 'utf8');
      const before = analyse(diskHost(), file);
      let answered = 0;
      fc.assert(
        fc.property(fc.array(fc.record({ kind: fc.constantFrom<Edit['kind']>('comment', 'blank', 'trailing', 'word'), at: fc.nat(10_000) }), { minLength: 1, maxLength: 4 }), (edits) => {
          const { text, meaningless } = apply(original, edits);
          const host = overlay(file, text);
          const moved = carryOver(before, readDeck(host, file));
          if (meaningless) expect(moved, 'a comment or blank-line edit is carried over').toBeDefined();
          if (moved) {
            answered++;
            expect(plain(moved)).toEqual(plain(analyse(host, file).diagnostics));
          }
        }),
        { numRuns: 25, seed: 7 },
      );
      expect(answered).toBeGreaterThan(0);
    });
  }
});

/**
 * A long flat netlist (thousands of lines, several parser chunks) with findings all through it:
 * domino stages whose dynamic nodes float while they evaluate, input and accept directives,
 * comments and continuation lines between.
 */
function flatDominoNetlist(stages: number): string {
  const lines = ['tern bring-up: flat domino stages', '.model bn nmos level=1 vto=0.4 kp=200u', '.model bp pmos level=1 vto=-0.4 kp=80u', 'vdd vdd 0 1.0', 'vss vss 0 0', 'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)'];
  for (let i = 0; i < stages; i++) {
    lines.push(`* stage ${i}`);
    if (i % 7 === 0) lines.push(`* tidemark: input a${i} b${i}`);
    if (i % 11 === 0) lines.push(`* tidemark: accept dyn${i} floating-node reason="stage ${i} reviewed"`);
    lines.push(`Mpre${i} dyn${i} clk vdd vdd bp w=0.5u l=0.05u`, `Mna${i} dyn${i} a${i} n${i} vss bn w=0.6u l=0.05u`, `Mnb${i} n${i} b${i} foot${i} vss bn w=0.6u`, '+ l=0.05u', `Mft${i} foot${i} clk vss vss bn w=0.8u l=0.05u`);
    lines.push(`Min${i} out${i} dyn${i} vss vss bn w=0.3u l=0.05u`, `Mip${i} out${i} dyn${i} vdd vdd bp w=0.6u l=0.05u`, '');
  }
  lines.push('.end', '');
  return lines.join('\n');
}

describe('carry-over in a long flat netlist: chunks both parses took from the same text move whole', () => {
  it('a comment or blank line put in anywhere is carried over, equal to a full re-analysis', () => {
    const file = '/tern/flat_domino.sp';
    const original = flatDominoNetlist(400);
    const before = analyse(memoryHost({ [file]: original }), file);
    expect(before.diagnostics.length).toBeGreaterThan(100);
    let shared = 0;
    fc.assert(
      fc.property(fc.array(fc.record({ kind: fc.constantFrom<Edit['kind']>('comment', 'blank'), at: fc.nat(100_000) }), { minLength: 1, maxLength: 3 }), (edits) => {
        const { text, meaningless } = apply(original, edits);
        const host = memoryHost({ [file]: text });
        const deck = readDeck(host, file);
        // the parse of this text started from the last one, which started from others before it
        if (sharedRuns(before.deck.files[0]!, deck.files[0]!).some((r) => r.count > 0)) shared++;
        const moved = carryOver(before, deck);
        if (meaningless) expect(moved, 'a comment or blank-line edit is carried over').toBeDefined();
        if (moved) expect(plain(moved)).toEqual(plain(analyse(host, file).diagnostics));
      }),
      { numRuns: 12, seed: 11 },
    );
    expect(shared).toBeGreaterThan(0);
  }, 120_000);
});

describe('the whole analysis moved over a comment or blank line put in, taken out or reworded at one place', () => {
  const cases: Array<[string, string, () => string]> = [
    ...samples.map((name): [string, string, () => string] => [name, path.join(SAMPLES, name), () => fs.readFileSync(path.join(SAMPLES, name), 'utf8')]),
    ['a flat netlist of 400 domino stages', '/tern/flat_domino.sp', () => flatDominoNetlist(400)],
    ['a generated hierarchical datapath (2k transistors)', '/tern/datapath.sp', () => hierarchicalNetlist(2_000)],
  ];
  for (const [name, file, read] of cases) {
    it(`${name}: answered from the previous analysis, equal to a fresh one`, () => {
      const original = read();
      const hostFor = (t: string) => (file.startsWith('/tern/') ? memoryHost({ [file]: t }) : overlay(file, t));
      const before = analyse(hostFor(original), file);
      const lines = original.split('\n');
      const comments = lines.flatMap((l, k) => (k > 0 && /^\*(?!.*tidemark:)/.test(l.trim()) && !lines[k + 1]?.trim().startsWith('+') ? [k] : []));
      fc.assert(
        fc.property(fc.constantFrom('comment', 'blank', 'taken out', 'reworded'), fc.nat(100_000), (kind, at) => {
          const edited = [...lines];
          if (kind === 'taken out' || kind === 'reworded') {
            if (!comments.length) return;
            const k = comments[at % comments.length]!;
            // reworded: no line moves
            if (kind === 'reworded') edited[k] = `${edited[k]} (checked)`;
            else edited.splice(k, 1);
          } else {
            const k = 1 + (at % Math.max(1, lines.length - 1));
            if (lines[k]?.trimStart().startsWith('+')) return;
            edited.splice(k, 0, kind === 'comment' ? '* reviewed by the Tern bring-up team' : '');
          }
          const host = hostFor(edited.join('\n'));
          const fast = reanalyse(before, readDeck(host, file));
          expect(fast, 'a layout edit at one place is answered from the previous analysis').toBeDefined();
          same(file, fast!, analyse(host, file));
        }),
        { numRuns: 12, seed: 13 },
      );
    }, 120_000);
  }
});
