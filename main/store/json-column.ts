// Documents (studies, programs, settings, results, notes) are stored as JSON text (RFC 8259).
// Plain JSON.stringify loses things silently: NaN and ±Infinity become null, -0 becomes 0,
// a Float64Array becomes an object keyed "0", "1", ..., a Date becomes text, undefined array
// items become null. Results legitimately hold NaN (an undefined statistic), so those numbers
// are written as a tagged object and restored on reading; anything JSON cannot carry
// faithfully is refused with its path instead of being changed.

import type { Checked, Problem } from './types.ts';

/** Key of the tag object that carries a number JSON cannot spell. */
export const NUMBER_TAG = '$fenceline:number';

const SPECIAL_NUMBERS: Record<string, number> = { NaN: Number.NaN, Infinity: Infinity, '-Infinity': -Infinity, '-0': -0 };
const MAX_PROBLEMS = 10;

function spellSpecial(n: number): string | null {
  if (Number.isNaN(n)) return 'NaN';
  if (n === Infinity) return 'Infinity';
  if (n === -Infinity) return '-Infinity';
  if (n === 0 && 1 / n < 0) return '-0';
  return null;
}

const IDENTIFIER = /^[A-Za-z_$][A-Za-z0-9_$]*$/;

function formatPath(root: string, steps: ReadonlyArray<string | number>): string {
  let out = root;
  for (const s of steps) {
    if (typeof s === 'number') out += `[${s}]`;
    else if (IDENTIFIER.test(s)) out += out === '' ? s : `.${s}`;
    else out += `[${JSON.stringify(s)}]`;
  }
  return out;
}

function describe(value: object): string {
  if (ArrayBuffer.isView(value)) return `a ${value.constructor.name}`;
  if (value instanceof Date) return 'a date object';
  if (value instanceof Map) return 'a Map';
  if (value instanceof Set) return 'a Set';
  const name = (value as { constructor?: { name?: unknown } }).constructor?.name;
  return typeof name === 'string' && name !== '' ? `an object of kind ${name}` : 'an object that is not plain data';
}

function advice(value: object): string {
  if (ArrayBuffer.isView(value)) return 'convert it to an ordinary list of numbers first (Array.from)';
  if (value instanceof Date) return 'store the time as ISO 8601 text (toISOString())';
  return 'store plain lists, numbers, text, true/false and null only';
}

/**
 * Encode `value` as JSON text that reads back to an equal value (including NaN, ±Infinity, -0).
 * `root` names the value in messages (e.g. `results`, `study`).
 */
export function encodeJson(value: unknown, root: string): Checked<string> {
  const problems: Problem[] = [];
  const steps: Array<string | number> = [];
  const ancestors = new Set<object>();

  const report = (message: string): void => {
    if (problems.length < MAX_PROBLEMS) problems.push({ path: formatPath(root, steps), message });
  };

  const walk = (v: unknown): unknown => {
    switch (typeof v) {
      case 'string':
      case 'boolean':
        return v;
      case 'number': {
        const special = spellSpecial(v);
        return special === null ? v : { [NUMBER_TAG]: special };
      }
      case 'undefined':
        report('This value is missing (undefined); give a value or null.');
        return null;
      case 'bigint':
        report('This is a big integer, which JSON cannot carry; store it as text or as an ordinary number.');
        return null;
      case 'function':
      case 'symbol':
        report(`This is a ${typeof v}, which is not data and cannot be stored.`);
        return null;
    }
    if (v === null) return null;
    const obj = v as object;
    if (ancestors.has(obj)) {
      report('This value contains itself (a loop of references); store a copy without the loop.');
      return null;
    }
    if (Array.isArray(obj)) {
      ancestors.add(obj);
      const out = new Array<unknown>(obj.length);
      for (let i = 0; i < obj.length; i++) {
        steps.push(i);
        out[i] = walk(obj[i]);
        steps.pop();
      }
      ancestors.delete(obj);
      return out;
    }
    const proto = Object.getPrototypeOf(obj);
    if (proto !== Object.prototype && proto !== null) {
      report(`This is ${describe(obj)}, which JSON would change silently; ${advice(obj)}.`);
      return null;
    }
    ancestors.add(obj);
    // No prototype, so a key spelled "__proto__" stays an ordinary key.
    const out = Object.create(null) as Record<string, unknown>;
    for (const [k, item] of Object.entries(obj)) {
      // An absent property and a property set to undefined mean the same thing in a document.
      if (item === undefined) continue;
      steps.push(k);
      if (k === NUMBER_TAG) report(`The key "${NUMBER_TAG}" is reserved by Fenceline; rename it.`);
      out[k] = walk(item);
      steps.pop();
    }
    ancestors.delete(obj);
    return out;
  };

  const encoded = walk(value);
  if (problems.length > 0) return { ok: false, problems };
  return { ok: true, value: JSON.stringify(encoded) };
}

/** Read JSON text written by encodeJson back into the value it came from. */
export function decodeJson(text: string): unknown {
  return JSON.parse(text, (_key, v: unknown) => {
    if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
      const keys = Object.keys(v);
      if (keys.length === 1 && keys[0] === NUMBER_TAG) {
        const spelled = (v as Record<string, unknown>)[NUMBER_TAG];
        if (typeof spelled === 'string' && spelled in SPECIAL_NUMBERS) return SPECIAL_NUMBERS[spelled];
      }
    }
    return v;
  });
}
