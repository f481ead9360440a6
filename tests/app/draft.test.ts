import { describe, expect, it } from 'vitest';
import { blankStudy, normalizeDraft, slug, tidyProgram, toStudyFile } from '../../app/lib/draft.ts';
import { validateProgram } from '../../main/rules/validate.ts';
import { validateStudy } from '../../main/studyfile/validate.ts';
import { sampleStudy } from './helpers.ts';
import { setColumnLabel, setRole } from '../../app/lib/roles.ts';

describe('the study draft', () => {
  it('round-trips the sample study into a study file that validates', () => {
    const file = toStudyFile(normalizeDraft(sampleStudy()));
    const checked = validateStudy(file);
    expect(checked.ok).toBe(true);
  });
  it('keeps the memo’s names of columns, and writes only those of columns that hold a role', () => {
    const d = normalizeDraft(sampleStudy());
    expect(toStudyFile(d).columns.labels).toEqual({ ARREARS_PRIOR: 'Utility arrears the March before (USD)', RENTER: 'Rents the home', OFFICE: 'Benefit office' });
    setRole(d, 'RENTER', { role: 'ignore' });
    expect(toStudyFile(d).columns.labels).toEqual({ ARREARS_PRIOR: 'Utility arrears the March before (USD)', OFFICE: 'Benefit office' });
    expect(validateStudy(toStudyFile(d)).ok).toBe(true);
    setRole(d, 'RENTER', { role: 'covariate' });
    expect(toStudyFile(d).columns.labels?.['RENTER']).toBe('Rents the home');
    setColumnLabel(d, 'OFFICE', ' ');
    expect(toStudyFile(d).columns.labels).not.toHaveProperty('OFFICE');
  });
  it('makes anything opened complete enough to edit, without inventing values', () => {
    for (const junk of [null, 3, [], { title: 7, program: 'x', columns: { outcomes: 'no' } }]) {
      const d = normalizeDraft(junk);
      expect(d.program.variables).toEqual([]);
      expect(d.columns.outcomes).toEqual([]);
      expect(d.title).toBe('');
    }
  });
  it('removes blank optional fields the forms leave, so the validator judges only what was given', () => {
    const p = sampleStudy().program;
    const withBlanks = { ...p, unit: '', variables: p.variables.map((v) => ({ ...v, unit: '', scale: '' as unknown as number })) };
    expect(validateProgram(withBlanks).ok).toBe(false);
    expect(validateProgram(tidyProgram(withBlanks)).ok).toBe(true);
  });
  it('a blank study is refused with messages, never accepted', () => {
    const r = validateStudy(toStudyFile(blankStudy()));
    expect(r.ok).toBe(false);
  });
  it('names folders safely', () => {
    expect(slug('Winter energy credit, first season (invented example)')).toBe('winter-energy-credit-first-season-invented-example');
    expect(slug('../../etc')).toBe('etc');
    expect(slug('')).toBe('study');
  });
});
