// The netlist's tokens, in the order the lexer tries them. SPICE is line-oriented, so line starts
// matter: '*' opens a comment and '+' a continuation only at the start of a line. Every character
// of any input matches some token, so lexing never fails; malformed constructs (an unclosed brace
// or quote) become tokens of their own that the parser reports.

import { createToken, Lexer, type CustomPatternMatcherFunc, type TokenType } from 'chevrotain';

/** True when only spaces or tabs stand between the start of the line and `offset`. */
function atLineStart(text: string, offset: number): boolean {
  for (let i = offset - 1; i >= 0; i--) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) return true;
    if (c !== 32 && c !== 9) return false;
  }
  return true;
}

function restOfLine(text: string, offset: number): number {
  let end = offset;
  while (end < text.length) {
    const c = text.charCodeAt(end);
    if (c === 10 || c === 13) break;
    end++;
  }
  return end;
}

function matched(text: string, offset: number, end: number): RegExpExecArray {
  // chevrotain only reads [0] of a custom match
  return [text.slice(offset, end)] as unknown as RegExpExecArray;
}

const matchCommentLine: CustomPatternMatcherFunc = (text, offset) =>
  text.charCodeAt(offset) === 42 /* * */ && atLineStart(text, offset) ? matched(text, offset, restOfLine(text, offset)) : null;

const matchContinuation: CustomPatternMatcherFunc = (text, offset) =>
  text.charCodeAt(offset) === 43 /* + */ && atLineStart(text, offset) ? matched(text, offset, offset + 1) : null;

/** `$` opens an inline comment at a line start or after white space (it may appear inside names). */
const matchDollarComment: CustomPatternMatcherFunc = (text, offset) => {
  if (text.charCodeAt(offset) !== 36 /* $ */) return null;
  const prev = offset > 0 ? text.charCodeAt(offset - 1) : 10;
  if (prev !== 32 && prev !== 9 && prev !== 10 && prev !== 13) return null;
  return matched(text, offset, restOfLine(text, offset));
};

/** `{...}` with nesting; stops at the end of the line. */
const matchBraceExpr: CustomPatternMatcherFunc = (text, offset) => {
  if (text.charCodeAt(offset) !== 123) return null;
  let depth = 0;
  for (let i = offset; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) return null;
    if (c === 123) depth++;
    else if (c === 125 && --depth === 0) return matched(text, offset, i + 1);
  }
  return null;
};

export const LineBreak = createToken({ name: 'LineBreak', pattern: /\r\n|\r|\n/, line_breaks: true });
export const WhiteSpace = createToken({ name: 'WhiteSpace', pattern: /[ \t\f\v]+/, group: Lexer.SKIPPED });
export const CommentLine = createToken({
  name: 'CommentLine',
  pattern: matchCommentLine,
  start_chars_hint: ['*'],
  line_breaks: false,
  group: 'comments',
});
export const Continuation = createToken({
  name: 'Continuation',
  pattern: matchContinuation,
  start_chars_hint: ['+'],
  line_breaks: false,
});
export const InlineComment = createToken({ name: 'InlineComment', pattern: /;[^\r\n]*/, group: 'comments' });
export const DollarComment = createToken({
  name: 'DollarComment',
  pattern: matchDollarComment,
  start_chars_hint: ['$'],
  line_breaks: false,
  group: 'comments',
});
export const BraceExpr = createToken({ name: 'BraceExpr', pattern: matchBraceExpr, start_chars_hint: ['{'], line_breaks: false });
export const QuoteExpr = createToken({ name: 'QuoteExpr', pattern: /'[^'\r\n]*'/ });
export const StringLit = createToken({ name: 'StringLit', pattern: /"[^"\r\n]*"/ });
/** An opening brace or quote with no closing one on the line: reported by the parser. */
export const Unclosed = createToken({ name: 'Unclosed', pattern: /[{'"][^\r\n]*/ });
export const StrayClose = createToken({ name: 'StrayClose', pattern: /\}/ });
export const Equals = createToken({ name: 'Equals', pattern: /=/ });
export const LParen = createToken({ name: 'LParen', pattern: /\(/ });
export const RParen = createToken({ name: 'RParen', pattern: /\)/ });
export const Comma = createToken({ name: 'Comma', pattern: /,/ });
/** Names, numbers with scale factors, dot cards, keywords: everything else up to a delimiter. */
const WORD_START = Array.from({ length: 94 }, (_, i) => String.fromCharCode(33 + i)).filter((c) => !'=(),{}\'";'.includes(c));
export const Word = createToken({ name: 'Word', pattern: /[^\s=(),{}'";]+/, start_chars_hint: WORD_START });

export const allTokens: TokenType[] = [
  LineBreak,
  WhiteSpace,
  CommentLine,
  Continuation,
  InlineComment,
  DollarComment,
  BraceExpr,
  QuoteExpr,
  StringLit,
  Unclosed,
  StrayClose,
  Equals,
  LParen,
  RParen,
  Comma,
  Word,
];

/**
 * One lexer for the whole process (chevrotain's performance guide: build once, reuse). It runs
 * with first-character optimisation, which needs every token's possible first characters; the
 * parser hands it ASCII-only text (see `asciiForLexer`) so the hints above are complete.
 */
export const netlistLexer = new Lexer(allTokens, {
  positionTracking: 'full',
  ensureOptimizations: true,
  lineTerminatorCharacters: ['\n', '\r'],
  lineTerminatorsPattern: /\r\n|\r|\n/g,
});
