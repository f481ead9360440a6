// Figure data and the count ledger. Outside checks: point-to-plane distance (closed-form
// geometry) for the signed distance; the fixture's rule written out by hand for the map's offer
// grid; the small-cell policy of docs/method.md §7 (US CMS: counts 1–10 hidden) for the ledger.

import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { boundaryMapData, densityData, niceStep, signedDistance, signedDistanceData } from '../../main/report/figure-data.ts';
import { buildCountLedger } from '../../main/report/model/memo-counts.ts';
import { shareableText } from '../../main/report/model/memo-scrub.ts';
import { lowerValidatedProgram } from '../../main/rules/compile.ts';
import { verdicts } from '../../main/rules/atoms.ts';
import type { Program } from '../../main/rules/types.ts';
import type { StudyRun } from '../../main/pipeline/run-study.ts';
import { runFixture } from './memo-fixture.ts';

let run: StudyRun;
beforeAll(async () => { run = await runFixture(3000); }, 60_000);

describe('signed distance to the nearest edge', () => {
  const program = (rule: unknown): Program => ({
    name: 't', variables: [
      { key: 'x', label: 'x', type: 'continuous', column: 'X', scale: 2 },
      { key: 'y', label: 'y', type: 'continuous', column: 'Y', scale: 5 },
    ], rule, offer: { ifEligible: 1, ifIneligible: 0 },
  } as unknown as Program);
  it('is the point-to-plane distance in scaled units, positive when eligible', () => {
    // x + y ≤ 10; in scaled units u = x/2, v = y/5 the plane is 2u + 5v = 10, distance |x + y − 10| / √(2² + 5²).
    const p = lowerValidatedProgram(program({ value: 'x + y', op: '<=', limit: 10 }));
    const cols = { n: 3, continuous: [Float64Array.from([1, 8, 4]), Float64Array.from([2, 6, 6])], discrete: [] };
    const eligible = verdicts(p, cols).eligible;
    const d = signedDistance(p, cols, eligible, [2, 5]);
    expect(d[0]).toBeCloseTo(7 / Math.sqrt(29), 12);
    expect(d[1]).toBeCloseTo(-4 / Math.sqrt(29), 12);
    expect(d[2]).toBeCloseTo(0, 12);
  });
  it('takes the nearest criterion whose reversal alone changes the verdict', () => {
    // all[x ≤ 10, y ≥ 20]: at (9, 0) only y's criterion can change the verdict (x's cannot alone: y fails).
    const p = lowerValidatedProgram(program({ all: [{ value: 'x', op: '<=', limit: 10 }, { value: 'y', op: '>=', limit: 20 }] }));
    const cols = { n: 2, continuous: [Float64Array.from([9, 9]), Float64Array.from([0, 30])], discrete: [] };
    const d = signedDistance(p, cols, verdicts(p, cols).eligible, [2, 5]);
    expect(d[0]).toBeCloseTo(-20 / 5, 12); // y's plane, 20 away = 4 scaled units; x's (0.5 away) is not pivotal
    expect(d[1]).toBeCloseTo(Math.min(1 / 2, 10 / 5), 12); // both pivotal when eligible
  });
});

describe('figure data from a run', () => {
  it('the map shades the rule’s own verdict (the fixture’s rule written out) and marks the band near its edges', () => {
    const { map } = boundaryMapData(run, { mapCells: 30 });
    expect(map).not.toBeNull();
    const m = map!;
    expect([m.x.key, m.y.key]).toEqual(['income', 'age']);
    const size = Number(/People in household: (\d)/.exec(m.panel ?? '')![1]);
    const limit = [22000, 29000, 36000, 43000][size - 1]!;
    let banded = 0;
    m.grid.probability.forEach((row, iy) => row.forEach((p, ix) => {
      const x = (m.grid.xEdges[ix]! + m.grid.xEdges[ix + 1]!) / 2;
      const y = (m.grid.yEdges[iy]! + m.grid.yEdges[iy + 1]!) / 2;
      expect(p).toBe(x <= limit && (y >= 65 || x / size <= 7000) ? 1 : 0);
      if (m.grid.inBand[iy]![ix]) {
        banded++;
        // In the band, some criterion's plane lies within delta (scaled units: income/10,000, age/10).
        const dist = Math.min(Math.abs(x - limit) / 10000, Math.abs(y - 65) / 10, Math.abs(x / size - 7000) / (10000 / size));
        expect(dist).toBeLessThanOrEqual(m.delta + 1e-9);
      }
    }));
    expect(banded).toBeGreaterThan(0);
    // Counts: no bin from 1 to 10 is shown.
    for (const v of m.counts.values.flat()) if (v !== null) expect(v === 0 || v > 10).toBe(true);
  });
  it('binned means leave out bins with 10 units or fewer, and density bins hide counts from 1 to 10', () => {
    const sd = signedDistanceData(run)!;
    expect(sd.takeUp).not.toBeNull();
    // Take-up is 0 on the not-eligible side except for overrides.
    const below = sd.takeUp!.bins.filter((b) => b.side === 'below' && b.mean !== null);
    expect(below.length).toBeGreaterThan(0);
    for (const b of below) expect(b.mean!).toBeLessThan(0.2);
    const dens = densityData(run);
    expect(dens.length).toBe(run.results.density.length);
    for (const d of dens) for (const b of d.bins) if (b.count !== null) expect(b.count === 0 || b.count > 10).toBe(true);
  });
  it('round steps', () => {
    expect([0.7, 1, 1.3, 2.2, 3, 7, 180].map(niceStep)).toEqual([1, 1, 2, 2.5, 5, 10, 200]);
  });
});

describe('the count ledger', () => {
  const withExclusions = (counts: number[]): Results => {
    const r: Results = JSON.parse(JSON.stringify(run.results));
    r.study.rowsExcluded = counts.map((count, i) => ({ reason: `reason ${i}`, count, rows: [] }));
    r.study.rowsRead = r.study.rowsUsed + counts.reduce((a, b) => a + b, 0);
    return r;
  };
  it('hides a count of 10 and shows one of 11 (default threshold)', () => {
    expect(buildCountLedger(withExclusions([10])).get('study.rowsExcluded[0].count')).toEqual({ shown: false, reason: 'small' });
    expect(buildCountLedger(withExclusions([11])).get('study.rowsExcluded[0].count')).toEqual({ shown: true, value: 11 });
  });
  it('handles a total that would reveal a hidden count', () => {
    // rows read − rows used = the one hidden exclusion: rows read is withheld, rows used shown.
    let l = buildCountLedger(withExclusions([4]));
    expect(l.get('study.rowsRead').shown).toBe(false);
    expect(l.get('study.rowsUsed').shown).toBe(true);
    // one small and one large exclusion: the large one is hidden too (else total − rest gives the small one).
    l = buildCountLedger(withExclusions([4, 300]));
    expect(l.get('study.rowsExcluded[0].count')).toEqual({ shown: false, reason: 'small' });
    expect(l.get('study.rowsExcluded[1].count')).toEqual({ shown: false, reason: 'derived' });
    expect(l.get('study.rowsRead').shown && l.get('study.rowsUsed').shown).toBe(true);
  });
  it('refuses a count that is not in it (every printed count must go through it)', () => {
    expect(() => buildCountLedger(run.results).get('study.nonsense')).toThrow(/not in the count ledger/);
  });
});

describe('counts in free text', () => {
  it('replaces every count with words, in the plural, and drops row numbers, examples and breakdowns', () => {
    expect(shareableText('3 unit(s) have no cluster id; they are left out.', 10)).toBe('Some units have no cluster id; they are left out.');
    expect(shareableText('At delta 0.1, 7 households have no score.', 10, ['household'])).toBe('At delta 0.1, some households have no score.');
    // Large counts too: read against a count printed elsewhere they give a small one away.
    expect(shareableText('12 rows were skipped; the first-stage F 8.5 is weak.', 10)).toBe('Some rows were skipped; the first-stage F 8.5 is weak.');
    expect(shareableText('payments.xlsx: PAID_ON: 3254 dates were read as the number of days since 1970-01-01.', 10)).toBe('payments.xlsx: PAID_ON: some dates were read as the number of days since 1970-01-01.');
    // Singular wording tells a count of one: the noun and its verb go into the plural.
    expect(shareableText('payments.xlsx: 1 row has no APPLICANT_ID and cannot be linked to a unit (row 3102).', 10)).toBe('payments.xlsx: some rows have no APPLICANT_ID and cannot be linked to a unit.');
    expect(shareableText('INCOME: 1 number written as text (such as "$27,450") was read as a number.', 10)).toBe('INCOME: some numbers written as text were read as a number.');
    expect(shareableText('Outcome Y is missing for 1 of the 15994 units used (1: Y is blank); they are left out of that outcome only (rows 9105).', 10))
      .toBe('Outcome Y is missing for some of the units used; they are left out of that outcome only.');
    expect(shareableText('recorded in steps of 1 years', 10)).toBe('recorded in steps of 1 years');
    expect(shareableText('3 rows (rows 4, 9, 12)', 0)).toBe('3 rows (rows 4, 9, 12)');
  });
});
