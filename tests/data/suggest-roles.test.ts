// Column-role suggestions that know the rule: on every sample program (with the study's column
// choices blanked, as a new user starts) the rule's inputs are found by their keys and labels, and
// none of them is offered as an outcome; on three invented workbooks written with other naming
// habits (lower_snake, Title Case With Spaces, abbreviated codes) the same holds.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { previewData } from '../../main/api/data.ts';
import type { PreviewColumn } from '../../main/contract/api.ts';
import type { Study } from '../../main/contract/study.ts';
import { nameWords, suggestRoles, variableMatch, type ColumnFacts, type ProgramColumns } from '../../main/data/suggest-roles.ts';

const SAMPLES = join(import.meta.dirname, '..', '..', 'sample-programs');

/** What the suggestions say, as "COLUMN → role[:variable]". */
const said = (names: string[], s: ReturnType<typeof suggestRoles>) =>
  Object.fromEntries(names.map((n, i) => [n, s[i] ? `${s[i]!.role}${s[i]!.variable ? `:${s[i]!.variable}` : ''}` : '-']));

async function sampleSuggestions(dir: string, file: string, sheet?: string): Promise<{ study: Study; columns: PreviewColumn[] }> {
  const study = JSON.parse(readFileSync(join(SAMPLES, dir, 'study.json'), 'utf8')) as Study;
  const program = { ...study.program, variables: study.program.variables.map((v) => ({ ...v, column: '' })) };
  const r = await previewData({ path: join(SAMPLES, dir, file), ...(sheet ? { sheet } : {}), program });
  if (!r.ok) throw new Error(JSON.stringify(r.error));
  return { study, columns: r.value.columns };
}

describe('suggestions on the sample programs, columns not yet chosen', () => {
  const cases: Array<[string, string, string | undefined]> = [
    ['winter-credit', 'applicants.xlsx', 'Applicants'],
    ['apprentice-voucher', 'applicants.xlsx', 'Intake 2025'],
    ['home-repair', 'households.xlsx', 'Households'],
    ['tutoring-lottery', 'pupils.xlsx', 'Pupils'],
  ];
  for (const [dir, file, sheet] of cases) {
    it(`${dir}: every rule input goes to the study's own column, the ID is found, and no rule input is an outcome`, async () => {
      const { study, columns } = await sampleSuggestions(dir, file, sheet);
      for (const v of study.program.variables) {
        const col = columns.find((c) => c.name === v.column);
        expect(col?.suggestion, `${dir} ${v.key}`).toMatchObject({ role: 'variable', variable: v.key });
      }
      expect(columns.find((c) => c.name === study.columns.id)?.suggestion?.role).toBe('id');
      const outcomes = columns.filter((c) => c.suggestion?.role === 'outcome').map((c) => c.name);
      expect(outcomes).toEqual(study.columns.outcomes.map((o) => o.column).filter((n) => columns.some((c) => c.name === n)));
      if (typeof study.columns.treatment === 'string') expect(columns.find((c) => c.name === study.columns.treatment)?.suggestion?.role).toBe('treatment');
      if (study.columns.decision) expect(columns.find((c) => c.name === study.columns.decision)?.suggestion?.role).toBe('decision');
    });
  }
  it('apprentice voucher: AGE is a characteristic known before the decision, not an outcome', async () => {
    const { columns } = await sampleSuggestions('apprentice-voucher', 'applicants.xlsx', 'Intake 2025');
    expect(columns.find((c) => c.name === 'AGE')?.suggestion?.role).toBe('covariate');
  });
  it('winter credit: the linked files give the payment date as take-up and the March arrears as the outcome, the amount paid as nothing', async () => {
    const pay = await sampleSuggestions('winter-credit', 'payments.xlsx', 'Paid');
    expect(said(pay.columns.map((c) => c.name), pay.columns.map((c) => c.suggestion))).toEqual({ APPLICANT_ID: 'id', PAID_ON: 'treatment', AMOUNT: '-' });
    const out = await sampleSuggestions('winter-credit', 'outcomes.csv');
    expect(said(out.columns.map((c) => c.name), out.columns.map((c) => c.suggestion))).toEqual({ CASE_NO: 'id', ARREARS_MARCH: 'outcome' });
  });
});

// Invented workbooks: the facts a preview would report for each column (3,000 rows looked at the
// first 1,000), and a rule declared in the app with keys made from its labels.
const facts = (name: string, kind: 'id' | 'amount' | 'count' | 'yesno' | 'text' | 'place'): ColumnFacts => ({
  name,
  holds: kind === 'id' || kind === 'text' || kind === 'place' ? 'text' : 'numbers',
  distinct: kind === 'id' ? 1000 : kind === 'amount' ? 950 : kind === 'count' ? 7 : kind === 'yesno' ? 2 : 12,
  looked: 1000,
  mostlyNumbers: kind === 'amount' || kind === 'count' || kind === 'yesno',
  zeroOne: kind === 'yesno',
});
const RULE: ProgramColumns = {
  variables: [
    { key: 'annual_income', label: 'Annual income', column: '' },
    { key: 'household_size', label: 'Household size', column: '' },
    { key: 'age', label: 'Age', column: '' },
  ],
};

describe('suggestions on invented workbooks with other naming habits', () => {
  it('lower_snake names', () => {
    const cols = [facts('case_id', 'id'), facts('annual_income', 'amount'), facts('household_size', 'count'), facts('age', 'amount'), facts('took_up', 'yesno'), facts('offered', 'yesno'), facts('earnings_after', 'amount'), facts('local_office', 'place')];
    expect(said(cols.map((c) => c.name), suggestRoles(cols, RULE))).toEqual({
      case_id: 'id', annual_income: 'variable:annual_income', household_size: 'variable:household_size', age: 'variable:age',
      took_up: 'treatment', offered: 'decision', earnings_after: 'outcome', local_office: 'cluster',
    });
  });
  it('Title Case With Spaces, and an outcome whose name does not say "after" (the one numeric column left)', () => {
    const cols = [facts('Case Number', 'id'), facts('Annual Income', 'amount'), facts('Household Size', 'count'), facts('Age', 'amount'), facts('Received Benefit', 'yesno'), facts('Energy Arrears', 'amount')];
    expect(said(cols.map((c) => c.name), suggestRoles(cols, RULE))).toEqual({
      'Case Number': 'id', 'Annual Income': 'variable:annual_income', 'Household Size': 'variable:household_size', Age: 'variable:age',
      'Received Benefit': 'treatment', 'Energy Arrears': 'outcome',
    });
  });
  it('abbreviated codes: HH = household, INC = income, SZ = size, YRS = years; DOB is not an age', () => {
    const cols = [facts('HHID', 'id'), facts('DOB', 'amount'), facts('HH_INC_AMT', 'amount'), facts('HHSZ', 'count'), facts('AGE_YRS', 'amount'), facts('ENRL_FLAG', 'yesno'), facts('INC_12M', 'amount')];
    const s = suggestRoles(cols, RULE);
    expect(said(cols.map((c) => c.name), s)).toMatchObject({
      HHID: 'id', HH_INC_AMT: 'variable:annual_income', HHSZ: 'variable:household_size', AGE_YRS: 'variable:age', INC_12M: 'outcome',
    });
    expect(s[1]?.variable).toBeUndefined(); // DOB
    expect(s.filter((x) => x?.role === 'outcome')).toHaveLength(1);
  });
  it('a program\'s own column names win over name matching, and each variable takes one column', () => {
    const cols = [facts('ID', 'id'), facts('INCOME_2024', 'amount'), facts('INCOME_2025', 'amount'), facts('SIZE', 'count')];
    const s = suggestRoles(cols, { variables: [{ key: 'income', label: 'Income', column: 'INCOME_2025' }, { key: 'size', label: 'Household size', column: '' }] });
    expect(said(cols.map((c) => c.name), s)).toMatchObject({ INCOME_2025: 'variable:income', SIZE: 'variable:size' });
    expect(s[1]?.role).not.toBe('variable');
  });
  it('one ID, decision and cluster; identifiers never match a variable', () => {
    const cols = [facts('PERSON_ID', 'id'), facts('HOUSEHOLD_ID', 'id'), { ...facts('OFFICE_ID', 'amount'), distinct: 3 }, facts('Site', 'place')];
    const s = suggestRoles(cols, RULE);
    expect(s.map((x) => x?.role ?? '-')).toEqual(['id', '-', 'cluster', '-']);
  });
});

describe('names read as words', () => {
  it('splits, lowers and expands abbreviations', () => {
    expect(nameWords('HH_INC_AMT')).toEqual(['household', 'income', 'amount']);
    expect(nameWords('HHSIZE')).toEqual(['household', 'size']);
    expect(nameWords('Annual Income (USD)')).toEqual(['annual', 'income']);
    expect(nameWords('ageYrs')).toEqual(['age', 'years']);
  });
  it('scores exact loose matches 1 and unrelated names 0', () => {
    expect(variableMatch('ANNUAL_INCOME', { key: 'annual_income', label: 'Annual income' })).toBe(1);
    expect(variableMatch('Household Size', { key: 'household_size', label: 'Household size' })).toBe(1);
    expect(variableMatch('DOB', { key: 'age', label: 'Age' })).toBe(0);
    expect(variableMatch('HOUSEHOLD_ID', { key: 'household_size', label: 'Household size' })).toBe(0);
  });
});
