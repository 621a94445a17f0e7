// Shared by the tests of the editor's quick paths: the disk with one file replaced (an editor
// buffer), and the whole JSON report of a result as plain data, to compare two results.

import * as path from 'node:path';
import { diskHost } from '../../server/src/cli/diskHost';
import type { FileHost } from '../../server/src/core/host';
import type { AnalysisResult } from '../../server/src/engine';
import { addToReport, emptyReport } from '../../server/src/findings/report';

export function overlay(file: string, text: string): FileHost {
  const disk = diskHost();
  return { ...disk, readFile: (p) => (path.resolve(p) === path.resolve(file) ? text : disk.readFile(p)) };
}

export function report(file: string, r: AnalysisResult): unknown {
  const rep = emptyReport();
  addToReport(rep, file, r, { allNodes: true });
  return JSON.parse(JSON.stringify(rep));
}

/** Where a number sits on a line of a text, and its value (a unit suffix after it is kept). */
export interface NumberSpot {
  line: number;
  start: number;
  end: number;
  value: number;
}

/** One of the numbers `find` picks out of the text's lines, scaled by a factor (four significant digits). */
export function scaleNumber(text: string, find: (lines: string[]) => NumberSpot[], pick: number, factor: number): string {
  const lines = text.split('\n');
  const spots = find(lines);
  if (spots.length === 0) return text;
  const s = spots[pick % spots.length]!;
  const next = Number((s.value * factor).toPrecision(4));
  const l = lines[s.line]!;
  lines[s.line] = l.slice(0, s.start) + String(next) + l.slice(s.end);
  return lines.join('\n');
}

/** Where the plain numbers on `.param`, `.model` and `.subckt` lines (and their continuation lines) are. */
export function cardValues(lines: string[]): NumberSpot[] {
  const out: NumberSpot[] = [];
  let onCard = false;
  lines.forEach((l, i) => {
    const head = l.trimStart().toLowerCase();
    onCard = head.startsWith('+') ? onCard : /^\.(param|params|model|subckt)\b/.test(head);
    if (!onCard) return;
    for (const m of l.matchAll(/=\s*(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(?![\d.e])/gi)) {
      const start = m.index! + m[0].length - m[1]!.length;
      out.push({ line: i, start, end: start + m[1]!.length, value: Number(m[1]) });
    }
  });
  return out;
}
