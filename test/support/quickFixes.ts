// The quick fixes of every sample and electrical fixture, for the tests that apply them, and a
// fix's edits applied to a text (lines put in, and words replaced in place).

import * as fs from 'node:fs';
import { analyse, type AnalysisResult } from '../../server/src/engine';
import type { Diagnostic } from '../../server/src/core/diagnostics';
import { quickFixes, type QuickFix } from '../../server/src/service/fixes';
import { overlay } from './edits';
import { samplesAndElectricalFixtures } from './fixtures';
import { applyEdits } from './lspClient';

export function* fixesOnSamples(title: RegExp): Generator<{ file: string; text: string; before: AnalysisResult; finding: Diagnostic; fix: QuickFix }> {
  for (const file of samplesAndElectricalFixtures()) {
    const text = fs.readFileSync(file, 'utf8');
    const before = analyse(overlay(file, text), file);
    for (const finding of before.diagnostics) for (const fix of quickFixes(before, finding)) if (title.test(fix.title)) yield { file, text, before, finding, fix };
  }
}

export function withFix(text: string, fix: QuickFix): string {
  return applyEdits(text, fix.edits.map((e) => ({ range: e.range, newText: e.newText })));
}
