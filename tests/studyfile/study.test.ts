import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadStudyFile, parseJsonText } from '../../main/studyfile/load.ts';
import { validateStudy } from '../../main/studyfile/validate.ts';

const SAMPLE = join(__dirname, '../../sample-programs/winter-credit/study.json');
// eslint-disable-next-line @typescript-eslint/no-explicit-any
const sample = (): any => JSON.parse(readFileSync(SAMPLE, 'utf8'));

function problemsOf(study: unknown) {
  const r = validateStudy(study);
  if (r.ok) throw new Error('expected problems');
  return r.problems;
}

describe('study file validation', () => {
  it('accepts the sample study and keeps what it says', () => {
    const r = validateStudy(sample());
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.settings).toEqual({ deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1, smallCellMax: 10 });
    expect(r.value.columns.outcomes).toEqual([{ column: 'ARREARS_MARCH', label: 'Utility arrears in March (USD)' }]);
  });

  it('fills in default settings when the study gives none', () => {
    const s = sample();
    delete s.settings;
    const r = validateStudy(s);
    expect(r.ok && r.value.settings).toEqual({ deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1, smallCellMax: 10 });
  });

  it.each([
    ['no format version', (s: any) => { delete s.fenceline; }, 'fenceline', /add "fenceline": 1/],
    ['a newer format', (s: any) => { s.fenceline = 2; }, 'fenceline', /newer than this version/],
    ['no title', (s: any) => { delete s.title; }, 'title', /title is missing/i],
    ['a typo in a top-level field', (s: any) => { s.setings = {}; }, 'setings', /did you mean "settings"/],
    ['no data section', (s: any) => { delete s.data; }, 'data', /data section is missing/],
    ['a data path that is a number', (s: any) => { s.data.path = 5; }, 'data.path', /non-empty text/],
    ['a join without its key', (s: any) => { s.data.join = [{ path: 'payments.xlsx' }]; }, 'data.join[0].key', /ID column of the joined file is missing/],
    ['no outcomes', (s: any) => { s.columns.outcomes = []; }, 'columns.outcomes', /at least one outcome/],
    ['an outcome that is a rule input', (s: any) => { s.columns.outcomes = [{ column: 'hh_income' }]; }, 'columns.outcomes[0].column', /input to the rule/],
    ['a covariate listed twice', (s: any) => { s.columns.covariates = ['RENTER', 'renter']; }, 'columns.covariates[1]', /listed twice/],
    ['a treatment listed in an unknown source', (s: any) => { s.columns.treatment = { listedIn: 'paid.xlsx' }; }, 'columns.treatment.listedIn', /not one of the joined sources/],
    ['treatmentPer below zero', (s: any) => { s.columns.treatmentPer = -5; }, 'columns.treatmentPer', /positive number/],
    ['a negative delta', (s: any) => { s.settings.deltas = [0.1, -0.2]; }, 'settings.deltas[1]', /positive number/],
    ['a repeated delta', (s: any) => { s.settings.deltas = [0.1, 0.1]; }, 'settings.deltas[1]', /listed twice/],
    ['draws as text', (s: any) => { s.settings.draws = '4000'; }, 'settings.draws', /whole number/],
    ['a suppression threshold out of range', (s: any) => { s.settings.smallCellMax = -1; }, 'settings.smallCellMax', /0 to 1,000/],
    ['column labels that are not pairs', (s: any) => { s.columns.labels = ['RENTER']; }, 'columns.labels', /pairs of a column name and the name the memo prints/],
    ['an empty column label', (s: any) => { s.columns.labels = { RENTER: ' ' }; }, 'columns.labels.RENTER', /non-empty text/],
    ['a label for a rule input', (s: any) => { s.columns.labels = { HH_INCOME: 'Income' }; }, 'columns.labels.HH_INCOME', /input to the rule/],
    ['a label for an outcome', (s: any) => { s.columns.labels = { ARREARS_MARCH: 'Arrears' }; }, 'columns.labels.ARREARS_MARCH', /outcome's "label"/],
    ['a label for a column with no role', (s: any) => { s.columns.labels = { NOTES: 'Case notes' }; }, 'columns.labels.NOTES', /no role in this study/],
    ['a lottery without the recorded decision', (s: any) => { s.program.offer.ifEligible = 0.6; delete s.columns.decision; }, 'columns.decision', /lottery/],
    ['a problem inside the program', (s: any) => { s.program.rule.all[0].op = '=<'; }, 'program.rule.all[0].op', /<=/],
  ])('refuses %s, naming where and what to do', (_name, mutate, path, message) => {
    const s = sample();
    mutate(s);
    const ps = problemsOf(s);
    const hit = ps.find((p) => p.path === path);
    expect(hit, JSON.stringify(ps)).toBeDefined();
    expect(hit!.message).toMatch(message);
  });

  it('reports every problem at once', () => {
    const s = sample();
    delete s.title;
    s.settings.draws = 1;
    s.columns.outcomes = [];
    expect(problemsOf(s).map((p) => p.path).sort()).toEqual(['columns.outcomes', 'settings.draws', 'title']);
  });

  it('never throws on inputs that are not studies', () => {
    for (const v of [null, 3, 'x', [], { fenceline: 1, program: [] }, { columns: 'x', data: [] }]) {
      const r = validateStudy(v);
      expect(r.ok).toBe(false);
    }
  });
});

describe('study file loading', () => {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-study-'));

  it('reads a separate program file relative to the study and names it in its problems', () => {
    const s = sample();
    const program = s.program;
    writeFileSync(join(dir, 'program.json'), JSON.stringify(program));
    s.program = 'program.json';
    writeFileSync(join(dir, 'study.json'), JSON.stringify(s));
    const r = loadStudyFile(join(dir, 'study.json'));
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.value.study.programPath).toBe('program.json');

    program.offer.ifEligible = 2;
    writeFileSync(join(dir, 'program.json'), JSON.stringify(program));
    const bad = loadStudyFile(join(dir, 'study.json'));
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems[0]!.message).toMatch(/^in program\.json: /);
  });

  it('says where a JSON syntax error is, by line and column', () => {
    const r = parseJsonText('{\n  "title": "x",\n  "data": { "path": "a.csv" }\n  "columns": {}\n}', 'study.json');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems[0]!.message).toMatch(/study\.json is not valid JSON at line 4, column 3/);
    }
  });

  it('says when the file is missing', () => {
    const r = loadStudyFile(join(dir, 'nope.json'));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0]!.message).toMatch(/nope\.json was not found/);
  });
});
