// Findings carried over edits that change no meaning (service/carryOver.ts): whenever the
// carry-over answers, it must equal a full re-analysis of the edited text, and for comment,
// blank-line and end-of-line white-space edits it must answer. Random edits over every sample.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { carryOver } from '../server/src/service/carryOver';
import { overlay } from './support/edits';

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
