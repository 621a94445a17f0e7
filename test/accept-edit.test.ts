// The accept path (circuit/acceptEdit.ts, engine `reanalyse`): after accept directives alone
// are put in (the quick fix), taken out, made stale or malformed, the analysis built from the
// previous one must equal a fresh analysis of the new text, finding for finding (accepted or
// not) and figure for figure. Every accept fix of every sample and electrical fixture, then an
// edit of that accept from the quick answer.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse, type AnalysisResult } from '../server/src/engine';
import { overlay } from './support/edits';
import { fixesOnSamples, withFix } from './support/quickFixes';
import { same } from './support/sameAnalysis';

const SAMPLES = path.join(__dirname, '..', 'samples');

function quick(file: string, previous: AnalysisResult, text: string): AnalysisResult {
  const fast = reanalyse(previous, readDeck(overlay(file, text), file));
  expect(fast, 'an accept edit is answered from the previous analysis').toBeDefined();
  same(file, fast!, analyse(overlay(file, text), file));
  return fast!;
}

describe('accept directives reuse the previous analysis and equal a fresh one', () => {
  it('every accept fix, then the accept made stale, malformed, changed in place and taken out again', () => {
    let fixes = 0;
    for (const { file, text, before, finding: d, fix: f } of fixesOnSamples(/^Accept/)) {
      const e = f.edits[0]!;
      const withAccept = withFix(text, f);
      const lines = withAccept.split('\n');
      const fast = quick(file, before, withAccept);
      expect(fast.diagnostics.some((x) => x.accepted), `${path.basename(file)}: ${f.title}`).toBe(true);
      const at = e.range.start.line;
      const edit = (line: string) => withAccept.split('\n').map((l, k) => (k === at ? line : l)).join('\n');
      // from the quick answer: a misspelt rule (a stale accept), no reason (malformed), another reason, the line taken out
      const accept = lines[at]!;
      quick(file, fast, edit(accept.replace(` ${d.rule} `, ' no-such-rule ')));
      const malformed = quick(file, fast, edit(accept.replace(/ reason=.*$/, '')));
      expect(malformed.diagnostics.some((x) => x.rule === 'directive' && x.range.start.line === at)).toBe(true);
      // and from the malformed one back: its finding goes
      quick(file, malformed, withAccept);
      quick(file, fast, edit(accept.replace(/reason="[^"]*"/, 'reason="checked in the lab"')));
      quick(file, fast, text);
      fixes++;
    }
    expect(fixes).toBeGreaterThan(20);
  }, 120_000);
  it('a directive of another kind, or a statement with it, is left to a fresh analysis', () => {
    const file = path.join(SAMPLES, 'tern_buses.sp');
    const text = fs.readFileSync(file, 'utf8');
    const before = analyse(overlay(file, text), file);
    const put = (extra: string[]) => {
      const lines = text.split('\n');
      lines.splice(20, 0, ...extra);
      return reanalyse(before, readDeck(overlay(file, lines.join('\n')), file));
    };
    expect(put(['* tidemark: accept stat floating-node reason="precharged every cycle"'])).toBeDefined();
    expect(put(['* tidemark: input stat'])).toBeUndefined();
    expect(put(['* tidemark: accept stat floating-node reason="x"', 'Rx stat 0 1k'])).toBeUndefined();
  });
});
