// Parameter expressions, as written inside braces or quotes (`{wn*2}`, `'l+0.01u'`),
// with ngspice's precedence and associativity:
// + − * / ^ (also **), parentheses, unary signs, numbers with SPICE scale factors,
// parameter names and the usual functions. Parsed once with a small Chevrotain
// grammar into a tree whose chains are n-ary (so a ten-thousand-term sum is one
// node, not ten thousand nested ones), evaluated per parameter binding.

import { createToken, EmbeddedActionsParser, Lexer, type IRecognitionException, type IToken } from 'chevrotain';
import { parseSpiceNumber } from './numbers';

export type ExprNode =
  | { t: 'num'; v: number }
  | { t: 'ref'; name: string; at: number }
  | { t: 'neg'; x: ExprNode }
  | { t: 'sum'; terms: ExprNode[]; minus: boolean[] }
  | { t: 'prod'; factors: ExprNode[]; divide: boolean[] }
  /** Chain evaluated from the left, as ngspice does: 2^3^2 is (2^3)^2 = 64. */
  | { t: 'pow'; chain: ExprNode[] }
  | { t: 'call'; fn: string; args: ExprNode[]; at: number };

export interface CompiledExpr {
  node: ExprNode;
  /** Lower-case parameter names the expression reads. */
  refs: string[];
}

export type CompileResult = { ok: true; expr: CompiledExpr } | { ok: false; message: string; at: number };

const MAX_NESTING = 64;

const WhiteSpace = createToken({ name: 'WhiteSpace', pattern: /[ \t\f\v\u00a0]+/, group: Lexer.SKIPPED });
const NumberLit = createToken({ name: 'NumberLit', pattern: /(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[A-Za-zµμ]*/ });
const Ident = createToken({ name: 'Ident', pattern: /[A-Za-z_][A-Za-z0-9_]*/ });
const StarStar = createToken({ name: 'StarStar', pattern: '**' });
const Plus = createToken({ name: 'Plus', pattern: '+' });
const Minus = createToken({ name: 'Minus', pattern: /[-\u2212]/ });
const Star = createToken({ name: 'Star', pattern: '*' });
const Slash = createToken({ name: 'Slash', pattern: '/' });
const Caret = createToken({ name: 'Caret', pattern: '^' });
const LParen = createToken({ name: 'LParen', pattern: '(' });
const RParen = createToken({ name: 'RParen', pattern: ')' });
const Comma = createToken({ name: 'Comma', pattern: ',' });

const exprTokens = [WhiteSpace, NumberLit, Ident, StarStar, Plus, Minus, Star, Slash, Caret, LParen, RParen, Comma];
const exprLexer = new Lexer(exprTokens, { positionTracking: 'onlyOffset', ensureOptimizations: true });

class ExpressionParser extends EmbeddedActionsParser {
  numberError: { at: number; message: string } | null = null;

  constructor() {
    super(exprTokens, { recoveryEnabled: false, maxLookahead: 2 });
    this.performSelfAnalysis();
  }

  expression = this.RULE('expression', (): ExprNode => {
    const first = this.SUBRULE(this.product);
    const terms: ExprNode[] = [first];
    const minus: boolean[] = [false];
    this.MANY(() => {
      const op = this.OR([{ ALT: () => this.CONSUME(Plus) }, { ALT: () => this.CONSUME(Minus) }]);
      const term = this.SUBRULE2(this.product);
      this.ACTION(() => {
        terms.push(term);
        minus.push(op.tokenType === Minus);
      });
    });
    return terms.length === 1 ? first : { t: 'sum', terms, minus };
  });

  product = this.RULE('product', (): ExprNode => {
    const first = this.SUBRULE(this.signed);
    const factors: ExprNode[] = [first];
    const divide: boolean[] = [false];
    this.MANY(() => {
      const op = this.OR([{ ALT: () => this.CONSUME(Star) }, { ALT: () => this.CONSUME(Slash) }]);
      const factor = this.SUBRULE2(this.signed);
      this.ACTION(() => {
        factors.push(factor);
        divide.push(op.tokenType === Slash);
      });
    });
    return factors.length === 1 ? first : { t: 'prod', factors, divide };
  });

  /**
   * Unary signs bind looser than ^, as in mathematics and as ngspice reads a leading sign: -2^2 is -4.
   * (ngspice reads a sign after a binary operator differently, `10+-2^2` being 14; Keepwell does not copy that.)
   */
  signed = this.RULE('signed', (): ExprNode => {
    let negative = false;
    this.MANY(() => {
      this.OR([
        { ALT: () => this.CONSUME(Plus) },
        {
          ALT: () => {
            this.CONSUME(Minus);
            negative = !negative;
          },
        },
      ]);
    });
    const x = this.SUBRULE(this.power);
    return negative ? { t: 'neg', x } : x;
  });

  power = this.RULE('power', (): ExprNode => {
    const base = this.SUBRULE(this.primary);
    const chain: ExprNode[] = [base];
    this.MANY(() => {
      this.OR([{ ALT: () => this.CONSUME(Caret) }, { ALT: () => this.CONSUME(StarStar) }]);
      // An exponent may carry its own sign: 2^-1.
      let negative = false;
      this.MANY2(() => {
        this.OR2([
          { ALT: () => this.CONSUME2(Plus) },
          {
            ALT: () => {
              this.CONSUME2(Minus);
              negative = !negative;
            },
          },
        ]);
      });
      const e = this.SUBRULE2(this.primary);
      this.ACTION(() => chain.push(negative ? { t: 'neg', x: e } : e));
    });
    return chain.length === 1 ? base : { t: 'pow', chain };
  });

  primary = this.RULE('primary', (): ExprNode => {
    return this.OR([
      {
        ALT: () => {
          const tok = this.CONSUME(NumberLit);
          return this.ACTION(() => this.number(tok));
        },
      },
      {
        ALT: () => {
          const id = this.CONSUME(Ident);
          let args: ExprNode[] | null = null;
          this.OPTION(() => {
            this.CONSUME(LParen);
            args = [];
            this.MANY_SEP({
              SEP: Comma,
              DEF: () => {
                const a = this.SUBRULE(this.expression);
                this.ACTION(() => args!.push(a));
              },
            });
            this.CONSUME(RParen);
          });
          return this.ACTION((): ExprNode => {
            const name = id.image.toLowerCase();
            return args ? { t: 'call', fn: name, args, at: id.startOffset } : { t: 'ref', name, at: id.startOffset };
          });
        },
      },
      {
        ALT: () => {
          this.CONSUME2(LParen);
          const inner = this.SUBRULE2(this.expression);
          this.CONSUME2(RParen);
          return inner;
        },
      },
    ]);
  });

  private number(tok: IToken): ExprNode {
    const r = parseSpiceNumber(tok.image);
    if (r.ok) return { t: 'num', v: r.value };
    this.numberError ??= {
      at: tok.startOffset,
      message: r.reason === 'non-finite' ? `number "${tok.image}" is not finite` : `malformed number "${tok.image}"`,
    };
    return { t: 'num', v: NaN };
  }
}

const parser = new ExpressionParser();

function nestingTooDeep(text: string): number {
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 40) {
      if (++depth > MAX_NESTING) return i;
    } else if (c === 41) depth--;
  }
  return -1;
}

function describe(e: IRecognitionException): string {
  const t = e.token;
  if (!t || t.tokenType?.name === 'EOF' || t.image === undefined || t.image === '') return 'expression ends too early';
  return `unexpected "${t.image}" in expression`;
}

function collectRefs(node: ExprNode, out: Set<string>): void {
  const stack: ExprNode[] = [node];
  while (stack.length) {
    const n = stack.pop()!;
    switch (n.t) {
      case 'ref':
        out.add(n.name);
        break;
      case 'neg':
        stack.push(n.x);
        break;
      case 'sum':
        for (const x of n.terms) stack.push(x);
        break;
      case 'prod':
        for (const x of n.factors) stack.push(x);
        break;
      case 'pow':
        for (const x of n.chain) stack.push(x);
        break;
      case 'call':
        for (const x of n.args) stack.push(x);
        break;
    }
  }
}

const compiled = new Map<string, CompileResult>();

/** Parse an expression's text (without its braces or quotes). `at` offsets are relative to the text. */
export function compileExpression(text: string): CompileResult {
  const cached = compiled.get(text);
  if (cached) return cached;
  const result = compileUncached(text);
  if (compiled.size > 50_000) compiled.clear();
  compiled.set(text, result);
  return result;
}

function compileUncached(text: string): CompileResult {
  if (text.trim() === '') return { ok: false, message: 'empty expression', at: 0 };
  const deep = nestingTooDeep(text);
  if (deep >= 0) return { ok: false, message: `parentheses nested deeper than ${MAX_NESTING}`, at: deep };
  const lexed = exprLexer.tokenize(text);
  if (lexed.errors.length) {
    const e = lexed.errors[0];
    return { ok: false, message: `unexpected character "${text.slice(e.offset, e.offset + Math.min(e.length, 1))}" in expression`, at: e.offset };
  }
  parser.numberError = null;
  parser.input = lexed.tokens;
  const node = parser.expression();
  if (parser.errors.length) {
    const e = parser.errors[0];
    return { ok: false, message: describe(e), at: Number.isFinite(e.token?.startOffset) ? e.token.startOffset : text.length };
  }
  const numberError = parser.numberError as { at: number; message: string } | null;
  if (numberError) return { ok: false, message: numberError.message, at: numberError.at };
  const refs = new Set<string>();
  collectRefs(node, refs);
  return { ok: true, expr: { node, refs: [...refs] } };
}

const FUNCTIONS: Record<string, { arity: number; f: (...xs: number[]) => number }> = {
  sqrt: { arity: 1, f: Math.sqrt },
  exp: { arity: 1, f: Math.exp },
  log: { arity: 1, f: Math.log },
  ln: { arity: 1, f: Math.log },
  log10: { arity: 1, f: Math.log10 },
  abs: { arity: 1, f: Math.abs },
  min: { arity: 2, f: Math.min },
  max: { arity: 2, f: Math.max },
  pow: { arity: 2, f: Math.pow },
  pwr: { arity: 2, f: Math.pow },
  floor: { arity: 1, f: Math.floor },
  ceil: { arity: 1, f: Math.ceil },
  int: { arity: 1, f: Math.trunc },
  sin: { arity: 1, f: Math.sin },
  cos: { arity: 1, f: Math.cos },
  tan: { arity: 1, f: Math.tan },
  atan: { arity: 1, f: Math.atan },
};

export const EXPRESSION_FUNCTIONS = Object.keys(FUNCTIONS);

export type EvalResult = { ok: true; value: number } | { ok: false; message: string; at: number };

export class EvalError extends Error {
  constructor(
    message: string,
    readonly at: number,
  ) {
    super(message);
  }
}

/** Evaluate with a lookup for parameter names; unknown names, wrong calls and non-finite results are errors. */
export function evaluate(node: ExprNode, lookup: (name: string, at: number) => number | undefined): EvalResult {
  try {
    const v = evalNode(node, lookup);
    if (!Number.isFinite(v)) return { ok: false, message: `expression evaluates to ${v}`, at: 0 };
    return { ok: true, value: v };
  } catch (e) {
    if (e instanceof EvalError) return { ok: false, message: e.message, at: e.at };
    throw e;
  }
}

function evalNode(node: ExprNode, lookup: (name: string, at: number) => number | undefined): number {
  switch (node.t) {
    case 'num':
      return node.v;
    case 'ref': {
      const v = lookup(node.name, node.at);
      if (v === undefined) throw new EvalError(`unknown parameter "${node.name}"`, node.at);
      return v;
    }
    case 'neg':
      return -evalNode(node.x, lookup);
    case 'sum': {
      let acc = 0;
      for (let i = 0; i < node.terms.length; i++) {
        const v = evalNode(node.terms[i], lookup);
        acc = node.minus[i] ? acc - v : acc + v;
      }
      return acc;
    }
    case 'prod': {
      let acc = 1;
      for (let i = 0; i < node.factors.length; i++) {
        const v = evalNode(node.factors[i], lookup);
        acc = node.divide[i] ? acc / v : acc * v;
      }
      return acc;
    }
    case 'pow': {
      let acc = evalNode(node.chain[0], lookup);
      for (let i = 1; i < node.chain.length; i++) acc = Math.pow(acc, evalNode(node.chain[i], lookup));
      return acc;
    }
    case 'call': {
      const fn = FUNCTIONS[node.fn];
      if (!fn) throw new EvalError(`unknown function "${node.fn}"`, node.at);
      if (node.args.length !== fn.arity) {
        throw new EvalError(`${node.fn}() takes ${fn.arity} argument${fn.arity === 1 ? '' : 's'}`, node.at);
      }
      return fn.f(...node.args.map((a) => evalNode(a, lookup)));
    }
  }
}
