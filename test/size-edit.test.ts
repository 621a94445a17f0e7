// The size-edit path (circuit/patch.ts, engine `reanalyse`): after an edit of plain-number sizes
// on MOSFET lines, the analysis built from the previous one must equal a fresh analysis of the
// new text, finding for finding and figure for figure (the whole JSON report, every node).
// Random edits over every sample and a generated hierarchical datapath, with model swaps between
// flavours of one polarity where the cards exist; edits of other kinds must be declined.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost, type FileHost } from '../server/src/core/host';
import { overlay, report } from './support/edits';
import { same } from './support/sameAnalysis';
import { patchSizes } from '../server/src/circuit/patch';
import { hierarchicalNetlist } from '../scripts/netlists';
import { fixesOnSamples } from './support/quickFixes';
import { applyEdits } from './support/lspClient';

const SAMPLES = path.join(__dirname, '..', 'samples');



type Edit = { line: number; param: number; factor: number; kind: 'size' | 'other' | 'flavour' };
const FACTORS = [0.5, 0.8, 1.25, 2, 3];

/**
 * Scales one size of one MOSFET line (a 'size' edit), changes a node name ('other'), or swaps
 * its model for the flavour named with an 'l' more or less ('flavour': a quick edit only where
 * that card exists, as `flavours` says).
 */
function apply(text: string, edits: Edit[], flavours = false): { text: string; sizesOnly: boolean } {
  const lines = text.split('\n');
  const mos = lines.map((l, i) => (/^m\S*\s/i.test(l) && /\b(w|l|ad|pd|m)=\d/i.test(l) ? i : -1)).filter((i) => i >= 0);
  let sizesOnly = true;
  for (const e of edits) {
    if (mos.length === 0) break;
    const i = mos[e.line % mos.length]!;
    if (e.kind === 'other') {
      lines[i] = lines[i]!.replace(/^(\S+\s+)(\S+)/, '$1$2_x');
      sizesOnly = false;
      continue;
    }
    if (e.kind === 'flavour') {
      lines[i] = lines[i]!.replace(/^((?:\S+\s+){5})(\S+)/, (_m, head: string, model: string) => head + (model.endsWith('l') ? model.slice(0, -1) : model + 'l'));
      continue;
    }
    const sizes = [...lines[i]!.matchAll(/\b(w|l|ad|as|pd|ps)=(\d+(?:\.\d+)?)(u|n|p)?\b/gi)];
    if (!sizes.length) continue;
    const s = sizes[e.param % sizes.length]!;
    const v = Number(s[2]) * FACTORS[e.factor % FACTORS.length]!;
    lines[i] = lines[i]!.slice(0, s.index!) + `${s[1]}=${Number(v.toPrecision(4))}${s[3] ?? ''}` + lines[i]!.slice(s.index! + s[0].length);
  }
  // a swap to a model that has no card is not a size edit (two swaps of one line cancel)
  const modelOf = (l: string) => (/^m/i.test(l) ? l.trim().split(/\s+/)[5] : undefined);
  const before = text.split('\n');
  if (!flavours && lines.some((l, k) => modelOf(l) !== modelOf(before[k]!))) sizesOnly = false;
  return { text: lines.join('\n'), sizesOnly };
}

function check(file: string, original: string, hostFor: (t: string) => FileHost, runs: number, flavours = false): number {
  const before = analyse(hostFor(original), file);
  let patched = 0;
  const edit = fc.array(fc.record({ line: fc.nat(500), param: fc.nat(5), factor: fc.nat(4), kind: fc.constantFrom<Edit['kind']>('size', 'size', 'size', 'other', 'flavour') }), { minLength: 1, maxLength: 3 });
  // two edits in a row: the second starts from the first's result, patched or fresh
  fc.assert(
    fc.property(edit, edit, (first, second) => {
      let previous = before;
      let text = original;
      for (const edits of [first, second]) {
        const next = apply(text, edits, flavours);
        if (next.text === text) continue;
        const host = hostFor(next.text);
        const deck = readDeck(host, file);
        // other edits may be answered by another quick path (a rename, a reconnection), never by this one
        if (!next.sizesOnly) expect(patchSizes(previous.deck, previous.design, deck), 'only size edits take the size patch').toBeUndefined();
        const fast = reanalyse(previous, deck);
        const full = analyse(host, file);
        if (fast) {
          patched++;
          expect(JSON.parse(JSON.stringify(fast.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
          expect(report(file, fast)).toEqual(report(file, full));
        }
        previous = fast ?? full;
        text = next.text;
      }
    }),
    { numRuns: runs, seed: 11 },
  );
  return patched;
}

describe('size edits reuse the previous analysis and equal a fresh one', () => {
  for (const name of fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp'))) {
    it(`${name}: random size edits`, () => {
      const file = path.join(SAMPLES, name);
      const text = fs.readFileSync(file, 'utf8');
      const patched = check(file, text, (t) => overlay(file, t), 12);
      // sizes written as parameter expressions are not patched on their lines (the sample with
      // {wn}, {lmin}): a `.param` edit is answered by the card-value path (test/value-edit.test.ts)
      const plainSizes = /^m\S*\s.*\bw=\d/im.test(text);
      if (plainSizes) expect(patched, 'some edits took the patch').toBeGreaterThan(0);
      else {
        const edited = text.replace(/\.param\s+wn\s*=\s*([\d.]+)/i, (_m, v) => `.param wn=${Number(v) * 2}`);
        expect(edited).not.toBe(text);
        const fast = reanalyse(analyse(overlay(file, text), file), readDeck(overlay(file, edited), file));
        expect(fast, 'a parameter edit is answered from the previous analysis').toBeDefined();
        same(file, fast!, analyse(overlay(file, edited), file));
      }
    });
  }
  it('the keeper resize fixes on every sample and electrical fixture are size edits, answered from the previous analysis and equal to a fresh one', () => {
    let fixes = 0;
    for (const { file, text, before, fix } of fixesOnSamples(/^Resize the keeper/)) {
      expect(fix.edits.every((e) => e.file === file)).toBe(true);
      const edited = applyEdits(text, fix.edits.map((e) => ({ range: e.range, newText: e.newText })));
      const deck = readDeck(overlay(file, edited), file);
      expect(patchSizes(before.deck, before.design, deck), fix.title).toBeDefined();
      const fast = reanalyse(before, deck);
      expect(fast, `${path.basename(file)}: ${fix.title}`).toBeDefined();
      same(file, fast!, analyse(overlay(file, edited), file));
      fixes++;
    }
    expect(fixes).toBeGreaterThanOrEqual(2);
  }, 120_000);

  it('a generated hierarchical datapath (5k transistors): random size edits in its leaf cells', () => {
    const file = '/datapath.sp';
    const patched = check(file, hierarchicalNetlist(5_000), (t) => memoryHost({ [file]: t }), 6, true);
    expect(patched).toBeGreaterThan(0);
  });
  it('the datapath, which has a second flavour of each card: model swaps are size edits', () => {
    const file = '/datapath.sp';
    // the generated netlist carries low-threshold flavours (bnl, bpl) of its two cards
    const text = hierarchicalNetlist(2_000);
    expect(text).toContain('.model bnl nmos');
    const patched = check(file, text, (t) => memoryHost({ [file]: t }), 8, true);
    expect(patched).toBeGreaterThan(0);
    // a card of the other polarity would change the switch network: not a size edit
    const swapped = text.replace('Mkp dyn out vdd vdd bp', 'Mkp dyn out vdd vdd bn');
    expect(reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: swapped }), file))).toBeUndefined();
    // the flavour swap the benchmark makes, equal to a fresh analysis
    const flavour = text.replace('Mkp dyn out vdd vdd bp', 'Mkp dyn out vdd vdd bpl');
    const fast = reanalyse(analyse(memoryHost({ [file]: text }), file), readDeck(memoryHost({ [file]: flavour }), file));
    expect(fast).toBeDefined();
    expect(report(file, fast!)).toEqual(report(file, analyse(memoryHost({ [file]: flavour }), file)));
  });
});
