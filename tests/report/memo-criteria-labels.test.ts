// What the memo calls things: each criterion stated in full once (the rule section) and by its
// short name afterwards; a column the study names (columns.labels) never printed bare; the
// technical appendix says how this run was computed (the interval's reference distribution, how
// the compliers were profiled) rather than a fixed text. Invented fixture (memo-fixture.ts).
import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { figureData } from '../../main/report/figure-data.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { runFixture } from './memo-fixture.ts';
import { walk, type Walked } from './memo-walk.ts';

let results: Results;
let figureDataOf: ReturnType<typeof figureData>;
let walked: Walked;
const all = () => walked.texts.map((t) => t.text).join('\n');

beforeAll(async () => {
  const run = await runFixture();
  results = JSON.parse(JSON.stringify(run.results));
  figureDataOf = figureData(run);
  walked = walk(buildMemo(results, figureDataOf, { createdAt: '2025-03-12T09:30:00Z' }));
}, 60_000);

describe('the memo names each criterion once in full, then by a short name', () => {
  it('gives every criterion a short name in results.json', () => {
    expect(results.program.criteria.map((c) => c.shortName)).toEqual(['income ≤ limit by size', 'age ≥ 65', 'income ÷ size ≤ 7,000']);
  });

  it('prints each criterion’s full words only in the rule section', () => {
    for (const c of results.program.criteria) {
      const words = c.description.replace(/^its /, '');
      const where = walked.texts.filter((t) => t.text.includes(words)).map((t) => t.section);
      expect(where, c.description).toEqual(['rule']);
    }
  });

  it('refers to the criteria by their short names in later sections', () => {
    const later = walked.texts.filter((t) => t.section !== 'rule');
    for (const c of results.program.criteria.filter((x) => x.movesWithContinuous)) {
      expect(later.some((t) => t.text.includes(`“${c.shortName}”`) || t.text === c.shortName), c.shortName).toBe(true);
    }
    // The rule section announces them.
    expect(walked.texts.filter((t) => t.section === 'rule').map((t) => t.text).join(' ')).toContain('Later sections call its criteria, in the order stated, “income ≤ limit by size”, “age ≥ 65” and “income ÷ size ≤ 7,000”.');
  });

  it('names a limit of a table by its criterion and group', () => {
    expect(all()).toContain('Limit of “income ≤ limit by size” for size = 1');
    expect(all()).not.toMatch(/limit on income/i);
  });
});

describe('the memo prints the study’s names for columns', () => {
  it('never prints a labelled column bare: its name, or the label with the column after it', () => {
    const label = 'Heating arrears before the season (USD)';
    expect(all()).toContain(label);
    for (const t of walked.texts) {
      const bare = t.text.replace(new RegExp(`\\(PRIOR\\)`, 'g'), '');
      expect(bare, `${t.section}: ${t.text}`).not.toMatch(/\bPRIOR\b/);
    }
  });

  it('names columns after hiding counts, so a breakdown by reason is still dropped whole (Disclosure control, docs/method.md)', () => {
    const r: Results = JSON.parse(JSON.stringify(results));
    r.study.notes.push({ code: 'outcome-missing', message: 'Outcome Heating spending in winter (USD) is missing for 209 of the 3,997 units used (208: no row in extra.csv for this CASE_ID; 1: CASE_ID appears more than once in extra.csv); they are left out of that outcome only (rows 206, 322 and 204 more).' });
    r.study.notes.push({ code: 'join-unmatched', message: 'extra.csv: 1 CASE_ID value matches no unit (such as C-99907).' });
    const texts = walk(buildMemo(r, figureDataOf, { createdAt: '2025-03-12T09:30:00Z' })).texts.map((t) => t.text);
    const note = texts.find((t) => t.startsWith('Outcome Heating spending'))!;
    expect(note).toBe('Outcome Heating spending in winter (USD) is missing for some of the units used; they are left out of that outcome only.');
    expect(texts).toContain('extra.csv: some ID (CASE_ID) values match no unit.');
  });

  it('says which column a reading problem is about with the input’s label first', () => {
    expect(all()).toMatch(/Annual household income \(INCOME\) is (not a number|blank)/);
  });
});

describe('the technical appendix describes this run', () => {
  const method = () => walked.texts.filter((t) => t.section === 'appendix-method').map((t) => t.text).join(' ');
  it('states the reference distribution of its intervals', () => {
    expect(results.settings.variance).toBe('HC1');
    expect(method()).toContain('normal critical values');
    expect(method()).not.toContain('G − 1');
  });
  it('states how the compliers were profiled, and that the delta check is descriptive', () => {
    expect(results.compliers.every((c) => c.method === '2SLS')).toBe(true);
    expect(method()).toContain('W·D as the outcome');
    expect(method()).not.toMatch(/κ-weighted means with the APS/);
    expect(method()).not.toMatch(/pairs of deltas whose 95% intervals do not overlap/);
    expect(method()).toContain('not tested against each other');
  });
});
