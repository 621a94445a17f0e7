// Robustness: random mutations of real netlists (the front-end fixtures and a dataset cell) and
// random bytes never make the front end throw or hang, and every diagnostic range lies inside
// the document it names.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import type { AnalysisResult } from '../server/src/engine';
import { cellFile, datasetAvailable } from './support/dataset';

const FIXTURES = path.join(__dirname, 'fixtures', 'frontend');
const seeds: string[] = fs
  .readdirSync(FIXTURES)
  .filter((f) => /\.(sp|cdl|inc|lib)$/.test(f))
  .map((f) => fs.readFileSync(path.join(FIXTURES, f), 'utf8'));
if (datasetAvailable()) seeds.push(fs.readFileSync(cellFile('sky130_fd_sc_hd__dfxtp_1', 'cdl'), 'utf8'));

const PIECES = ['+', '*', '$ ', ';', '{', '}', "'", '"', '(', ')', '=', ',', '\n', '\r\n', '\t', ' ', '.subckt', '.ends', '.include x.inc', '.lib', '.endl', '.param a={a}', 'X1', 'M1', '/', '1e99meg', '\u00e9', '\u{1F600}', '\0'];

function checkRanges(docs: Record<string, string>, r: AnalysisResult): void {
  for (const d of r.diagnostics) {
    const text = docs[d.file];
    expect(text, `diagnostic in unknown file ${d.file}`).toBeDefined();
    const lines = text!.split(/\r\n|\r|\n/);
    const { start, end } = d.range;
    expect(start.line).toBeGreaterThanOrEqual(0);
    expect(end.line).toBeLessThan(lines.length);
    expect(start.line <= end.line).toBe(true);
    expect(start.character).toBeGreaterThanOrEqual(0);
    expect(start.character).toBeLessThanOrEqual(lines[start.line]!.length);
    expect(end.character).toBeLessThanOrEqual(lines[end.line]!.length);
    if (start.line === end.line) expect(start.character).toBeLessThanOrEqual(end.character);
  }
}

function run(text: string, inc = '* included\n.model nch nmos level=1\n'): void {
  const docs = { '/f/main.sp': text, '/f/x.inc': inc };
  const r = analyse(memoryHost(docs), '/f/main.sp');
  checkRanges(docs, r);
}

const mutation = fc.record({
  seed: fc.nat({ max: seeds.length - 1 }),
  edits: fc.array(
    fc.record({ at: fc.nat(), del: fc.nat({ max: 12 }), insert: fc.oneof(fc.constantFrom(...PIECES), fc.string({ maxLength: 6 })) }),
    { minLength: 1, maxLength: 12 },
  ),
});

describe('front end never throws and keeps ranges inside the document', () => {
  it('on random mutations of real netlists', () => {
    fc.assert(
      fc.property(mutation, ({ seed, edits }) => {
        let text = seeds[seed]!;
        for (const e of edits) {
          const at = e.at % (text.length + 1);
          text = text.slice(0, at) + e.insert + text.slice(at + e.del);
        }
        run(text);
      }),
      { numRuns: 400 },
    );
  });

  it('on random bytes and random unicode', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 400 }), fc.uint8Array({ maxLength: 400 }).map((b) => Buffer.from(b).toString('latin1'))), (text) => run(text)),
      { numRuns: 400 },
    );
  });

  it('on mutated includes too', () => {
    fc.assert(
      fc.property(mutation, ({ seed, edits }) => {
        let inc = seeds[seed]!;
        for (const e of edits) {
          const at = e.at % (inc.length + 1);
          inc = inc.slice(0, at) + e.insert + inc.slice(at + e.del);
        }
        run('top\n.include x.inc\nX1 a b cell\n.end\n', inc);
      }),
      { numRuns: 200 },
    );
  });

  it('on pathological shapes: deep nesting, long lines, many continuations', () => {
    run('t\nv1 a 0 {' + '('.repeat(5000) + '1' + ')'.repeat(5000) + '}\n');
    run('t\nM1 ' + 'a '.repeat(100000) + '\n');
    run('t\nv1 a 0 {' + '1+'.repeat(9999) + '1}\n');
    run('t\nv1 a 0 {' + '-'.repeat(9999) + '1}\n');
    run('t\nM1 a b c d nch\n' + '+ w=1u\n'.repeat(20000));
    run('t\n' + '.subckt s a\n'.repeat(2000) + 'X1 a s\n' + '.ends\n'.repeat(2000) + 'X0 n s\n');
  });
});
