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
import { chunkLines, movedLinesBetween, parseNetlist, sharedRuns } from '../server/src/syntax/parser';
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

describe('a parse from the previous parse of the file reads what a fresh parse reads', () => {
  // edits that keep the line count (most typing) and ones that do not, and the lines that change
  // the parser's state for the rest of the file
  const inserts = ['.control', '.endc', '.end', '+ w=1u', '* a comment', '* tidemark: clock clk period=2n high=1n', 'M9 a b c d nch w={wn} l=1u', 'x', ''];
  function edit(text: string, where: number, kind: number, pick: number): string {
    const lines = text.split('\n');
    const at = where % lines.length;
    const l = lines[at]!;
    switch (kind % 4) {
      case 0: // a character typed in the line
        lines[at] = l.slice(0, pick % (l.length + 1)) + 'z' + l.slice(pick % (l.length + 1));
        break;
      case 1: // the line replaced
        lines[at] = inserts[pick % inserts.length]!;
        break;
      case 2: // a line put in
        lines.splice(at, 0, inserts[pick % inserts.length]!);
        break;
      default: // the line deleted
        lines.splice(at, 1);
    }
    return lines.join('\n');
  }
  const long = flatNetlist(2_500);
  // many chunks holding comments, directives, pin lines, continuations, a control block and
  // broken lines, so that chunks moved by a line put in or taken out carry each of them
  const sampleText = fs.readFileSync(path.join(ROOT, 'samples', fs.readdirSync(path.join(ROOT, 'samples')).find((f) => f.endsWith('.sp'))!), 'utf8');
  const mixedLines = long.split('\n');
  for (let at = mixedLines.length - 200; at > 1; at -= 300) mixedLines.splice(at, 0, '* a comment', '*.PININFO a:I y:O', '* tidemark: supply vdd', 'M1 a b', '+ c d nch w=1u', 'R1 a = b', sampleText.split('\n').slice(1).join('\n').replace(/^\.end\s*$/im, ''), '.control', 'run', '.endc');
  const mixed = mixedLines.join('\n');
  const texts: Array<[string, string]> = [
    ['the flat netlist (2.5k lines)', long],
    ['the flat netlist with comments, directives, continuations and control blocks between', mixed],
    ['the hierarchical netlist', hierarchicalNetlist(5_000)],
    ...fs.readdirSync(path.join(ROOT, 'samples')).filter((f) => f.endsWith('.sp')).map((f): [string, string] => [f, fs.readFileSync(path.join(ROOT, 'samples', f), 'utf8')]),
  ];
  it('lone CR and CRLF line ends: a parse from an earlier text of other lines', () => {
    // a lone CR ends a line for the parser, so a statement's lines must be told apart by it too
    // (an earlier statement was once taken for a later one whose lines were cut at '\n' only)
    const piece = fc.constantFrom('\r', '\n', '\r\n', 'M1 a b c d nch w=1u', 'I', 'x', '+ w=1u', '* note', '7J', ' ', '.end');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 30 }), fc.array(piece, { maxLength: 30 }), (a, b) => {
        const earlier = parseNetlist('/x.sp', a.join(''), { hasTitle: true });
        const fromEarlier = parseNetlist('/x.sp', b.join(''), { hasTitle: true }, earlier);
        expect(JSON.stringify(fromEarlier)).toBe(JSON.stringify(parseNetlist('/x.sp', b.join(''), { hasTitle: true })));
      }),
      { numRuns: 3000, seed: 41 },
    );
  });
  for (const [name, text] of texts) {
    it(`${name}: random edits, one and two in a row`, () => {
      const first = parseNetlist('/x.sp', text, { hasTitle: true });
      fc.assert(
        fc.property(fc.nat(100_000), fc.nat(3), fc.nat(1000), fc.nat(100_000), fc.nat(3), fc.nat(1000), (w1, k1, p1, w2, k2, p2) => {
          const once = edit(text, w1, k1, p1);
          const fromFirst = parseNetlist('/x.sp', once, { hasTitle: true }, first);
          const fresh = parseNetlist('/x.sp', once, { hasTitle: true });
          expect(JSON.stringify(fromFirst)).toBe(JSON.stringify(fresh));
          // the earlier chunks recognised where their text now starts cut the text as a fresh parse does
          expect(chunkLines(fromFirst)).toEqual(chunkLines(fresh));
          const twice = edit(once, w2, k2, p2);
          const fromOnce = parseNetlist('/x.sp', twice, { hasTitle: true }, fromFirst);
          const freshTwice = parseNetlist('/x.sp', twice, { hasTitle: true });
          expect(JSON.stringify(fromOnce)).toBe(JSON.stringify(freshTwice));
          expect(chunkLines(fromOnce)).toEqual(chunkLines(freshTwice));
        }),
        { numRuns: name.startsWith('the flat') ? 12 : 25, seed: 37 },
      );
    }, 120_000);
  }
  it('an edit that keeps the line count re-reads only its chunk, and every other statement is the earlier object', () => {
    const first = parseNetlist('/x.sp', long, { hasTitle: true });
    const lines = long.split('\n');
    const at = lines.length - 10;
    const edited = lines[at]!.replace(/w=([\d.]+)u/, 'w=$11u');
    expect(edited).not.toBe(lines[at]);
    lines[at] = edited;
    const next = parseNetlist('/x.sp', lines.join('\n'), { hasTitle: true }, first);
    expect(next.statements.length).toBe(first.statements.length);
    // the unchanged lines of the chunk read again keep their earlier readings too
    const same = next.statements.filter((s, k) => s === first.statements[k]).length;
    expect(same).toBe(first.statements.length - 1);
  });
  it('a line put in or taken out re-reads only its chunk: the statements below are the earlier ones moved', () => {
    const text = flatNetlist(40_000);
    const first = parseNetlist('/x.sp', text, { hasTitle: true });
    const lines = text.split('\n');
    const at = 10_000;
    lines.splice(at, 0, '* a comment put in');
    const inserted = parseNetlist('/x.sp', lines.join('\n'), { hasTitle: true }, first);
    expect(inserted.statements.length).toBe(first.statements.length);
    const shifts = first.statements.map((s, k) => movedLinesBetween(s, inserted.statements[k]!));
    const startsAbove = first.statements.filter((s) => s.range.start.line < at).length;
    const above = shifts.filter((d, k) => d === 0 && k < startsAbove).length;
    const below = shifts.filter((d, k) => d === 1 && k >= startsAbove).length;
    // every statement: the chunks taken whole and, in the chunk read again, the unchanged lines
    expect(above).toBe(startsAbove);
    expect(below).toBe(first.statements.length - startsAbove);
    // the runs both parses read from one chunk text: each of their lines reads the same at the
    // shift, and a run ends where the next chunk starts
    const runs = sharedRuns(first, inserted);
    expect(runs.length).toBeGreaterThan(10);
    const starts = chunkLines(first);
    const before = text.split('\n');
    for (const r of runs) {
      expect(starts).toContain(r.fromLine);
      expect(r.toLine + 1 === before.length - 1 || starts.includes(r.toLine + 1)).toBe(true);
      for (let l = r.fromLine; l <= r.toLine; l++) expect(lines[l + r.shift]).toBe(before[l]);
      expect(inserted.statements[r.bFirst]!.range.start.line - first.statements[r.aFirst]!.range.start.line).toBe(r.shift);
    }
    // and back: a moved reading compares with the first at once, as the same place
    lines.splice(at, 1);
    const back = parseNetlist('/x.sp', lines.join('\n'), { hasTitle: true }, inserted);
    expect(first.statements.filter((s, k) => movedLinesBetween(s, back.statements[k]!) === 0).length).toBe(first.statements.length);
    expect(JSON.stringify(back)).toBe(JSON.stringify(first));
    // words the comparison did not read are still there, at their new lines
    const k = first.statements.length - 5;
    expect(JSON.stringify(inserted.statements[k])).toBe(JSON.stringify(parseNetlist('/x.sp', lines.slice(0, at).concat('* a comment put in', lines.slice(at)).join('\n'), { hasTitle: true }).statements[k]));
  });
});
