// Interval arithmetic over expressions: an enclosure of every value an expression can take
// when each variable ranges over an interval (a box). Used to prove that a criterion cannot
// change inside the box around a unit, and to check that a divisor cannot be zero.
//
// The rules are those of R. E. Moore, "Interval Analysis" (Prentice-Hall, 1966), ch. 2:
//   [a, b] + [c, d] = [a + c, b + d]          [a, b] - [c, d] = [a - d, b - c]
//   [a, b] × [c, d] = [min(ac, ad, bc, bd), max(ac, ad, bc, bd)]
//   [a, b] / [c, d] = [a, b] × [1/d, 1/c]     when 0 ∉ [c, d]
// with outward rounding of the end points (Moore 1966, ch. 3) so that the enclosure also holds
// for exact real arithmetic, not only for the rounded double result. Rounding is done here
// without hardware rounding modes: an operation is first checked for exactness with an
// error-free transformation (Knuth's TwoSum, TAOCP vol. 2, 3rd ed., 1997, §4.2.2, Thm B;
// Dekker's product, Numer. Math. 18, 1971, 224–242); only an inexact end point is moved one
// unit in the last place outwards. Round-to-nearest is off by at most half a unit, so one step
// is enough (IEEE 754-2019, §4.3).
//
// Conventions for unbounded end points follow the set-based view (IEEE 1788-2015, §7.5):
// 0 × ±∞ contributes 0 (every real point of an unbounded interval times 0 is 0), and an
// undefined end point (∞ − ∞) widens to the whole line.

import type { ExprNode } from './types.ts';

export interface Interval { lo: number; hi: number }

export const ENTIRE: Interval = Object.freeze({ lo: -Infinity, hi: Infinity });

export const point = (v: number): Interval => ({ lo: v, hi: v });

export const containsZero = (i: Interval): boolean => i.lo <= 0 && i.hi >= 0;

export const contains = (i: Interval, v: number): boolean => i.lo <= v && v <= i.hi;

// ---- Stepping one unit in the last place ----------------------------------------------------

const scratch = new Float64Array(1);
const bits = new BigInt64Array(scratch.buffer);

/** The next double above x (x itself for +∞ and NaN). */
export function nextUp(x: number): number {
  if (Number.isNaN(x) || x === Infinity) return x;
  if (x === 0) return Number.MIN_VALUE;
  scratch[0] = x;
  bits[0] = x > 0 ? bits[0]! + 1n : bits[0]! - 1n;
  return scratch[0]!;
}

/** The next double below x (x itself for −∞ and NaN). */
export function nextDown(x: number): number {
  return -nextUp(-x);
}

// ---- Error-free transformations -------------------------------------------------------------

/** Exact rounding error of a + b (Knuth's TwoSum): a + b = s + err exactly, when s is finite. */
function sumError(a: number, b: number, s: number): number {
  const bb = s - a;
  return (a - (s - bb)) + (b - bb);
}

const SPLITTER = 134217729; // 2^27 + 1, Veltkamp's split (Dekker 1971)

function split(a: number): [number, number] {
  const c = SPLITTER * a;
  const hi = c - (c - a);
  return [hi, a - hi];
}

/** Exact rounding error of a × b (Dekker's TwoProduct), valid without overflow or underflow. */
function productError(a: number, b: number, p: number): number {
  const [ah, al] = split(a);
  const [bh, bl] = split(b);
  return al * bl - (((p - ah * bh) - al * bh) - ah * bl);
}

// Magnitudes between which Dekker's product is exact (no overflow in the split, no underflow
// in the error term): 2^-900 .. 2^900 is well inside both limits.
const SAFE_LO = 2 ** -900;
const SAFE_HI = 2 ** 900;
const safe = (x: number): boolean => x === 0 || (Math.abs(x) > SAFE_LO && Math.abs(x) < SAFE_HI);

type Direction = 'down' | 'up';

/**
 * Directed rounding of a computed result r, given the sign of (true value − r): 0 when r is
 * exact, ±1 when known, NaN when unknown (then r is moved outwards in both directions).
 */
function directed(r: number, errorSign: number, dir: Direction): number {
  if (Number.isNaN(r)) return dir === 'down' ? -Infinity : Infinity;
  if (errorSign === 0) return r;
  if (dir === 'down') return errorSign < 0 || Number.isNaN(errorSign) ? nextDown(r) : r;
  return errorSign > 0 || Number.isNaN(errorSign) ? nextUp(r) : r;
}

function addRounded(a: number, b: number, dir: Direction): number {
  const s = a + b;
  if (Number.isNaN(s)) return dir === 'down' ? -Infinity : Infinity; // ∞ − ∞: unbounded
  if (!Number.isFinite(s)) {
    // Either an operand is infinite (the sum is exactly that infinity) or the sum overflowed
    // (the true sum is finite, beyond the largest double, on the side of s).
    if (!Number.isFinite(a) || !Number.isFinite(b)) return s;
    return directed(s, s > 0 ? -1 : 1, dir);
  }
  return directed(s, Math.sign(sumError(a, b, s)), dir);
}

function mulRounded(a: number, b: number, dir: Direction): number {
  if (a === 0 || b === 0) return 0; // also 0 × ±∞, see the set-based convention above
  const p = a * b;
  if (!Number.isFinite(a) || !Number.isFinite(b)) return p; // ±∞ × nonzero is exact
  if (!Number.isFinite(p)) return directed(p, p > 0 ? -1 : 1, dir);
  // Dekker's error term is exact only away from overflow and underflow (a zero product of
  // non-zero factors has underflowed); elsewhere the direction is unknown.
  if (p === 0 || !safe(a) || !safe(b) || !safe(p)) return directed(p, NaN, dir);
  return directed(p, Math.sign(productError(a, b, p)), dir);
}

function divRounded(a: number, b: number, dir: Direction): number {
  // Called only with 0 ∉ divisor interval, so b ≠ 0 here.
  const q = a / b;
  if (Number.isNaN(q)) return dir === 'down' ? -Infinity : Infinity; // ∞ / ∞
  if (!Number.isFinite(a) || !Number.isFinite(b)) return q; // ∞ / finite, finite / ∞: exact
  if (!Number.isFinite(q)) return directed(q, q > 0 ? -1 : 1, dir);
  if (a === 0) return 0;
  if (q === 0 || !safe(a) || !safe(b) || !safe(q)) return directed(q, NaN, dir);
  // Residual a − q·b = (a − p) − e with p + e = q·b exactly (Dekker); a − p is exact by
  // Sterbenz's lemma since p is within a factor 2 of a. a/b − q has the sign of residual × b.
  const p = q * b;
  if (!safe(p)) return directed(q, NaN, dir);
  const residual = (a - p) - productError(q, b, p);
  return directed(q, Math.sign(residual) * Math.sign(b), dir);
}

// ---- Elementary interval operations (Moore 1966, §2.2) --------------------------------------

/** Treats NaN end points as unbounded, so that a malformed input never narrows a result. */
function sane(i: Interval): Interval {
  const lo = Number.isNaN(i.lo) ? -Infinity : i.lo;
  const hi = Number.isNaN(i.hi) ? Infinity : i.hi;
  return lo === i.lo && hi === i.hi ? i : { lo, hi };
}

export function addI(a: Interval, b: Interval = point(0)): Interval {
  const x = sane(a), y = sane(b);
  return { lo: addRounded(x.lo, y.lo, 'down'), hi: addRounded(x.hi, y.hi, 'up') };
}

export function negI(a: Interval): Interval {
  const x = sane(a);
  return { lo: -x.hi, hi: -x.lo };
}

export function subI(a: Interval, b: Interval = point(0)): Interval {
  return addI(a, negI(b));
}

export function mulI(a: Interval, b: Interval = point(1)): Interval {
  const x = sane(a), y = sane(b);
  const pairs: Array<[number, number]> = [[x.lo, y.lo], [x.lo, y.hi], [x.hi, y.lo], [x.hi, y.hi]];
  let lo = Infinity, hi = -Infinity;
  for (const [p, q] of pairs) {
    lo = Math.min(lo, mulRounded(p, q, 'down'));
    hi = Math.max(hi, mulRounded(p, q, 'up'));
  }
  return { lo, hi };
}

/** Division; the whole line when the divisor interval contains 0 (Moore 1966, §2.2). */
export function divI(a: Interval, b: Interval = point(1)): Interval {
  const x = sane(a), y = sane(b);
  if (containsZero(y)) return { lo: -Infinity, hi: Infinity };
  // With 0 ∉ y, x / y is monotone in each argument over the box, so the extremes are at corners.
  const pairs: Array<[number, number]> = [[x.lo, y.lo], [x.lo, y.hi], [x.hi, y.lo], [x.hi, y.hi]];
  let lo = Infinity, hi = -Infinity;
  for (const [p, q] of pairs) {
    lo = Math.min(lo, divRounded(p, q, 'down'));
    hi = Math.max(hi, divRounded(p, q, 'up'));
  }
  return { lo, hi };
}

/** min is monotone in each argument, so it maps end points to end points (exactly). */
export function minI(a: Interval, b: Interval = a): Interval {
  const x = sane(a), y = sane(b);
  return { lo: Math.min(x.lo, y.lo), hi: Math.min(x.hi, y.hi) };
}

export function maxI(a: Interval, b: Interval = a): Interval {
  const x = sane(a), y = sane(b);
  return { lo: Math.max(x.lo, y.lo), hi: Math.max(x.hi, y.hi) };
}

/**
 * An enclosure of the expression's values over the box `boundsOf` describes (each bound must
 * have lo ≤ hi). For every point of the box where the expression is defined (no division by
 * zero), its exact value and its double-precision value both lie in the result. The enclosure
 * may be wider than the true range (Moore 1966, §3.1: each occurrence of a variable is treated
 * independently).
 */
export function intervalOf(node: ExprNode, boundsOf: (key: string) => Interval): Interval {
  switch (node.kind) {
    case 'num': return point(node.value);
    case 'var': return sane(boundsOf(node.key));
    case 'neg': return negI(intervalOf(node.arg, boundsOf));
    case 'bin': {
      const l = intervalOf(node.left, boundsOf);
      const r = intervalOf(node.right, boundsOf);
      switch (node.op) {
        case '+': return addI(l, r);
        case '-': return subI(l, r);
        case '*': return mulI(l, r);
        case '/': return divI(l, r);
      }
      break;
    }
    case 'call': {
      const parts = node.args.map((a) => intervalOf(a, boundsOf));
      const combine = node.fn === 'min' ? minI : maxI;
      return parts.reduce((acc, i) => combine(acc, i));
    }
  }
  return ENTIRE;
}
