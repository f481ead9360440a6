// An adversarial check of the memo's small-cell suppression, written apart from the memo model
// (main/report/model/memo-counts.ts, suppress.ts) so the two do not share a mistake.
//
// The reader's position: every count the memo prints (each number node carries its source path into
// results.json, so the printed counts are known exactly), every share printed beside them, and the
// sum and difference relations any careful reader knows (rows read = used + each exclusion; n =
// offered + not offered; units near the edge at a smaller delta are among those at a larger one, so
// the difference is a count of units; …). Every count not printed is an unknown ≥ 0. For each count
// with a true value from 1 to N (N = settings.smallCellMax), including the differences and gaps a
// reader can form, the audit computes its feasible range by linear programming — the interval
// [min, max] over all non-negative solutions of the relations with the printed values fixed — and
// calls it a leak when the range lies inside [1, N] or holds a single whole number. This is the
// audit of Cox (1980), "Suppression methodology and statistical disclosure control", JASA
// 75(370):377–385, and Hundepool et al. (2012), Statistical Disclosure Control, Wiley, §4.3
// ("the attacker's problem" solved as a pair of LPs per suppressed cell). The LP is the
// continuous relaxation: a leak it finds is real; whole-number reasoning could only narrow the
// ranges further (noted as a limit of the check).
//
// The solver: the two-phase simplex method with Bland's smallest-index rule against cycling
// (Bland 1977, "New finite pivoting rules for the simplex method", Math. Oper. Res. 2(2):103–107;
// Chvátal 1983, Linear Programming, ch. 2–3).

import type { Results } from '../../main/contract/results.ts';
import type { Document } from '../../main/report/model/document.ts';
import { walk } from './memo-walk.ts';

type LpResult = { status: 'optimal'; value: number } | { status: 'infeasible' } | { status: 'unbounded' };

const EPS = 1e-9;

/** min c·x subject to A x = b, x ≥ 0 (two-phase simplex, Bland's rule). */
export function simplexMin(A: number[][], b: number[], c: number[]): LpResult {
  const m = A.length;
  const n = c.length;
  const width = n + m + 1;
  const rhs = n + m;
  const T: Float64Array[] = [];
  const basis: number[] = [];
  for (let i = 0; i < m; i++) {
    const row = new Float64Array(width);
    const sign = b[i]! < 0 ? -1 : 1;
    for (let j = 0; j < n; j++) row[j] = sign * (A[i]![j] ?? 0);
    row[n + i] = 1;
    row[rhs] = sign * b[i]!;
    T.push(row);
    basis.push(n + i);
  }
  const obj = new Float64Array(width);
  const pivot = (r: number, col: number) => {
    const pr = T[r]!;
    const pv = pr[col]!;
    for (let j = 0; j < width; j++) pr[j]! /= pv;
    for (let i = 0; i < m; i++) {
      if (i === r) continue;
      const f = T[i]![col]!;
      if (f !== 0) for (let j = 0; j < width; j++) T[i]![j]! -= f * pr[j]!;
    }
    const f = obj[col]!;
    if (f !== 0) for (let j = 0; j < width; j++) obj[j]! -= f * pr[j]!;
    basis[r] = col;
  };
  const run = (allowed: number): 'optimal' | 'unbounded' => {
    for (let iter = 0; iter < 50_000; iter++) {
      let col = -1;
      for (let j = 0; j < allowed; j++) if (obj[j]! < -EPS) { col = j; break; }
      if (col < 0) return 'optimal';
      let r = -1;
      let best = Infinity;
      for (let i = 0; i < m; i++) {
        const a = T[i]![col]!;
        if (a > EPS) {
          const ratio = T[i]![rhs]! / a;
          if (ratio < best - EPS || (Math.abs(ratio - best) <= EPS && basis[i]! < basis[r]!)) { best = ratio; r = i; }
        }
      }
      if (r < 0) return 'unbounded';
      pivot(r, col);
    }
    throw new Error('simplex: too many iterations');
  };
  // Phase 1: minimize the sum of the artificial variables.
  for (let j = 0; j < width; j++) {
    if (j >= n && j < n + m) continue;
    let s = 0;
    for (let i = 0; i < m; i++) s += T[i]![j]!;
    obj[j] = -s;
  }
  run(n + m);
  if (-obj[rhs]! > 1e-7 * Math.max(1, ...b.map(Math.abs))) return { status: 'infeasible' };
  // Drive artificial variables out of the basis (a row with none to pivot on is redundant).
  for (let i = 0; i < m; i++) {
    if (basis[i]! < n) continue;
    for (let j = 0; j < n; j++) if (Math.abs(T[i]![j]!) > 1e-9) { pivot(i, j); break; }
  }
  // Phase 2.
  obj.fill(0);
  for (let j = 0; j < n; j++) obj[j] = c[j]!;
  for (let i = 0; i < m; i++) {
    const cb = basis[i]! < n ? c[basis[i]!]! : 0;
    if (cb !== 0) for (let j = 0; j < width; j++) obj[j]! -= cb * T[i]![j]!;
  }
  if (run(n) === 'unbounded') return { status: 'unbounded' };
  return { status: 'optimal', value: -obj[rhs]! + 0 };
}

// ---------------------------------------------------------------------------------------------
// The counts and the relations a reader knows

/** A linear relation Σ coef·var (=, ≤) constant, over named counts. */
interface Relation { terms: Array<[string, number]>; kind: 'eq' | 'le'; constant: number }

export interface CountModel {
  /** Every count (a results path, or a name for a count a reader can form), with its true value. */
  values: Map<string, number>;
  relations: Relation[];
}

/** The counts in results.json and the relations between them, as a reader of the memo knows them. */
export function countModel(r: Results): CountModel {
  const values = new Map<string, number>();
  const relations: Relation[] = [];
  const v = (name: string, value: number) => { values.set(name, value); return name; };
  const eq = (total: string, parts: string[]) => relations.push({ terms: [[total, 1], ...parts.map((p): [string, number] => [p, -1])], kind: 'eq', constant: 0 });
  /** A count the reader can form as total − parts (added as its own unknown). */
  const gap = (name: string, total: string, parts: string[]) => {
    const rest = values.get(total)! - parts.reduce((s, p) => s + values.get(p)!, 0);
    if (rest < 0) return;
    eq(total, [...parts, v(name, rest)]);
  };
  const s = r.study;
  v('study.rowsRead', s.rowsRead);
  v('study.rowsUsed', s.rowsUsed);
  const ex = s.rowsExcluded.map((e, i) => v(`study.rowsExcluded[${i}].count`, e.count));
  gap('rows excluded in all', 'study.rowsRead', ['study.rowsUsed']);
  if (values.has('rows excluded in all')) eq('rows excluded in all', ex);
  s.joins.forEach((j, i) => {
    v(`study.joins[${i}].matched`, j.matched);
    v(`study.joins[${i}].unmatchedKeys.count`, j.unmatchedKeys.count);
    v(`study.joins[${i}].duplicateKeys.count`, j.duplicateKeys.count);
  });
  const f = r.fidelity;
  if (f) {
    for (const k of ['compared', 'agree', 'disagree', 'offeredAgainstRule', 'refusedAgainstRule'] as const) v(`fidelity.${k}`, f[k]);
    eq('fidelity.compared', ['fidelity.agree', 'fidelity.disagree']);
    eq('fidelity.disagree', ['fidelity.offeredAgainstRule', 'fidelity.refusedAgainstRule']);
    if (f.compared === s.rowsUsed) eq('fidelity.compared', ['study.rowsUsed']);
  }
  const order = r.design.byDelta.map((d, k) => ({ d: d.delta, k })).sort((a, b) => a.d - b.d).map((x) => x.k);
  /** Units in the sample at a smaller delta are in it at the larger one: the difference is a count. */
  const nested = (path: (k: number) => string, reverse = false) => {
    for (let j = 0; j + 1 < order.length; j++) {
      const [a, b] = reverse ? [path(order[j + 1]!), path(order[j]!)] : [path(order[j]!), path(order[j + 1]!)];
      if (values.has(a) && values.has(b)) gap(`added between ${a} and ${b}`, b, [a]);
    }
  };
  r.design.byDelta.forEach((d, k) => {
    const p = `design.byDelta[${k}]`;
    v(`${p}.boundary`, d.boundary); v(`${p}.exact`, d.exact); v(`${p}.simulated`, d.simulated); v(`${p}.constant`, d.constant);
    eq('study.rowsUsed', [`${p}.exact`, `${p}.simulated`, `${p}.constant`]);
    const c = r.design.composition[k];
    if (c && c.boundary === d.boundary) {
      const only = c.atoms.map((a, j) => {
        v(`design.composition[${k}].atoms[${j}].straddling`, a.straddling);
        // Straddling a criterion includes straddling it only.
        relations.push({ terms: [[`design.composition[${k}].atoms[${j}].only`, 1], [`design.composition[${k}].atoms[${j}].straddling`, -1]], kind: 'le', constant: 0 });
        return v(`design.composition[${k}].atoms[${j}].only`, a.only);
      });
      eq(`${p}.boundary`, [...only, v(`design.composition[${k}].several`, c.several), v(`design.composition[${k}].lotteryOnly`, c.lotteryOnly)]);
    }
    r.outcomes.forEach((o, i) => {
      const b = o.byDelta[k];
      if (!b) return;
      const q = `outcomes[${i}].byDelta[${k}]`;
      v(`${q}.n`, b.n); v(`${q}.offered`, b.offered); v(`${q}.notOffered`, b.notOffered);
      eq(`${q}.n`, [`${q}.offered`, `${q}.notOffered`]);
      gap(`near the edge without outcome ${i} at delta ${k}`, `${p}.boundary`, [`${q}.n`]);
    });
  });
  nested((k) => `design.byDelta[${k}].boundary`);
  nested((k) => `design.byDelta[${k}].constant`, true);
  r.design.composition[0]?.atoms.forEach((_, j) => nested((k) => `design.composition[${k}].atoms[${j}].straddling`));
  r.outcomes.forEach((o, i) => {
    for (const fld of ['n', 'offered', 'notOffered']) nested((k) => `outcomes[${i}].byDelta[${k}].${fld}`);
    v(`outcomes[${i}].missing`, o.missing);
    v(`outcomes[${i}].naiveOls.n`, o.naiveOls.n);
    eq('study.rowsUsed', [`outcomes[${i}].naiveOls.n`, `outcomes[${i}].missing`]);
  });
  const sc = r.thresholdChanges?.scenarios ?? [];
  sc.forEach((x, i) => {
    v(`thresholdChanges.scenarios[${i}].switchers`, x.switchers);
    v(`thresholdChanges.scenarios[${i}].switchersOutsideBand`, x.switchersOutsideBand);
    gap(`switchers inside the band, scenario ${i}`, `thresholdChanges.scenarios[${i}].switchers`, [`thresholdChanges.scenarios[${i}].switchersOutsideBand`]);
  });
  sc.forEach((x, i) => sc.forEach((y, j) => {
    // Every pair of moves of one limit in one direction, the larger containing the smaller.
    if (y.path !== x.path || Math.sign(y.relativeChange) !== Math.sign(x.relativeChange) || Math.abs(y.relativeChange) <= Math.abs(x.relativeChange)) return;
    for (const fld of ['switchers', 'switchersOutsideBand']) {
      gap(`switched by scenario ${j} and not ${i} (${fld})`, `thresholdChanges.scenarios[${j}].${fld}`, [`thresholdChanges.scenarios[${i}].${fld}`]);
    }
  }));
  return { values, relations };
}

// ---------------------------------------------------------------------------------------------
// The audit

export interface Leak { count: string; value: number; range: [number, number]; why: string }

const plainPath = /^[A-Za-z_][A-Za-z0-9_]*(\.[A-Za-z_][A-Za-z0-9_]*|\[\d+\])*$/;

/** Every count the memo prints (by its source) and every share of two counts it prints. */
export function printedCounts(doc: Document, model: CountModel): { shown: Map<string, number>; shares: Array<{ a: string; b: string; value: number; halfWidth: number }> } {
  const shown = new Map<string, number>();
  const shares: Array<{ a: string; b: string; value: number; halfWidth: number }> = [];
  for (const n of walk(doc).numbers) {
    const src = n.source?.trim();
    if (!src) continue;
    if (plainPath.test(src) && model.values.has(src)) { shown.set(src, n.value); continue; }
    const m = /^(.+) \/ (.+)$/.exec(src);
    if (m && model.values.has(m[1]!) && model.values.has(m[2]!)) {
      const decimals = n.format.decimals ?? (n.format.style === 'percent' ? 1 : 2);
      const scale = n.format.style === 'percent' ? 100 : 1;
      shares.push({ a: m[1]!, b: m[2]!, value: n.value, halfWidth: 0.5 * 10 ** -decimals / scale + 1e-12 });
    }
  }
  return { shown, shares };
}

/** Leaks of small counts in a memo: printed small counts and hidden ones the relations pin down. */
export function auditDisclosure(results: Results, doc: Document): Leak[] {
  const N = results.settings.smallCellMax;
  if (N === 0) return [];
  const model = countModel(results);
  const { shown, shares } = printedCounts(doc, model);
  const leaks: Leak[] = [];
  for (const [name, value] of shown) {
    if (value >= 1 && value <= N) leaks.push({ count: name, value, range: [value, value], why: 'printed' });
  }
  // Unknowns: every count not printed. Relations with the printed values moved to the right.
  const unknown = [...model.values.keys()].filter((k) => !shown.has(k));
  const col = new Map(unknown.map((k, i) => [k, i]));
  const rows: Array<{ coef: number[]; kind: 'eq' | 'le'; rhs: number }> = [];
  const addRow = (terms: Array<[string, number]>, kind: 'eq' | 'le', constant: number) => {
    const coef = new Array<number>(unknown.length).fill(0);
    let rhs = constant;
    for (const [name, a] of terms) {
      if (shown.has(name)) rhs -= a * shown.get(name)!;
      else coef[col.get(name)!]! += a;
    }
    if (coef.every((x) => x === 0)) return;
    rows.push({ coef, kind, rhs });
  };
  for (const rel of model.relations) addRow(rel.terms, rel.kind, rel.constant);
  for (const s of shares) {
    // a / b printed as `value` to its decimals: (value − h)·b ≤ a ≤ (value + h)·b.
    addRow([[s.a, 1], [s.b, -(s.value + s.halfWidth)]], 'le', 0);
    addRow([[s.a, -1], [s.b, s.value - s.halfWidth]], 'le', 0);
  }
  // Standard form: one slack per inequality.
  const slacks = rows.filter((r) => r.kind === 'le').length;
  const width = unknown.length + slacks;
  let k = 0;
  const A = rows.map((r) => {
    const row = [...r.coef, ...new Array<number>(slacks).fill(0)];
    if (r.kind === 'le') row[unknown.length + k++] = 1;
    return row;
  });
  const b = rows.map((r) => r.rhs);
  for (const name of unknown) {
    const value = model.values.get(name)!;
    if (!(value >= 1 && value <= N)) continue;
    const c = new Array<number>(width).fill(0);
    c[col.get(name)!] = 1;
    const lo = simplexMin(A, b, c);
    c[col.get(name)!] = -1;
    const hi = simplexMin(A, b, c);
    if (lo.status === 'infeasible' || hi.status === 'infeasible') throw new Error('audit: the relations do not hold for the true values (a fault of the audit)');
    const min = lo.status === 'optimal' ? lo.value : -Infinity;
    const max = hi.status === 'optimal' ? -hi.value : Infinity;
    const tol = 1e-6;
    if (min >= 1 - tol && max <= N + tol) leaks.push({ count: name, value, range: [min, max], why: `can be worked out to lie between 1 and ${N}` });
    else if (Math.ceil(min - tol) >= Math.floor(max + tol)) leaks.push({ count: name, value, range: [min, max], why: 'can be worked out exactly' });
  }
  return leaks;
}

// ---------------------------------------------------------------------------------------------
// Rendered text

const SCAN_NOUNS = ['row', 'unit', 'value', 'id', 'key', 'record', 'case', 'person', 'people', 'date', 'number', 'entry', 'household', 'applicant', 'pupil', 'observation', 'cluster'];

/**
 * Places in rendered text (pdftotext output, HTML text, DOCX XML text, XLSX cells) where a small
 * count can be read: a bare number from 1 to N followed within three words by a count word ("3
 * rows", "2 APPLICANT_ID values"), a breakdown prefix ("(1: EARNINGS_12M is blank)"), a row number
 * ("row 3102", "rows 206, 322"), or singular wording after the small-cell mark ("≤10 row has").
 */
export function smallCountsInText(text: string, N: number, mark: string, unitWords: readonly string[] = []): string[] {
  const nouns = new Set([...SCAN_NOUNS, ...unitWords.map((w) => w.toLowerCase())]);
  const isNoun = (w: string) => {
    const x = w.toLowerCase().replace(/\(s\)$/, '');
    return nouns.has(x) || nouns.has(x.replace(/ies$/, 'y')) || nouns.has(x.replace(/e?s$/, '')) || nouns.has(x.replace(/s$/, ''));
  };
  const found: string[] = [];
  const t = text.replace(/\s+/g, ' ');
  for (const m of t.matchAll(/(^|[^\d.,\-/:=×*+<>≤])(\d+)(?![\d.,%]\d)((?: [A-Za-z_()]+| [\d,]+(?= [A-Za-z])){1,4})/g)) {
    const v = Number(m[2]);
    if (v < 1 || v > N) continue;
    if (m[3]!.trim().split(' ').some(isNoun)) found.push(m[0].trim());
  }
  for (const m of t.matchAll(/\(\s*\d+\s*:\s*[A-Za-z_][^)]*\b(?:blank|missing|more than once|no row|not a number|duplicate)[^)]*\)/gi)) found.push(m[0]);
  for (const m of t.matchAll(/\(such as [^)]*\)/gi)) found.push(m[0]);
  for (const m of t.matchAll(/\brows? \d{1,7}(?:, \d{1,7})*\b/gi)) found.push(m[0]);
  if (mark) {
    const esc = mark.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
    for (const m of t.matchAll(new RegExp(`${esc} (?:[A-Za-z_]+ ){0,2}?(?:row|unit|value|id|record|household|applicant|pupil|person|number|date) (?:[A-Za-z_]+ ){0,3}?(?:is|was|has|does|appears|matches)\\b`, 'gi'))) found.push(m[0]);
  }
  return found;
}
