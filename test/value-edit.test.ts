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
import { cardValues, overlay, scaleNumber, type NumberSpot } from './support/edits';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');
const LIBRARY = path.join(SAMPLES, 'models', 'tern45.lib');
const FACTORS = [0.5, 0.8, 0.97, 1.25, 2, 10];

/** One such number scaled by a factor (its unit suffix kept). */
function editValue(text: string, pick: number, factor: number): string {
  return scaleNumber(text, cardValues, pick, FACTORS[factor % FACTORS.length]!);
}

/** A size on a MOSFET line, or a parameter on an instance line, written as an expression of its value. */
function editElementValue(text: string, pick: number, factor: number): string {
  const lines = text.split('\n');
  const spots: NumberSpot[] = [];
  lines.forEach((l, i) => {
    if (!/^[mx]/i.test(l.trim())) return;
    for (const m of l.matchAll(/\b(w|l)=(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)u(?![\w.])/gi)) {
      const start = m.index! + m[1]!.length + 1;
      spots.push({ line: i, start, end: start + m[2]!.length + 1, value: Number(m[2]) });
    }
  });
  if (spots.length === 0) return text;
  const s = spots[pick % spots.length]!;
  const l = lines[s.line]!;
  lines[s.line] = `${l.slice(0, s.start)}{${s.value}u*${FACTORS[factor % FACTORS.length]}}${l.slice(s.end)}`;
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
    // the benchmark's edit: the parameter every latch's pass gates read; and that length
    // written as an expression on the pass gate's line in the latch cell
    for (const edited of [text.replace(/^\.param lpass=0\.05u$/m, '.param lpass=0.06u'), text.replace('Mtn d clk st vss bn w=0.3u l=lpass', 'Mtn d clk st vss bn w=0.3u l={lpass*1.2}')]) {
      expect(edited).not.toBe(text);
      const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
      expect(fast, 'a length parameter edited is answered from the previous analysis').toBeDefined();
      same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
      // then a value on the p-channel card: every p-channel device takes it (the cards read
      // again by that answer must be the ones its devices hold, or none of them would)
      const card = edited.replace(/^(\.model bp .*)kp=80u/m, '$1kp=85u');
      expect(card).not.toBe(edited);
      const next = reanalyse(fast!, readDeck(memoryHost({ [file]: card }), file));
      expect(next).toBeDefined();
      same(file, next!, analyse(memoryHost({ [file]: card }), file));
    }
    expect(total).toBeGreaterThan(60);
  }, 120_000);
  it('sizes on MOSFET lines written as expressions, on every sample, the electrical fixtures and a 2k datapath', () => {
    let taken = 0;
    const files: Array<[string, string, (t: string) => FileHost]> = [...fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp')).map((f) => path.join(SAMPLES, f)), ...fs.readdirSync(path.join(__dirname, 'fixtures', 'electrical')).filter((f) => f.endsWith('.sp')).map((f) => path.join(__dirname, 'fixtures', 'electrical', f))].map((f) => [f, fs.readFileSync(f, 'utf8'), (t: string) => overlay(f, t)]);
    files.push(['/datapath.sp', hierarchicalNetlist(2_000), (t) => memoryHost({ '/datapath.sp': t })]);
    for (const [file, text, hostFor] of files) taken += checkRandomEdits(file, text, hostFor, 6, 29, [fc.nat(5000), fc.nat(50)], (t, [pick, factor]) => editElementValue(t, pick!, factor!));
    expect(taken).toBeGreaterThan(30);
  }, 120_000);
  // the shapes the values-only walk (elaborate revalue) must follow as a fresh elaboration does
  // each edit: the text replaced, and whether it is answered from the previous analysis (else the
  // caller analyses afresh)
  const SHAPES: Array<[string, string[], Array<[string, string, boolean?]>]> = [
    [
      'instance parameters that read a global one (the cell takes another parameter set), a cell parameter, binned cards',
      [
        'tern values: cells with parameters',
        '.param wp=0.6u wn=0.3u lk=0.1u',
        '.model nb.1 nmos level=1 vto=0.40 kp=200u lmin=0 lmax=0.15u wmin=0 wmax=1',
        '.model nb.2 nmos level=1 vto=0.45 kp=180u lmin=0.15u lmax=1 wmin=0 wmax=1',
        '.model pb pmos level=1 vto=-0.4 kp=80u',
        '.subckt cinv a y vdd vss w=1u',
        '.param half={w/2}',
        'Mp y a vdd vdd pb w={w} l=0.1u',
        'Mn y a vss vss nb w={half} l=0.1u',
        '.ends',
        '.subckt cdyn clk a y vdd vss',
        'Mpre dyn clk vdd vdd pb w=0.5u l=0.1u',
        'Mna dyn a foot vss nb w={wn} l=0.1u',
        'Mft foot clk vss vss nb w=0.8u l={lk}',
        'Mkp dyn y vdd vdd pb w=0.15u l={lk}',
        'Xo dyn y vdd vss cinv w={wp}',
        '.ends',
        'Xd0 clk a0 y0 vdd 0 cdyn',
        'Xd1 clk a1 y1 vdd 0 cdyn',
        'Xi0 y0 z0 vdd 0 cinv w=1.2u',
        'Mz z1 y1 0 0 nmissing w=0.3u l={lk}',
        'vdd vdd 0 1.0',
        'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)',
        '* tidemark: input a0 a1',
        '.end',
      ],
      [
        ['wp=0.6u', 'wp=0.8u'],
        ['wn=0.3u', 'wn=0.5u'],
        // the foot device moves to the longer bin's card
        ['lk=0.1u', 'lk=0.2u'],
        ['kp=180u', 'kp=150u'],
        // element lines: an instance parameter (a longer value moves the line's end), an
        // expression on a MOSFET line in a cell, an instance parameter given by an expression
        ['w=1.2u', 'w=1.25u'],
        ['w={wn}', 'w={wn*1.5}'],
        ['cinv w={wp}', 'cinv w={wp*2}'],
        ['w=0.15u l={lk}', 'w=0.15u l={lk*2}'],
        // a default on the subcircuit line (every instance that does not set it)
        ['vss w=1u', 'vss w=1.4u'],
      ],
    ],
    [
      'a cell library analysed cell by cell',
      ['tern values: a library', '.param wk=0.15u', '.model nb nmos level=1 vto=0.4 kp=200u', '.model pb pmos level=1 vto=-0.4 kp=80u', '.subckt keeper_latch d clk q vdd vss', 'Mt d clk st vss nb w=0.3u l=0.1u', 'Mk st q vdd vdd pb w={wk} l=0.1u', 'Mp q st vdd vdd pb w=0.6u l=0.1u', 'Mn q st vss vss nb w=0.3u l=0.1u', '.ends', '.subckt holder b vdd vss', 'Mh b b vss vss nb w={wk} l=0.2u', '.ends', '.end'],
      [['wk=0.15u', 'wk=0.25u']],
    ],
    [
      'a model card value given by a parameter (only the card changes, the devices keep their sizes)',
      ['tern values: a card parameter', '.param cov=0.3n', '.model nb nmos level=1 vto=0.4 kp=200u', '.model pb pmos level=1 vto=-0.4 kp=80u cgdo={cov} cgso={cov}', 'Mpre dyn clk vdd vdd pb w=0.5u l=0.1u', 'Mna dyn a 0 0 nb w=0.4u l=0.1u', 'Mi y dyn 0 0 nb w=0.3u l=0.1u', 'vdd vdd 0 1.0', 'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)', '* tidemark: input a', '.end'],
      [['cov=0.3n', 'cov=0.6n']],
    ],
    [
      'a length that moves one device out of every bin (left out: no card, and its name gives no polarity) and another into one',
      ['tern values: bins with gaps', '.param lq=0.2u', '.model qq.1 nmos level=1 vto=0.4 kp=200u lmin=0 lmax=0.15u wmin=0 wmax=1', '.model qr.1 nmos level=1 vto=0.4 kp=200u lmin=0.15u lmax=1 wmin=0 wmax=1', '.model pb pmos level=1 vto=-0.4 kp=80u', 'Mq y a 0 0 qq w=0.3u l={lq}', 'Mr z a 0 0 qr w=0.3u l={lq}', 'Mp y a vdd vdd pb w=0.6u l=0.1u', 'vdd vdd 0 1.0', '* tidemark: input a', '.end'],
      // the devices are other ones: the caller analyses afresh
      [['lq=0.2u', 'lq=0.1u', false]],
    ],
    [
      'a length that moves the last device out of every bin (one device fewer)',
      ['tern values: the last device left out', '.param lq=0.1u', '.model qq.1 nmos level=1 vto=0.4 kp=200u lmin=0 lmax=0.15u wmin=0 wmax=1', '.model pb pmos level=1 vto=-0.4 kp=80u', 'Mp y a vdd vdd pb w=0.6u l=0.1u', 'Mq y a 0 0 qq w=0.3u l={lq}', 'vdd vdd 0 1.0', '* tidemark: input a', '.end'],
      [['lq=0.1u', 'lq=0.2u', false]],
    ],
  ];
  for (const [what, lines, edits] of SHAPES) {
    it(`${what}: each edit answered from the previous analysis, equal to a fresh one`, () => {
      const file = '/shapes.sp';
      const text = lines.join('\n');
      const before = analyse(memoryHost({ [file]: text }), file);
      let last = before;
      let lastText = text;
      for (const [from, to, quick = true] of edits) {
        // from the first analysis, and from the last quick answer (edits stacked)
        for (const [base, baseText] of [[before, text], [last, lastText]] as const) {
          const edited = baseText.replace(from, to);
          expect(edited, from).not.toBe(baseText);
          const fast = reanalyse(base, readDeck(memoryHost({ [file]: edited }), file));
          expect(fast !== undefined, `${from} -> ${to}`).toBe(quick);
          if (!fast) continue;
          same(file, fast, analyse(memoryHost({ [file]: edited }), file));
          last = fast;
          lastText = edited;
        }
      }
    });
  }
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
