// The netlist parser. The lexer runs once over the file; a small pass joins '+' continuations
// into logical lines; the chevrotain parser then reads each logical line on its own, so an error
// in one line can never swallow the next. One parser instance is reused through `.input`.

import { EmbeddedActionsParser, type IToken, type IRecognitionException } from 'chevrotain';
import {
  allTokens,
  BraceExpr,
  Comma,
  CommentLine,
  Continuation,
  DollarComment,
  Equals,
  InlineComment,
  LineBreak,
  LParen,
  netlistLexer,
  QuoteExpr,
  RParen,
  StrayClose,
  StringLit,
  Unclosed,
  Word,
} from './tokens';
import type { AssignItem, DirectiveLine, GroupItem, Item, PinInfoLine, Statement, SyntaxFile, ValueItem, WordItem } from './tree';
import { diag, type Diagnostic } from '../core/diagnostics';
import { rangeOf, Span, spanRanges, type Range } from '../core/source';

export function tokenRange(t: IToken): Range {
  const line = (t.startLine ?? 1) - 1;
  const ch = (t.startColumn ?? 1) - 1;
  const endLine = (t.endLine ?? t.startLine ?? 1) - 1;
  const endCh = t.endColumn ?? ch + t.image.length;
  return rangeOf(line, ch, endLine, endCh);
}

/**
 * Tree nodes built by the parser keep their position as plain numbers and make a Range only on
 * access: a 100k-line netlist then holds about half as many objects (and the collector walks
 * half as many). They satisfy the tree's interfaces like any object literal would.
 */
class ParsedWord implements WordItem {
  constructor(
    readonly text: string,
    private readonly sl: number,
    private readonly sc: number,
    private readonly el: number,
    private readonly ec: number,
  ) {}
  get kind(): 'word' {
    return 'word';
  }
  get range(): Range {
    return new Span(this.sl, this.sc, this.el, this.ec);
  }
  /** The same word `lines` lines further down. */
  movedDown(lines: number): ParsedWord {
    return new ParsedWord(this.text, this.sl + lines, this.sc, this.el + lines, this.ec);
  }
  toJSON(): WordItem {
    return { kind: 'word', text: this.text, range: this.range };
  }
}

class ParsedAssign implements AssignItem {
  constructor(
    readonly name: WordItem,
    readonly value: ValueItem | undefined,
  ) {}
  get kind(): 'assign' {
    return 'assign';
  }
  get range(): Range {
    return spanRanges(this.name.range, (this.value ?? this.name).range);
  }
  toJSON(): AssignItem {
    return { kind: 'assign', name: this.name, value: this.value, range: this.range };
  }
}

function wordOf(t: IToken): WordItem {
  const line = t.startLine! - 1;
  const ch = t.startColumn! - 1;
  return new ParsedWord(t.image, line, ch, t.endLine! - 1, t.endColumn!);
}

class StatementParser extends EmbeddedActionsParser {
  constructor() {
    super(allTokens, { recoveryEnabled: true, maxLookahead: 2 });
    this.performSelfAnalysis();
  }

  public statement = this.RULE('statement', (): Statement | undefined => {
    const head = this.CONSUME(Word);
    const items: Item[] = [];
    this.MANY(() => {
      const it = this.SUBRULE(this.item);
      if (it) items.push(it);
    });
    return this.ACTION(() => {
      const headItem = wordOf(head);
      const last = items.length > 0 ? items[items.length - 1]!.range : headItem.range;
      return { head: headItem, items, range: spanRanges(headItem.range, last) };
    });
  });

  private item = this.RULE('item', (): Item | undefined =>
    this.OR([
      {
        ALT: () => {
          const name = this.CONSUME(Word);
          let value: ValueItem | undefined;
          let hasEquals = false;
          this.OPTION(() => {
            this.CONSUME(Equals);
            hasEquals = true;
            value = this.SUBRULE(this.value);
          });
          return this.ACTION((): Item => {
            const w = wordOf(name);
            if (!hasEquals) return w;
            return new ParsedAssign(w, value);
          });
        },
      },
      { ALT: () => this.SUBRULE(this.nonWordValue) },
      {
        ALT: () => {
          this.CONSUME(Comma);
          return undefined;
        },
      },
    ]),
  );

  private value = this.RULE('value', (): ValueItem | undefined =>
    this.OR([
      {
        ALT: () => {
          const t = this.CONSUME(Word);
          return this.ACTION(() => wordOf(t));
        },
      },
      { ALT: () => this.SUBRULE(this.nonWordValue) },
    ]),
  );

  private nonWordValue = this.RULE('nonWordValue', (): ValueItem | undefined =>
    this.OR([
      {
        ALT: () => {
          const t = this.CONSUME(BraceExpr);
          return this.ACTION((): ValueItem => ({ kind: 'expr', text: t.image.slice(1, -1), delimiter: '{', range: tokenRange(t) }));
        },
      },
      {
        ALT: () => {
          const t = this.CONSUME(QuoteExpr);
          return this.ACTION((): ValueItem => ({ kind: 'expr', text: t.image.slice(1, -1), delimiter: "'", range: tokenRange(t) }));
        },
      },
      {
        ALT: () => {
          const t = this.CONSUME(StringLit);
          return this.ACTION((): ValueItem => ({ kind: 'string', text: t.image.slice(1, -1), range: tokenRange(t) }));
        },
      },
      { ALT: () => this.SUBRULE(this.group) },
    ]),
  );

  private group = this.RULE('group', (): GroupItem | undefined => {
    const open = this.CONSUME(LParen);
    const items: Item[] = [];
    this.MANY(() => {
      const it = this.SUBRULE(this.item);
      if (it) items.push(it);
    });
    const close = this.CONSUME(RParen);
    return this.ACTION(() => {
      const end = close.image ? tokenRange(close) : items.length ? items[items.length - 1]!.range : tokenRange(open);
      return { kind: 'group' as const, items, range: spanRanges(tokenRange(open), end) };
    });
  });
}

let sharedParser: StatementParser | undefined;
function parser(): StatementParser {
  return (sharedParser ??= new StatementParser());
}

export interface ParseOptions {
  /** A top-level deck's first line is its title; an included file has none. */
  hasTitle: boolean;
  /** False: every chunk through the lexer and the parser (the test of the plain-line reader). */
  plainLines?: boolean;
}

const DIRECTIVE_PREFIX = /^\*\s*tidemark\s*:\s*/i;
const PININFO_PREFIX = /^\*\.pininfo\b/i;

/**
 * Parses one file. Never throws: anything it cannot read becomes a `syntax` diagnostic with the
 * range of the offending text, and the rest of the file is read as usual. With `previous` (an
 * earlier parse of the same file), every chunk whose text and parser state are unchanged is
 * taken from it: at the same line as it is (the same statement objects), at another line as
 * `MovedStatement`s over the earlier ones. Chunks end where the text says (`chunksOf`), so an
 * edit re-reads only its own chunk of a long file (and perhaps a neighbour), whether or not it
 * changes the line count.
 */
export function parseNetlist(file: string, text: string, options: ParseOptions = { hasTitle: true }, previous?: SyntaxFile): SyntaxFile {
  const titleLine = options.hasTitle ? 1 : 0;
  let title: string | undefined;
  if (options.hasTitle) {
    const eol = text.search(/\r|\n/);
    title = (eol < 0 ? text : text.slice(0, eol)).trim();
  }
  const plainLines = options.plainLines !== false;
  // the earlier chunks by text: a chunk that moved (lines put in or taken out above it) is
  // taken too, moved down or up
  const earlierRecords = previous && previous.file === file ? (chunkParses.get(previous) ?? []) : [];
  const earlier = new Map<string, ChunkParse[]>();
  for (const r of earlierRecords) {
    const same = earlier.get(r.text);
    if (same) same.push(r);
    else earlier.set(r.text, [r]);
  }
  const chunks = [...chunksOf(text, earlierRecords)].map((chunk) => ({ ...chunk, text: text.slice(chunk.start, chunk.end) }));
  // the earlier statements of the chunks whose text is gone (the edited ones), by their lines'
  // text, for the unchanged lines of the chunks read afresh
  let gone: StatementsByText | undefined;
  const records: ChunkParse[] = [];
  let state: ChunkParse['stateIn'] = { inControl: false, ended: false };
  for (const chunk of chunks) {
    const old = reusableChunk(earlier.get(chunk.text), chunk, titleLine, state);
    let r: ChunkParse;
    if (old) r = old.line === chunk.line ? old : movedChunk(old, chunk);
    else {
      r = parseChunk(file, text, chunk, chunk.text, titleLine, state, plainLines);
      if (earlierRecords.length) {
        if (!gone) {
          const texts = new Set(chunks.map((c) => c.text));
          gone = statementsByText(earlierRecords.filter((x) => !texts.has(x.text)));
        }
        takeUnchangedStatements(r, gone);
      }
    }
    records.push(r);
    state = r.stateOut;
  }
  // (joined natively: a long file has a hundred chunks)
  const statements = ([] as Statement[]).concat(...records.map((r) => r.statements));
  const statementStartLines = ([] as number[]).concat(...records.map((r) => r.startLines));
  const cardIndices: number[] = [];
  let offset = 0;
  for (const r of records) {
    for (const k of r.cards) cardIndices.push(offset + k);
    offset += r.statements.length;
  }
  const comments = ([] as IToken[]).concat(...records.map((r) => r.comments));
  const diagnostics = ([] as Diagnostic[]).concat(...records.map((r) => r.diagnostics));
  let lineCount = 1;
  for (const r of records) lineCount += r.lineBreaks;
  const { directives, pinInfos } = readSpecialComments(file, comments, statementStartLines, titleLine, diagnostics);
  const out: SyntaxFile = { file, title, statements, cardIndices, directives, pinInfos, diagnostics, lineCount };
  chunkParses.set(out, records);
  return out;
}

/** One chunk's reading: what it adds to the file, and the parser state before and after it. */
interface ChunkParse {
  text: string;
  /** The 0-based line the chunk starts on. */
  line: number;
  titleLine: number;
  stateIn: { inControl: boolean; ended: boolean };
  stateOut: { inControl: boolean; ended: boolean };
  statements: Statement[];
  /** Each statement's first line. */
  startLines: number[];
  /** The statements that are dot cards (their head starts with '.'), by index in the chunk. */
  cards: number[];
  comments: IToken[];
  diagnostics: Diagnostic[];
  lineBreaks: number;
  /** The character offset the chunk starts at (the comment tokens' offsets count from the file's start). */
  start: number;
  /** As in `TextChunk`. */
  scanLines: number;
  lineAdvance: number;
  /** The reading this one was taken from (itself when read afresh), through moves and parses. */
  origin?: ChunkParse;
}

/**
 * Runs of statements that two parses of one file read from the same chunk text, one parse
 * taken from the other (directly or through parses between): statements `aFirst..` of `a` and
 * `bFirst..` of `b`, `count` of them, and every line of the chunk (`fromLine..toLine` in `a`,
 * comments and directives included), moved down `shift` lines. Empty when nothing is known.
 */
export interface SharedRun {
  aFirst: number;
  bFirst: number;
  count: number;
  fromLine: number;
  toLine: number;
  shift: number;
}

export function sharedRuns(a: SyntaxFile, b: SyntaxFile): SharedRun[] {
  const ra = chunkParses.get(a);
  const rb = chunkParses.get(b);
  if (!ra || !rb || a.file !== b.file) return [];
  const originOf = (r: ChunkParse) => r.origin ?? r;
  // origins read once in each parse (a text repeated may be taken twice from one reading)
  const inA = new Map<ChunkParse, { r: ChunkParse; first: number } | null>();
  let first = 0;
  for (const r of ra) {
    const o = originOf(r);
    inA.set(o, inA.has(o) ? null : { r, first });
    first += r.statements.length;
  }
  const seenB = new Map<ChunkParse, number>();
  for (const r of rb) seenB.set(originOf(r), (seenB.get(originOf(r)) ?? 0) + 1);
  const out: SharedRun[] = [];
  first = 0;
  for (const r of rb) {
    const o = originOf(r);
    const x = inA.get(o);
    if (x && seenB.get(o) === 1) {
      const last = x.r.text.endsWith('\n') || x.r.text.endsWith('\r') ? x.r.line + x.r.lineAdvance - 1 : x.r.line + x.r.lineAdvance;
      out.push({ aFirst: x.first, bFirst: first, count: r.statements.length, fromLine: x.r.line, toLine: last, shift: r.line - x.r.line });
    }
    first += r.statements.length;
  }
  return out;
}

/** The first line of each chunk a parse read (for tests: a parse from an earlier one cuts as a fresh one does). */
export function chunkLines(f: SyntaxFile): number[] {
  return (chunkParses.get(f) ?? []).map((r) => r.line);
}

/** A stretch of the text read as one chunk; `line` is the 0-based line it starts on. */
interface TextChunk {
  start: number;
  end: number;
  line: number;
  /** Lines the cut-finding counted in it (by '\n'): a chunk this long ends at the next statement. */
  scanLines: number;
  /** Lines it holds (a lone CR breaks a line too): the next chunk starts this many lines on. */
  lineAdvance: number;
}

/** Each parse's chunks, for the next parse of the same file. */
const chunkParses = new WeakMap<SyntaxFile, ChunkParse[]>();

/**
 * An earlier chunk of the same text that the parse may take for this one: read in the same
 * parser state and title mode, the one at the same line first. A chunk holding the title line
 * is taken only where it was (the title is not read as a statement).
 */
function reusableChunk(candidates: ChunkParse[] | undefined, chunk: { line: number }, titleLine: number, state: ChunkParse['stateIn']): ChunkParse | undefined {
  if (!candidates) return undefined;
  let found: ChunkParse | undefined;
  for (const old of candidates) {
    if (old.titleLine !== titleLine || old.stateIn.inControl !== state.inControl || old.stateIn.ended !== state.ended) continue;
    if (old.line === chunk.line) return old;
    const holdsTitle = (line: number) => titleLine > 0 && line <= titleLine - 1;
    if (!holdsTitle(old.line) && !holdsTitle(chunk.line)) found ??= old;
  }
  return found;
}

/**
 * A statement the parse took from an earlier parse, moved by whole lines. It keeps the first
 * reading it came from (through any parses between) and the lines moved since, so a comparison
 * of the two parses need not read the words; its words are made from that reading when first
 * read (a comment line put in above half of a long file moves every statement below it, and the
 * editor's carry-over of findings reads none of their words). Its wire shape is a plain
 * statement's.
 */
class MovedStatement implements Statement {
  private movedHead: WordItem | undefined;
  private movedItems: Item[] | undefined;
  constructor(
    readonly range: Range,
    readonly first: Statement,
    readonly lines: number,
  ) {}
  get head(): WordItem {
    return (this.movedHead ??= movedWord(this.first.head, this.lines));
  }
  get items(): Item[] {
    return (this.movedItems ??= this.first.items.map((it) => movedItem(it, this.lines)));
  }
  toJSON(): Statement {
    return { head: this.head, items: this.items, range: this.range };
  }
}

function movedRange(r: Range, lines: number): Range {
  return new Span(r.start.line + lines, r.start.character, r.end.line + lines, r.end.character);
}

function movedWord(w: WordItem, lines: number): WordItem {
  return w instanceof ParsedWord ? w.movedDown(lines) : { kind: 'word', text: w.text, range: movedRange(w.range, lines) };
}

function movedValue(v: ValueItem, lines: number): ValueItem {
  switch (v.kind) {
    case 'word':
      return movedWord(v, lines);
    case 'group':
      return { kind: 'group', items: v.items.map((it) => movedItem(it, lines)), range: movedRange(v.range, lines) };
    default:
      return { ...v, range: movedRange(v.range, lines) };
  }
}

function movedItem(it: Item, lines: number): Item {
  return it.kind === 'assign' ? new ParsedAssign(movedWord(it.name, lines), it.value && movedValue(it.value, lines)) : movedValue(it, lines);
}

/**
 * How many lines `y` sits below `x` when both are readings of the same statement, word for word,
 * one taken from the other's parse moved by whole lines (directly or through parses between);
 * undefined when that is not known (they may still be equal).
 */
export function movedLinesBetween(x: Statement, y: Statement): number | undefined {
  const fx = x instanceof MovedStatement ? x.first : x;
  const fy = y instanceof MovedStatement ? y.first : y;
  if (fx !== fy) return undefined;
  return (y instanceof MovedStatement ? y.lines : 0) - (x instanceof MovedStatement ? x.lines : 0);
}

/** Earlier statements by the text of their lines (whole lines, from the first to the last). */
type StatementsByText = Map<string, Statement[]>;

/** The start offset of each line of a chunk's text (a lone CR breaks a line too, as the parser counts lines). */
function lineStartsOf(chunkText: string): number[] {
  const out = [0];
  if (chunkText.indexOf('\r') < 0) {
    for (let at = chunkText.indexOf('\n'); at >= 0 && at + 1 < chunkText.length; at = chunkText.indexOf('\n', at + 1)) out.push(at + 1);
    return out;
  }
  for (let i = 0; i + 1 < chunkText.length; i++) {
    const c = chunkText.charCodeAt(i);
    if (c === 10 || (c === 13 && chunkText.charCodeAt(i + 1) !== 10)) out.push(i + 1);
  }
  return out;
}

/** The text of a statement's lines within its chunk. */
function linesText(chunkText: string, starts: number[], chunkLine: number, s: Statement): string {
  const first = s.range.start.line - chunkLine;
  const last = s.range.end.line - chunkLine;
  return chunkText.slice(starts[first] ?? chunkText.length, starts[last + 1] ?? chunkText.length);
}

function statementsByText(records: readonly ChunkParse[]): StatementsByText {
  const out: StatementsByText = new Map();
  for (const r of records) {
    const starts = lineStartsOf(r.text);
    for (const s of r.statements) {
      const key = linesText(r.text, starts, r.line, s);
      const same = out.get(key);
      if (same) same.push(s);
      else out.set(key, [s]);
    }
  }
  return out;
}

/**
 * In a chunk read afresh, each statement whose lines read exactly as an earlier statement's
 * is replaced by that earlier reading: the same object at the same line, a `MovedStatement`
 * over it at another. A statement's reading depends only on the text of its lines and where
 * they are (the same fact that lets a whole chunk be taken), so the two are equal; and the
 * comparisons of two parses after an edit in a long chunk then read only the edited lines.
 */
function takeUnchangedStatements(r: ChunkParse, earlier: StatementsByText): void {
  if (earlier.size === 0) return;
  const starts = lineStartsOf(r.text);
  for (let k = 0; k < r.statements.length; k++) {
    const s = r.statements[k]!;
    const candidates = earlier.get(linesText(r.text, starts, r.line, s));
    if (!candidates) continue;
    const line = s.range.start.line;
    const same = candidates.find((x) => x.range.start.line === line);
    const x = same ?? candidates[0]!;
    r.statements[k] = same ?? movedStatement(x, line - x.range.start.line);
  }
}

function movedStatement(s: Statement, lines: number): Statement {
  return s instanceof MovedStatement ? new MovedStatement(movedRange(s.range, lines), s.first, s.lines + lines) : new MovedStatement(movedRange(s.range, lines), s, lines);
}

/**
 * An earlier chunk's reading at the place its text now starts: the same text read at another
 * line reads the same, every position moved by the line count (columns stay).
 */
function movedChunk(old: ChunkParse, chunk: { start: number; line: number }): ChunkParse {
  const lines = chunk.line - old.line;
  const chars = chunk.start - old.start;
  const statements = old.statements.map((s) => movedStatement(s, lines));
  const comments = old.comments.map((t): IToken => ({ ...t, startOffset: t.startOffset + chars, endOffset: t.endOffset === undefined ? undefined : t.endOffset + chars, startLine: t.startLine! + lines, endLine: t.endLine! + lines }));
  const diagnostics = old.diagnostics.map((d): Diagnostic => ({ ...d, range: movedRange(d.range, lines) }));
  return { ...old, origin: old.origin ?? old, line: chunk.line, start: chunk.start, statements, startLines: old.startLines.map((l) => l + lines), comments, diagnostics };
}

function dotCards(statements: readonly Statement[]): number[] {
  const out: number[] = [];
  for (let k = 0; k < statements.length; k++) if (statements[k]!.head.text.charCodeAt(0) === 46 /* . */) out.push(k);
  return out;
}

function parseChunk(file: string, text: string, chunk: TextChunk, chunkText: string, titleLine: number, stateIn: ChunkParse['stateIn'], plainLines: boolean): ChunkParse {
  const statements: Statement[] = [];
  const comments: IToken[] = [];
  const diagnostics: Diagnostic[] = [];
  const record = (lineBreaks: number): ChunkParse => ({ text: chunkText, line: chunk.line, titleLine, stateIn, stateOut: { inControl, ended }, statements, startLines: statements.map((x) => x.range.start.line), cards: dotCards(statements), comments, diagnostics, lineBreaks, start: chunk.start, scanLines: chunk.scanLines, lineAdvance: chunk.lineAdvance });
  // The optimised lexer knows only ASCII first characters: lex a copy with every other UTF-16
  // unit replaced by '~' (same length, so offsets, lines and columns hold), then restore images.
  const nonAscii = /[^\x00-\x7f]/.test(chunkText);
  const p = parser();
  let inControl = stateIn.inControl;
  let ended = stateIn.ended;

  const parseLogicalLine = (tokens: IToken[]): void => {
    const first = tokens[0]!;
    const headText = first.tokenType === Word ? first.image.toLowerCase() : '';
    // .control ... .endc holds simulator commands, not circuit; after .end nothing is read.
    if (ended) return;
    if (inControl) {
      if (headText === '.endc') inControl = false;
      return;
    }
    if (headText === '.control') {
      inControl = true;
      return;
    }
    if (reportMalformedTokens(file, tokens, diagnostics)) return;
    if (first.tokenType !== Word) {
      diagnostics.push(diag('syntax', file, tokenRange(first), `a line must start with an element name or a dot card, not '${first.image.slice(0, 20)}'`));
      return;
    }
    p.input = tokens;
    const stmt = p.statement();
    if (p.errors.length > 0) {
      diagnostics.push(syntaxErrorOf(file, p.errors[0]!, tokens));
      return;
    }
    if (!stmt) return;
    if (headText === '.end') {
      ended = true;
      return;
    }
    statements.push(stmt);
  };

  // most chunks of an extracted netlist are plain element lines: read without the lexer
  const plain = !inControl && !ended && plainLines && !nonAscii ? readPlainChunk(text, chunk, titleLine) : undefined;
  if (plain) {
    for (const stmt of plain.statements) statements.push(stmt);
    for (const c of plain.comments) comments.push(c);
    return record(plain.lineBreaks);
  }
  // (lexed a chunk at a time, so tokens die young: cheap for the garbage collector)
  let lineBreaks = 0;
  const lexed = netlistLexer.tokenize(nonAscii ? chunkText.replace(/[^\x00-\x7f]/g, '~') : chunkText);
  const adjust = (t: IToken) => {
    if (chunk.start) {
      t.startOffset += chunk.start;
      t.endOffset! += chunk.start;
      t.startLine! += chunk.line;
      t.endLine! += chunk.line;
    }
    if (nonAscii) t.image = text.slice(t.startOffset, t.endOffset! + 1);
  };
  for (const e of lexed.errors) {
    // Unreachable by construction (every character matches a token); kept as a guard.
    diagnostics.push(diag('syntax', file, rangeOf(e.line! - 1 + chunk.line, e.column! - 1, e.line! - 1 + chunk.line, e.column! - 1 + e.length), e.message));
  }
  for (const t of lexed.groups['comments'] ?? []) {
    adjust(t);
    if (t.tokenType === CommentLine) comments.push(t);
  }
  // Logical lines: join '+' continuations, even across comment lines in between.
  let current: IToken[] = [];
  let lineEnded = false;
  for (const t of lexed.tokens) {
    adjust(t);
    const type = t.tokenType;
    if (type === LineBreak) lineBreaks++;
    if (t.startLine === titleLine) continue;
    if (type === LineBreak) {
      if (current.length > 0) lineEnded = true;
      continue;
    }
    if (type === Continuation) {
      if (current.length === 0 && !lineEnded) {
        diagnostics.push(diag('syntax', file, tokenRange(t), "'+' continues a line, but there is no line before it to continue", 'warning'));
      }
      lineEnded = false;
      continue;
    }
    if (lineEnded) {
      parseLogicalLine(current);
      current = [];
      lineEnded = false;
    }
    current.push(t);
  }
  if (current.length > 0) parseLogicalLine(current);
  return record(lineBreaks);
}

/**
 * One line in CHUNK_LINES may start a chunk (a power of two: the hash's mask), after the first
 * MIN_CHUNK_LINES, so chunks average about 640 lines: small enough that an edit re-reads little
 * (the flat 100k-line netlist: a line put in, about 35 ms with 512 against 55 ms with 1,024),
 * large enough that a whole parse pays little per chunk (about 5% more than with 1,024). No chunk is shorter
 * than MIN_CHUNK_LINES; one longer than MAX_CHUNK_LINES ends at the next statement (text with
 * few lines that hash to a cut, such as many copies of one line).
 */
const CHUNK_LINES = 512;
const MIN_CHUNK_LINES = 128;
const MAX_CHUNK_LINES = 8192;
/** How many of a line's first characters decide whether a chunk may start there. */
const CUT_HASH_CHARS = 24;

// Character classes of the plain-line reader (ASCII codes).
const PLAIN_OTHER = 0;
const PLAIN_WORD = 1;
const PLAIN_SPACE = 2;
const PLAIN_EQUALS = 3;
const plainClass = new Uint8Array(128);
for (let c = 33; c < 127; c++) plainClass[c] = PLAIN_WORD;
for (const ch of '=(),{}\'";$') plainClass[ch.charCodeAt(0)] = PLAIN_OTHER;
plainClass[61] = PLAIN_EQUALS;
for (const c of [32, 9, 11, 12]) plainClass[c] = PLAIN_SPACE;

/**
 * A chunk read without the lexer and the parser, when every line in it is blank, a comment line
 * or a plain statement: words, and `name=value` pairs of words, with spaces between (no '+'
 * continuation, brace, quote, parenthesis, comma, ';' or '$' anywhere, no line break but LF and
 * CRLF, no `.control`, `.endc` or `.end`). The statements, the comment lines and the line breaks
 * are what the lexer and the parser make of the same text (`test/parser-plain.test.ts` holds
 * it); undefined for any other chunk, which takes the usual way. An extracted netlist is mostly
 * such lines, and this reads them several times faster.
 */
function readPlainChunk(text: string, chunk: { start: number; end: number; line: number }, titleLine: number): { statements: Statement[]; comments: IToken[]; lineBreaks: number } | undefined {
  const statements: Statement[] = [];
  const comments: IToken[] = [];
  let line = chunk.line;
  let i = chunk.start;
  const end = chunk.end;
  const words: Array<WordItem | '='> = [];
  while (i < end) {
    // one physical line: [i, eol)
    let eol = i;
    while (eol < end && text.charCodeAt(eol) !== 10) eol++;
    let stop = eol;
    // CRLF is one line break; a lone CR (a line break too) takes the usual way
    if (eol < end && stop > i && text.charCodeAt(stop - 1) === 13) stop--;
    if (line !== titleLine - 1) {
      // a line start, for '*' and '+', is what only spaces and tabs precede (as in the lexer)
      let k = i;
      while (k < stop && (text.charCodeAt(k) === 32 || text.charCodeAt(k) === 9)) k++;
      const first = text.charCodeAt(k);
      if (k < stop && first === 42 /* * */) {
        const image = text.slice(k, stop);
        if (image.indexOf('\r') >= 0) return undefined;
        comments.push({ image, startOffset: k, endOffset: stop - 1, startLine: line + 1, endLine: line + 1, startColumn: k - i + 1, endColumn: stop - i, tokenType: CommentLine, tokenTypeIdx: CommentLine.tokenTypeIdx! });
      } else if (k < stop) {
        if (first === 43 /* + */) return undefined;
        words.length = 0;
        while (k < stop) {
          const c = text.charCodeAt(k);
          const cls = c < 128 ? plainClass[c]! : PLAIN_OTHER;
          if (cls === PLAIN_SPACE) k++;
          else if (cls === PLAIN_EQUALS) {
            words.push('=');
            k++;
          } else if (cls === PLAIN_WORD) {
            const from = k;
            while (k < stop && text.charCodeAt(k) < 128 && plainClass[text.charCodeAt(k)] === PLAIN_WORD) k++;
            words.push(new ParsedWord(text.slice(from, k), line, from - i, line, k - i));
          } else return undefined;
        }
        const stmt = plainStatement(words);
        if (!stmt) return undefined;
        const head = stmt.head.text.toLowerCase();
        if (head === '.control' || head === '.endc' || head === '.end') return undefined;
        statements.push(stmt);
      }
    } else {
      // the title is not read, but a lone CR in it would break the line
      const cr = text.indexOf('\r', i);
      if (cr >= 0 && cr < stop) return undefined;
    }
    if (eol < end) line++;
    i = eol + 1;
  }
  return { statements, comments, lineBreaks: line - chunk.line };
}

/** A head word, then words and `name=value` pairs; undefined for anything else (the parser reports it). */
function plainStatement(words: ReadonlyArray<WordItem | '='>): Statement | undefined {
  const head = words[0];
  if (head === undefined || head === '=') return undefined;
  const items: Item[] = [];
  for (let k = 1; k < words.length; k++) {
    const w = words[k]!;
    if (w === '=') return undefined;
    if (words[k + 1] !== '=') {
      items.push(w);
      continue;
    }
    const value = words[k + 2];
    if (value === undefined || value === '=' || words[k + 3] === '=') return undefined;
    items.push(new ParsedAssign(w, value));
    k += 2;
  }
  const last = items.length > 0 ? items[items.length - 1]!.range : head.range;
  return { head, items, range: spanRanges(head.range, last) };
}

/**
 * Splits the text into chunks of about CHUNK_LINES lines, each ending where a statement starts
 * (never before a '+' continuation, a comment line or a blank line, which may belong to the
 * statement before). Where a chunk ends is decided by the text of the line after it (a hash of
 * its first characters), not by line counts: an edit changes the chunk it is in (and at most its
 * neighbour, when it makes or unmakes a cut), and every other chunk keeps its text, so lines put
 * in or taken out leave the later chunks to be taken from the previous parse, moved. `line` is
 * the 0-based line the chunk starts on.
 */
function* chunksOf(text: string, earlier: readonly ChunkParse[] = []): Generator<TextChunk> {
  let start = 0;
  let line = 0;
  const anyCR = text.indexOf('\r') >= 0;
  const nextLine = (from: number) => {
    const nl = text.indexOf('\n', from);
    return nl < 0 ? text.length : nl + 1;
  };
  // the earlier chunks by their first line, to be recognised where their text now starts
  const byFirstLine = new Map<string, ChunkParse[]>();
  for (const r of earlier) {
    const nl = r.text.indexOf('\n');
    const first = nl < 0 ? r.text : r.text.slice(0, nl + 1);
    const same = byFirstLine.get(first);
    if (same) same.push(r);
    else byFirstLine.set(first, [r]);
  }
  /**
   * An earlier chunk whose text starts at `at` and that the cuts below would end where it ends:
   * every cut decision inside a chunk reads only its own lines and their count, so the same
   * text makes the same decisions; the line after it must still make a cut (or the text end).
   */
  const recognised = (at: number): ChunkParse | undefined => {
    const candidates = byFirstLine.get(text.slice(at, nextLine(at)));
    if (!candidates) return undefined;
    for (let k = 0; k < candidates.length && k < 4; k++) {
      const r = candidates[k]!;
      const end = at + r.text.length;
      // (a slice compared whole: string equality is a memory compare, startsWith reads per character)
      if (end > text.length || text.slice(at, end) !== r.text) continue;
      if (end >= text.length || (r.scanLines >= MIN_CHUNK_LINES && cutBefore(end, r.scanLines >= MAX_CHUNK_LINES))) return r;
    }
    return undefined;
  };
  /** The line at `at` starts a statement, and its text says a chunk may start there. */
  const cutBefore = (at: number, force: boolean): boolean => {
    let k = at;
    while (k < text.length && (text.charCodeAt(k) === 32 || text.charCodeAt(k) === 9)) k++;
    const c = text.charCodeAt(k);
    if (k >= text.length || c === 43 /* + */ || c === 42 /* * */ || c === 10 || c === 13) return false;
    if (force) return true;
    // FNV-1a over the line's first characters (its element name, mostly)
    let h = 0x811c9dc5;
    for (let i = k, stop = Math.min(text.length, k + CUT_HASH_CHARS); i < stop; i++) {
      const ch = text.charCodeAt(i);
      if (ch === 10 || ch === 13) break;
      h = Math.imul(h ^ ch, 0x01000193);
    }
    return ((h >>> 0) & (CHUNK_LINES - 1)) === 0;
  };
  while (start < text.length || start === 0) {
    const known = start < text.length ? recognised(start) : undefined;
    if (known) {
      const end = start + known.text.length;
      yield { start, end, line, scanLines: known.scanLines, lineAdvance: known.lineAdvance };
      if (end >= text.length) return;
      line += known.lineAdvance;
      start = end;
      continue;
    }
    let end = start;
    let breaks = 0;
    for (; end < text.length && breaks < MIN_CHUNK_LINES; breaks++) end = nextLine(end);
    while (end < text.length && !cutBefore(end, breaks >= MAX_CHUNK_LINES)) {
      end = nextLine(end);
      breaks++;
    }
    let advance = breaks;
    if (anyCR) {
      // a lone CR breaks a line too
      advance = 0;
      for (let i = start; i < end; i++) {
        const c = text.charCodeAt(i);
        if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) advance++;
      }
    }
    yield { start, end, line, scanLines: breaks, lineAdvance: advance };
    if (end >= text.length) return;
    line += advance;
    start = end;
  }
}

function reportMalformedTokens(file: string, tokens: IToken[], out: Diagnostic[]): boolean {
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i]!;
    if (t.tokenType === Equals) {
      // `w= l=1u`: the word after '=' is the next parameter's name, not this one's value
      const next = tokens[i + 1];
      const after = tokens[i + 2];
      const missing = !next || next.tokenType === Equals || next.tokenType === RParen || next.tokenType === Comma || (next.tokenType === Word && after?.tokenType === Equals);
      if (missing && i > 0) {
        const name = tokens[i - 1]!;
        out.push(diag('syntax', file, spanRanges(tokenRange(name), tokenRange(t)), `a value is expected after '${name.image}='`));
        return true;
      }
    }
    if (t.tokenType === Unclosed) {
      const what = t.image[0] === '{' ? "'{' has no matching '}'" : t.image[0] === '"' ? 'the string is not closed' : "the quote ' is not closed";
      out.push(diag('syntax', file, tokenRange(t), `${what} on this line`));
      return true;
    }
    if (t.tokenType === StrayClose) {
      out.push(diag('syntax', file, tokenRange(t), "'}' with no '{' before it"));
      return true;
    }
  }
  return false;
}

function syntaxErrorOf(file: string, e: IRecognitionException, tokens: IToken[]): Diagnostic {
  const t = e.token;
  const last = tokens[tokens.length - 1]!;
  // At the end of a line chevrotain reports the virtual EOF token: point just past the line.
  const atEnd = !t || t.tokenType.name === 'EOF' || t.startOffset === undefined || Number.isNaN(t.startOffset);
  const range = atEnd ? (() => { const r = tokenRange(last); return rangeOf(r.end.line, r.end.character, r.end.line, r.end.character); })() : tokenRange(t);
  let message: string;
  const tokName = atEnd ? 'the end of the line' : `'${t.image}'`;
  if (e.name === 'MismatchedTokenException' && /RParen/.test(e.message)) message = `')' expected before ${tokName}`;
  else if (e.name === 'NoViableAltException' && tokens.some((x) => x.tokenType === Equals)) message = `a value is expected after '=' (found ${tokName})`;
  else message = `unexpected ${tokName}`;
  return diag('syntax', file, range, message);
}

function readSpecialComments(
  file: string,
  comments: IToken[], // comment lines, in file order
  statementStartLines: number[],
  titleLine: number,
  out: Diagnostic[],
): { directives: DirectiveLine[]; pinInfos: PinInfoLine[] } {
  const directives: DirectiveLine[] = [];
  const pinInfos: PinInfoLine[] = [];
  let si = 0;
  for (const c of comments) {
    if (c.tokenType !== CommentLine || c.startLine === titleLine) continue;
    const line = c.startLine! - 1;
    while (si < statementStartLines.length && statementStartLines[si]! <= line) si++;
    const text = c.image;
    const startCol = c.startColumn! - 1;
    const prefix = DIRECTIVE_PREFIX.exec(text);
    if (prefix) {
      const words = splitWords(text, prefix[0].length, line, startCol);
      if (words.length === 0) {
        out.push(diag('directive', file, tokenRange(c), 'a tidemark directive needs a verb, for example `* tidemark: clock clk period=1n high=0.5n`'));
        continue;
      }
      directives.push({ verb: words[0]!.text.toLowerCase(), args: words.slice(1), range: tokenRange(c), statementIndex: si });
      continue;
    }
    if (PININFO_PREFIX.test(text)) {
      const words = splitWords(text, '*.pininfo'.length, line, startCol);
      const pins: PinInfoLine['pins'] = [];
      for (const w of words) {
        const m = /^(.+):([IOB])$/i.exec(w.text);
        if (!m) continue;
        const d = m[2]!.toUpperCase();
        pins.push({ name: m[1]!, direction: d === 'I' ? 'input' : d === 'O' ? 'output' : 'inout', range: w.range });
      }
      pinInfos.push({ pins, range: tokenRange(c), statementIndex: si });
    }
  }
  void DollarComment;
  void InlineComment;
  return { directives, pinInfos };
}

function splitWords(text: string, from: number, line: number, startCol: number): WordItem[] {
  const words: WordItem[] = [];
  const re = /\S+/g;
  re.lastIndex = from;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text))) {
    const ch = startCol + m.index;
    words.push({ kind: 'word', text: m[0], range: rangeOf(line, ch, line, ch + m[0].length) });
  }
  return words;
}
