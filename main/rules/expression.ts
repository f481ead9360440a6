// Arithmetic expressions inside an eligibility program (`value`, `limit`, `else`):
// numbers, variable keys, + - * /, parentheses, unary minus/plus, min(...) and max(...).
// A hand-written recursive-descent parser (Aho, Lam, Sethi & Ullman, "Compilers: Principles,
// Techniques, and Tools", 2nd ed., 2006, §4.4): user text is never handed to the host
// language. Precedence and associativity are the usual ones of arithmetic: * and / bind
// tighter than + and -, both levels associate to the left, unary signs bind tightest.
//
// Positions: `ExprError.position` is a 0-based character offset (as in `Span`); the sentence in
// `ExprError.message` counts characters from 1, the way a reader counts ("at position 1" is the
// first character).

import type { BinaryOp, CallName, ExprError, ExprNode, ExprSource, ParsedExpr } from './types.ts';

/** Longest formula accepted, in characters (a guard against pasted junk, not a real limit). */
export const MAX_EXPRESSION_LENGTH = 2000;
/** Deepest nesting of parentheses, signs and function calls accepted. */
export const MAX_EXPRESSION_DEPTH = 64;

const FUNCTIONS: readonly CallName[] = ['min', 'max'];

/** Identifier syntax of variable keys (shared with validation). */
export const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_]*$/;

// ---- Tokens -------------------------------------------------------------------------------

type Token =
  | { t: 'num'; value: number; text: string; start: number; end: number }
  | { t: 'id'; name: string; start: number; end: number }
  | { t: 'op'; op: '+' | '-' | '*' | '/' | '(' | ')' | ','; start: number; end: number }
  | { t: 'end'; start: number; end: number };

class ParseFailure {
  constructor(readonly error: ExprError) {}
}

const at = (offset: number): string => `at position ${offset + 1}`;

function fail(message: string, position: number): never {
  throw new ParseFailure({ message, position });
}

const isDigit = (c: string | undefined): boolean => c !== undefined && c >= '0' && c <= '9';
const isIdStart = (c: string | undefined): boolean =>
  c !== undefined && ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c === '_');
const isIdPart = (c: string | undefined): boolean => isIdStart(c) || isDigit(c);
const isSpace = (c: string | undefined): boolean =>
  c === ' ' || c === '\t' || c === '\n' || c === '\r' || c === '\u00a0';

/** A sentence for a character that has no place in a formula, with the likely intent. */
function strayCharacterMessage(text: string, i: number): string {
  const c = text[i] ?? '';
  const two = text.slice(i, i + 2);
  const where = at(i);
  if (two === '**') return `'**' ${where}: powers are not available; write the product out (x * x)`;
  if (c === '^') return `'^' ${where}: powers are not available; write the product out (x * x)`;
  if (c === '%') return `'%' ${where}: write percentages as fractions (0.6 for 60%)`;
  if ('<>=!≤≥≠'.includes(c)) {
    return `'${c}' ${where}: comparisons belong in the condition's "op", not inside a formula`;
  }
  if ('$€£¥'.includes(c)) return `'${c}' ${where}: write amounts without currency signs`;
  if (c === '×' || c === '·') return `'${c}' ${where}: write multiplication as *`;
  if (c === '÷') return `'${c}' ${where}: write division as /`;
  if (c === '−' || c === '–' || c === '—') return `'${c}' ${where}: write minus as the plain '-' character`;
  if (c === '[' || c === '{') return `'${c}' ${where}: group with round parentheses ( ) only`;
  if (c === '"' || c === "'") return `a quotation mark ${where}: write variable keys without quotes`;
  const shown = c.charCodeAt(0) < 32 ? `a control character (code ${c.charCodeAt(0)})` : `'${c}'`;
  return `${shown} ${where} cannot be used in a formula: use numbers, variable keys, + - * /, parentheses, min and max`;
}

function tokenize(text: string): Token[] {
  const tokens: Token[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (isSpace(c)) { i += 1; continue; }
    if (isDigit(c) || (c === '.' && isDigit(text[i + 1]))) {
      tokens.push(readNumber(text, i));
      i = tokens[tokens.length - 1]!.end;
      continue;
    }
    if (isIdStart(c)) {
      let j = i + 1;
      while (isIdPart(text[j])) j += 1;
      tokens.push({ t: 'id', name: text.slice(i, j), start: i, end: j });
      i = j;
      continue;
    }
    if (c === '+' || c === '-' || c === '/' || c === '(' || c === ')' || c === ',' ||
        (c === '*' && text[i + 1] !== '*')) {
      tokens.push({ t: 'op', op: c, start: i, end: i + 1 });
      i += 1;
      continue;
    }
    fail(strayCharacterMessage(text, i), i);
  }
  tokens.push({ t: 'end', start: text.length, end: text.length });
  return tokens;
}

function readNumber(text: string, start: number): Token {
  let j = start;
  while (isDigit(text[j])) j += 1;
  if (text[j] === '.') {
    j += 1;
    while (isDigit(text[j])) j += 1;
  }
  if ((text[j] === 'e' || text[j] === 'E') &&
      (isDigit(text[j + 1]) || ((text[j + 1] === '+' || text[j + 1] === '-') && isDigit(text[j + 2])))) {
    j += 2;
    while (isDigit(text[j])) j += 1;
  }
  const literal = text.slice(start, j);
  if (text[j] === '.') fail(`'${text.slice(start, j + 1)}' ${at(start)} is not a number: use one decimal point`, j);
  if (isIdStart(text[j])) {
    fail(`'${literal}${text[j]}' ${at(start)}: put an operator between a number and a variable (e.g. ${literal} * ${text[j]})`, j);
  }
  const value = Number(literal);
  if (!Number.isFinite(value)) fail(`the number '${literal}' ${at(start)} is too large`, start);
  return { t: 'num', value, text: literal, start, end: j };
}

// ---- Parser -------------------------------------------------------------------------------

class Parser {
  private pos = 0;
  private depth = 0;
  /** How many min/max argument lists enclose the current point (commas are legal only there). */
  private callDepth = 0;

  constructor(private readonly text: string, private readonly tokens: Token[]) {}

  private peek(): Token { return this.tokens[this.pos] ?? this.tokens[this.tokens.length - 1]!; }
  private next(): Token { const t = this.peek(); if (this.pos < this.tokens.length - 1) this.pos += 1; return t; }
  private isOp(t: Token, op: string): boolean { return t.t === 'op' && t.op === op; }

  private enter(position: number): void {
    this.depth += 1;
    if (this.depth > MAX_EXPRESSION_DEPTH) {
      fail(`the formula nests more than ${MAX_EXPRESSION_DEPTH} levels deep ${at(position)}: simplify it`, position);
    }
  }
  private leave(): void { this.depth -= 1; }

  parseWhole(): ExprNode {
    const node = this.parseSum();
    const t = this.peek();
    if (t.t !== 'end') this.unexpectedAfterOperand(t);
    return node;
  }

  /** sum := product (('+' | '-') product)* — a loop, so long chains do not deepen the stack. */
  private parseSum(): ExprNode {
    let left = this.parseProduct();
    for (;;) {
      const t = this.peek();
      if (t.t !== 'op' || (t.op !== '+' && t.op !== '-')) return left;
      this.next();
      const right = this.parseProduct();
      left = { kind: 'bin', op: t.op, left, right, start: left.start, end: right.end };
    }
  }

  /** product := unary (('*' | '/') unary)* */
  private parseProduct(): ExprNode {
    let left = this.parseUnary();
    for (;;) {
      const t = this.peek();
      if (t.t !== 'op' || (t.op !== '*' && t.op !== '/')) return left;
      this.next();
      const right = this.parseUnary();
      left = { kind: 'bin', op: t.op as BinaryOp, left, right, start: left.start, end: right.end };
    }
  }

  /** unary := ('-' | '+') unary | primary */
  private parseUnary(): ExprNode {
    const t = this.peek();
    if (this.isOp(t, '-') || this.isOp(t, '+')) {
      this.next();
      this.enter(t.start);
      const arg = this.parseUnary();
      this.leave();
      if (this.isOp(t, '+')) return { ...arg, start: t.start };
      return { kind: 'neg', arg, start: t.start, end: arg.end };
    }
    return this.parsePrimary();
  }

  /** primary := number | key | ('min' | 'max') '(' sum (',' sum)+ ')' | '(' sum ')' */
  private parsePrimary(): ExprNode {
    const t = this.next();
    if (t.t === 'num') {
      this.checkThousandsSeparator(t);
      return { kind: 'num', value: t.value, start: t.start, end: t.end };
    }
    if (t.t === 'id') {
      if (this.isOp(this.peek(), '(')) return this.parseCall(t);
      if ((FUNCTIONS as readonly string[]).includes(t.name)) {
        fail(`'${t.name}' ${at(t.start)} is a function: write ${t.name}(a, b) with at least two arguments`, t.start);
      }
      return { kind: 'var', key: t.name, start: t.start, end: t.end };
    }
    if (t.t === 'op' && t.op === '(') {
      this.enter(t.start);
      const saved = this.callDepth;
      this.callDepth = 0;
      const inner = this.parseSum();
      this.callDepth = saved;
      const close = this.peek();
      if (!this.isOp(close, ')')) this.missingClose(close, t.start);
      this.next();
      this.leave();
      return { ...inner, start: t.start, end: close.end };
    }
    if (t.t === 'end') {
      if (t.start === 0 || this.text.trim() === '') {
        fail('the formula is empty: write a number, a variable key or an arithmetic expression', 0);
      }
      fail(`the formula ends too early ${at(t.start)}: expected a number, a variable or '(' after the last operator`, t.start);
    }
    if (t.op === ')') fail(`expected a number, a variable or '(' ${at(t.start)}, found ')'`, t.start);
    if (t.op === ',') fail(`expected a number, a variable or '(' ${at(t.start)}, found ','`, t.start);
    fail(`expected a number, a variable or '(' ${at(t.start)}, found '${t.op}'`, t.start);
  }

  private parseCall(name: Extract<Token, { t: 'id' }>): ExprNode {
    if (!(FUNCTIONS as readonly string[]).includes(name.name)) {
      fail(`unknown function '${name.name}' ${at(name.start)}: only min and max are available`, name.start);
    }
    const open = this.next();
    this.enter(open.start);
    this.callDepth += 1;
    const args: ExprNode[] = [];
    if (this.isOp(this.peek(), ')')) {
      fail(`${name.name}() ${at(name.start)} needs at least two arguments, e.g. ${name.name}(a, b)`, name.start);
    }
    for (;;) {
      args.push(this.parseSum());
      const t = this.peek();
      if (this.isOp(t, ',')) { this.next(); continue; }
      if (this.isOp(t, ')')) break;
      this.missingClose(t, open.start);
    }
    const close = this.next();
    this.callDepth -= 1;
    this.leave();
    if (args.length < 2) {
      fail(`${name.name}(...) ${at(name.start)} needs at least two arguments separated by commas, e.g. ${name.name}(a, b)`, name.start);
    }
    return { kind: 'call', fn: name.name as CallName, args, start: name.start, end: close.end };
  }

  private missingClose(found: Token, openAt: number): never {
    if (found.t === 'end') fail(`')' missing for '(' ${at(openAt)}`, found.start);
    if (found.t === 'op' && found.op === ',') {
      fail(`',' ${at(found.start)}: a comma only separates the arguments of min or max`, found.start);
    }
    fail(`${describeToken(this.text, found)} ${at(found.start)}: expected an operator (+ - * /) or ')' to close '(' ${at(openAt)}`, found.start);
  }

  private unexpectedAfterOperand(t: Token): never {
    if (t.t === 'op' && t.op === ')') fail(`')' ${at(t.start)} has no matching '('`, t.start);
    if (t.t === 'op' && t.op === ',') fail(`',' ${at(t.start)}: a comma only separates the arguments of min or max`, t.start);
    const previous = this.tokens[this.pos - 1];
    if (t.t === 'num' && previous?.t === 'num') {
      fail(`'${this.text.slice(previous.start, t.end)}' ${at(previous.start)}: write numbers without spaces, or put an operator between them`, t.start);
    }
    fail(`${describeToken(this.text, t)} ${at(t.start)}: expected an operator (+ - * /) or the end of the formula`, t.start);
  }

  /** `35,000` outside a min/max argument list is a thousands separator, never two arguments. */
  private checkThousandsSeparator(num: Extract<Token, { t: 'num' }>): void {
    const comma = this.peek();
    if (this.callDepth > 0 || !this.isOp(comma, ',') || comma.start !== num.end) return;
    const written = /^[0-9.,]+/.exec(this.text.slice(num.start))?.[0] ?? '';
    if (/^\d{1,3}(,\d{3})+(\.\d*)?$/.test(written)) {
      fail(`'${written}' ${at(num.start)}: write numbers without thousands separators (${written.replace(/,/g, '')})`, num.start);
    }
    if (/^\d+,\d+$/.test(written)) {
      fail(`'${written}' ${at(num.start)}: write decimals with a point (${written.replace(',', '.')})`, num.start);
    }
  }
}

function describeToken(text: string, t: Token): string {
  return t.t === 'end' ? 'the end of the formula' : `'${text.slice(t.start, t.end)}'`;
}

// ---- Public API ---------------------------------------------------------------------------

/** Parses a formula. Never throws: syntax problems come back as errors with a position. */
export function parseExpression(text: string): ParsedExpr {
  if (typeof text !== 'string') {
    return { ok: false, errors: [{ message: 'a formula must be text', position: 0 }] };
  }
  if (text.length > MAX_EXPRESSION_LENGTH) {
    return {
      ok: false,
      errors: [{
        message: `the formula is ${text.length.toLocaleString('en-US')} characters long; the limit is ${MAX_EXPRESSION_LENGTH.toLocaleString('en-US')}: simplify it`,
        position: MAX_EXPRESSION_LENGTH,
      }],
    };
  }
  try {
    const tokens = tokenize(text);
    return { ok: true, node: new Parser(text, tokens).parseWhole() };
  } catch (e) {
    if (e instanceof ParseFailure) return { ok: false, errors: [e.error] };
    // Anything else is a defect of ours; report it as a problem of the formula rather than crash.
    return { ok: false, errors: [{ message: 'this formula could not be read (internal error); please report it', position: 0 }] };
  }
}

/** A program's expression source: a finite number, or a formula string. */
export function exprFromSource(src: ExprSource): ParsedExpr {
  if (typeof src === 'number') {
    if (Number.isFinite(src)) return { ok: true, node: { kind: 'num', value: src, start: 0, end: String(src).length } };
    return { ok: false, errors: [{ message: `${String(src)} is not a usable number: write a finite number`, position: 0 }] };
  }
  if (typeof src === 'string') return parseExpression(src);
  return { ok: false, errors: [{ message: `expected a number or a formula in quotes, found ${kindOf(src)}`, position: 0 }] };
}

function kindOf(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  if (typeof v === 'object') return 'an object';
  return `a value of type ${typeof v}`;
}

/** The variable keys an expression reads. */
export function variablesIn(node: ExprNode): Set<string> {
  const out = new Set<string>();
  const stack: ExprNode[] = [node];
  while (stack.length > 0) {
    const n = stack.pop()!;
    switch (n.kind) {
      case 'var': out.add(n.key); break;
      case 'num': break;
      case 'neg': stack.push(n.arg); break;
      case 'bin': stack.push(n.left, n.right); break;
      case 'call': stack.push(...n.args); break;
    }
  }
  return out;
}

// Binding strength used by formatExpression (and by wording.ts).
export const PRECEDENCE = { sum: 1, product: 2, unary: 3, atom: 4 } as const;

export function precedenceOf(node: ExprNode): number {
  switch (node.kind) {
    case 'bin': return node.op === '+' || node.op === '-' ? PRECEDENCE.sum : PRECEDENCE.product;
    case 'neg': return PRECEDENCE.unary;
    // A negative literal prints with a leading '-', so it binds like a unary minus.
    case 'num': return node.value < 0 || Object.is(node.value, -0) ? PRECEDENCE.unary : PRECEDENCE.atom;
    default: return PRECEDENCE.atom;
  }
}

/**
 * Whether a child needs parentheses under a binary operator. Left operands need them only
 * when they bind more loosely; right operands also when equally loose, because both levels
 * associate to the left (a - (b - c) is not (a - b) - c).
 */
export function needsParentheses(parentOp: BinaryOp, child: ExprNode, side: 'left' | 'right'): boolean {
  const parent = parentOp === '+' || parentOp === '-' ? PRECEDENCE.sum : PRECEDENCE.product;
  const own = precedenceOf(child);
  return side === 'left' ? own < parent : own <= parent;
}

function formatNumber(value: number): string {
  if (Object.is(value, -0)) return '-0';
  return String(value);
}

/** How printExpression writes numbers and signs; the grammar's own parentheses are the same for every style. */
export interface ExpressionStyle {
  number: (value: number) => string;
  minus: string;
  operators: Record<BinaryOp, string>;
}

const CANONICAL: ExpressionStyle = { number: formatNumber, minus: '-', operators: { '+': '+', '-': '-', '*': '*', '/': '/' } };

/** An expression with as few parentheses as the grammar allows, in the given style. */
export function printExpression(node: ExprNode, style: ExpressionStyle): string {
  switch (node.kind) {
    case 'num': return style.number(node.value);
    case 'var': return node.key;
    case 'neg': {
      const inner = printExpression(node.arg, style);
      return precedenceOf(node.arg) < PRECEDENCE.unary ? `${style.minus}(${inner})` : `${style.minus}${inner}`;
    }
    case 'bin': {
      const l = printExpression(node.left, style);
      const r = printExpression(node.right, style);
      const left = needsParentheses(node.op, node.left, 'left') ? `(${l})` : l;
      const right = needsParentheses(node.op, node.right, 'right') ? `(${r})` : r;
      return `${left} ${style.operators[node.op]} ${right}`;
    }
    case 'call': return `${node.fn}(${node.args.map((a) => printExpression(a, style)).join(', ')})`;
  }
}

/**
 * Canonical text with as few parentheses as the grammar allows; parseExpression of the result
 * gives back the same tree (spans aside) for every tree the parser can produce.
 */
export function formatExpression(node: ExprNode): string {
  return printExpression(node, CANONICAL);
}

/**
 * Reference scalar evaluator (IEEE 754 double arithmetic; x / 0 gives ±Infinity or NaN as the
 * standard says). The compiled evaluator must agree with it.
 */
export function evaluateExpression(node: ExprNode, valueOf: (key: string) => number): number {
  switch (node.kind) {
    case 'num': return node.value;
    case 'var': return valueOf(node.key);
    case 'neg': return -evaluateExpression(node.arg, valueOf);
    case 'bin': return applyBinary(node.op, evaluateExpression(node.left, valueOf), evaluateExpression(node.right, valueOf));
    case 'call': {
      const values = node.args.map((a) => evaluateExpression(a, valueOf));
      return node.fn === 'min' ? Math.min(...values) : Math.max(...values);
    }
  }
}

function applyBinary(op: BinaryOp, a: number, b: number): number {
  switch (op) {
    case '+': return a + b;
    case '-': return a - b;
    case '*': return a * b;
    case '/': return a / b;
  }
}
