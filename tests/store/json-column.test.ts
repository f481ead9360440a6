// Document columns: JSON text (RFC 8259) that reads back to an equal value, or a refusal with
// the path of what JSON cannot carry.

import { describe, expect, it } from 'vitest';
import { decodeJson, encodeJson, NUMBER_TAG } from '../../main/store/json-column.ts';
import { must, problemsOf } from './helpers.ts';

const roundTrip = (v: unknown): unknown => decodeJson(must(encodeJson(v, 'doc')));

describe('encodeJson / decodeJson', () => {
  it('writes plain documents exactly as JSON.stringify does, so other tools can read them', () => {
    const doc = { fenceline: 1, title: 'Winter credit — “first” season ☃', settings: { deltas: [0.05, 0.1], draws: 4000, seed: 1 }, flags: [true, false, null], n: -12.5e-300 };
    expect(must(encodeJson(doc, 'study'))).toBe(JSON.stringify(doc));
    expect(decodeJson(JSON.stringify(doc))).toEqual(doc);
  });

  it('keeps NaN, ±Infinity and -0, which plain JSON turns into null and 0', () => {
    const back = roundTrip({ se: Number.NaN, f: [Infinity, -Infinity, -0, 0] }) as { se: number; f: number[] };
    expect(Number.isNaN(back.se)).toBe(true);
    expect(back.f[0]).toBe(Infinity);
    expect(back.f[1]).toBe(-Infinity);
    expect(Object.is(back.f[2], -0)).toBe(true);
    expect(Object.is(back.f[3], 0)).toBe(true);
  });

  it('keeps a key spelled __proto__ as an ordinary key', () => {
    const doc = JSON.parse('{"__proto__": {"x": 1}, "a": 2}') as unknown;
    const back = roundTrip(doc) as Record<string, unknown>;
    expect(Object.keys(back)).toEqual(['__proto__', 'a']);
    expect(Object.getPrototypeOf(back)).toBe(Object.prototype);
  });

  it('treats an undefined property as absent', () => {
    expect(roundTrip({ a: 1, b: undefined })).toEqual({ a: 1 });
  });

  it('refuses what JSON would change silently, naming each place', () => {
    const loop: Record<string, unknown> = { name: 'x' };
    loop.self = loop;
    const problems = problemsOf(encodeJson({
      aps: new Float64Array([0.5]),
      when: new Date(0),
      list: [1, undefined],
      big: 10n,
      fn: () => 1,
      map: new Map(),
      'odd key': { [NUMBER_TAG]: 'NaN' },
      loop,
    }, 'results'));
    const byPath = Object.fromEntries(problems.map((p) => [p.path, p.message]));
    expect(Object.keys(byPath).sort()).toEqual(['results.aps', 'results.big', 'results.fn', 'results.list[1]', 'results.loop.self', 'results.map', 'results.when', `results["odd key"]["${NUMBER_TAG}"]`].sort());
    expect(byPath['results.aps']).toMatch(/Float64Array.*ordinary list of numbers/);
    expect(byPath['results.when']).toMatch(/ISO 8601/);
    expect(byPath['results.loop.self']).toMatch(/contains itself/);
  });

  it('allows the same object twice when it is not a loop', () => {
    const shared = { a: 1 };
    expect(roundTrip({ x: shared, y: shared })).toEqual({ x: { a: 1 }, y: { a: 1 } });
  });

  it('refuses an undefined document', () => {
    expect(problemsOf(encodeJson(undefined, 'study'))[0]).toEqual({ path: 'study', message: 'This value is missing (undefined); give a value or null.' });
  });
});
