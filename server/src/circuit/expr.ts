// Expressions inside `{...}` or `'...'`: arithmetic, comparisons, logic, the ternary operator and
// the usual ngspice/HSPICE functions, over parameters and SPICE numbers with scale factors.
// Parsed once per distinct text (chevrotain, one parser instance) and compiled to a closure.

import { createToken, EmbeddedActionsParser, Lexer, type IToken } from 'chevrotain';
import { scanSpiceNumber } from './numbers';

const WS = createToken({ name: 'WS', pattern: /[ \t\r\n]+/, group: Lexer.SKIPPED });
const Num = createToken({ name: 'Num', pattern: /(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[a-zA-Z]*/ });
const Ident = createToken({ name: 'Ident', pattern: /[a-zA-Z_][a-zA-Z0-9_.$#!]*/ });
const Pow = createToken({ name: 'Pow', pattern: /\*\*|\^/ });
const AndAnd = createToken({ name: 'AndAnd', pattern: /&&/ });
const OrOr = createToken({ name: 'OrOr', pattern: /\|\|/ });
const Cmp = createToken({ name: 'Cmp', pattern: /==|!=|<=|>=|<|>/ });
const Not = createToken({ name: 'Not', pattern: /!/ });
const Plus = createToken({ name: 'Plus', pattern: /\+/ });
const Minus = createToken({ name: 'Minus', pattern: /-/ });
const Star = createToken({ name: 'Star', pattern: /\*/ });
const Slash = createToken({ name: 'Slash', pattern: /\// });
const Percent = createToken({ name: 'Percent', pattern: /%/ });
const Question = createToken({ name: 'Question', pattern: /\?/ });
const Colon = createToken({ name: 'Colon', pattern: /:/ });
const LP = createToken({ name: 'LP', pattern: /\(/ });
const RP = createToken({ name: 'RP', pattern: /\)/ });
const Comma = createToken({ name: 'Comma', pattern: /,/ });

const exprTokens = [WS, Num, Ident, Pow, AndAnd, OrOr, Cmp, Not, Plus, Minus, Star, Slash, Percent, Question, Colon, LP, RP, Comma];
const exprLexer = new Lexer(exprTokens, { positionTracking: 'onlyOffset', ensureOptimizations: false });

export type ExprNode =
  | { op: 'num'; value: number }
  | { op: 'ref'; name: string }
  | { op: 'call'; name: string; args: ExprNode[] }
  | { op: 'unary'; operator: string; arg: ExprNode }
  | { op: 'binary'; operator: string; left: ExprNode; right: ExprNode }
  | { op: 'ternary'; test: ExprNode; then: ExprNode; else: ExprNode };

const BAD: ExprNode = { op: 'num', value: NaN };

class ExprParser extends EmbeddedActionsParser {
  constructor() {
    super(exprTokens, { recoveryEnabled: false });
    this.performSelfAnalysis();
  }

  public expression = this.RULE('expression', (): ExprNode => {
    const test = this.SUBRULE(this.orExpr);
    let result = test;
    this.OPTION(() => {
      this.CONSUME(Question);
      const a = this.SUBRULE(this.expression);
      this.CONSUME(Colon);
      const b = this.SUBRULE2(this.expression);
      result = this.ACTION(() => ({ op: 'ternary' as const, test, then: a, else: b }));
    });
    return result;
  });

  private binaryChain(first: ExprNode, rest: Array<[string, ExprNode]>): ExprNode {
    let node = first;
    for (const [operator, right] of rest) node = { op: 'binary', operator, left: node, right };
    return node;
  }

  private orExpr = this.RULE('orExpr', (): ExprNode => {
    const first = this.SUBRULE(this.andExpr);
    const rest: Array<[string, ExprNode]> = [];
    this.MANY(() => {
      const t = this.CONSUME(OrOr);
      rest.push([t.image, this.SUBRULE2(this.andExpr)]);
    });
    return this.ACTION(() => this.binaryChain(first, rest));
  });

  private andExpr = this.RULE('andExpr', (): ExprNode => {
    const first = this.SUBRULE(this.cmpExpr);
    const rest: Array<[string, ExprNode]> = [];
    this.MANY(() => {
      const t = this.CONSUME(AndAnd);
      rest.push([t.image, this.SUBRULE2(this.cmpExpr)]);
    });
    return this.ACTION(() => this.binaryChain(first, rest));
  });

  private cmpExpr = this.RULE('cmpExpr', (): ExprNode => {
    const first = this.SUBRULE(this.addExpr);
    const rest: Array<[string, ExprNode]> = [];
    this.MANY(() => {
      const t = this.CONSUME(Cmp);
      rest.push([t.image, this.SUBRULE2(this.addExpr)]);
    });
    return this.ACTION(() => this.binaryChain(first, rest));
  });

  private addExpr = this.RULE('addExpr', (): ExprNode => {
    const first = this.SUBRULE(this.mulExpr);
    const rest: Array<[string, ExprNode]> = [];
    this.MANY(() => {
      const t = this.OR([{ ALT: () => this.CONSUME(Plus) }, { ALT: () => this.CONSUME(Minus) }]);
      rest.push([t.image, this.SUBRULE2(this.mulExpr)]);
    });
    return this.ACTION(() => this.binaryChain(first, rest));
  });

  private mulExpr = this.RULE('mulExpr', (): ExprNode => {
    const first = this.SUBRULE(this.unaryExpr);
    const rest: Array<[string, ExprNode]> = [];
    this.MANY(() => {
      const t = this.OR([{ ALT: () => this.CONSUME(Star) }, { ALT: () => this.CONSUME(Slash) }, { ALT: () => this.CONSUME(Percent) }]);
      rest.push([t.image, this.SUBRULE2(this.unaryExpr)]);
    });
    return this.ACTION(() => this.binaryChain(first, rest));
  });

  private unaryExpr = this.RULE('unaryExpr', (): ExprNode =>
    this.OR([
      {
        ALT: () => {
          const t = this.OR2([{ ALT: () => this.CONSUME(Minus) }, { ALT: () => this.CONSUME(Plus) }, { ALT: () => this.CONSUME(Not) }]);
          const arg = this.SUBRULE(this.unaryExpr);
          return this.ACTION(() => ({ op: 'unary' as const, operator: t.image, arg }));
        },
      },
      { ALT: () => this.SUBRULE(this.powExpr) },
    ]),
  );

  // Power binds tighter than unary minus on its left (-2**2 = -4) and is right-associative.
  private powExpr = this.RULE('powExpr', (): ExprNode => {
    const base = this.SUBRULE(this.primary);
    let result = base;
    this.OPTION(() => {
      this.CONSUME(Pow);
      const exp = this.SUBRULE(this.unaryExpr);
      result = this.ACTION(() => ({ op: 'binary' as const, operator: '**', left: base, right: exp }));
    });
    return result;
  });

  private primary = this.RULE('primary', (): ExprNode =>
    this.OR([
      {
        ALT: () => {
          const t = this.CONSUME(Num);
          return this.ACTION(() => ({ op: 'num' as const, value: scanSpiceNumber(t.image)?.value ?? NaN }));
        },
      },
      {
        ALT: () => {
          const t: IToken = this.CONSUME(Ident);
          let args: ExprNode[] | undefined;
          this.OPTION(() => {
            this.CONSUME(LP);
            args = [];
            this.OPTION2(() => {
              args!.push(this.SUBRULE(this.expression));
              this.MANY(() => {
                this.CONSUME(Comma);
                args!.push(this.SUBRULE2(this.expression));
              });
            });
            this.CONSUME(RP);
          });
          return this.ACTION((): ExprNode =>
            args ? { op: 'call', name: t.image.toLowerCase(), args } : { op: 'ref', name: t.image.toLowerCase() },
          );
        },
      },
      {
        ALT: () => {
          this.CONSUME2(LP);
          const e = this.SUBRULE3(this.expression);
          this.CONSUME2(RP);
          return e;
        },
      },
    ]),
  );
}

let sharedParser: ExprParser | undefined;

export type ParsedExpr = { ok: true; node: ExprNode } | { ok: false; message: string };

const parseCache = new Map<string, ParsedExpr>();

/** Parses an expression (cached by text). Never throws. */
export function parseExpression(text: string): ParsedExpr {
  const hit = parseCache.get(text);
  if (hit) return hit;
  const result = parseUncached(text);
  if (parseCache.size > 50_000) parseCache.clear();
  parseCache.set(text, result);
  return result;
}

/** Deeper nesting than any real netlist writes; beyond it the recursive parser could overflow. */
const MAX_NESTING = 100;

function parseUncached(text: string): ParsedExpr {
  let depth = 0;
  let maxDepth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 40) maxDepth = Math.max(maxDepth, ++depth);
    else if (c === 41) depth--;
  }
  if (maxDepth > MAX_NESTING) return { ok: false, message: `expression nests parentheses ${maxDepth} deep; at most ${MAX_NESTING} are read` };
  if (text.length > 20_000) return { ok: false, message: `expression is ${text.length} characters long; at most 20000 are read` };
  const lexed = exprLexer.tokenize(text);
  if (lexed.errors.length > 0) {
    const e = lexed.errors[0]!;
    return { ok: false, message: `cannot read '${text.substr(e.offset, e.length)}' in expression '${text}'` };
  }
  if (lexed.tokens.length === 0) return { ok: false, message: 'empty expression' };
  const p = (sharedParser ??= new ExprParser());
  p.input = lexed.tokens;
  let node: ExprNode;
  try {
    node = p.expression();
  } catch (e) {
    // A pathological chain (thousands of unary operators) can exhaust the stack: say so.
    if (e instanceof RangeError) return { ok: false, message: 'expression is too deeply nested to read' };
    throw e;
  }
  if (p.errors.length > 0 || !node) {
    const t = p.errors[0]?.token;
    const where = t && t.image ? `at '${t.image}'` : 'at the end';
    return { ok: false, message: `cannot parse expression '${text}' ${where}` };
  }
  return { ok: true, node: node ?? BAD };
}

export const CONSTANTS: Record<string, number> = {
  pi: Math.PI,
  e: Math.E,
  // Boltzmann constant and elementary charge, exact in the 2019 SI
  boltz: 1.380649e-23,
  echarge: 1.602176634e-19,
};

const FUNCTIONS: Record<string, (...a: number[]) => number> = {
  sqrt: Math.sqrt,
  exp: Math.exp,
  ln: Math.log,
  log: Math.log, // ngspice: log is the natural logarithm
  log10: Math.log10,
  abs: Math.abs,
  sin: Math.sin,
  cos: Math.cos,
  tan: Math.tan,
  asin: Math.asin,
  acos: Math.acos,
  atan: Math.atan,
  sinh: Math.sinh,
  cosh: Math.cosh,
  tanh: Math.tanh,
  floor: Math.floor,
  ceil: Math.ceil,
  int: Math.trunc,
  nint: (x) => Math.sign(x) * Math.round(Math.abs(x)),
  sgn: Math.sign,
  sign: (a, b) => (b === undefined ? Math.sign(a!) : Math.abs(a!) * (b >= 0 ? 1 : -1)),
  min: Math.min,
  max: Math.max,
  pow: Math.pow,
  pwr: (a, b) => Math.sign(a!) * Math.pow(Math.abs(a!), b!),
  atan2: Math.atan2,
  hypot: Math.hypot,
  limit: (x, lo, hi) => Math.min(Math.max(x!, lo!), hi!),
  u: (x) => (x! > 0 ? 1 : 0),
  db: (x) => 20 * Math.log10(Math.abs(x!)),
};

export class EvalError extends Error {}

/** Evaluates a parsed expression; `lookup` returns a parameter's value or undefined if unknown. */
export function evaluateExpr(n: ExprNode, lookup: (name: string) => number | undefined): number {
  switch (n.op) {
    case 'num':
      return n.value;
    case 'ref': {
      const v = lookup(n.name);
      if (v !== undefined) return v;
      const c = CONSTANTS[n.name];
      if (c !== undefined) return c;
      throw new EvalError(`unknown parameter '${n.name}'`);
    }
    case 'call': {
      const f = FUNCTIONS[n.name];
      if (!f) throw new EvalError(`unknown function '${n.name}'`);
      return f(...n.args.map((a) => evaluateExpr(a, lookup)));
    }
    case 'unary': {
      const v = evaluateExpr(n.arg, lookup);
      return n.operator === '-' ? -v : n.operator === '!' ? (v === 0 ? 1 : 0) : v;
    }
    case 'ternary':
      return evaluateExpr(n.test, lookup) !== 0 ? evaluateExpr(n.then, lookup) : evaluateExpr(n.else, lookup);
    case 'binary': {
      const a = evaluateExpr(n.left, lookup);
      if (n.operator === '&&') return a !== 0 && evaluateExpr(n.right, lookup) !== 0 ? 1 : 0;
      if (n.operator === '||') return a !== 0 || evaluateExpr(n.right, lookup) !== 0 ? 1 : 0;
      const b = evaluateExpr(n.right, lookup);
      switch (n.operator) {
        case '+': return a + b;
        case '-': return a - b;
        case '*': return a * b;
        case '/':
          if (b === 0) throw new EvalError('division by zero');
          return a / b;
        case '%': return a % b;
        case '**': return Math.pow(a, b);
        case '==': return a === b ? 1 : 0;
        case '!=': return a !== b ? 1 : 0;
        case '<': return a < b ? 1 : 0;
        case '<=': return a <= b ? 1 : 0;
        case '>': return a > b ? 1 : 0;
        case '>=': return a >= b ? 1 : 0;
        default: throw new EvalError(`unknown operator '${n.operator}'`);
      }
    }
  }
}
