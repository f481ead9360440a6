// countText (main/data/count-text.ts) writes what Intl's en-US number format writes (ICU, through
// Number#toLocaleString), the reference here, for every kind of number.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countText } from '../../main/data/count-text.ts';

describe('countText', () => {
  it('matches toLocaleString("en-US") on whole numbers of every length and sign', () => {
    for (const v of [0, 7, 12, 999, 1000, 1001, 99_999, 100_000, 999_999, 1_000_000, 16_000, -1, -1000, -123_456_789, Number.MAX_SAFE_INTEGER, Number.MIN_SAFE_INTEGER]) {
      expect(countText(v)).toBe(v.toLocaleString('en-US'));
    }
    fc.assert(fc.property(fc.integer({ min: Number.MIN_SAFE_INTEGER, max: Number.MAX_SAFE_INTEGER }), (v) => countText(v) === v.toLocaleString('en-US')));
  });

  it('leaves everything else to toLocaleString (fractions, −0, NaN, infinities, unsafe integers)', () => {
    for (const v of [1.5, -0.25, 1234.5678, -0, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, 2 ** 60]) {
      expect(countText(v)).toBe(v.toLocaleString('en-US'));
    }
  });
});
