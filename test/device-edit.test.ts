// The splice path (circuit/splice.ts, switchNetwork `patchSwitchNetwork` with a renumbering,
// classify `renumberDevices` and `reclassify`, estimate `renumberEstimates` and `reestimate`,
// engine `reanalyse`): after transistor lines are added or deleted, the analysis built from the
// previous one must equal a fresh analysis of the new text, finding for finding and figure for
// figure, with the circuit, the switch network and each stage's findings equal to fresh ones.
// Random additions and deletions over every sample, the fixtures and a generated datapath, one
// and two in a row; and lines added with a new net on them (circuit/newNets).

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { fixesOnSamples, withFix } from './support/quickFixes';
import { checkRandomEdits, same } from './support/sameAnalysis';
import { addDevice, addDeviceOnNewNet, deleteDevice } from './support/deviceEdits';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');

/** An addition or a deletion, chosen by the numbers drawn. */
function edit(text: string, kind: number, pick: number, where: number): string {
  return kind % 3 === 0 ? deleteDevice(text, pick, where % 2 === 0) : addDevice(text, pick, where, kind >> 1);
}

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number): number {
  return checkRandomEdits(file, original, hostFor, runs, 17, [fc.nat(11), fc.nat(5000), fc.nat(500)], (t, [kind, pick, where]) => edit(t, kind!, pick!, where!));
}

describe('transistor lines added or deleted reuse the previous analysis and equal a fresh one', () => {
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random additions and deletions`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 40);
    });
  }
  for (const kind of ['classify', 'electrical']) {
    const dir = path.join(__dirname, 'fixtures', kind);
    it(`the ${kind} fixtures: random additions and deletions`, () => {
      let taken = 0;
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 12);
      }
      expect(taken).toBeGreaterThan(10);
    }, 120_000);
  }
  it('a generated hierarchical datapath (2k transistors): devices added and deleted in its cells', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    // (12 runs: the latch cells' lengths are a parameter, and a copy of those lines is declined)
    const taken = check(file, text, (t) => memoryHost({ [file]: t }), 12);
    // the benchmark's edit: a device added in the block that every slice chain runs through
    const edited = text.replace(/^(Xs3 .*)$/m, '$1\nMx w3 clk vdd vdd bp w=0.1u l=0.1u');
    expect(edited).not.toBe(text);
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'a plain transistor line added in a cell is spliced in').toBeDefined();
    same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    expect(taken).toBeGreaterThan(2);
    expect(total).toBeGreaterThan(20);
  }, 120_000);
  it('a long run of additions and deletions in the block cell, each from the previous quick answer (the derived maps fold on the way)', () => {
    const file = '/datapath.sp';
    let text = hierarchicalNetlist(2_000);
    let previous = analyse(memoryHost({ [file]: text }), file);
    const added: string[] = [];
    for (let k = 0; k < 30; k++) {
      let next: string;
      if (k % 3 === 2) {
        // the oldest added device deleted again
        next = text.replace(`\n${added.shift()!}`, '');
      } else {
        // on a net the block has already written by then (a net written first on the new line
        // would renumber the nets)
        const at = (k * 7) % 20;
        const line = `Mk${k} w${Math.min(at, 18)} ${k % 2 ? 'clk' : 'in1'} vdd vdd bp w=0.2u l=0.1u`;
        added.push(line);
        next = text.replace(new RegExp(`^(Xs${at} .*)$`, 'm'), `$1\n${line}`);
      }
      expect(next).not.toBe(text);
      const fast = reanalyse(previous, readDeck(memoryHost({ [file]: next }), file));
      expect(fast, `edit ${k} is spliced in`).toBeDefined();
      if (k % 6 === 5 || k === 29) same(file, fast!, analyse(memoryHost({ [file]: next }), file));
      previous = fast!;
      text = next;
    }
  }, 120_000);
});

describe('transistor lines added on new nets reuse the previous analysis and equal a fresh one', () => {
  const check = (file: string, original: string, hostFor: (t: string) => FileHost, runs: number) =>
    checkRandomEdits(file, original, hostFor, runs, 29, [fc.nat(11), fc.nat(5000), fc.nat(500)], (t, [variant, pick, where]) => addDeviceOnNewNet(t, pick!, where!, variant!));
  let total = 0;
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random lines added on new nets`, () => {
      const file = path.join(SAMPLES, name);
      total += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 25);
    });
  }
  it('the fixtures: random lines added on new nets', () => {
    let taken = 0;
    for (const kind of ['classify', 'electrical']) {
      const dir = path.join(__dirname, 'fixtures', kind);
      for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.sp'))) {
        const file = path.join(dir, name);
        taken += check(file, fs.readFileSync(file, 'utf8'), (t) => overlay(file, t), 6);
      }
    }
    expect(taken).toBeGreaterThan(10);
  }, 120_000);
  it('a generated hierarchical datapath (2k transistors): a series device put in the block cell on a new node', () => {
    const file = '/datapath.sp';
    const text = hierarchicalNetlist(2_000);
    // (the latch cells' lengths are a parameter, and the domino cell is over the copy limit: most are declined)
    const taken = check(file, text, (t) => memoryHost({ [file]: t }), 16);
    const edited = text.replace(/^(Xs3 .*)$/m, '$1\nMx w3 clk w3mid vdd bp w=0.1u l=0.1u');
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: edited }), file));
    expect(fast, 'a transistor line on a new node is spliced in').toBeDefined();
    same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
    expect(taken).toBeGreaterThan(2);
    expect(total).toBeGreaterThan(30);
  }, 120_000);
});

describe('a transistor line added above the model cards', () => {
  it('moves the cards with their lines (and the note on a card Tidemark does not evaluate), equal to a fresh analysis', () => {
    const file = '/cards-below.sp';
    const text = [
      '* model cards at the bottom, as many decks have them',
      'vdd vdd 0 1.2',
      'vclk clk 0 pulse(0 1.2 0 0.1n 0.1n 4.9n 10n)',
      'Mpre dyn clk vdd vdd bp w=0.4u l=0.1u',
      'Mev dyn a foot 0 bn w=0.4u l=0.1u',
      'Mft foot clk 0 0 bn w=0.4u l=0.1u',
      'Minvp out dyn vdd vdd bp w=0.4u l=0.1u',
      'Minvn out dyn 0 0 bn w=0.2u l=0.1u',
      'Mhv out2 out 0 0 bhv w=0.2u l=0.1u',
      '.model bn nmos level=1 vto=0.4 kp=200u',
      '.model bp pmos level=1 vto=-0.4 kp=80u',
      '.model bhv nmos level=73',
      '.end',
    ].join('\n');
    const before = analyse(memoryHost({ [file]: text }), file);
    expect(before.diagnostics.some((d) => d.rule === 'unknown-model')).toBe(true);
    for (const line of ['Mx dyn b foot 0 bn w=0.4u l=0.1u', 'Mx dyn b nfoot 0 bn w=0.4u l=0.1u', 'Mx2 out3 out 0 0 bhv w=0.2u l=0.1u']) {
      const edited = text.replace('Mft foot', `${line}\nMft foot`);
      const fast = reanalyse(before, readDeck(memoryHost({ [file]: edited }), file));
      expect(fast, `${line}: spliced in with the cards below moved`).toBeDefined();
      same(file, fast!, analyse(memoryHost({ [file]: edited }), file));
      const card = fast!.design.modelCards.get('bn')![0]!;
      expect(card.range.start.line).toBe(10);
      expect(fast!.circuits[0]!.circuit.mosfets.every((m) => !m.card || fast!.design.modelCards.get(m.card.name)!.includes(m.card))).toBe(true);
      // a second line from the quick answer: the moved cards move again
      const again = edited.replace('Minvp out', 'My out b vdd vdd bp w=0.4u l=0.1u\nMinvp out');
      const fast2 = reanalyse(fast!, readDeck(memoryHost({ [file]: again }), file));
      expect(fast2).toBeDefined();
      same(file, fast2!, analyse(memoryHost({ [file]: again }), file));
    }
  });
});

describe('the quick fixes that put devices in', () => {
  it('keeper, holder, feedback and precharge fixes on every sample and electrical fixture are answered from the previous analysis, equal to a fresh one', () => {
    let fixes = 0;
    for (const { file, text, before, fix } of fixesOnSamples(/^(Insert|Precharge)/)) {
      expect(fix.edits.every((e) => e.range.start.character === 0 && e.range.end.line === e.range.start.line && e.newText.endsWith('\n'))).toBe(true);
      const edited = withFix(text, fix);
      const fast = reanalyse(before, readDeck(overlay(file, edited), file));
      expect(fast, `${path.basename(file)}: ${fix.title}`).toBeDefined();
      same(file, fast!, analyse(overlay(file, edited), file));
      fixes++;
    }
    expect(fixes).toBeGreaterThan(10);
  }, 120_000);
});
