// The parser's plain-line reader (syntax/parser.ts `readPlainChunk`) reads chunks of plain
// element lines without the lexer and the parser. Whatever it reads must be exactly what the
// lexer and the parser make of the same text: every statement, range, comment-borne directive,
// pin line, finding and the line count. Compared on every netlist in the samples, the fixtures
// and the open SKY130 cell library, on generated netlists, and on random text built from the
// characters that decide between the two ways.

import * as fs from 'node:fs';
import * as path from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../server/src/syntax/parser';
import { flatNetlist, hierarchicalNetlist } from '../scripts/netlists';

const ROOT = path.join(__dirname, '..');
const DATASET = path.join(ROOT, '..', 'shared', 'datasets', 'sky130_fd_sc_hd', 'cdl');

function files(dir: string): string[] {
  const out: string[] = [];
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...files(p));
    else if (/\.(sp|cdl|inc|lib|spice|cir)$/i.test(e.name)) out.push(p);
  }
  return out;
}

/** Both ways, as plain data (the tree's positions are read through its getters). */
function bothWays(text: string, hasTitle: boolean): [string, string] {
  const plain = JSON.stringify(parseNetlist('/x.sp', text, { hasTitle }));
  const lexed = JSON.stringify(parseNetlist('/x.sp', text, { hasTitle, plainLines: false }));
  return [plain, lexed];
}

describe('the plain-line reader reads what the lexer and the parser read', () => {
  it('every netlist of the samples, the fixtures and the SKY130 cell library', () => {
    const all = [...files(path.join(ROOT, 'samples')), ...files(path.join(ROOT, 'test', 'fixtures')), ...(fs.existsSync(DATASET) ? files(DATASET) : [])];
    expect(all.length).toBeGreaterThan(100);
    for (const f of all) {
      const text = fs.readFileSync(f, 'utf8');
      for (const hasTitle of [true, false]) {
        const [plain, lexed] = bothWays(text, hasTitle);
        expect(plain, f).toBe(lexed);
      }
    }
  });

  it('generated netlists: the flat one is read by the plain reader, and the same', () => {
    for (const text of [flatNetlist(5_000), hierarchicalNetlist(5_000), flatNetlist(2_000).replace(/\n/g, '\r\n')]) {
      const [plain, lexed] = bothWays(text, true);
      expect(plain).toBe(lexed);
    }
  });

  it('random text from the characters that decide between the two ways', () => {
    // words, '=', the delimiters the reader leaves to the lexer, comment and continuation starts,
    // both line breaks and a lone CR, tabs, a non-ASCII letter
    const pieces = ['M1', 'n1', 'w', 'l', '0.3u', '.model', '.end', '.control', '.endc', '.ends', '.subckt', 'x', '=', ' ', '  ', '\t', '\n', '\r\n', '\r', '*', '* tidemark: clock clk', '*.pininfo a:I', '+', '(', ')', ',', '{', '}', "'", '"', ';', '$', 'é', '\f'];
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...pieces), { maxLength: 60 }), fc.boolean(), (parts, hasTitle) => {
        const text = parts.join('');
        const [plain, lexed] = bothWays(text, hasTitle);
        expect(plain).toBe(lexed);
      }),
      { numRuns: 3000, seed: 31 },
    );
  });
});
