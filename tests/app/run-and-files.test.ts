// The Run screen's checks as typed, the run's one progress bar, the Data step's derived lists
// and small English: each against something outside it (the engine's own settings check, the
// stage order of a run, hand-made lists).

import { describe, expect, it } from 'vitest';
import { checkSettingsText } from '../../app/lib/run-settings.ts';
import { overallShare } from '../../app/lib/progress.ts';
import { clusterChoices, FEW_CLUSTERS, guessJoinKey, recentStudies } from '../../app/lib/data-files.ts';
import { counted, withArticle } from '../../app/lib/words.ts';
import { normalizeDraft } from '../../app/lib/draft.ts';
import { validateSettings } from '../../main/design/propensity.ts';
import type { DataPreview, PreviewColumn } from '../../main/contract/api.ts';
import { sampleStudy } from './helpers.ts';

describe('run settings are checked as typed, with the engine\'s limits', () => {
  const cases: Array<[string, string, string]> = [
    ['0.05, 0.1, 0.2', '4000', '1'], ['-0.1', '4000', '1'], ['0', '4000', '1'], ['abc', '4000', '1'], ['', '4000', '1'],
    ['0.1', '31', '1'], ['0.1', '32', '0'], ['0.1', '1000000', '7'], ['0.1', '1000001', '7'], ['0.1', '4000.5', '1'], ['0.1', '4000', '-1'], ['0.1', '4,000', '1'],
  ];
  it.each(cases)('deltas %s, draws %s, seed %s: the same verdict as the engine', (deltas, draws, seed) => {
    const mine = checkSettingsText({ deltas, draws, seed });
    const numbers = { deltas: deltas.split(/[,;\s]+/).filter(Boolean).map(Number), draws: Number(draws.replace(/,/g, '')), seed: Number(seed) };
    expect(mine.ok).toBe(validateSettings(numbers).ok);
  });
  it('names the field and says what to type, a negative radius included', () => {
    const r = checkSettingsText({ deltas: '0.1, -0.2', draws: 'many', seed: '1' });
    expect(r.ok).toBe(false);
    expect(r.messages.deltas).toEqual(['-0.2 is not above 0: a radius is a distance, such as 0.1.']);
    expect(r.messages.draws[0]).toMatch(/whole number from 32/);
    expect(r.messages.seed).toEqual([]);
  });
});

describe('one progress bar for the whole run', () => {
  it('never moves backwards when a later stage starts at 0 of its own work', () => {
    let share = 0;
    const seen: number[] = [];
    for (const p of [
      { stage: 'saving', done: 1, total: 1 }, { stage: 'import', done: 500, total: 3000 }, { stage: 'import', done: 3000, total: 3000 },
      { stage: 'propensity', done: 0, total: 3000 }, { stage: 'propensity', done: 1900, total: 3000 }, { stage: 'estimate', done: 0, total: 4 },
      { stage: 'checks', done: 1, total: 8 }, { stage: 'import', done: 0, total: 10 }, { stage: 'memo', done: 4, total: 4 },
    ]) { share = overallShare(p, share); seen.push(share); }
    for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThanOrEqual(seen[i - 1]!);
    expect(seen.at(-1)).toBeCloseTo(1, 10);
  });
});

const col = (name: string, distinct: number, suggestion: PreviewColumn['suggestion'] = null): PreviewColumn => ({ name, letter: 'A', holds: 'numbers', blanks: 0, distinct, suggestion });
const preview = (columns: PreviewColumn[], rowCount = 3000): DataPreview => ({ path: '/x', fileName: 'x.xlsx', format: 'xlsx', sheets: [], sheet: null, headerRow: 1, rowCount, columns, rows: [], notes: [] });

describe('lists the Data and Start steps derive', () => {
  it('links a second file by the main ID\'s name, else by the column suggested as an ID', () => {
    expect(guessJoinKey(preview([col('PAID_ON', 60), col('applicant id', 1000)]), 'APPLICANT_ID')).toBe('applicant id');
    expect(guessJoinKey(preview([col('CASE_NO', 1000, { role: 'id', why: '' }), col('ARREARS', 900)]), 'APPLICANT_ID')).toBe('CASE_NO');
    expect(guessJoinKey(preview([col('ARREARS', 900)]), 'APPLICANT_ID')).toBeNull();
  });
  it('offers as clusters only columns that group units and play no other role', () => {
    const d = normalizeDraft(sampleStudy());
    const p = preview([col('APPLICANT_ID', 1000), col('HH_INCOME', 991), col('OFFICE', 24), col('OFFERED', 2), col('RENTER', 2), col('ARREARS_PRIOR', 250)]);
    expect(clusterChoices(d, [p]).map((c) => c.name)).toEqual(['OFFICE', 'RENTER', 'ARREARS_PRIOR']);
    expect(clusterChoices(d, [p]).find((c) => c.name === 'OFFICE')!.groups).toBeLessThan(FEW_CLUSTERS);
  });
  it('lists each recent study once, without the workspace\'s run copies', () => {
    const list = [
      { path: '/ws/studies/grant/study.json', title: 'Grant', openedAt: '2026-01-02' },
      { path: '/ws/studies/grant.json', title: 'Grant', openedAt: '2026-01-01' },
      { path: '/ws/studies/grant.json', title: 'Grant', openedAt: '2025-12-01' },
      { path: '/home/a/mine/study.json', title: 'Mine', openedAt: '2025-11-01' },
    ];
    expect(recentStudies(list, '/ws/studies/').map((r) => r.path)).toEqual(['/ws/studies/grant.json', '/home/a/mine/study.json']);
  });
  it('counts with the right noun and article', () => {
    expect(counted(1, 'unit')).toBe('1 unit');
    expect(counted(15994, 'unit')).toBe('15,994 units');
    expect(withArticle('applicant')).toBe('an applicant');
    expect(withArticle('household')).toBe('a household');
    expect(withArticle('unit')).toBe('a unit');
  });
});
