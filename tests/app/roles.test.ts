import { describe, expect, it } from 'vitest';
import { applySuggestions, roleOf, setRole } from '../../app/lib/roles.ts';
import { normalizeDraft } from '../../app/lib/draft.ts';
import type { PreviewColumn } from '../../main/contract/api.ts';
import { sampleStudy } from './helpers.ts';

const draft = () => normalizeDraft(sampleStudy());

describe('column roles read from and written to the study', () => {
  it('reads the roles the sample study gives, forgiving case and spaces', () => {
    const d = draft();
    expect(roleOf(d, ' applicant_id ')).toEqual({ role: 'id' });
    expect(roleOf(d, 'HH_INCOME')).toEqual({ role: 'variable', variable: 'income' });
    expect(roleOf(d, 'OFFICE')).toEqual({ role: 'cluster' });
    expect(roleOf(d, 'RENTER')).toEqual({ role: 'covariate' });
    expect(roleOf(d, 'SOMETHING')).toEqual({ role: 'ignore' });
  });
  it('moves a one-column role and takes the column out of its old role', () => {
    const d = draft();
    setRole(d, 'AGE_MAX', { role: 'variable', variable: 'income' });
    expect(d.program.variables.find((v) => v.key === 'income')?.column).toBe('AGE_MAX');
    expect(d.program.variables.find((v) => v.key === 'age')?.column).toBe('');
    setRole(d, 'RENTER', { role: 'outcome' });
    expect(d.columns.covariates).toEqual(['ARREARS_PRIOR']);
    expect(d.columns.outcomes.map((o) => o.column)).toEqual(['ARREARS_MARCH', 'RENTER']);
    setRole(d, 'RENTER', { role: 'ignore' });
    expect(roleOf(d, 'RENTER').role).toBe('ignore');
  });
  it('applies suggestions only to columns without a role and never steals a role given', () => {
    const d = draft();
    const col = (name: string, suggestion: PreviewColumn['suggestion']): PreviewColumn => ({ name, letter: 'A', holds: 'numbers', blanks: 0, distinct: 2, suggestion });
    const n = applySuggestions(d, [
      col('OTHER_ID', { role: 'id', why: '' }),          // the study has an ID already
      col('ARREARS_PRIOR', { role: 'outcome', why: '' }), // has a role already
      col('WAGES_PRE', { role: 'covariate', why: '' }),   // free: applied
    ]);
    expect(n).toBe(1);
    expect(d.columns.id).toBe('APPLICANT_ID');
    expect(d.columns.covariates).toContain('WAGES_PRE');
    expect(roleOf(d, 'ARREARS_PRIOR').role).toBe('covariate');
  });
});
