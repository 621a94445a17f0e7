// The path for edits of what the estimates read for the whole circuit (circuit/electricalEdit.ts,
// engine `reanalyse`): a supply's volts, a clock source's edges and period, the values of the
// `clock`, `standby`, `budget` and `temps` directives. When the phases keep their pattern the
// classification stands and every estimate is worked out again; the answer must equal a fresh
// analysis of the new text, finding for finding and figure for figure. Random edits over every
// sample, the fixtures and a generated datapath, one and two in a row; an edit after which some
// combinations of clock values are no longer run keeps the results of the others; edits that
// bring a new combination or could make a rail appear or go are declined. The same for new corner and
// budget settings (engine `reanalyseOptions`), which the editor's settings change.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse, reanalyseOptions } from '../server/src/engine';
import type { EngineOptions } from '../server/src/core/options';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { editDirectiveLine, editElectricalValue, electricalValues } from './support/electricalEdits';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { samplesAndElectricalFixtures } from './support/fixtures';
import { hierarchicalNetlist } from '../scripts/netlists';

function checkLines(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 37, [fc.nat(5000), fc.nat(50)], (t, [pick, kind]) => editDirectiveLine(t, pick!, kind!));
}

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 31, [fc.nat(5000), fc.nat(50)], (t, [pick, factor]) => editElectricalValue(t, pick!, factor!));
}

describe('supply, clock, budget and corner values reuse the classification and equal a fresh analysis', () => {
  let total = 0;
  const SAMPLES = path.join(__dirname, '..', 'samples');
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random values on its sources and directives`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 14);
    }, 120_000);
  }
  for (const kind of ['classify', 'electrical']) {
    const dir = path.join(__dirname, 'fixtures', kind);
    it(`the ${kind} fixtures: random values on their sources and directives`, () => {
      for (const name of fs.readdirSync(dir).filter((f) => /\.(sp|cdl)$/.test(f))) {
        const file = path.join(dir, name);
        const text = fs.readFileSync(file, 'utf8');
        if (electricalValues(text.split('\n')).length) total += check(file, text, (t) => overlay(file, t), 6);
      }
    }, 120_000);
  }

  it('budget and corners lines put in and directive lines taken out, on every sample and electrical fixture: every later line moves', () => {
    let taken = 0;
    for (const file of samplesAndElectricalFixtures()) taken += checkLines(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 8);
    expect(taken).toBeGreaterThan(20);
  }, 120_000);

  it('a comment or blank line put in or taken out where there are electrical directives: every result stands, moved', () => {
    let answered = 0;
    for (const file of samplesAndElectricalFixtures()) {
      let text = fs.readFileSync(file, 'utf8');
      // each file gets a directive of this kind, so the edit is one this path reads
      if (!/tidemark:\s*(budget|temps|clock|standby|supply)\b/i.test(text)) text = text.replace(/\n\.end\b/i, '\n* tidemark: budget 10%\n.end');
      const before = analyse(overlay(file, text), file);
      const lines = text.split('\n');
      const spots = lines.map((_, k) => k).filter((k) => k > 0 && k % 5 === 1 && !lines[k]!.trim().startsWith('+'));
      const edits = spots.map((k, n) => [...lines.slice(0, k), n % 2 ? '' : '* a note', ...lines.slice(k)].join('\n'));
      const comment = lines.findIndex((l, k) => k > 0 && /^\*(?!.*tidemark:)/.test(l.trim()) && !lines[k + 1]?.trim().startsWith('+'));
      if (comment > 0) edits.push(lines.filter((_, k) => k !== comment).join('\n'));
      for (const edited of edits) {
        const host = overlay(file, edited);
        const fast = reanalyse(before, readDeck(host, file));
        expect(fast, `${path.basename(file)}: a line put in or taken out is answered from the previous analysis`).toBeDefined();
        fast!.circuits.forEach((a, i) => expect(a.estimates, 'no estimate is worked out again').toBe(before.circuits[i]!.estimates));
        same(file, fast!, analyse(host, file));
        answered++;
      }
    }
    expect(answered).toBeGreaterThan(40);
  }, 120_000);

  it('a generated hierarchical datapath (2k transistors): the supply, both clocks, a budget and corners', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000).replace('\n.end\n', '\n* tidemark: budget 12%\n* tidemark: temps 25 110\n.end\n');
    total += check(file, text, (t) => memoryHost({ [file]: t }), 10);
    const before = analyse(memoryHost({ [file]: text }), file);
    const cases: Array<[string, string, boolean]> = [
      ['the supply at 1.1 V', text.replace('vdd vdd 0 1.0', 'vdd vdd 0 1.1'), true],
      ['both clocks at half the frequency', text.replace('PULSE(0 1 0 10p 10p 0.5n 1n)', 'PULSE(0 1 0 10p 10p 1n 2n)').replace('PULSE(1 0 0 10p 10p 0.5n 1n)', 'PULSE(1 0 0 10p 10p 1n 2n)'), true],
      ['a tighter budget', text.replace('budget 12%', 'budget 5%'), true],
      ['a budget in volts', text.replace('budget 12%', 'budget 0.08V'), true],
      ['a hotter corner', text.replace('temps 25 110', 'temps 25 125'), true],
      ['a supply declared by a directive at another volts', text.replace('* tidemark: budget 12%', '* tidemark: budget 12%\n* tidemark: supply vdd=1.05'), false],
      ['the budget line taken out (the default budget)', text.replace('* tidemark: budget 12%\n', ''), true],
      ['a budget line put in at the top', text.replace('\n', '\n* tidemark: budget 9%\n'), true],
      // declined: the supply to 0 V makes it a ground; one clock at another period changes the phases
      ['the supply at 0 V', text.replace('vdd vdd 0 1.0', 'vdd vdd 0 0'), false],
      ['one clock at another period', text.replace('PULSE(0 1 0 10p 10p 0.5n 1n)', 'PULSE(0 1 0 10p 10p 0.7n 1.5n)'), false],
    ];
    for (const [what, edited, answered] of cases) {
      expect(edited, what).not.toBe(text);
      const host = memoryHost({ [file]: edited });
      const fast = reanalyse(before, readDeck(host, file));
      expect(fast !== undefined, what).toBe(answered);
      if (fast) same(file, fast, analyse(host, file));
    }
    // the supply declared by a directive instead of a source: its volts edited there
    const declared = text.replace('vdd vdd 0 1.0\n', '').replace('* tidemark: budget 12%', '* tidemark: budget 12%\n* tidemark: supply vdd=1.0');
    expect(declared).toContain('supply vdd=1.0');
    const beforeDeclared = analyse(memoryHost({ [file]: declared }), file);
    for (const [edited, answered] of [[declared.replace('supply vdd=1.0', 'supply vdd=1.2'), true], [declared.replace('supply vdd=1.0', 'supply vdd=0'), false]] as const) {
      const host = memoryHost({ [file]: edited });
      const fast = reanalyse(beforeDeclared, readDeck(host, file));
      expect(fast !== undefined, edited.includes('vdd=0') ? 'the directive supply at 0 V' : 'the directive supply at 1.2 V').toBe(answered);
      if (fast) same(file, fast, analyse(host, file));
    }
    expect(total).toBeGreaterThan(40);
  }, 120_000);
});

describe('standby lines reuse the classification when the cycle already has their clock values', () => {
  it('the dynamic flop sample (one clock): its standby line taken out, at the other level, put in again', () => {
    const file = path.join(__dirname, '..', 'samples', 'tern_dynamic_flop.sp');
    const text = fs.readFileSync(file, 'utf8');
    const line = '* tidemark: standby clk=0 for=50u\n';
    expect(text).toContain(line);
    const without = text.replace(line, '');
    const cases: Array<[string, string, string]> = [
      ['taken out', text, without],
      ['the other level', text, text.replace('standby clk=0', 'standby clk=1')],
      ['a longer standby', text, text.replace('for=50u', 'for=2m')],
      ['put in again', without, text],
    ];
    for (const [what, from, to] of cases) {
      const fast = reanalyse(analyse(overlay(file, from), file), readDeck(overlay(file, to), file));
      expect(fast, what).toBeDefined();
      same(file, fast!, analyse(overlay(file, to), file));
    }
  });

  it('declined when the standby holds one clock of two and frees the other (a new combination of values), or names a net the circuit does not number first', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    const before = analyse(memoryHost({ [file]: text }), file);
    for (const line of ['* tidemark: standby clk=0 for=1u', '* tidemark: standby a0=0 for=1u']) {
      const edited = text.replace('\n.end\n', `\n${line}\n.end\n`);
      expect(reanalyse(before, readDeck(memoryHost({ [file]: edited }), file)), line).toBeUndefined();
    }
  });
});

describe('an edit that stops running some combinations of clock values keeps the results of the others', () => {
  it('the datapath (2k transistors): a clock back at the period of the other (nine phases to two), a standby line that freed the other clock taken out; a node floating only in a combination no longer run', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    const cases: Array<[string, string]> = [
      ['one clock back at the period of the other', text.replace('PULSE(0 1 0 10p 10p 0.5n 1n)', 'PULSE(0 1 0 10p 10p 0.7n 1.5n)')],
      ['a standby line holding one clock of two taken out', text.replace('\n.end\n', '\n* tidemark: standby clk=0 for=1u\n.end\n')],
    ];
    // a node that floats only when both clocks are high, and fights when both are low: a
    // pull-up the one clock turns off, a pull-down the other clock turns off through an inverter
    const both = [
      'two clocks, one node driven in every combination the cycle runs',
      '.model n nmos level=1 vto=0.4 kp=200u',
      '.model p pmos level=1 vto=-0.4 kp=80u',
      'vdd vdd 0 1.0',
      'vclk1 clk1 0 PULSE(0 1 0 10p 10p 0.5n 1n)',
      'vclk2 clk2 0 PULSE(1 0 0 10p 10p 0.5n 1n)',
      'Mib bn clk2 vdd vdd p w=0.4u l=0.1u',
      'Min bn clk2 0 0 n w=0.2u l=0.1u',
      'Mup x clk1 vdd vdd p w=0.4u l=0.1u',
      'Mdn x bn 0 0 n w=0.2u l=0.1u',
      'Mop y x vdd vdd p w=0.4u l=0.1u',
      'Mon y x 0 0 n w=0.2u l=0.1u',
      '.end',
      '',
    ].join('\n');
    cases.push(['the other clock at the period of the first again (the node no longer floats nor fights)', both.replace('PULSE(1 0 0 10p 10p 0.5n 1n)', 'PULSE(1 0 0 10p 10p 0.7n 1.5n)')]);
    for (const [what, from] of cases) {
      const to = from.startsWith('two clocks') ? both : text;
      const before = analyse(memoryHost({ [file]: from }), file);
      if (to === both) expect(before.diagnostics.filter((d) => /^x[ :]/.test(d.message)).map((d) => d.rule), what).toEqual(['floating-node', 'contention']);
      const host = memoryHost({ [file]: to });
      const fast = reanalyse(before, readDeck(host, file));
      expect(fast, what).toBeDefined();
      expect(fast!.circuits[0]!.plan.phases.length, what).toBeLessThan(before.circuits[0]!.plan.phases.length);
      same(file, fast!, analyse(host, file));
    }
  });
});

describe('new corner or budget settings reuse the classification and equal a fresh analysis', () => {
  const BASE: EngineOptions = { tempsC: [25, 110], budget: { fraction: 0.1 } };
  const NEXT: EngineOptions[] = [{ tempsC: [0, 85, 125] }, { tempsC: [25, 110], budget: { volts: 0.05 } }, { tempsC: [-40, 150], budget: { fraction: 0.05 } }, {}];
  it('every sample and electrical fixture: each new setting from the first, and one after another', () => {
    let taken = 0;
    for (const file of samplesAndElectricalFixtures()) {
      const host = overlay(file, fs.readFileSync(file, 'utf8'));
      const before = analyse(host, file, BASE);
      let last = before;
      let lastOptions = BASE;
      for (const options of NEXT) {
        const fresh = analyse(host, file, options);
        const fast = reanalyseOptions(before, BASE, options);
        expect(fast, `${path.basename(file)}: ${JSON.stringify(options)}`).toBeDefined();
        same(file, fast!, fresh);
        const chained = reanalyseOptions(last, lastOptions, options);
        expect(chained).toBeDefined();
        same(file, chained!, fresh);
        last = chained!;
        lastOptions = options;
        taken++;
      }
    }
    expect(taken).toBeGreaterThan(20);
  }, 120_000);

  it('a generated hierarchical datapath (2k transistors), with and without a corners directive (which wins over the setting)', () => {
    const file = '/datapath.sp';
    for (const text of [hierarchicalNetlist(2_000), hierarchicalNetlist(2_000).replace('\n.end\n', '\n* tidemark: temps 25 90\n.end\n')]) {
      const host = memoryHost({ [file]: text });
      const before = analyse(host, file, BASE);
      for (const options of NEXT) same(file, reanalyseOptions(before, BASE, options)!, analyse(host, file, options));
    }
  }, 120_000);

  it('other settings, and a budget the receiving gate sets, are left to a fresh analysis', () => {
    const file = '/datapath.sp';
    const host = memoryHost({ [file]: hierarchicalNetlist(2_000) });
    const before = analyse(host, file, BASE);
    const declined: Array<[string, EngineOptions]> = [
      ['a supply net', { ...BASE, supplies: { vddx: 1.0 } }],
      ['a clock', { ...BASE, clocks: [{ net: 'clk', periodS: 2e-9, highS: 1e-9 }] }],
      ['the geometry scale', { ...BASE, geometryScale: 1e-6 }],
      ['an include path', { ...BASE, includePaths: ['/lib'] }],
      ['the receiver budget', { ...BASE, budget: { receiver: true } }],
      ['the front end only', { ...BASE, frontEndOnly: true }],
    ];
    for (const [what, options] of declined) expect(reanalyseOptions(before, BASE, options), what).toBeUndefined();
  });
});
