// Suggested roles for the columns of a data file, shown on the Data screen beside each column.
// Suggestions only: the analyst confirms every role. Order of trust:
//   1. the rule's own variables: a column the program names, else the column whose name matches
//      the variable's key or label (case, spaces, underscores and common abbreviations forgiven);
//   2. the unit ID, take-up, the recorded decision and the cluster, by name and content;
//   3. characteristics known before the decision (covariates), by name or yes/no content;
//   4. outcomes: numeric columns whose names say they were measured later, or the only numeric
//      column left over. A column the rule reads is never suggested as an outcome.
// The name patterns and abbreviations are common practice in agency extracts (no published
// source). Pure.

import type { ColumnRole, PreviewColumn } from '../contract/api.ts';

export interface ColumnFacts {
  name: string;
  holds: PreviewColumn['holds'];
  /** Distinct shown values among the rows looked at, and how many rows were looked at. */
  distinct: number;
  looked: number;
  /** Numbers apart from at most 1% stray text cells. */
  mostlyNumbers: boolean;
  /** Every numeric value is 0 or 1 (and the column is mostly numbers). */
  zeroOne: boolean;
}

export interface ProgramColumns {
  /** Variable key, label and the column the program names for it ('' when not chosen yet). */
  variables: Array<{ key: string; label: string; column: string; type?: 'continuous' | 'discrete' }>;
}

type Suggestion = NonNullable<PreviewColumn['suggestion']>;

// ---- Names as words ----------------------------------------------------------------------------

/** Abbreviations seen in agency extracts, and the word each stands for (common practice). */
const ABBREVIATIONS: Record<string, string> = {
  hh: 'household', hhld: 'household', hsehold: 'household', inc: 'income', incm: 'income', amt: 'amount', amnt: 'amount',
  yrs: 'years', yr: 'years', year: 'years', mos: 'months', mo: 'months', mth: 'months', mths: 'months', month: 'months',
  sz: 'size', siz: 'size', num: 'number', nbr: 'number', nr: 'number', cnt: 'count', tot: 'total', ann: 'annual', annl: 'annual',
  pers: 'people', ppl: 'people', persons: 'people', person: 'people', members: 'people', member: 'people', mem: 'people', mbrs: 'people',
  dep: 'dependents', deps: 'dependents', dependent: 'dependents', chld: 'children', kids: 'children', child: 'children',
  earn: 'earnings', earning: 'earnings', wage: 'earnings', wages: 'earnings', sal: 'salary', scr: 'score', pts: 'points',
  cond: 'condition', grd: 'grade', gr: 'grade', emp: 'employment', bal: 'balance', exp: 'expenses', cst: 'cost', costs: 'cost',
  rev: 'revenue', ben: 'benefit', benef: 'benefit', pmt: 'payment', pymt: 'payment', pay: 'payment', paid: 'payment',
  dob: 'birthdate', bdate: 'birthdate', birth: 'birthdate', birthday: 'birthdate',
};
const STOP_WORDS = new Set(['of', 'in', 'the', 'a', 'an', 'per', 'for', 'at', 'on', 'by', 'and', 'or', 'to', 'is', 'with', 'usd', 'eur', 'gbp']);
/** Words naming the unit itself: they carry little weight when matching a variable. */
const SUBJECT_WORDS = new Set(['household', 'applicant', 'people', 'pupil', 'student', 'family', 'client', 'case', 'oldest', 'head', 'owner', 'member']);
/** Words that make a column an identifier or a code, never an amount the rule reads. */
const IDENTIFIER_WORDS = new Set(['id', 'key', 'ident', 'identifier', 'ref', 'code', 'uuid']);
/** Known words, for splitting names written without separators ("HHSIZE" → hh size). */
const KNOWN = [...new Set([...Object.keys(ABBREVIATIONS), ...Object.values(ABBREVIATIONS), 'size', 'income', 'age', 'score', 'grade', 'cost', 'repair', 'total', 'annual', 'monthly', 'weekly',
  'id', 'after', 'before', 'prior', 'post', 'pre', 'rent', 'renter', 'owner', 'region', 'office', 'arrears', 'bill', 'spring', 'autumn', 'max', 'min', 'value', 'rate', 'days', 'hours'])]
  .sort((a, b) => b.length - a.length);

function segment(word: string): string[] {
  if (word.length <= 3 || KNOWN.includes(word)) return [word];
  const out: string[] = [];
  let rest = word;
  while (rest.length > 0) {
    const hit = KNOWN.find((k) => k.length >= 2 && rest.startsWith(k));
    if (!hit) return [word];
    out.push(hit);
    rest = rest.slice(hit.length);
  }
  return out;
}

/** "HH_INC_AMT" → household, income, amount; "Annual Income (USD)" → annual, income. */
export function nameWords(name: string): string[] {
  const raw = name
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter((w) => w !== '')
    .flatMap((w) => (/^[a-z]+$/.test(w) ? segment(w) : [w]));
  return raw.map((w) => ABBREVIATIONS[w] ?? w).filter((w) => !STOP_WORDS.has(w));
}

/** Qualifiers that say which version of an amount ("annual income"): half weight. */
const QUALIFIER_WORDS = new Set(['annual', 'monthly', 'weekly', 'gross', 'net', 'current', 'declared', 'reported', 'estimated', 'total']);
/** Words a column name adds without changing what it holds (units, flags). */
const FILLER_WORDS = new Set(['amount', 'value', 'number', 'count', 'flag', 'yn', 'ind', 'years', 'months', 'days', 'usd', 'pct', 'percent']);
const weight = (w: string): number => (SUBJECT_WORDS.has(w) || QUALIFIER_WORDS.has(w) ? 0.5 : 1);
const weightOf = (ws: Iterable<string>): number => [...ws].reduce((s, w) => s + weight(w), 0);
const loose = (s: string): string => s.toLowerCase().replace(/[^a-z0-9]+/g, '');

/**
 * How well a column name matches a variable (0 to 1): an exact match of key or label, loosely
 * written, is 1; else the weighted share of the variable's words the column has (below 1), less
 * a little for each other word the column adds, halved when the column reads like something
 * measured later. A column that names an identifier, or a birth date for an age, never matches.
 */
export function variableMatch(column: string, v: { key: string; label: string }): number {
  const c = new Set(nameWords(column));
  const targets = [v.key, v.label].filter((t) => t.trim() !== '');
  if (targets.some((t) => loose(t) === loose(column))) return 1;
  let best = 0;
  for (const t of targets) {
    const words = new Set(nameWords(t));
    if (words.size === 0 || c.size === 0) continue;
    if ([...c].some((w) => IDENTIFIER_WORDS.has(w) && !words.has(w))) continue;
    if (words.has('age') && c.has('birthdate')) continue;
    const common = [...words].filter((w) => c.has(w));
    if (common.length === 0 || common.every((w) => SUBJECT_WORDS.has(w) || QUALIFIER_WORDS.has(w))) continue;
    const extra = [...c].filter((w) => !words.has(w) && !SUBJECT_WORDS.has(w) && !QUALIFIER_WORDS.has(w) && !FILLER_WORDS.has(w)).length;
    let score = Math.min(0.99, weightOf(common) / weightOf(words)) - 0.15 * extra;
    if (AFTER.test(nameWords(column).join(' ')) && !AFTER.test([...words].join(' '))) score /= 2;
    best = Math.max(best, score);
  }
  return best;
}

const MATCH_AT_LEAST = 0.5;

// ---- Roles by name and content -----------------------------------------------------------------

const isId = (c: ColumnFacts): boolean => c.looked > 0 && c.distinct === c.looked;
const has = (c: ColumnFacts, re: RegExp): boolean => re.test(nameWords(c.name).join(' ')) || re.test(c.name.toLowerCase());

const ID_NAME = /(^|[^a-z])(id|key|ident|identifier|case|ref|number|no|uuid)$|^id[^a-z]|(^|\s)(id|identifier)(\s|$)/i;
const TAKE_UP = /receiv|enrol|took|take ?up|uptake|treat|particip|claimed|attend|repaired|served|joined|completed|paid/;
const DECISION = /offer|decision|approv|award|select|granted|admit|accepted/;
const CLUSTER = /(^|\s)(office|site|district|region|county|branch|school|clinic|area|zone|ward|cluster|village|centre|center)/;
/** Known before the decision: characteristics and earlier measurements. */
const BEFORE = /prior|before|baseline|(^|\s)pre(\s|$)|last years|previous|(^|\s)age(\s|$)|birthdate|(^|\s)sex(\s|$)|gender|female|(^|\s)male(\s|$)|renter|owner|disab|married|ethnic|language|urban|rural/;
/** Measured later. */
const AFTER = /after|(^|\s)post(\s|$)|follow|later|outcome|result|(^|\s)next|endline|(^|\s)exit|\d+ ?months?$|months? \d+|(^|\s)\d+m$|(^|\s)(spring|summer|jan|january|feb|february|mar|march|apr|april|may|jun|june|jul|july|aug|august|sep|sept|september|oct|october|nov|november|dec|december)(\s|$)|(^|\s)y[1-9](\s|$)|years [1-9]/;
/** Amounts of the benefit itself: neither outcomes nor covariates by default. */
const BENEFIT_AMOUNT = /amount|payment|benefit|grant|voucher|subsidy/;

function roleByName(c: ColumnFacts): { role: ColumnRole; why: string } | null {
  if (has(c, ID_NAME) && isId(c)) return { role: 'id', why: 'the name reads like an identifier and every value differs' };
  if (has(c, DECISION) && c.zeroOne) return { role: 'decision', why: 'the name reads like the recorded decision and the values are 0/1' };
  if (has(c, TAKE_UP) && c.mostlyNumbers) return { role: 'treatment', why: 'the name reads like take-up of the benefit' };
  if (has(c, CLUSTER) && (!c.mostlyNumbers || c.distinct <= Math.max(2, c.looked / 5)) && c.distinct < c.looked) return { role: 'cluster', why: 'the name reads like a place units are grouped by' };
  return null;
}

/** One suggestion per column; a role held by one column (ID, each variable, take-up, decision, cluster) goes to the best fit. */
export function suggestRoles(columns: readonly ColumnFacts[], program: ProgramColumns | null): Array<Suggestion | null> {
  const out: Array<Suggestion | null> = columns.map(() => null);
  const names = columns.map((c) => c.name);
  const usable = (c: ColumnFacts) => c.holds !== 'empty';
  const ruleColumns = new Set<number>();

  // 1. The rule's variables. A column the program names wins; then the best name matches, best first.
  const open = [] as Array<{ key: string; label: string }>;
  for (const v of program?.variables ?? []) {
    const wanted = v.column.trim().toLowerCase();
    const i = wanted === '' ? -1 : names.findIndex((n) => n.trim().toLowerCase() === wanted);
    if (i >= 0 && out[i] === null) { out[i] = { role: 'variable', variable: v.key, why: `the rule reads ${v.label || v.key} from this column` }; ruleColumns.add(i); }
    else if (i < 0) open.push(v);
  }
  const pairs: Array<{ v: { key: string; label: string }; i: number; score: number }> = [];
  for (const v of open) columns.forEach((c, i) => {
    if (!usable(c) || out[i] !== null) return;
    const score = variableMatch(c.name, v);
    if (score >= MATCH_AT_LEAST) pairs.push({ v, i, score });
  });
  pairs.sort((a, b) => b.score - a.score || a.i - b.i);
  const placed = new Set<string>();
  for (const p of pairs) {
    if (placed.has(p.v.key) || out[p.i] !== null) { if (p.score === 1) ruleColumns.add(p.i); continue; }
    out[p.i] = { role: 'variable', variable: p.v.key, why: `the name matches the rule's ${p.v.label || p.v.key}` };
    placed.add(p.v.key);
    ruleColumns.add(p.i);
  }

  // 2. ID, decision, take-up, cluster: one column each, the first that fits by name and content.
  const taken = new Set<ColumnRole>();
  columns.forEach((c, i) => {
    if (out[i] !== null || !usable(c)) return;
    const r = roleByName(c);
    if (r === null || taken.has(r.role)) return;
    out[i] = r;
    taken.add(r.role);
  });
  if (!taken.has('id')) {
    const i = columns.findIndex((c, j) => out[j] === null && c.holds === 'text' && isId(c));
    if (i >= 0) { out[i] = { role: 'id', why: 'every value differs, as an identifier does' }; taken.add('id'); }
  }

  // 3. Covariates: named like something known before the decision, or a yes/no characteristic.
  columns.forEach((c, i) => {
    if (out[i] !== null || !c.mostlyNumbers || ruleColumns.has(i)) return;
    if (has(c, AFTER) && !has(c, BEFORE)) return;
    if (has(c, BEFORE)) out[i] = { role: 'covariate', why: 'the name reads like something known before the decision' };
    else if (c.zeroOne) out[i] = { role: 'covariate', why: 'a yes/no column; a covariate if it was known before the decision' };
  });

  // 4. Outcomes: named like a later measurement; failing that, the only numeric column left.
  const later = columns.flatMap((c, i) => (out[i] === null && c.mostlyNumbers && !ruleColumns.has(i) && has(c, AFTER) ? [i] : []));
  for (const i of later) out[i] = { role: 'outcome', why: 'the name reads like something measured after the decision; check it was' };
  if (later.length === 0) {
    const left = columns.flatMap((c, i) => (out[i] === null && c.mostlyNumbers && !c.zeroOne && !ruleColumns.has(i) && !has(c, BENEFIT_AMOUNT) ? [i] : []));
    if (left.length === 1) out[left[0]!] = { role: 'outcome', why: 'the one numeric column not used otherwise; check it was measured after the decision' };
  }
  return out;
}
