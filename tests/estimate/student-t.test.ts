// Student t quantiles and p-values (main/estimate/student-t.ts) against the published table of
// upper critical values in the NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2
// "Critical Values of the Student's t Distribution" (3 decimals): the 0.025 and 0.005 upper-tail
// columns are the two-sided 95% and 99% critical values.
import { describe, expect, it } from 'vitest';
import { referenceFor, tCritical, twoSidedTP } from '../../main/estimate/student-t.ts';

const TABLE_0975: Array<[number, number]> = [
  [1, 12.706], [2, 4.303], [5, 2.571], [10, 2.228], [11, 2.201], [12, 2.179], [20, 2.086], [23, 2.069], [30, 2.042], [40, 2.021], [100, 1.984],
];
const TABLE_0995: Array<[number, number]> = [[3, 5.841], [11, 3.106], [23, 2.807], [60, 2.66]];

describe('Student t', () => {
  it('95% two-sided critical values match the NIST/SEMATECH table to 3 decimals', () => {
    for (const [df, c] of TABLE_0975) expect(Math.abs(tCritical(0.95, df) - c)).toBeLessThan(5e-4);
  });
  it('99% two-sided critical values match the table to 3 decimals', () => {
    for (const [df, c] of TABLE_0995) expect(Math.abs(tCritical(0.99, df) - c)).toBeLessThan(5e-4);
  });
  it('p-value at the critical value is the level; t(1) is Cauchy: P(|T| > 1) = 1/2 exactly', () => {
    for (const [df] of TABLE_0975) expect(twoSidedTP(tCritical(0.95, df), df)).toBeCloseTo(0.05, 10);
    expect(twoSidedTP(1, 1)).toBeCloseTo(0.5, 14);
    // t(2): P(|T| > t) = 1 − t/√(2 + t²) in closed form (the t(2) CDF is elementary).
    expect(twoSidedTP(3, 2)).toBeCloseTo(1 - 3 / Math.sqrt(11), 14);
  });
  it('no clusters: the normal reference; with G clusters t(G − 1)', () => {
    expect(referenceFor(0.95, null).critical).toBeCloseTo(1.959964, 6);
    expect(referenceFor(0.95, 12).df).toBe(11);
    expect(referenceFor(0.95, 12).critical).toBeCloseTo(tCritical(0.95, 11), 14);
    expect(twoSidedTP(0, 11)).toBe(1);
  });
});
