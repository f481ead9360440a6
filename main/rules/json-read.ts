// Safe reading of untrusted JSON-like values, shared by the program and study-file validators:
// own data properties only (so `__proto__` and `constructor` are plain keys), plain objects only,
// and phrases that describe a wrong value in words.

import type { Problem } from './types.ts';

export type Obj = Record<string, unknown>;

export function isPlainObject(v: unknown): v is Obj {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) return false;
  const proto: unknown = Object.getPrototypeOf(v);
  return proto === Object.prototype || proto === null;
}

export function hasOwn(o: Obj, key: string): boolean {
  return Object.prototype.hasOwnProperty.call(o, key);
}

/** Own data property only: never walks the prototype, never calls a getter. */
export function getOwn(o: Obj, key: string): unknown {
  const d = Object.getOwnPropertyDescriptor(o, key);
  return d && 'value' in d ? d.value : undefined;
}

export function quoteText(text: string, max = 60): string {
  const shown = text.length > max ? `${text.slice(0, max)}…` : text;
  return `"${shown}"`;
}

/** What the input holds, in words (for "found ..." phrases). */
export function describeGiven(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'null';
  if (typeof v === 'string') return v === '' ? 'an empty text' : `the text ${quoteText(v, 40)}`;
  if (typeof v === 'number') return Number.isFinite(v) ? `the number ${v}` : `${v}`;
  if (typeof v === 'boolean') return String(v);
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return isPlainObject(v) ? 'an object' : 'a non-JSON value';
  return `a ${typeof v}`;
}

export const fieldPath = (base: string, key: string): string =>
  /^[A-Za-z_][A-Za-z0-9_]*$/.test(key) ? (base ? `${base}.${key}` : key) : `${base}[${JSON.stringify(key)}]`;

// ---- Suggestions: optimal string alignment distance (Damerau 1964; Levenshtein 1966) ---------

export function editDistance(a: string, b: string): number {
  const s = a.slice(0, 64), t = b.slice(0, 64);
  const rows: number[][] = [];
  for (let i = 0; i <= s.length; i += 1) {
    const row: number[] = [i];
    for (let j = 1; j <= t.length; j += 1) {
      if (i === 0) { row.push(j); continue; }
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      let d = Math.min(rows[i - 1]![j]! + 1, row[j - 1]! + 1, rows[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1]) d = Math.min(d, rows[i - 2]![j - 2]! + 1);
      row.push(d);
    }
    rows.push(row);
  }
  return rows[s.length]![t.length]!;
}

/** The closest candidate, if it is close enough to be a likely typo. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  const lower = word.toLowerCase();
  for (const c of candidates) {
    const d = c.toLowerCase() === lower ? 0 : editDistance(lower, c.toLowerCase());
    if (d < bestDistance) { best = c; bestDistance = d; }
  }
  const allowed = Math.max(1, Math.min(3, Math.floor(word.length / 3)));
  return best !== undefined && bestDistance <= allowed && bestDistance < word.length ? best : undefined;
}

/** Problems for fields of `o` not in `allowed`, each with a "did you mean" where one is close. */
export function unknownFieldProblems(o: Obj, path: string, allowed: readonly string[], what: string): Problem[] {
  const out: Problem[] = [];
  for (const key of Object.keys(o)) {
    if (allowed.includes(key)) continue;
    const guess = closest(key, allowed);
    const hint = guess !== undefined ? `did you mean "${guess}"?` : `the fields of ${what} are: ${allowed.join(', ')}`;
    out.push({ path: fieldPath(path, key), message: `unknown field ${quoteText(key, 40)} in ${what}: ${hint}` });
  }
  return out;
}
