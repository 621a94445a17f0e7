// Edits of the electrical kind, for the tests of the paths that answer them: a number on a source
// line (after its nodes) or on a clock, standby, budget, corners or supply directive scaled, and
// a budget or corners line put in or a directive line taken out.

import { scaleNumber, type NumberSpot } from './edits';

const FACTORS = [0.5, 0.8, 0.97, 1.1, 1.25, 2, 3];
const SOURCE_LINE = /^\s*[vi]\S*\s+\S+\s+\S+\s/i;
const DIRECTIVE_LINE = /^\s*\*\s*tidemark:\s*(clock|standby|budget|temps|supply)\b/i;

/** Where the numbers are on source lines (after the nodes) and on those directives' lines. */
export function electricalValues(lines: string[]): NumberSpot[] {
  const out: NumberSpot[] = [];
  lines.forEach((l, i) => {
    const source = SOURCE_LINE.exec(l);
    const directive = DIRECTIVE_LINE.exec(l);
    if (!source && !directive) return;
    const from = source ? source[0].length : directive![0].length;
    for (const m of l.slice(from).matchAll(/(?<![\w.])(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(?=[a-z%]*(?![\w.]))/gi)) {
      const start = from + m.index!;
      out.push({ line: i, start, end: start + m[1]!.length, value: Number(m[1]) });
    }
  });
  return out;
}

/** One such number scaled by a factor (its unit suffix kept). */
export function editElectricalValue(text: string, pick: number, factor: number): string {
  return scaleNumber(text, electricalValues, pick, FACTORS[factor % FACTORS.length]!);
}

/** A budget or corners line put in before a line, or a budget, corners, clock or standby line taken out. */
export function editDirectiveLine(text: string, pick: number, kind: number): string {
  const lines = text.split('\n');
  const existing = lines.flatMap((l, i) => (DIRECTIVE_LINE.test(l) ? [i] : []));
  if (kind % 3 === 2) {
    if (!existing.length) return text;
    lines.splice(existing[pick % existing.length]!, 1);
    return lines.join('\n');
  }
  const end = lines.findIndex((l) => /^\.end\b/i.test(l.trim()));
  const at = 1 + (pick % Math.max(1, (end < 0 ? lines.length : end) - 1));
  lines.splice(at, 0, kind % 3 === 0 ? `* tidemark: budget ${5 + (pick % 20)}%` : `* tidemark: temps 25 ${80 + (pick % 50)}`);
  return lines.join('\n');
}
