// Plain-language wording of a program, for the memo and the app: the formula said in words a
// reviewer reads without knowing the file format. Deterministic and total on valid programs
// (validateProgram); on anything odd it falls back to the text as written rather than throw.

import { exprFromSource, needsParentheses, precedenceOf, PRECEDENCE } from './expression.ts';
import type { Comparator, Condition, ExprNode, ExprSource, LookupLimit, Offer, Program, Variable } from './types.ts';

const COMPARATOR_WORDS: Record<Comparator, string> = {
  '<=': 'is at most',
  '<': 'is below',
  '>=': 'is at least',
  '>': 'is above',
  '==': 'equals',
  '!=': 'is not',
};

const OPERATOR_SIGNS = { '+': '+', '-': '−', '*': '×', '/': '÷' } as const;

// ---- Numbers and nouns -------------------------------------------------------------------------

/** 21000 → "21,000"; 1234.5 → "1,234.5"; −3 → "−3"; very large or small numbers keep exponent form. */
export function formatAmount(n: number): string {
  if (!Number.isFinite(n)) return String(n);
  const sign = n < 0 ? '−' : '';
  const abs = Math.abs(n);
  if (abs >= 1e21 || (abs !== 0 && abs < 1e-6)) return sign + String(abs);
  const [whole = '0', fraction] = String(abs).split('.');
  const grouped = whole.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return sign + grouped + (fraction !== undefined ? `.${fraction}` : '');
}

/** 0.6 → "60%"; 0.125 → "12.5%"; shares near 0 or 1 keep enough digits not to read as 0% or 100%. */
export function formatPercent(p: number): string {
  const v = p * 100;
  if (!Number.isFinite(v)) return `${v}%`;
  for (let digits = 2; digits <= 12; digits += 1) {
    const rounded = Number(v.toFixed(digits));
    const collapses = (rounded === 0 && v !== 0) || (rounded === 100 && v !== 100);
    if (!collapses) return `${rounded}%`;
  }
  return `${v}%`;
}

function plural(noun: string): string {
  const irregular: Record<string, string> = { person: 'people', child: 'children', man: 'men', woman: 'women' };
  const lower = noun.toLowerCase();
  if (irregular[lower] !== undefined) return irregular[lower]!;
  if (/[^aeiou]y$/i.test(noun)) return `${noun.slice(0, -1)}ies`;
  if (/(s|x|z|ch|sh)$/i.test(noun)) return `${noun}es`;
  return `${noun}s`;
}

/** "a" or "an" before a noun, by its first letters. */
export function article(noun: string): string {
  return /^[aeio]/i.test(noun) || /^u[^aeiou][^aeiou]/i.test(noun) ? 'an' : 'a';
}

const capitalize = (s: string): string => s.charAt(0).toUpperCase() + s.slice(1);

/** A label inside a sentence: "Annual household income" → "annual household income"; acronyms stay. */
function inSentence(label: string): string {
  const firstWord = label.split(/\s/)[0] ?? '';
  if (/^[A-Z][a-z]/.test(label) && !/[A-Z]/.test(firstWord.slice(1))) return label.charAt(0).toLowerCase() + label.slice(1);
  return label;
}

function findVariable(p: Program, key: string): Variable | undefined {
  return p.variables.find((v) => v.key === key);
}

function variableName(p: Program, key: string): string {
  const v = findVariable(p, key);
  return v !== undefined && v.label.trim() !== '' ? inSentence(v.label) : key;
}

function valueLabel(v: Variable | undefined, value: number): string | undefined {
  for (const d of v?.values ?? []) if (typeof d === 'object' && d.value === value) return d.label;
  return undefined;
}

// ---- Expressions --------------------------------------------------------------------------------

function wordNode(node: ExprNode, p: Program): string {
  switch (node.kind) {
    case 'num': return formatAmount(node.value);
    case 'var': return variableName(p, node.key);
    case 'neg': {
      const inner = wordNode(node.arg, p);
      return precedenceOf(node.arg) < PRECEDENCE.unary ? `−(${inner})` : `−${inner}`;
    }
    case 'bin': {
      const wrap = (child: ExprNode, side: 'left' | 'right'): string => {
        const text = wordNode(child, p);
        return needsParentheses(node.op, child, side) || child.kind === 'call' ? `(${text})` : text;
      };
      return `${wrap(node.left, 'left')} ${OPERATOR_SIGNS[node.op]} ${wrap(node.right, 'right')}`;
    }
    case 'call': {
      const parts = node.args.map((a) => wordNode(a, p));
      const two = parts.length === 2;
      const head = node.fn === 'min' ? (two ? 'the smaller of' : 'the smallest of') : (two ? 'the larger of' : 'the largest of');
      return `${head} ${listWithAnd(parts)}`;
    }
  }
}

function listWithAnd(parts: string[]): string {
  if (parts.length <= 1) return parts.join('');
  return `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}`;
}

/** "a, b or c". */
export function listWithOr(parts: string[]): string {
  if (parts.length <= 1) return parts.join('');
  return `${parts.slice(0, -1).join(', ')} or ${parts[parts.length - 1]}`;
}

function parse(src: ExprSource): ExprNode | undefined {
  const parsed = exprFromSource(src);
  return parsed.ok ? parsed.node : undefined;
}

/** An expression in words, e.g. "35,000 + 7,000 × (people in household − 3)". */
export function describeExpression(src: ExprSource, p: Program): string {
  const node = parse(src);
  return node !== undefined ? wordNode(node, p) : String(src);
}

function leftmost(node: ExprNode): ExprNode {
  let n = node;
  for (;;) {
    if (n.kind === 'bin') n = n.left;
    else return n;
  }
}

/** The compared quantity: "its annual household income (USD)", "its income ÷ people in household". */
function subject(src: ExprSource, p: Program): string {
  const node = parse(src);
  if (node === undefined) return String(src);
  if (node.kind === 'var') {
    const v = findVariable(p, node.key);
    const unit = v?.unit !== undefined && v.unit.trim() !== '' ? ` (${v.unit})` : '';
    return `its ${variableName(p, node.key)}${unit}`;
  }
  const text = wordNode(node, p);
  return leftmost(node).kind === 'var' ? `its ${text}` : text;
}

function lookupWords(l: LookupLimit, p: Program): string {
  const by = findVariable(p, l.by);
  const entries = Object.keys(l.table).map((key, order) => {
    const labelled = by?.values?.find((d) => typeof d === 'object' && d.label === key);
    const value = labelled !== undefined && typeof labelled === 'object' ? labelled.value : Number(key);
    const shown = typeof labelled === 'object' ? labelled.label
      : Number.isFinite(value) ? (valueLabel(by, value) ?? formatAmount(value)) : key;
    return { value: Number.isFinite(value) ? value : Infinity, order, text: `${shown}: ${describeExpression(l.table[key]!, p)}` };
  });
  entries.sort((a, b) => a.value - b.value || a.order - b.order);
  const parts = entries.map((e) => e.text);
  if (l.else !== undefined) parts.push(`otherwise ${describeExpression(l.else, p)}`);
  return `the limit by ${variableName(p, l.by)} (${parts.join('; ')})`;
}

function limitWords(c: Extract<Condition, { op: Comparator }>, p: Program): string {
  const limit = c.limit;
  if (typeof limit === 'object' && limit !== null) return lookupWords(limit, p);
  const valueNode = parse(c.value);
  if (valueNode?.kind === 'var' && typeof limit === 'number') {
    const label = valueLabel(findVariable(p, valueNode.key), limit);
    if (label !== undefined) return label;
  }
  return describeExpression(limit, p);
}

// ---- Conditions ------------------------------------------------------------------------------------

const isCompound = (c: Condition): boolean =>
  ('all' in c && c.all.length > 1) || ('any' in c && c.any.length > 1) || 'atLeast' in c;

/** Children of a list; compound children are bracketed where the list would otherwise blur. */
function children(list: Condition[], p: Program, alwaysBracket: boolean): string[] {
  return list.map((child, i) => {
    const text = describeCondition(child, p);
    const last = i === list.length - 1;
    return isCompound(child) && (alwaysBracket || !last) ? `(${text})` : text;
  });
}

/** One condition in words, without the leading "A household is eligible if". */
export function describeCondition(c: Condition, p: Program): string {
  const text = conditionWords(c, p);
  const label = (c as { label?: unknown }).label;
  return typeof label === 'string' && label.trim() !== '' ? `${text} (“${label}”)` : text;
}

function conditionWords(c: Condition, p: Program): string {
  if ('all' in c) {
    const parts = children(c.all, p, false);
    if (parts.length <= 1) return parts.join('');
    return `${parts.slice(0, -1).join(', ')}, and ${parts[parts.length - 1]}`;
  }
  if ('any' in c) {
    if (c.any.length <= 1) return children(c.any, p, false).join('');
    if (c.any.length === 2) {
      const [a, b] = children(c.any, p, false);
      return `either ${a}, or ${b}`;
    }
    return `at least one of: ${children(c.any, p, true).join('; ')}`;
  }
  if ('atLeast' in c) return `at least ${c.atLeast} of these: ${children(c.of, p, true).join('; ')}`;
  if ('not' in c) {
    const inner = describeCondition(c.not, p);
    return `it is not the case that ${isCompound(c.not) ? `(${inner})` : inner}`;
  }
  if ('in' in c) {
    const v = findVariable(p, c.value);
    const shown = c.in.map((item) => {
      if (typeof item === 'number') return valueLabel(v, item) ?? formatAmount(item);
      const n = Number(item);
      return /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(item) ? (valueLabel(v, n) ?? formatAmount(n)) : item;
    });
    return `its ${variableName(p, c.value)} is ${listWithOr(shown)}`;
  }
  return `${subject(c.value, p)} ${COMPARATOR_WORDS[c.op] ?? c.op} ${limitWords(c, p)}`;
}

// ---- Offer and program -------------------------------------------------------------------------------

/** "Eligible households are offered the benefit with probability 60% (a lottery); the others are never offered." */
export function describeOffer(o: Offer, unit = 'unit'): string {
  const who = capitalize(`eligible ${plural(unit)}`);
  const eligible = o.ifEligible === 1 ? 'are always offered the benefit'
    : o.ifEligible === 0 ? 'are never offered the benefit'
      : `are offered the benefit with probability ${formatPercent(o.ifEligible)} (a lottery)`;
  const others = o.ifIneligible === 0 ? 'the others are never offered'
    : o.ifIneligible === 1 ? 'the others are always offered'
      : `the others are offered it with probability ${formatPercent(o.ifIneligible)}`;
  return `${who} ${eligible}; ${others}.`;
}

/** The whole program: who is eligible, and how eligibility becomes an offer. */
export function describeProgram(p: Program): string {
  const unit = p.unit !== undefined && p.unit.trim() !== '' ? p.unit.trim() : 'unit';
  const who = capitalize(`${article(unit)} ${unit}`);
  return `${who} is eligible if ${describeCondition(p.rule, p)}. ${describeOffer(p.offer, unit)}`;
}
