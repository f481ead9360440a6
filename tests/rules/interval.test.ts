// Interval arithmetic, checked against R. E. Moore, "Interval Analysis" (Prentice-Hall, 1966),
// §2.2 (the endpoint formulas, evaluated by hand below) and against its defining property:
// the value at every point of the box lies in the interval (the "inclusion" property, §3.1),
// for double-precision evaluation and for exact rational arithmetic.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  addI, subI, mulI, divI, negI, minI, maxI, intervalOf, nextUp, nextDown, type Interval,
} from '../../main/rules/interval.ts';
import { evaluateExpression, parseExpression } from '../../main/rules/expression.ts';
import type { ExprNode } from '../../main/rules/types.ts';
import { exprTree } from './arbitraries.ts';

const I = (lo: number, hi: number): Interval => ({ lo, hi });

function node(text: string): ExprNode {
  const r = parseExpression(text);
  if (!r.ok) throw new Error(r.errors[0]?.message);
  return r.node;
}

// ---- Exact rationals from doubles (every finite double is m · 2^e) ---------------------------

interface Q { n: bigint; d: bigint } // d > 0

function gcd(a: bigint, b: bigint): bigint {
  let x = a < 0n ? -a : a, y = b;
  while (y !== 0n) [x, y] = [y, x % y];
  return x === 0n ? 1n : x;
}
function q(n: bigint, d: bigint): Q {
  if (d < 0n) { n = -n; d = -d; }
  const g = gcd(n, d);
  return { n: n / g, d: d / g };
}
function fromDouble(x: number): Q {
  // Only finite doubles have an exact fraction (NaN or ±Infinity would never become integers).
  if (!Number.isFinite(x)) throw new RangeError(`fromDouble: ${x} is not a finite double`);
  let e = 0n;
  let m = x;
  while (!Number.isInteger(m)) { m *= 2; e += 1n; } // multiplying by 2 is exact
  return q(BigInt(m), 2n ** e);
}
const qAdd = (a: Q, b: Q): Q => q(a.n * b.d + b.n * a.d, a.d * b.d);
const qNeg = (a: Q): Q => ({ n: -a.n, d: a.d });
const qMul = (a: Q, b: Q): Q => q(a.n * b.n, a.d * b.d);
const qCmp = (a: Q, b: Q): number => { const l = a.n * b.d, r = b.n * a.d; return l < r ? -1 : l > r ? 1 : 0; };

/** Exact value of the expression at a point, or undefined where it divides by zero. */
function exact(n: ExprNode, at: (k: string) => Q): Q | undefined {
  switch (n.kind) {
    case 'num': return fromDouble(n.value);
    case 'var': return at(n.key);
    case 'neg': { const a = exact(n.arg, at); return a && qNeg(a); }
    case 'bin': {
      const a = exact(n.left, at), b = exact(n.right, at);
      if (a === undefined || b === undefined) return undefined;
      if (n.op === '+') return qAdd(a, b);
      if (n.op === '-') return qAdd(a, qNeg(b));
      if (n.op === '*') return qMul(a, b);
      if (b.n === 0n) return undefined;
      return q(a.n * b.d, a.d * b.n);
    }
    case 'call': {
      const xs = n.args.map((x) => exact(x, at));
      if (xs.some((x) => x === undefined)) return undefined;
      return (xs as Q[]).reduce((m, x) => (n.fn === 'min' ? (qCmp(x, m) < 0 ? x : m) : (qCmp(x, m) > 0 ? x : m)));
    }
  }
}

const within = (v: Q, i: Interval): boolean =>
  (i.lo === -Infinity || qCmp(fromDouble(i.lo), v) <= 0) && (i.hi === Infinity || qCmp(v, fromDouble(i.hi)) <= 0);

describe('elementary operations (Moore 1966, §2.2; values computed by hand)', () => {
  it('adds, subtracts and negates end points', () => {
    expect(addI(I(1, 2), I(3, 4))).toEqual(I(4, 6));
    expect(subI(I(1, 2), I(3, 4))).toEqual(I(-3, -1));
    expect(negI(I(-1, 5))).toEqual(I(-5, 1));
  });
  it('multiplies by the extreme corner products', () => {
    expect(mulI(I(-1, 2), I(3, 4))).toEqual(I(-4, 8));
    expect(mulI(I(-2, -1), I(-3, 4))).toEqual(I(-8, 6));
    expect(mulI(I(-2, 3), I(-5, 4))).toEqual(I(-15, 12));
  });
  it('divides by intervals that exclude 0, and gives the whole line otherwise', () => {
    expect(divI(I(1, 2), I(4, 8))).toEqual(I(0.125, 0.5));
    expect(divI(I(-6, 3), I(-3, -1.5))).toEqual(I(-2, 4));
    expect(divI(I(1, 2), I(-1, 1))).toEqual(I(-Infinity, Infinity));
    expect(divI(I(1, 2), I(0, 1))).toEqual(I(-Infinity, Infinity));
    expect(divI(I(1, 2), I(-1, 0))).toEqual(I(-Infinity, Infinity));
  });
  it('takes minima and maxima end point by end point', () => {
    expect(minI(I(1, 5), I(2, 3))).toEqual(I(1, 3));
    expect(maxI(I(1, 5), I(2, 3))).toEqual(I(2, 5));
  });
  it('treats 0 × unbounded as 0 (IEEE 1788-2015, §7.5: the set-based product) and ∞ − ∞ as unbounded', () => {
    expect(mulI(I(0, 0), I(-Infinity, Infinity))).toEqual(I(0, 0));
    expect(addI(I(-Infinity, 1), I(2, Infinity))).toEqual(I(-Infinity, Infinity));
  });
});

describe('outward rounding (Moore 1966, ch. 3)', () => {
  // ulp(1) = 2^-52 in binary64 (IEEE 754-2019, §3.6).
  it('steps one unit in the last place', () => {
    expect(nextUp(1)).toBe(1 + 2 ** -52);
    expect(nextDown(1)).toBe(1 - 2 ** -53);
    expect(nextUp(0)).toBe(5e-324);
    expect(nextDown(0)).toBe(-5e-324);
    expect(nextUp(-5e-324)).toBe(-0);
    expect(nextUp(Number.MAX_VALUE)).toBe(Infinity);
    expect(nextDown(Infinity)).toBe(Number.MAX_VALUE);
  });
  it('keeps exact results as they are and widens inexact ones', () => {
    // 0.1 + 0.2 rounds up to 0.30000000000000004 (the exact sum of the two doubles is below it).
    const s = addI(I(0.1, 0.1), I(0.2, 0.2));
    expect(s.hi).toBe(0.1 + 0.2);
    expect(s.lo).toBe(nextDown(0.1 + 0.2));
    expect(within(qAdd(fromDouble(0.1), fromDouble(0.2)), s)).toBe(true);
    // 1/3 is inexact: the interval brackets the true third.
    const t = divI(I(1, 1), I(3, 3));
    expect(t.lo).toBeLessThan(t.hi);
    expect(within(q(1n, 3n), t)).toBe(true);
    // 0.1 × 3 is inexact as well.
    const p = mulI(I(0.1, 0.1), I(3, 3));
    expect(within(qMul(fromDouble(0.1), fromDouble(3)), p)).toBe(true);
    expect(p.hi).toBeGreaterThan(p.lo);
  });
  it('encloses overflowed products and underflowed quotients', () => {
    const big = mulI(I(1e300, 1e300), I(1e300, 1e300));
    expect(big.lo).toBe(Number.MAX_VALUE);
    expect(big.hi).toBe(Infinity);
    const tiny = divI(I(5e-324, 5e-324), I(4, 4));
    expect(tiny.lo).toBeLessThanOrEqual(0);
    expect(tiny.hi).toBeGreaterThan(0);
  });
});

describe('intervalOf', () => {
  it('bounds the example limit formula over a box (hand-computed)', () => {
    const i = intervalOf(node('35000 + 7000 * (size - 3)'), () => I(4, 6));
    expect(i).toEqual(I(42000, 56000));
    const r = intervalOf(node('income / size'), (k) => (k === 'income' ? I(12000, 24000) : I(2, 4)));
    expect(r).toEqual(I(3000, 12000));
    expect(intervalOf(node('min(a, 10) - max(a, 0)'), () => I(-5, 20))).toEqual(I(-25, 10));
  });

  it('is wider than the range when a variable repeats (Moore 1966, §3.1), but still encloses it', () => {
    const i = intervalOf(node('x - x'), () => I(0, 1));
    expect(i).toEqual(I(-1, 1));
  });

  // The inclusion property on random expressions, random boxes and random points.
  const keys = ['x', 'y', 'z'] as const;
  const num = fc.oneof(fc.integer({ min: -20, max: 20 }), fc.double({ min: -1000, max: 1000, noNaN: true }), fc.constantFrom(0.1, 0.3, 1 / 3, 1e-9));
  const box = fc.record({
    x: fc.tuple(fc.double({ min: -100, max: 100, noNaN: true }), fc.double({ min: 0, max: 50, noNaN: true })),
    y: fc.tuple(fc.integer({ min: -10, max: 10 }), fc.integer({ min: 0, max: 5 })),
    z: fc.tuple(fc.double({ min: -1, max: 1, noNaN: true }), fc.constantFrom(0, 1e-12, 0.5, 3)),
  }).map((b) => Object.fromEntries(keys.map((k) => [k, I(b[k][0], b[k][0] + b[k][1])])) as Record<string, Interval>);
  const fractions = fc.array(fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true })), { minLength: 1, maxLength: 6 });

  it('contains the double-precision and the exact value at every sampled point (property)', () => {
    let checkedExact = 0;
    fc.assert(fc.property(exprTree([...keys], num, 4), box, fractions, (n, b, ts) => {
      const enclosure = intervalOf(n, (k) => b[k]!);
      expect(enclosure.lo).toBeLessThanOrEqual(enclosure.hi);
      const points = [...ts, [0, 0, 0], [1, 1, 1]] as Array<[number, number, number]>;
      for (const t of points) {
        const at: Record<string, number> = {};
        keys.forEach((k, j) => {
          const i = b[k]!;
          // a convex combination: hi − lo can overflow to Infinity over the whole double range
          at[k] = Math.min(i.hi, Math.max(i.lo, i.lo * (1 - t[j]!) + i.hi * t[j]!));
        });
        const v = evaluateExpression(n, (k) => at[k]!);
        if (!Number.isNaN(v)) {
          expect(v).toBeGreaterThanOrEqual(enclosure.lo);
          expect(v).toBeLessThanOrEqual(enclosure.hi);
        }
        const e = exact(n, (k) => fromDouble(at[k]!));
        if (e !== undefined) {
          expect(within(e, enclosure)).toBe(true);
          checkedExact += 1;
        }
      }
    }), { numRuns: 400 });
    expect(checkedExact).toBeGreaterThan(1000);
  });

  it('each elementary operation encloses the exact result of its end-point arithmetic (property)', () => {
    // Moderate values, and the whole finite range (overflow, subnormals, underflow).
    const d = fc.oneof(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ noNaN: true, noDefaultInfinity: true }));
    const interval = fc.tuple(d, d).map(([a, b]) => I(Math.min(a, b), Math.max(a, b)));
    fc.assert(fc.property(interval, interval, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (a, b, s, t) => {
      // Points as convex combinations: hi − lo overflows to Infinity for wide intervals, and
      // 0 × Infinity is NaN (which would leave no exact fraction to compare).
      const x = a.lo * (1 - s) + a.hi * s, y = b.lo * (1 - t) + b.hi * t;
      const px = fromDouble(Math.min(a.hi, Math.max(a.lo, x))), py = fromDouble(Math.min(b.hi, Math.max(b.lo, y)));
      expect(within(qAdd(px, py), addI(a, b))).toBe(true);
      expect(within(qAdd(px, qNeg(py)), subI(a, b))).toBe(true);
      expect(within(qMul(px, py), mulI(a, b))).toBe(true);
      if (py.n !== 0n) expect(within(q(px.n * py.d, px.d * py.n), divI(a, b))).toBe(true);
    }), { numRuns: 2000 });
  });
});
