// The reconnection path (circuit/rewire.ts, switchNetwork `patchSwitchNetwork`, classify
// `reclassify`, estimate `reestimate`, engine `reanalyse`): after a node word of an element
// line is changed to another net of its scope, the analysis built from the previous one must
// equal a fresh analysis of the new text, finding for finding and figure for figure, and the
// patched switch network must equal a fresh build, and each stage's findings, revised from the
// previous ones, those written afresh from the same results. Random reconnections over every sample and
// a generated hierarchical datapath, one and two in a row: to nets the scope has, to new names
// (circuit/newNets: every stage's results under the new net numbers first), and the only use
// of a net moved away (the net goes: the patched results under the numbers without it).

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { reconnect, reconnectLastUse, reconnectToNewNet } from './support/reconnect';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 11, [fc.nat(5000), fc.nat(500)], (t, [pick, to]) => reconnect(t, pick!, to!));
}

describe('reconnections reuse the previous analysis and equal a fresh one', () => {
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random reconnections`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 40);
    });
  }
  // the classification and electrical fixtures: keepers, latches, buses, stacks, memory cells
  for (const kind of ['classify', 'electrical']) {
    const dir = path.join(__dirname, 'fixtures', kind);
    it(`the ${kind} fixtures: random reconnections`, () => {
      let taken = 0;
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 12);
      }
      expect(taken).toBeGreaterThan(10);
    }, 120_000);
  }
  it('a generated hierarchical datapath (2k transistors): reconnections in its cells and at the top', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    const taken = check(file, text, (t) => memoryHost({ [file]: t }), 6);
    // the benchmark's edit: a block input moved to another net
    const edited = text.replace(/^Xb1 a1 /m, 'Xb1 a3 ');
    expect(edited).not.toBe(text);
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'moving an instance input to another existing net is a reconnection').toBeDefined();
    same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    expect(taken).toBeGreaterThan(2);
    expect(total).toBeGreaterThan(20);
  }, 120_000);
});

describe('a reconnection reaches the witness checks that read the rebuilt group, however deep', () => {
  // the evaluate stack reads a and a copy of it inverted three gates back (a, i1, i2, ab): the
  // check of dyn traces through all three inverters, so it knows the stack never conducts. The
  // middle inverter's input moved to b breaks that: dyn's check must be done again, though
  // the middle inverter's group is two gate levels from it (reclassify finds it from the record
  // of the groups each check read, not by gate levels)
  const file = '/chain.sp';
  const text = [
    '* a dynamic node reading a and its inverted copy',
    '* tidemark: input a b',
    'vdd vdd 0 1.0',
    'vclk clk 0 PULSE(0 1 0 10p 10p 0.49n 1n)',
    'Mpre dyn clk vdd vdd pch w=0.6u l=0.1u',
    'Mna dyn a n1 0 nch w=0.6u l=0.1u',
    'Mnb n1 ab foot 0 nch w=0.6u l=0.1u',
    'Mft foot clk 0 0 nch w=0.8u l=0.1u',
    'M4n bb b 0 0 nch w=0.3u l=0.1u',
    'M4p bb b vdd vdd pch w=0.6u l=0.1u',
    'Mon out dyn 0 0 nch w=0.3u l=0.1u',
    'Mop out dyn vdd vdd pch w=0.6u l=0.1u',
    'M1n i1 a 0 0 nch w=0.3u l=0.1u',
    'M1p i1 a vdd vdd pch w=0.6u l=0.1u',
    'M2n i2 i1 0 0 nch w=0.3u l=0.1u',
    'M2p i2 i1 vdd vdd pch w=0.6u l=0.1u',
    'M3n ab i2 0 0 nch w=0.3u l=0.1u',
    'M3p ab i2 vdd vdd pch w=0.6u l=0.1u',
    '.model nch nmos level=1',
    '.model pch pmos level=1',
    '.end',
  ].join('\n');
  const stateOfDyn = (r: ReturnType<typeof analyse>) => {
    const a = r.circuits[0]!;
    const dyn = a.circuit.netByName.get('dyn')!;
    return a.classification.perPhase.map((m) => m.get(dyn)?.state ?? 'driven').join(' ');
  };
  it('the middle inverter moved to another input', () => {
    const before = analyse(memoryHost({ [file]: text }), file);
    expect(stateOfDyn(before)).toContain('floating');
    const edited = text.replace('M2n i2 i1 ', 'M2n i2 b ').replace('M2p i2 i1 ', 'M2p i2 b ');
    const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'a reconnection').toBeDefined();
    const fresh = analyse(memoryHost({ [file]: edited }), file);
    expect(stateOfDyn(fresh)).not.toBe(stateOfDyn(before));
    expect(stateOfDyn(fast!)).toBe(stateOfDyn(fresh));
    same(file, fast!, fresh);
    // and back
    const back = reanalyse(fast!, readDeck(memoryHost({ [file]: text }), file));
    expect(back).toBeDefined();
    same(file, back!, before);
  });
});

describe('reconnections to a new net name reuse the previous analysis and equal a fresh one', () => {
  const toNew = (file: string, original: string, hostFor: (t: string) => FileHost, runs: number) =>
    checkRandomEdits(file, original, hostFor, runs, 23, [fc.nat(5000), fc.nat(90)], (t, [pick, tag]) => reconnectToNewNet(t, pick!, tag!));
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random words moved to new nets`, () => {
      const file = path.join(SAMPLES, name);
      total += toNew(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 25);
    });
  }
  it('the classification and electrical fixtures: random words moved to new nets', () => {
    let taken = 0;
    for (const kind of ['classify', 'electrical']) {
      const dir = path.join(__dirname, 'fixtures', kind);
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += toNew(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 6);
      }
    }
    expect(taken).toBeGreaterThan(20);
  }, 120_000);
  it('a generated hierarchical datapath (2k transistors): new nets in its cells and at the top', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    const taken = toNew(file, text, (t) => memoryHost({ [file]: t }), 6);
    const before = analyse(memoryHost({ [file]: text }), file);
    // the benchmark's edits: a block input, and a slice input inside the block cell, moved to new names
    for (const [from, to] of [['Xb1 a1 ', 'Xb1 a1n '], ['Xs3 w2 ', 'Xs3 w2n ']] as const) {
      const edited = text.replace(from, to);
      expect(edited).not.toBe(text);
      const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
      expect(fast, `${to.trim()}: a new net is a reconnection`).toBeDefined();
      expect(fast!.circuits[0]!.circuit.nets.length).toBeGreaterThan(before.circuits[0]!.circuit.nets.length);
      // nets are numbered in runs by the definition that names them, the most copied first and
      // the top level last: a name put in at the top level moves no net below an instance, one
      // put in to the block cell none of the cells below it (two levels down and more)
      const was = before.circuits[0]!.circuit;
      const now = fast!.circuits[0]!.circuit;
      const depth = from.startsWith('Xb1') ? 1 : 2;
      const moved = was.nets.filter((n, id) => n.name.split('.').length > depth && now.netByName.get(n.name) !== id).length;
      expect(moved, 'nets of the cells below renumbered').toBe(0);
      same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    }
    expect(taken).toBeGreaterThan(2);
    expect(total).toBeGreaterThan(60);
  }, 120_000);
  it('a new name a directive, a setting or a name rule gives a role to is left to a fresh analysis', () => {
    const file = '/roles.sp';
    const text = ['* roles', '* tidemark: clock phi2 period=10n', 'vdd vdd 0 1.2', 'vphi phi 0 pulse(0 1.2 0 0.1n 0.1n 4.9n 10n)', 'Mp x phi vdd vdd bp w=0.2u l=0.1u', 'Mn x a 0 0 bn w=0.2u l=0.1u', 'Mi y x 0 0 bn w=0.2u l=0.1u', 'Cl x 0 1f', '.model bn nmos level=1', '.model bp pmos level=1', '.end'].join('\n');
    const before = analyse(memoryHost({ [file]: text }), file);
    const edit = (to: string) => reanalyse(before, readDeck(memoryHost({ [file]: text.replace('Mn x a 0', `Mn x ${to} 0`) }), file));
    expect(edit('a2'), 'a plain new name is taken').toBeDefined();
    expect(edit('phi2'), 'named by a clock directive').toBeUndefined();
    expect(edit('vdd2'), 'a supply by the name rule').toBeUndefined();
    expect(edit('gnd2'), 'a ground by the name rule').toBeUndefined();
  });
});

describe('the only use of a net moved to another net reuses the previous analysis and equals a fresh one', () => {
  const lastUse = (file: string, original: string, hostFor: (t: string) => FileHost, runs: number) =>
    checkRandomEdits(file, original, hostFor, runs, 31, [fc.nat(5000), fc.nat(500)], (t, [pick, to]) => reconnectLastUse(t, pick!, to!));
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: a net's only use moved away`, () => {
      const file = path.join(SAMPLES, name);
      total += lastUse(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 20);
    });
  }
  it('the fixtures, and the 2k datapath: a net in a cell and at the top level left unused', () => {
    let taken = 0;
    for (const kind of ['classify', 'electrical']) {
      const dir = path.join(__dirname, 'fixtures', kind);
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += lastUse(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 6);
      }
    }
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    taken += lastUse(file, text, (t) => memoryHost({ [file]: t }), 6);
    // a new net and back: the name typed, then the word put back (the new net goes again)
    const before = analyse(memoryHost({ [file]: text }), file);
    const typed = text.replace('Xb1 a1 ', 'Xb1 a1n ');
    const first = reanalyse(before, readDeck(memoryHost({ [file]: typed }), file))!;
    const back = reanalyse(first, readDeck(memoryHost({ [file]: text }), file));
    expect(back, 'the new net taken out again').toBeDefined();
    expect(back!.circuits[0]!.circuit.nets.length).toBe(before.circuits[0]!.circuit.nets.length);
    same(file, back!, before);
    expect(taken).toBeGreaterThan(10);
    expect(total).toBeGreaterThan(10);
  }, 120_000);
});
