// Validation of an eligibility program (study file format 1, `program` object).
// Reports every problem at once, each with its JSON path and one sentence saying what is wrong
// and what to do. Never throws, whatever the input (cyclic, huge, exotic objects): the walk is
// bounded by the program's grammar, by depth and size limits, and by a work budget.

import { IDENTIFIER, evaluateExpression, exprFromSource, variablesIn } from './expression.ts';
import { containsZero, intervalOf, type Interval } from './interval.ts';
import {
  closest, describeGiven as given, unknownFieldProblems, fieldPath, getOwn as get, hasOwn as has, isPlainObject, quoteText as quote, type Obj,
} from './json-read.ts';
import type {
  Checked, Comparator, Condition, ExprNode, ExprSource, LookupLimit, Offer, Problem, Program, Variable,
} from './types.ts';

// ---- Limits (guards against abuse, far beyond any real program) ---------------------------

export const MAX_CONDITION_DEPTH = 32;
export const MAX_CONDITIONS = 10_000;
export const MAX_VARIABLES = 1_000;
export const MAX_LIST_LENGTH = 10_000;
export const MAX_PROBLEMS = 200;
/**
 * Expression nodes evaluated (over intervals) to prove divisors non-zero, per program. Past it,
 * further proofs are skipped (nothing is reported): a guard against inputs built to be slow.
 */
const DIVISION_WORK_BUDGET = 2_000_000;
const MAX_DISCRETE_COMBINATIONS = 256;
const BISECTION_DEPTH = 4;

const COMPARATORS: readonly Comparator[] = ['<', '<=', '>', '>=', '==', '!='];
const OPERATOR_SYNONYMS: Record<string, Comparator> = {
  '=<': '<=', '=>': '>=', '=': '==', '===': '==', '!==': '!=', '<>': '!=', '=!': '!=',
  '≤': '<=', '≥': '>=', '≠': '!=', '⩽': '<=', '⩾': '>=',
  lt: '<', le: '<=', lte: '<=', gt: '>', ge: '>=', gte: '>=', eq: '==', ne: '!=', neq: '!=',
};
const TYPE_SYNONYMS: Record<string, 'continuous' | 'discrete'> = {
  numeric: 'continuous', number: 'continuous', float: 'continuous', real: 'continuous', double: 'continuous',
  categorical: 'discrete', category: 'discrete', integer: 'discrete', int: 'discrete', count: 'discrete',
  binary: 'discrete', boolean: 'discrete', flag: 'discrete', factor: 'discrete', ordinal: 'discrete',
};

const PROGRAM_FIELDS = ['name', 'unit', 'variables', 'rule', 'offer'];
const VARIABLE_FIELDS = ['key', 'label', 'type', 'column', 'unit', 'scale', 'range', 'values'];
const VALUE_FIELDS = ['value', 'label'];
const OFFER_FIELDS = ['ifEligible', 'ifIneligible'];
const LOOKUP_FIELDS = ['by', 'table', 'else'];
const CONDITION_FORMS = {
  all: ['all'],
  any: ['any'],
  atLeast: ['atLeast', 'of'],
  not: ['not'],
  comparison: ['value', 'op', 'limit'],
  membership: ['value', 'in'],
} as const;
type FormName = keyof typeof CONDITION_FORMS;
const CONDITION_FIELDS = ['all', 'any', 'atLeast', 'of', 'not', 'value', 'op', 'limit', 'in', 'label'];

// ---- Context --------------------------------------------------------------------------------

interface DiscreteValue { value: number; label?: string }

interface VarInfo {
  key: string;
  path: string;
  /** The variable's label, for messages in form words. */
  label?: string;
  type?: 'continuous' | 'discrete';
  range?: [number, number];
  values?: DiscreteValue[];
}

interface Ctx {
  problems: Problem[];
  overflow: number;
  vars: Map<string, VarInfo>;
  conditionsSeen: number;
  conditionLimitReported: boolean;
  divisionWork: number;
  /** False when the variables list itself is unusable: unknown-key problems would only be noise. */
  variablesUsable: boolean;
  /** Checked expressions by source and restriction: a formula repeated many times is checked once. */
  expressionCache: Map<string, { messages: string[]; used: Set<string> | undefined }>;
  /**
   * Messages for the app's forms rather than the study file: fields named as the forms name them,
   * no JSON examples or paths; a variable's data column may still be unchosen (it is chosen later,
   * with the data).
   */
  forms: boolean;
}

export interface ValidateOptions {
  /** Word the messages for the app's forms (see Ctx.forms). */
  forms?: boolean;
}

/** The file's words or the form's words, as the context asks. */
const say = (ctx: Ctx, file: string, form: string): string => (ctx.forms ? form : file);
/** How a discrete variable is named in form words. */
const named = (v: VarInfo): string => v.label ?? v.key;

function report(ctx: Ctx, path: string, message: string): void {
  if (ctx.problems.length < MAX_PROBLEMS) ctx.problems.push({ path, message });
  else ctx.overflow += 1;
}

// ---- Safe reading of untrusted values -------------------------------------------------------


const indexPath = (base: string, i: number): string => `${base}[${i}]`;

function formatNumberList(values: number[], max = 8): string {
  const shown = values.slice(0, max).map(String).join(', ');
  return values.length > max ? `${shown}, …` : shown;
}

function unknownFields(ctx: Ctx, o: Obj, path: string, allowed: readonly string[], what: string): void {
  for (const p of unknownFieldProblems(o, path, allowed, what)) report(ctx, p.path, p.message);
}

function requireField(ctx: Ctx, o: Obj, path: string, key: string, what: string, example: string, form?: string): unknown {
  if (!has(o, key) || get(o, key) === undefined) {
    report(ctx, fieldPath(path, key), form !== undefined && ctx.forms ? form : `${what} is missing its "${key}": ${example}`);
    return undefined;
  }
  return get(o, key);
}

function checkText(ctx: Ctx, v: unknown, path: string, what: string, formEmpty?: string): v is string {
  if (typeof v !== 'string') {
    report(ctx, path, `${what} must be text in quotes; found ${given(v)}`);
    return false;
  }
  if (v.trim() === '') {
    report(ctx, path, formEmpty !== undefined && ctx.forms ? formEmpty : `${what} is empty: write it out`);
    return false;
  }
  return true;
}

/** Arrays are checked for length before any element is touched (sparse giants never hang us). */
function checkList(ctx: Ctx, v: unknown, path: string, what: string, example: string, formEmpty?: string): v is unknown[] {
  if (!Array.isArray(v)) {
    report(ctx, path, `${what} must be a list in square brackets, e.g. ${example}; found ${given(v)}`);
    return false;
  }
  if (v.length === 0) {
    report(ctx, path, formEmpty !== undefined && ctx.forms ? formEmpty : `${what} is an empty list: give at least one entry, e.g. ${example}`);
    return false;
  }
  if (v.length > MAX_LIST_LENGTH) {
    report(ctx, path, `${what} has ${v.length} entries; the limit is ${MAX_LIST_LENGTH}`);
    return false;
  }
  return true;
}

// ---- Discrete values ------------------------------------------------------------------------

const NUMERIC_TEXT = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** What a table key or an `in` entry written as text means for a discrete variable. */
function resolveDiscrete(text: string, v: VarInfo, forms = false): { value: number } | { error: string } {
  const byLabel = v.values?.find((d) => d.label === text);
  if (byLabel !== undefined) return { value: byLabel.value };
  if (NUMERIC_TEXT.test(text)) {
    const value = Number(text);
    if (!Number.isFinite(value)) return { error: `${quote(text)} is too large to be a value of "${v.key}"` };
    return checkDeclared(value, v, forms);
  }
  const labels = (v.values ?? []).flatMap((d) => (d.label === undefined ? [] : [d.label]));
  const guess = closest(text, labels);
  if (guess !== undefined) return { error: forms ? `${quote(text)} is not a value of ${named(v)}: did you mean ${guess}?` : `${quote(text)} is not a value of "${v.key}": did you mean the label "${guess}"?` };
  if (forms) return { error: `${quote(text)} is not a value of ${named(v)}: type one of its values${labels.length > 0 ? ` or labels (${labels.slice(0, 6).join(', ')})` : ', such as 1'}` };
  const hint = labels.length > 0
    ? `write one of its values as a number in quotes ("1") or one of its labels (${labels.slice(0, 6).map((l) => `"${l}"`).join(', ')})`
    : `write one of its values as a number in quotes, e.g. "1"`;
  return { error: `${quote(text)} is not a value of "${v.key}": ${hint}` };
}

function checkDeclared(value: number, v: VarInfo, forms = false): { value: number } | { error: string } {
  if (v.values !== undefined && !v.values.some((d) => d.value === value)) {
    if (forms) return { error: `${value} is not one of the values listed for ${named(v)} (${formatNumberList(v.values.map((d) => d.value))}): use a listed value or add it to the variable's values` };
    return {
      error: `${value} is not one of the values declared for "${v.key}" (${formatNumberList(v.values.map((d) => d.value))}, see ${v.path}.values): use a declared value or add it there`,
    };
  }
  return { value };
}

// ---- Variables --------------------------------------------------------------------------------

function suggestIdentifier(key: string): string {
  let s = key.trim().replace(/[^A-Za-z0-9_]+/g, '_').replace(/^_+|_+$/g, '');
  if (s === '') s = 'x';
  if (/^[0-9]/.test(s)) s = `_${s}`;
  if (s === 'min' || s === 'max') s = `${s}_value`;
  return s;
}

function checkVariable(ctx: Ctx, v: unknown, path: string): VarInfo | undefined {
  const what = 'variable';
  if (!isPlainObject(v)) {
    report(ctx, path, `each variable must be an object such as {"key": "income", "label": "Annual income", "type": "continuous", "column": "INCOME"}; found ${given(v)}`);
    return undefined;
  }
  unknownFields(ctx, v, path, VARIABLE_FIELDS, 'a variable');
  let info: VarInfo | undefined;
  const key = requireField(ctx, v, path, 'key', `this ${what}`, 'give it a short key used in formulas, e.g. "income"', 'Type a short name used in calculations, such as income.');
  if (key !== undefined) {
    if (typeof key !== 'string') {
      report(ctx, fieldPath(path, 'key'), `a variable key must be text in quotes, e.g. "income"; found ${given(key)}`);
    } else if (key.trim() === '' && ctx.forms) {
      report(ctx, fieldPath(path, 'key'), 'Type a short name used in calculations, such as income.');
    } else if (!IDENTIFIER.test(key)) {
      report(ctx, fieldPath(path, 'key'), say(ctx,
        `the key ${quote(key, 40)} cannot be used in formulas: start with a letter or _, then only letters, digits and _ (e.g. "${suggestIdentifier(key)}")`,
        `The short name ${quote(key, 40)} cannot be used in calculations: start with a letter, then only letters, digits and _ (such as ${suggestIdentifier(key)}).`));
    } else if (key === 'min' || key === 'max') {
      report(ctx, fieldPath(path, 'key'), say(ctx, `"${key}" is the name of a formula function: choose another key, e.g. "${key}_value"`,
        `${key} is a calculation word: choose another short name, such as ${key}_value.`));
    } else {
      info = { key, path };
    }
  }
  const label = requireField(ctx, v, path, 'label', `this ${what}`, 'give it the words used for it in reports, e.g. "Annual household income"', 'Type the words the memo uses for it, such as Annual household income.');
  if (label !== undefined && checkText(ctx, label, fieldPath(path, 'label'), 'a variable label', 'Type the words the memo uses for it, such as Annual household income.') && info !== undefined) info.label = label;
  // In the app the column is chosen with the data, after the rule: an unchosen one is not a problem of the rule.
  const column = ctx.forms && (get(v, 'column') === undefined || get(v, 'column') === '') ? undefined
    : requireField(ctx, v, path, 'column', `this ${what}`, 'give the name of the data column that holds it, e.g. "HH_INCOME"');
  if (column !== undefined) checkText(ctx, column, fieldPath(path, 'column'), 'a column name');
  if (has(v, 'unit') && get(v, 'unit') !== undefined) checkText(ctx, get(v, 'unit'), fieldPath(path, 'unit'), 'a unit');

  const typeValue = requireField(ctx, v, path, 'type', `this ${what}`,
    'write "continuous" (an amount the formula thresholds, such as income) or "discrete" (a category or count held fixed, such as household size)');
  let type: 'continuous' | 'discrete' | undefined;
  if (typeValue === 'continuous' || typeValue === 'discrete') {
    type = typeValue;
  } else if (typeValue !== undefined) {
    const text = typeof typeValue === 'string' ? typeValue : '';
    const guess = TYPE_SYNONYMS[text.toLowerCase()] ?? closest(text, ['continuous', 'discrete']);
    const hint = guess !== undefined ? ` — did you mean "${guess}"?` : '';
    report(ctx, fieldPath(path, 'type'),
      `the type must be "continuous" (an amount the formula thresholds) or "discrete" (a category or count held fixed); found ${given(typeValue)}${hint}`);
  }
  if (info !== undefined && type !== undefined) info.type = type;

  const scale = get(v, 'scale');
  if (scale !== undefined) {
    if (type === 'discrete') {
      report(ctx, fieldPath(path, 'scale'), 'a scale applies only to continuous variables (discrete variables are held fixed in the neighbourhood): remove it');
    } else if (typeof scale === 'string' && NUMERIC_TEXT.test(scale.trim())) {
      report(ctx, fieldPath(path, 'scale'), `write the scale as a number without quotes (${scale.trim()})`);
    } else if (typeof scale !== 'number' || !Number.isFinite(scale) || scale <= 0) {
      report(ctx, fieldPath(path, 'scale'), say(ctx,
        `the scale must be a positive number (the distance along this variable counted as one unit, e.g. 10000 for income in dollars); found ${given(scale)}`,
        `Type the scale as a positive number (the distance counted as one step, such as 10000 for income in dollars), or leave it empty to use the standard deviation.`));
    }
  }

  const range = get(v, 'range');
  if (range !== undefined) {
    if (type === 'discrete') {
      report(ctx, fieldPath(path, 'range'), 'a range applies to continuous variables; for a discrete variable list its possible values in "values"');
    } else if (!Array.isArray(range) || range.length !== 2 ||
               typeof range[0] !== 'number' || typeof range[1] !== 'number' ||
               !Number.isFinite(range[0]) || !Number.isFinite(range[1])) {
      report(ctx, fieldPath(path, 'range'), `the range must be two numbers [smallest, largest], e.g. [0, 500000]; found ${given(range)}`);
    } else if (range[0] >= range[1]) {
      report(ctx, fieldPath(path, 'range'), `the range [${range[0]}, ${range[1]}] must start with the smaller number and have some width`);
    } else if (info !== undefined && type === 'continuous') {
      info.range = [range[0], range[1]];
    }
  }

  const values = get(v, 'values');
  if (values !== undefined) {
    if (type === 'continuous') {
      report(ctx, fieldPath(path, 'values'), 'a list of values applies to discrete variables; for a continuous variable give a "range": [smallest, largest]');
    } else {
      const declared = checkValues(ctx, values, fieldPath(path, 'values'));
      if (declared !== undefined && info !== undefined) info.values = declared;
    }
  }
  return info;
}

function checkValues(ctx: Ctx, values: unknown, path: string): DiscreteValue[] | undefined {
  if (!checkList(ctx, values, path, '"values"', '[1, 2, 3] or [{"value": 1, "label": "North"}]', 'List the possible values, separated by commas, such as 1, 2, 3 or 1=North.')) return undefined;
  const out: DiscreteValue[] = [];
  let ok = true;
  const seenValue = new Map<number, number>();
  const seenLabel = new Map<string, number>();
  for (let i = 0; i < values.length; i += 1) {
    const item: unknown = values[i];
    const p = indexPath(path, i);
    let entry: DiscreteValue | undefined;
    if (typeof item === 'number' && Number.isFinite(item)) {
      entry = { value: item };
    } else if (isPlainObject(item)) {
      unknownFields(ctx, item, p, VALUE_FIELDS, 'a declared value');
      const value = requireField(ctx, item, p, 'value', 'this declared value', 'write {"value": 1, "label": "North"}');
      const label = requireField(ctx, item, p, 'label', 'this declared value', 'write {"value": 1, "label": "North"}');
      const valueOk = typeof value === 'number' && Number.isFinite(value);
      if (value !== undefined && !valueOk) report(ctx, fieldPath(p, 'value'), `a declared value must be a number; found ${given(value)}`);
      const labelOk = label !== undefined && checkText(ctx, label, fieldPath(p, 'label'), 'a value label');
      if (valueOk && labelOk) entry = { value: value as number, label: label as string };
    } else {
      report(ctx, say(ctx, p, path), say(ctx, `each declared value must be a number or {"value": 1, "label": "North"}; found ${given(item)}`,
        `${typeof item === 'string' ? quote(item, 40) : given(item)} is not a value: write numbers, or number=label such as 1=Single.`));
    }
    if (entry === undefined) { ok = false; continue; }
    const firstValue = seenValue.get(entry.value);
    if (firstValue !== undefined) {
      report(ctx, say(ctx, p, path), say(ctx, `the value ${entry.value} is already declared at ${indexPath(path, firstValue)}: list each value once`, `${entry.value} is listed twice: list each value once.`));
      ok = false;
    } else seenValue.set(entry.value, i);
    if (entry.label !== undefined) {
      const firstLabel = seenLabel.get(entry.label);
      if (firstLabel !== undefined) {
        report(ctx, say(ctx, fieldPath(p, 'label'), path), say(ctx, `the label ${quote(entry.label, 40)} is already used at ${indexPath(path, firstLabel)}: give each value its own label`,
          `The label ${quote(entry.label, 40)} is used twice: give each value its own label.`));
        ok = false;
      } else seenLabel.set(entry.label, i);
      if (NUMERIC_TEXT.test(entry.label) && Number(entry.label) !== entry.value) {
        report(ctx, say(ctx, fieldPath(p, 'label'), path),
          `the label ${quote(entry.label)} reads as the number ${Number(entry.label)} but labels the value ${entry.value}: use words, so table keys stay unambiguous`);
        ok = false;
      }
    }
    out.push(entry);
  }
  return ok ? out : undefined;
}

// ---- Expressions ------------------------------------------------------------------------------

/** Per-expression restriction of a discrete variable's values (inside a lookup's table or else). */
type Restriction = Map<string, number[]>;

function checkExpression(ctx: Ctx, src: unknown, path: string, restrict?: Restriction): Set<string> | undefined {
  if (ctx.forms && typeof src === 'string' && src.trim() === '') {
    report(ctx, path, path.endsWith('.value') ? 'Choose what is compared.' : 'Type a limit.');
    return undefined;
  }
  if (typeof src !== 'number' && typeof src !== 'string') return checkExpressionUncached(ctx, src, path, restrict);
  const restriction = restrict === undefined ? '' : JSON.stringify([...restrict]);
  const key = `${typeof src}:${String(src)}|${restriction}`;
  let cached = ctx.expressionCache.get(key);
  if (cached === undefined) {
    const sink: Ctx = { ...ctx, problems: [], overflow: 0 };
    const used = checkExpressionUncached(sink, src, path, restrict);
    ctx.divisionWork = sink.divisionWork;
    cached = { messages: sink.problems.map((p) => p.message), used };
    ctx.expressionCache.set(key, cached);
  }
  for (const message of cached.messages) report(ctx, path, message);
  return cached.used;
}

function checkExpressionUncached(ctx: Ctx, src: unknown, path: string, restrict?: Restriction): Set<string> | undefined {
  if (typeof src !== 'number' && typeof src !== 'string') {
    report(ctx, path, `expected a number or a formula in quotes (e.g. "35000 + 7000 * (size - 3)"); found ${given(src)}`);
    return undefined;
  }
  const parsed = exprFromSource(src as ExprSource);
  if (!parsed.ok) {
    for (const e of parsed.errors) {
      report(ctx, path, typeof src === 'string' ? `in the formula ${quote(src)}: ${e.message}` : e.message);
    }
    return undefined;
  }
  const used = variablesIn(parsed.node);
  let known = true;
  for (const key of used) {
    if (ctx.vars.has(key)) continue;
    known = false;
    if (!ctx.variablesUsable) continue;
    const where = typeof src === 'string' ? positionOf(parsed.node, key) : 0;
    const guess = closest(key, ctx.vars.keys());
    const hint = guess !== undefined
      ? `did you mean "${guess}"?`
      : ctx.vars.size > 0 ? `the declared variables are: ${[...ctx.vars.keys()].slice(0, 12).join(', ')}` : say(ctx, 'declare it in program.variables', 'add it under “Variables the rule reads”');
    report(ctx, path, say(ctx, `"${key}" (at position ${where + 1} in ${quote(String(src))}) is not a declared variable: ${hint}`,
      `${key === String(src).trim() ? `“${key}” is not a number or a variable` : `“${key}” (at position ${where + 1} in ${quote(String(src))}) is not a variable of the rule`}: ${guess !== undefined ? `did you mean ${guess}? ` : ''}type a number${ctx.vars.size > 0 ? `, or a calculation with ${[...ctx.vars.keys()].slice(0, 12).join(', ')}` : ''}.`));
  }
  if (known) checkDivisions(ctx, parsed.node, String(src), path, restrict ?? new Map());
  return used;
}

function positionOf(node: ExprNode, key: string): number {
  const stack: ExprNode[] = [node];
  let best = Infinity;
  while (stack.length > 0) {
    const n = stack.pop()!;
    if (n.kind === 'var' && n.key === key) best = Math.min(best, n.start);
    else if (n.kind === 'neg') stack.push(n.arg);
    else if (n.kind === 'bin') stack.push(n.left, n.right);
    else if (n.kind === 'call') stack.push(...n.args);
  }
  return Number.isFinite(best) ? best : 0;
}

// ---- Division by zero --------------------------------------------------------------------------

interface Affine { constant: number; coefficients: Map<string, number> }

/** The expression as c + Σ aᵢ·xᵢ when it is affine (so its range over a box is exact), else undefined. */
function affineForm(node: ExprNode): Affine | undefined {
  switch (node.kind) {
    case 'num': return { constant: node.value, coefficients: new Map() };
    case 'var': return { constant: 0, coefficients: new Map([[node.key, 1]]) };
    case 'neg': { const a = affineForm(node.arg); return a && scaleAffine(a, -1); }
    case 'call': return undefined;
    case 'bin': {
      const l = affineForm(node.left);
      const r = affineForm(node.right);
      if (l === undefined || r === undefined) return undefined;
      if (node.op === '+' || node.op === '-') {
        const sign = node.op === '+' ? 1 : -1;
        const coefficients = new Map(l.coefficients);
        for (const [k, c] of r.coefficients) coefficients.set(k, (coefficients.get(k) ?? 0) + sign * c);
        return { constant: l.constant + sign * r.constant, coefficients };
      }
      const isConstant = (a: Affine): boolean => [...a.coefficients.values()].every((c) => c === 0);
      if (node.op === '*') {
        if (isConstant(l)) return scaleAffine(r, l.constant);
        if (isConstant(r)) return scaleAffine(l, r.constant);
        return undefined;
      }
      if (isConstant(r) && r.constant !== 0) return scaleAffine(l, 1 / r.constant);
      return undefined;
    }
  }
}

function scaleAffine(a: Affine, factor: number): Affine {
  const coefficients = new Map<string, number>();
  for (const [k, c] of a.coefficients) coefficients.set(k, c * factor);
  return { constant: a.constant * factor, coefficients };
}

function divisionsIn(node: ExprNode): Array<Extract<ExprNode, { kind: 'bin' }>> {
  const out: Array<Extract<ExprNode, { kind: 'bin' }>> = [];
  const stack: ExprNode[] = [node];
  while (stack.length > 0) {
    const n = stack.pop()!;
    if (n.kind === 'bin') { if (n.op === '/') out.push(n); stack.push(n.left, n.right); }
    else if (n.kind === 'neg') stack.push(n.arg);
    else if (n.kind === 'call') stack.push(...n.args);
  }
  return out.sort((a, b) => a.start - b.start);
}

function checkDivisions(ctx: Ctx, node: ExprNode, text: string, path: string, restrict: Restriction): void {
  for (const division of divisionsIn(node)) {
    const divisor = division.right;
    const divisorText = divisor.end <= text.length && divisor.end > divisor.start
      ? text.slice(divisor.start, divisor.end).trim() : text;
    const used = [...variablesIn(divisor)];
    const affine = affineForm(divisor);
    const alwaysZero = used.length === 0
      ? evaluateExpression(divisor, () => NaN) === 0
      : affine !== undefined && affine.constant === 0 && [...affine.coefficients.values()].every((c) => c === 0);
    if (alwaysZero) {
      report(ctx, path, `the formula ${quote(text)} divides by ${quote(divisorText)}, which is always 0: rewrite the division`);
      continue;
    }
    if (used.length === 0) continue;
    const zeroAt = zeroWithinDomains(ctx, divisor, affine, used, restrict);
    if (zeroAt !== undefined) {
      report(ctx, path, `the formula ${quote(text)} can divide by zero: ${quote(divisorText)} can be 0 ${zeroAt}; rewrite it so the divisor cannot be 0, or narrow the declared range or values`);
    }
  }
}

/**
 * Where the divisor can be 0 over the declared domains, in words, or undefined when it cannot
 * (or when some variable has no declared domain, so nothing can be said). Discrete variables
 * are enumerated; continuous ones are boxes, bounded by interval arithmetic (Moore 1966) and
 * refined by bisection; affine divisors get their exact range.
 */
function zeroWithinDomains(ctx: Ctx, divisor: ExprNode, affine: Affine | undefined, used: string[], restrict: Restriction): string | undefined {
  const discrete: Array<{ key: string; values: number[] }> = [];
  const continuous = new Map<string, Interval>();
  for (const key of used) {
    const v = ctx.vars.get(key);
    if (v?.type === 'discrete') {
      const values = restrict.get(key) ?? v.values?.map((d) => d.value);
      if (values === undefined) return undefined;
      discrete.push({ key, values });
    } else if (v?.type === 'continuous') {
      if (v.range === undefined) return undefined;
      continuous.set(key, { lo: v.range[0], hi: v.range[1] });
    } else return undefined;
  }
  const combinations = discrete.reduce((n, d) => n * d.values.length, 1);
  const enumerate = combinations <= MAX_DISCRETE_COMBINATIONS;
  const boxes: Array<Map<string, Interval>> = [];
  if (enumerate) {
    let partial: Array<Map<string, Interval>> = [new Map(continuous)];
    for (const d of discrete) {
      const next: Array<Map<string, Interval>> = [];
      for (const box of partial) for (const value of d.values) next.push(new Map(box).set(d.key, { lo: value, hi: value }));
      partial = next;
    }
    boxes.push(...partial);
  } else {
    const hull = new Map(continuous);
    for (const d of discrete) hull.set(d.key, { lo: Math.min(...d.values), hi: Math.max(...d.values) });
    boxes.push(hull);
  }
  const cost = affine !== undefined ? 2 * affine.coefficients.size + 1 : nodeCount(divisor);
  for (const box of boxes) {
    if (ctx.divisionWork > DIVISION_WORK_BUDGET) return undefined;
    if (affine !== undefined) ctx.divisionWork += cost;
    const possible = affine !== undefined ? containsZero(affineRange(affine, box)) : mayBeZero(ctx, divisor, box, BISECTION_DEPTH, cost);
    if (possible) return describeBox(box, discrete.map((d) => d.key), [...continuous.keys()], ctx);
  }
  return undefined;
}

function affineRange(a: Affine, box: Map<string, Interval>): Interval {
  // Each variable occurs once, so the interval sum is the exact range up to rounding (Moore 1966, §3.1).
  const node: ExprNode = [...a.coefficients].reduce<ExprNode>(
    (acc, [key, c]) => ({
      kind: 'bin', op: '+', left: acc, start: 0, end: 0,
      right: { kind: 'bin', op: '*', left: { kind: 'num', value: c, start: 0, end: 0 }, right: { kind: 'var', key, start: 0, end: 0 }, start: 0, end: 0 },
    }),
    { kind: 'num', value: a.constant, start: 0, end: 0 },
  );
  return intervalOf(node, (k) => box.get(k) ?? { lo: -Infinity, hi: Infinity });
}

function mayBeZero(ctx: Ctx, node: ExprNode, box: Map<string, Interval>, depthLeft: number, cost: number): boolean {
  ctx.divisionWork += cost;
  const range = intervalOf(node, (k) => box.get(k) ?? { lo: -Infinity, hi: Infinity });
  if (!containsZero(range)) return false;
  if (depthLeft === 0 || ctx.divisionWork > DIVISION_WORK_BUDGET) return true;
  let widest: string | undefined;
  let width = 0;
  for (const [k, i] of box) if (i.hi - i.lo > width) { widest = k; width = i.hi - i.lo; }
  if (widest === undefined) return true;
  const i = box.get(widest)!;
  const mid = i.lo + (i.hi - i.lo) / 2;
  return mayBeZero(ctx, node, new Map(box).set(widest, { lo: i.lo, hi: mid }), depthLeft - 1, cost) ||
         mayBeZero(ctx, node, new Map(box).set(widest, { lo: mid, hi: i.hi }), depthLeft - 1, cost);
}

function nodeCount(node: ExprNode): number {
  let n = 0;
  const stack: ExprNode[] = [node];
  while (stack.length > 0) {
    const x = stack.pop()!;
    n += 1;
    if (x.kind === 'neg') stack.push(x.arg);
    else if (x.kind === 'bin') stack.push(x.left, x.right);
    else if (x.kind === 'call') stack.push(...x.args);
  }
  return n;
}

function describeBox(box: Map<string, Interval>, discreteKeys: string[], continuousKeys: string[], ctx: Ctx): string {
  const parts: string[] = [];
  for (const k of discreteKeys) {
    const i = box.get(k)!;
    parts.push(i.lo === i.hi ? `${k} is ${i.lo}` : `${k} is between ${i.lo} and ${i.hi}`);
  }
  for (const k of continuousKeys) {
    const r = ctx.vars.get(k)?.range;
    if (r !== undefined) parts.push(`${k} is in its declared range [${r[0]}, ${r[1]}]`);
  }
  return `when ${parts.join(' and ')}`;
}

// ---- Conditions --------------------------------------------------------------------------------

const FORM_EXAMPLE =
  'write one of {"all": [...]}, {"any": [...]}, {"atLeast": 2, "of": [...]}, {"not": {...}}, ' +
  'a comparison {"value": "income", "op": "<=", "limit": 30000} or a membership {"value": "region", "in": [1, 4]}';

function formsOf(c: Obj): FormName[] {
  const forms: FormName[] = [];
  if (has(c, 'all')) forms.push('all');
  if (has(c, 'any')) forms.push('any');
  if (has(c, 'atLeast') || has(c, 'of')) forms.push('atLeast');
  if (has(c, 'not')) forms.push('not');
  if (has(c, 'op') || has(c, 'limit')) forms.push('comparison');
  if (has(c, 'in')) forms.push('membership');
  return forms;
}

/** Checks one condition; returns the variable keys it reads (for the "uses no variable" check). */
function checkCondition(ctx: Ctx, c: unknown, path: string, depth: number): Set<string> {
  const used = new Set<string>();
  if (depth > MAX_CONDITION_DEPTH) {
    report(ctx, path, `conditions are nested more than ${MAX_CONDITION_DEPTH} levels deep here (or a condition contains itself): simplify the rule`);
    return used;
  }
  ctx.conditionsSeen += 1;
  if (ctx.conditionsSeen > MAX_CONDITIONS) {
    if (!ctx.conditionLimitReported) {
      report(ctx, path, `the rule has more than ${MAX_CONDITIONS} conditions: simplify it`);
      ctx.conditionLimitReported = true;
    }
    return used;
  }
  if (!isPlainObject(c)) {
    const hint = Array.isArray(c) ? '; to require all of them, write {"all": [...]}' : '';
    report(ctx, path, `a condition must be an object; found ${given(c)}${hint}: ${FORM_EXAMPLE}`);
    return used;
  }
  const forms = formsOf(c);
  unknownFields(ctx, c, path, CONDITION_FIELDS, 'a condition');
  if (forms.length === 0) {
    if (has(c, 'value')) {
      report(ctx, path, 'a condition with a "value" needs an "op" and a "limit" (a comparison) or an "in" list (a membership)');
    } else {
      report(ctx, path, `this condition has none of the known forms: ${FORM_EXAMPLE}`);
    }
    return used;
  }
  if (forms.length > 1) {
    const keys = forms.map((f) => CONDITION_FORMS[f].filter((k) => has(c, k))[0] ?? f);
    report(ctx, path,
      `this condition mixes ${keys.map((k) => `"${k}"`).join(' and ')}; a condition has exactly one form: put each in its own condition (inside {"all": [...]} if all must hold)`);
    return used;
  }
  const label = get(c, 'label');
  if (label !== undefined) checkText(ctx, label, fieldPath(path, 'label'), 'a condition label');
  const add = (s: Set<string> | undefined): void => { if (s !== undefined) for (const k of s) used.add(k); };

  switch (forms[0]!) {
    case 'all':
    case 'any': {
      const key = forms[0] === 'all' ? 'all' : 'any';
      const list = get(c, key);
      const p = fieldPath(path, key);
      if (checkList(ctx, list, p, `"${key}"`, `{"${key}": [{"value": "age", "op": ">=", "limit": 65}, ...]}`, 'Add at least one criterion to this group.')) {
        for (let i = 0; i < list.length; i += 1) add(checkCondition(ctx, list[i], indexPath(p, i), depth + 1));
      }
      break;
    }
    case 'atLeast': {
      const k = requireField(ctx, c, path, 'atLeast', 'this "at least k of" condition', 'write {"atLeast": 2, "of": [...]}');
      const of = requireField(ctx, c, path, 'of', 'this "at least k of" condition', 'write {"atLeast": 2, "of": [...]}');
      const listOk = of !== undefined && checkList(ctx, of, fieldPath(path, 'of'), '"of"', '{"atLeast": 2, "of": [{...}, {...}, {...}]}', 'Add at least one criterion to this group.');
      if (k !== undefined) {
        if (typeof k !== 'number' || !Number.isInteger(k) || k < 1) {
          report(ctx, fieldPath(path, 'atLeast'), say(ctx, `"atLeast" must be a whole number of conditions, 1 or more; found ${given(k)}`, 'Type how many as a whole number, 1 or more.'));
        } else if (listOk && k > (of as unknown[]).length) {
          const n = (of as unknown[]).length;
          report(ctx, fieldPath(path, 'atLeast'), say(ctx,
            `"atLeast" is ${k} but "of" lists only ${n} condition${n === 1 ? '' : 's'}, so it could never hold: lower it or add conditions`,
            `“How many” is ${k} but the group has only ${n} criteri${n === 1 ? 'on' : 'a'}, so no one could qualify: lower it or add criteria.`));
        }
      }
      if (listOk) {
        const list = of as unknown[];
        for (let i = 0; i < list.length; i += 1) add(checkCondition(ctx, list[i], indexPath(fieldPath(path, 'of'), i), depth + 1));
      }
      break;
    }
    case 'not':
      add(checkCondition(ctx, get(c, 'not'), fieldPath(path, 'not'), depth + 1));
      break;
    case 'comparison':
      add(checkComparison(ctx, c, path));
      break;
    case 'membership':
      add(checkMembership(ctx, c, path));
      break;
  }
  return used;
}

function checkComparison(ctx: Ctx, c: Obj, path: string): Set<string> {
  const used = new Set<string>();
  const example = 'e.g. {"value": "income", "op": "<=", "limit": 30000}';
  const value = requireField(ctx, c, path, 'value', 'this comparison', `say what is compared, ${example}`, 'Choose what is compared.');
  const op = requireField(ctx, c, path, 'op', 'this comparison', `give one of < <= > >= == !=, ${example}`, 'Choose how it is compared.');
  const limit = requireField(ctx, c, path, 'limit', 'this comparison', `give the number or formula it is compared with, ${example}`, 'Type a limit: this criterion counts only once it has one.');
  let complete = value !== undefined && limit !== undefined;
  if (value !== undefined) {
    const vs = checkExpression(ctx, value, fieldPath(path, 'value'));
    if (vs === undefined) complete = false; else for (const k of vs) used.add(k);
  }
  if (op !== undefined && !(COMPARATORS as readonly unknown[]).includes(op)) {
    const text = typeof op === 'string' ? op.trim() : '';
    const guess = (COMPARATORS as readonly string[]).includes(text) ? text : OPERATOR_SYNONYMS[text.toLowerCase()];
    const hint = guess !== undefined ? ` — did you mean "${guess}"?` : '';
    report(ctx, fieldPath(path, 'op'), `the comparison "op" must be one of < <= > >= == != ; found ${given(op)}${hint}`);
  }
  if (limit !== undefined) {
    const ls = isPlainObject(limit)
      ? checkLookup(ctx, limit, fieldPath(path, 'limit'))
      : checkExpression(ctx, limit, fieldPath(path, 'limit'));
    if (ls === undefined) complete = false; else for (const k of ls) used.add(k);
  }
  if (complete && used.size === 0) {
    report(ctx, path, say(ctx, 'this comparison uses no variable, so it gives the same answer for every unit: compare a variable or a formula over variables',
      'This criterion uses no variable, so it gives the same answer for every unit: compare a variable, or a calculation with variables.'));
  }
  return used;
}

function checkMembership(ctx: Ctx, c: Obj, path: string): Set<string> {
  const used = new Set<string>();
  const value = requireField(ctx, c, path, 'value', 'this membership', 'name the discrete variable, e.g. {"value": "region", "in": [1, 4, 7]}');
  const list = get(c, 'in');
  let v: VarInfo | undefined;
  if (value !== undefined) {
    const p = fieldPath(path, 'value');
    if (typeof value !== 'string' || (ctx.forms && value === '')) {
      report(ctx, p, say(ctx, `"in" checks the value of one discrete variable: write its key in quotes, e.g. "region"; found ${given(value)}`, 'Choose the variable whose value is checked.'));
    } else if (!IDENTIFIER.test(value)) {
      report(ctx, p, `"in" checks the value of one discrete variable, not a formula: write just its key (found ${quote(value)}); for formulas use a comparison`);
    } else if (!ctx.vars.has(value)) {
      const guess = closest(value, ctx.vars.keys());
      if (ctx.variablesUsable) report(ctx, p, `"${value}" is not a declared variable${guess !== undefined ? `: did you mean "${guess}"?` : say(ctx, ': declare it in program.variables', ': add it under “Variables the rule reads”')}`);
    } else {
      v = ctx.vars.get(value)!;
      used.add(value);
      if (v.type === 'continuous') {
        report(ctx, p, say(ctx, `"in" lists exact values, which suits only discrete variables; "${value}" is continuous: use comparisons such as {"value": "${value}", "op": ">=", "limit": ...}`,
          `“Is one of” lists exact values, which suits only discrete variables; ${named(v)} is continuous: use a criterion with a comparison instead.`));
        v = undefined;
      } else if (v.type === undefined) v = undefined;
    }
  }
  const p = fieldPath(path, 'in');
  if (!checkList(ctx, list, p, '"in"', '{"value": "region", "in": [1, 4, 7]}', 'List at least one value, separated by commas, such as 1, 4, 7.')) return used;
  const seen = new Map<number, number>();
  for (let i = 0; i < list.length; i += 1) {
    const item: unknown = list[i];
    const ip = indexPath(p, i);
    let meaning: { value: number } | { error: string } | undefined;
    if (typeof item === 'number') {
      if (!Number.isFinite(item)) { report(ctx, ip, `${item} is not a usable value: write a finite number`); continue; }
      meaning = v !== undefined ? checkDeclared(item, v, ctx.forms) : { value: item };
    } else if (typeof item === 'string') {
      if (v !== undefined) meaning = resolveDiscrete(item, v, ctx.forms);
      else if (NUMERIC_TEXT.test(item)) meaning = { value: Number(item) };
    } else {
      report(ctx, ip, `each entry of "in" must be a value (a number) or a declared label in quotes; found ${given(item)}`);
      continue;
    }
    if (meaning === undefined) continue;
    if ('error' in meaning) { report(ctx, ip, meaning.error); continue; }
    const first = seen.get(meaning.value);
    if (first !== undefined) report(ctx, ip, say(ctx, `this entry means ${meaning.value}, already listed at ${indexPath(p, first)}: list each value once`, `${meaning.value} is listed twice: list each value once.`));
    else seen.set(meaning.value, i);
  }
  return used;
}

function checkLookup(ctx: Ctx, l: Obj, path: string): Set<string> | undefined {
  const used = new Set<string>();
  let complete = true;
  unknownFields(ctx, l, path, LOOKUP_FIELDS, 'a lookup limit');
  const example = 'e.g. {"by": "size", "table": {"1": 21000, "2": 28000}, "else": "28000 + 7000 * (size - 2)"}';
  const by = requireField(ctx, l, path, 'by', 'this lookup limit', `name the discrete variable that picks the limit, ${example}`, 'Choose the variable the limit depends on.');
  const table = requireField(ctx, l, path, 'table', 'this lookup limit', `give the limits for each value, ${example}`, 'Add at least one row to the table.');
  let v: VarInfo | undefined;
  if (by !== undefined) {
    const p = fieldPath(path, 'by');
    if (typeof by !== 'string' || (ctx.forms && by === '')) {
      report(ctx, p, say(ctx, `"by" must be the key of a discrete variable in quotes, e.g. "size"; found ${given(by)}`, 'Choose the variable the limit depends on.'));
      complete = false;
    } else if (!ctx.vars.has(by)) {
      const guess = closest(by, ctx.vars.keys());
      if (ctx.variablesUsable) report(ctx, p, `"${by}" is not a declared variable${guess !== undefined ? `: did you mean "${guess}"?` : say(ctx, ': declare it in program.variables', ': add it under “Variables the rule reads”')}`);
      complete = false;
    } else {
      used.add(by);
      const info = ctx.vars.get(by)!;
      if (info.type === 'continuous') {
        report(ctx, p, say(ctx, `a lookup picks its limit by a discrete variable; "${by}" is continuous: write the limit as a formula over "${by}" instead`,
          `A table picks its limit by a discrete variable; ${named(info)} is continuous: give the limit as a calculation with ${by} instead.`));
      } else if (info.type === 'discrete') v = info;
    }
  }
  const covered: number[] = [];
  if (table !== undefined) {
    const p = fieldPath(path, 'table');
    if (!isPlainObject(table)) {
      report(ctx, p, `the table must be an object of value: limit pairs, e.g. {"1": 21000, "2": 28000}; found ${given(table)}`);
      complete = false;
    } else {
      const keys = Object.keys(table);
      if (keys.length === 0) {
        report(ctx, p, say(ctx, 'the table is empty: give at least one value: limit pair, e.g. {"1": 21000}', 'Add at least one row to the table.'));
      } else if (keys.length > MAX_LIST_LENGTH) {
        report(ctx, p, `the table has ${keys.length} entries; the limit is ${MAX_LIST_LENGTH}`);
        complete = false;
      } else {
        const meaningOf = new Map<number, string>();
        for (const key of keys) {
          const kp = `${p}[${JSON.stringify(key)}]`;
          let restrict: Restriction | undefined;
          if (v !== undefined) {
            const meaning = resolveDiscrete(key, v, ctx.forms);
            if ('error' in meaning) {
              report(ctx, kp, say(ctx, `table key ${meaning.error}`, `In the table, ${meaning.error}.`));
            } else {
              const first = meaningOf.get(meaning.value);
              if (first !== undefined) {
                report(ctx, kp, say(ctx, `table keys ${quote(first)} and ${quote(key)} both mean ${meaning.value}: keep one`, `The table has two rows for ${meaning.value} (${quote(first)} and ${quote(key)}): keep one.`));
              } else {
                meaningOf.set(meaning.value, key);
                covered.push(meaning.value);
              }
              restrict = new Map([[v.key, [meaning.value]]]);
            }
          }
          const s = checkExpression(ctx, get(table, key), kp, restrict);
          if (s === undefined) complete = false; else for (const k of s) used.add(k);
        }
      }
    }
  }
  const elseSource = get(l, 'else');
  if (elseSource !== undefined) {
    const declared = v?.values?.map((d) => d.value);
    const restrict = v !== undefined && declared !== undefined
      ? new Map([[v.key, declared.filter((x) => !covered.includes(x))]]) : undefined;
    const s = checkExpression(ctx, elseSource, fieldPath(path, 'else'), restrict);
    if (s === undefined) complete = false; else for (const k of s) used.add(k);
  } else if (v?.values !== undefined && table !== undefined && isPlainObject(table)) {
    const missing = v.values.map((d) => d.value).filter((x) => !covered.includes(x));
    if (missing.length > 0) {
      report(ctx, path, say(ctx,
        `the table has no limit for ${v.key} ${formatNumberList(missing)} (declared in ${v.path}.values) and there is no "else": add ${missing.length === 1 ? 'an entry' : 'entries'} or an "else" formula`,
        `The table has no limit when ${named(v)} is ${formatNumberList(missing)}: add ${missing.length === 1 ? 'a row' : 'rows'}, or a limit for any other value.`));
    }
  }
  return complete ? used : undefined;
}

// ---- Offer ---------------------------------------------------------------------------------------

function checkProbability(ctx: Ctx, o: Obj, path: string, key: 'ifEligible' | 'ifIneligible'): number | undefined {
  const meaning = key === 'ifEligible' ? 'the probability of an offer when the formula says eligible'
    : 'the probability of an offer when the formula says ineligible';
  const field = key === 'ifEligible' ? 'The chance of an offer when eligible' : 'The chance of an offer when not eligible';
  const v = requireField(ctx, o, path, key, 'the offer', `give ${meaning}, a number from 0 to 1`, `${field} is missing: type a number from 0 to 1.`);
  if (v === undefined) return undefined;
  const p = fieldPath(path, key);
  if (typeof v === 'number' && Number.isFinite(v) && v >= 0 && v <= 1) return v;
  if (ctx.forms) {
    const hint = typeof v === 'number' && Number.isFinite(v) && v > 1 && v <= 100 ? `: for ${v}% type ${v / 100}` : typeof v === 'string' && v.trim() === '' ? '' : ' (0.6 for 60%)';
    report(ctx, p, `${field} is a number from 0 to 1${hint}.`);
    return undefined;
  }
  if (typeof v === 'number' && Number.isFinite(v) && v > 1 && v <= 100) {
    report(ctx, p, `"${key}" is ${meaning}, a number from 0 to 1; found ${v}: for ${v}% write ${v / 100}`);
  } else if (typeof v === 'string' && /%\s*$/.test(v)) {
    report(ctx, p, `"${key}" is ${meaning}: write it as a number from 0 to 1 without quotes (0.6 for 60%)`);
  } else if (typeof v === 'boolean') {
    report(ctx, p, `"${key}" is ${meaning}: write 1 for always and 0 for never, not ${v}`);
  } else {
    report(ctx, p, `"${key}" is ${meaning}, a number from 0 to 1; found ${given(v)}`);
  }
  return undefined;
}

function checkOffer(ctx: Ctx, o: unknown, path: string): void {
  if (!isPlainObject(o)) {
    report(ctx, path, `the offer must be an object such as {"ifEligible": 1, "ifIneligible": 0}; found ${given(o)}`);
    return;
  }
  unknownFields(ctx, o, path, OFFER_FIELDS, 'the offer');
  const e = checkProbability(ctx, o, path, 'ifEligible');
  const i = checkProbability(ctx, o, path, 'ifIneligible');
  if (e !== undefined && i !== undefined && e === i) {
    report(ctx, path, say(ctx,
      `"ifEligible" and "ifIneligible" are both ${e}, so the offer would not depend on the formula: use 1 and 0 for a deterministic rule, or e.g. 0.6 and 0 for a lottery among the eligible`,
      `Both chances are ${e}, so the offer would not depend on the rule: use 1 and 0 for a plain rule, or such as 0.6 and 0 for a lottery among the eligible.`));
  }
}

// ---- Program --------------------------------------------------------------------------------------

/**
 * Checks a program object. On success `value` is a fresh copy holding only the known fields,
 * with numbers and strings exactly as given (nothing rewritten), safe to hand to the compiler.
 */
export function validateProgram(input: unknown, basePath = 'program', options: ValidateOptions = {}): Checked<Program> {
  try {
    return validateUnguarded(input, basePath, options.forms === true);
  } catch {
    // Only reachable with exotic objects (proxies, throwing getters): not JSON data.
    return { ok: false, problems: [{ path: basePath, message: 'the program could not be read: it must be plain JSON data (objects, lists, text, numbers)' }] };
  }
}

function validateUnguarded(input: unknown, basePath: string, forms: boolean): Checked<Program> {
  const ctx: Ctx = { problems: [], overflow: 0, vars: new Map(), conditionsSeen: 0, conditionLimitReported: false, divisionWork: 0, variablesUsable: true, expressionCache: new Map(), forms };
  if (!isPlainObject(input)) {
    return {
      ok: false,
      problems: [{ path: basePath, message: `the program must be an object with "name", "variables", "rule" and "offer"; found ${given(input)}` }],
    };
  }
  unknownFields(ctx, input, basePath, PROGRAM_FIELDS, 'the program');
  const name = requireField(ctx, input, basePath, 'name', 'the program', 'give it a name, e.g. "Winter Energy Credit"', 'Type the program’s name, such as Winter energy credit.');
  if (name !== undefined) checkText(ctx, name, fieldPath(basePath, 'name'), 'the program name', 'Type the program’s name, such as Winter energy credit.');
  const unit = get(input, 'unit');
  if (unit !== undefined) checkText(ctx, unit, fieldPath(basePath, 'unit'), 'the unit (what one row is, e.g. "household")');

  const variables = requireField(ctx, input, basePath, 'variables', 'the program', 'declare the variables the formula reads');
  const vp = fieldPath(basePath, 'variables');
  ctx.variablesUsable = Array.isArray(variables) && variables.length > 0 && variables.length <= MAX_VARIABLES;
  if (variables !== undefined) {
    if (!Array.isArray(variables)) {
      report(ctx, vp, `the variables must be a list of objects, one per variable; found ${given(variables)}`);
    } else if (variables.length === 0) {
      report(ctx, vp, say(ctx, 'no variables are declared: list at least one, e.g. {"key": "income", "label": "Annual income", "type": "continuous", "column": "INCOME"}',
        'Add the variables the rule reads (Add a variable), such as Annual income.'));
    } else if (variables.length > MAX_VARIABLES) {
      report(ctx, vp, `there are ${variables.length} variables; the limit is ${MAX_VARIABLES}`);
    } else {
      const firstAt = new Map<string, number>();
      for (let i = 0; i < variables.length; i += 1) {
        const info = checkVariable(ctx, variables[i], indexPath(vp, i));
        if (info === undefined) continue;
        const first = firstAt.get(info.key);
        if (first !== undefined) {
          report(ctx, fieldPath(indexPath(vp, i), 'key'), say(ctx, `"${info.key}" is already the key of ${indexPath(vp, first)}: give each variable its own key`,
            `${info.key} is already the short name of variable ${first + 1}: give each variable its own.`));
        } else {
          firstAt.set(info.key, i);
          ctx.vars.set(info.key, info);
        }
      }
    }
  }

  const rule = requireField(ctx, input, basePath, 'rule', 'the program', 'give the eligibility condition, e.g. {"value": "income", "op": "<=", "limit": 30000}', 'Add at least one criterion under “Who is eligible”.');
  if (rule !== undefined) checkCondition(ctx, rule, fieldPath(basePath, 'rule'), 1);
  const offer = requireField(ctx, input, basePath, 'offer', 'the program', 'say how the verdict becomes an offer, e.g. {"ifEligible": 1, "ifIneligible": 0}');
  if (offer !== undefined) checkOffer(ctx, offer, fieldPath(basePath, 'offer'));

  if (ctx.problems.length > 0) {
    const problems = [...ctx.problems];
    if (ctx.overflow > 0) problems.push({ path: basePath, message: `…and ${ctx.overflow} more problems: fix the ones above first` });
    return { ok: false, problems };
  }
  return { ok: true, value: copyProgram(input) };
}

// ---- Clean copy of a valid program --------------------------------------------------------------

function setOwn<T extends object>(o: T, key: string, value: unknown): void {
  Object.defineProperty(o, key, { value, enumerable: true, writable: true, configurable: true });
}

function copyProgram(p: Obj): Program {
  const out: Program = {
    name: get(p, 'name') as string,
    variables: (get(p, 'variables') as Obj[]).map(copyVariable),
    rule: copyCondition(get(p, 'rule') as Obj),
    offer: copyOffer(get(p, 'offer') as Obj),
  };
  if (has(p, 'unit') && get(p, 'unit') !== undefined) out.unit = get(p, 'unit') as string;
  return out;
}

function copyVariable(v: Obj): Variable {
  const out: Variable = {
    key: get(v, 'key') as string,
    label: get(v, 'label') as string,
    type: get(v, 'type') as Variable['type'],
    column: (get(v, 'column') as string | undefined) ?? '',
  };
  const unit = get(v, 'unit'); if (unit !== undefined) out.unit = unit as string;
  const scale = get(v, 'scale'); if (scale !== undefined) out.scale = scale as number;
  const range = get(v, 'range') as number[] | undefined; if (range !== undefined) out.range = [range[0]!, range[1]!];
  const values = get(v, 'values') as unknown[] | undefined;
  if (values !== undefined) {
    out.values = values.map((d) => typeof d === 'number' ? d : { value: get(d as Obj, 'value') as number, label: get(d as Obj, 'label') as string });
  }
  return out;
}

function withLabel<T extends object>(out: T, c: Obj): T {
  const label = get(c, 'label');
  if (label !== undefined) (out as { label?: string }).label = label as string;
  return out;
}

function copyCondition(c: Obj): Condition {
  switch (formsOf(c)[0]) {
    case 'all': return withLabel({ all: (get(c, 'all') as Obj[]).map(copyCondition) }, c);
    case 'any': return withLabel({ any: (get(c, 'any') as Obj[]).map(copyCondition) }, c);
    case 'atLeast': return withLabel({ atLeast: get(c, 'atLeast') as number, of: (get(c, 'of') as Obj[]).map(copyCondition) }, c);
    case 'not': return withLabel({ not: copyCondition(get(c, 'not') as Obj) }, c);
    case 'membership': return withLabel({ value: get(c, 'value') as string, in: [...(get(c, 'in') as Array<number | string>)] }, c);
    default: {
      const limit = get(c, 'limit');
      return withLabel({
        value: get(c, 'value') as ExprSource,
        op: get(c, 'op') as Comparator,
        limit: isPlainObject(limit) ? copyLookup(limit) : (limit as ExprSource),
      }, c);
    }
  }
}

function copyLookup(l: Obj): LookupLimit {
  const source = get(l, 'table') as Obj;
  const table: Record<string, ExprSource> = {};
  for (const key of Object.keys(source)) setOwn(table, key, get(source, key));
  const out: LookupLimit = { by: get(l, 'by') as string, table };
  const elseSource = get(l, 'else');
  if (elseSource !== undefined) out.else = elseSource as ExprSource;
  return out;
}

function copyOffer(o: Obj): Offer {
  return { ifEligible: get(o, 'ifEligible') as number, ifIneligible: get(o, 'ifIneligible') as number };
}
