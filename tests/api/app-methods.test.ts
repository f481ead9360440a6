// The app's api methods (issue 6) through callApi, as the renderer calls them. The try-a-unit
// cases follow the winter-credit rule as its README states it (limits 21,000 / 28,000 / 35,000,
// then 7,000 more per person; and age 65 or more, or income per person at most 6,000).

import { mkdtempSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { callApi, REGISTERED_METHODS } from '../../main/api.ts';
import { API_METHODS } from '../../main/contract/api.ts';
import { rebasePath } from '../../main/api/studies.ts';
import { SAMPLE_DIR, sampleStudy } from '../app/helpers.ts';

const scratch = () => mkdtempSync(join(tmpdir(), 'fenceline-api-'));
const ok = <T>(r: { ok: boolean; value?: T; error?: unknown }): T => { expect(r, JSON.stringify(r.error)).toMatchObject({ ok: true }); return r.value as T; };

describe('the registry', () => {
  it('implements exactly the methods of the contract', () => {
    expect([...REGISTERED_METHODS].sort()).toEqual([...API_METHODS].sort());
  });
  it('refuses extra or mistyped arguments of the app methods', async () => {
    const r = await callApi('files.list', { dir: '/', kind: 'everything', more: 1 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems.map((p) => p.path).sort()).toEqual(['args.kind', 'args.more']);
  });
});

describe('program.check and program.tryUnit', () => {
  const program = sampleStudy().program;
  it('reads a valid program back in plain words with its criteria', async () => {
    const v = ok(await callApi('program.check', { program })) as { valid: boolean; reading: string; criteria: Array<{ path: string; variables: string[] }> };
    expect(v.valid).toBe(true);
    expect(v.reading).toMatch(/at least 65/);
    expect(v.criteria.map((c) => c.variables)).toEqual([['income', 'size'], ['age'], ['income', 'size']]);
  });
  it('answers an invalid program with its problems, not an error', async () => {
    const v = ok(await callApi('program.check', { program: { ...program, offer: { ifEligible: 2, ifIneligible: 0 } } })) as { valid: boolean; problems: Array<{ path: string }> };
    expect(v.valid).toBe(false);
    expect(v.problems.map((p) => p.path)).toContain('program.offer.ifEligible');
  });
  it.each([
    [{ income: 21000, size: 1, age: 70 }, 'eligible'],             // at the limit (at most)
    [{ income: 21001, size: 1, age: 70 }, 'not eligible'],
    [{ income: '12,000', size: '2', age: 30 }, 'eligible'],        // 6,000 per person
    [{ income: 12002, size: 2, age: 30 }, 'not eligible'],
    [{ income: 42000, size: 4, age: 66 }, 'eligible'],             // 35,000 + 7,000 × (4 − 3)
    [{ income: 42001, size: 4, age: 66 }, 'not eligible'],
    [{ income: 30000, size: 3, age: '' }, 'unknown'],              // age decides, and is missing
    [{ income: 50000, size: 1 }, 'not eligible'],                  // over the limit: age does not matter
  ])('%j → %s', async (values, verdict) => {
    const v = ok(await callApi('program.tryUnit', { program, values })) as { verdict: string; offerProbability: number | null };
    expect(v.verdict).toBe(verdict);
    expect(v.offerProbability).toBe(verdict === 'eligible' ? 1 : verdict === 'unknown' ? null : 0);
  });
  it('says which typed value is not a number, at its key', async () => {
    const v = ok(await callApi('program.tryUnit', { program, values: { income: 'lots', size: 1, age: 70 } })) as { problems: Array<{ path: string; message: string }>; verdict: string };
    expect(v.problems).toEqual([{ path: 'values.income', message: expect.stringMatching(/Annual household income: the text "lots" is not a number/) }]);
    expect(v.verdict).toBe('unknown');
  });
});

describe('study files', () => {
  it('opens a study with its problems so they can be fixed on screen', async () => {
    const dir = scratch();
    const study = sampleStudy() as unknown as Record<string, any>;
    study.columns.outcomes = [];
    writeFileSync(join(dir, 'broken.json'), JSON.stringify(study));
    const v = ok(await callApi('study.open', { path: join(dir, 'broken.json') })) as { study: { title: string }; problems: Array<{ path: string }> };
    expect(v.study.title).toBe(study.title);
    expect(v.problems.map((p) => p.path)).toContain('columns.outcomes');
  });
  it('refuses a file that is not JSON with the line and column', async () => {
    const dir = scratch();
    writeFileSync(join(dir, 's.json'), '{\n  "title": "x",,\n}');
    const r = await callApi('study.open', { path: join(dir, 's.json') });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/line 2, column/);
  });
  it('saves a study elsewhere with its data paths (and the "listed in" source) rewritten for the new folder', async () => {
    const dir = scratch();
    const target = join(dir, 'copy', 'study.json');
    ok(await callApi('study.save', { path: target, study: sampleStudy(), baseDir: SAMPLE_DIR }));
    const saved = JSON.parse(readFileSync(target, 'utf8'));
    expect(saved.data.path).toBe(join(SAMPLE_DIR, 'applicants.xlsx'));
    expect(saved.data.join[0].path).toBe(join(SAMPLE_DIR, 'payments.xlsx'));
    expect(saved.columns.treatment).toEqual({ listedIn: join(SAMPLE_DIR, 'payments.xlsx') });
    ok(await callApi('data.check', { study: saved, baseDir: join(dir, 'copy') }));
  });
  it('refuses to save an invalid study, naming each problem', async () => {
    const r = await callApi('study.save', { path: join(scratch(), 's.json'), study: { fenceline: 1 } });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems.map((p) => p.path)).toEqual(expect.arrayContaining(['title', 'program']));
  });
  it('keeps data inside the study folder relative', () => {
    expect(rebasePath('data/a.csv', '/x/old', '/x/old')).toBe('data/a.csv');
    expect(rebasePath('a.csv', '/x/old', '/x/new')).toBe('/x/old/a.csv');
    expect(rebasePath('/x/new/in/a.csv', '/x/old', '/x/new')).toBe('in/a.csv');
  });
  it('lists the sample programs with a study file', async () => {
    const v = ok(await callApi('samples.list', {})) as { samples: Array<{ id: string; studyPath: string }> };
    expect(v.samples.map((s) => s.id)).toContain('winter-credit');
  });
});

describe('data.preview and data.check', () => {
  const csv = 'Report of 2025\n\nCASE_ID,INCOME,SIZE,OFFERED,RECEIVED,OFFICE,ARREARS_PRIOR,OUTCOME\n' +
    Array.from({ length: 30 }, (_, i) => `C-${i},${10000 + i * 700},${1 + (i % 3)},${i % 2},${i % 2},Office ${i % 4},${i * 3},${i * 1.5}`).join('\n') + '\n';
  it('finds the header under a title, shows the first 20 rows and suggests roles', async () => {
    const dir = scratch();
    writeFileSync(join(dir, 'units.csv'), csv);
    const program = { variables: [{ key: 'income', label: 'Income', column: 'income' }] };
    const v = ok(await callApi('data.preview', { path: join(dir, 'units.csv'), program })) as {
      headerRow: number; rowCount: number; rows: Array<{ row: number; cells: string[] }>; columns: Array<{ name: string; suggestion: { role: string; variable?: string } | null }>;
    };
    expect(v.headerRow).toBe(3);
    expect(v.rowCount).toBe(30);
    expect(v.rows).toHaveLength(20);
    expect(v.rows[0]).toEqual({ row: 4, cells: ['C-0', '10000', '1', '0', '0', 'Office 0', '0', '0'] });
    const role = Object.fromEntries(v.columns.map((c) => [c.name, c.suggestion?.role === 'variable' ? `variable:${c.suggestion.variable}` : c.suggestion?.role]));
    expect(role).toMatchObject({ CASE_ID: 'id', INCOME: 'variable:income', OFFERED: 'decision', RECEIVED: 'treatment', OFFICE: 'cluster', ARREARS_PRIOR: 'covariate', OUTCOME: 'outcome' });
  });
  it('refuses a damaged workbook with one plain message', async () => {
    const dir = scratch();
    writeFileSync(join(dir, 'units.xlsx'), csv);
    const r = await callApi('data.preview', { path: join(dir, 'units.xlsx') });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems).toEqual([{ path: 'units.xlsx', message: expect.stringMatching(/named like an Excel workbook but holds plain text/) }]);
  });
  it('checks a study that is not saved: rows used and left out', async () => {
    const dir = scratch();
    writeFileSync(join(dir, 'units.csv'), csv.replace('C-5,', ',')); // one blank ID
    const study = {
      fenceline: 1, title: 'T',
      program: { name: 'P', variables: [{ key: 'income', label: 'Income', type: 'continuous', column: 'INCOME' }], rule: { value: 'income', op: '<=', limit: 20000 }, offer: { ifEligible: 1, ifIneligible: 0 } },
      data: { path: 'units.csv' }, columns: { id: 'CASE_ID', outcomes: [{ column: 'OUTCOME' }] },
    };
    const v = ok(await callApi('data.check', { study, baseDir: dir })) as { rowsRead: number; rowsUsed: number; rowsExcluded: Array<{ reason: string; count: number; rows: number[] }>; eligible: number };
    expect(v.rowsRead).toBe(30);
    expect(v.rowsUsed).toBe(29);
    expect(v.rowsExcluded).toEqual([{ reason: 'CASE_ID is blank', count: 1, rows: [9] }]);
    expect(v.eligible).toBe(14); // incomes 10,000 + 700·i ≤ 20,000 for i = 0..14, less the blank-ID row
    const bad = await callApi('data.check', { study: { ...study, columns: { id: 'CASE_IDD', outcomes: [{ column: 'OUTCOME' }] } }, baseDir: dir });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.error.problems[0]!.message).toMatch(/did you mean CASE_ID/);
  });
});

describe('workspace and host services', () => {
  it('refuses workspace methods when the host gave no workspace, in plain words', async () => {
    const r = await callApi('workspace.recent', {});
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/no workspace folder/);
  });
  it('remembers opened studies and lists runs recorded in the workspace file', async () => {
    const ws = scratch();
    const dir = scratch();
    writeFileSync(join(dir, 'study.json'), JSON.stringify({ ...sampleStudy(), data: { ...sampleStudy().data, path: join(SAMPLE_DIR, 'applicants.xlsx'), join: [] }, columns: { ...sampleStudy().columns, treatment: undefined, outcomes: [{ column: 'OFFERED' }] } }));
    ok(await callApi('study.open', { path: join(dir, 'study.json') }, { workspaceDir: ws }));
    const recent = ok(await callApi('workspace.recent', {}, { workspaceDir: ws })) as { studies: Array<{ path: string }>; runs: unknown[] };
    expect(recent.studies.map((s) => s.path)).toEqual([join(dir, 'study.json')]);
    expect(recent.runs).toEqual([]);
    const info = ok(await callApi('workspace.info', {}, { workspaceDir: ws, host: 'browser' })) as { dialogs: boolean; runsDir: string };
    expect(info.dialogs).toBe(false);
    expect(info.runsDir).toBe(join(ws, 'runs'));
  });
  it('lists folders and only the files of the kind asked for', async () => {
    const dir = scratch();
    mkdirSync(join(dir, 'sub'));
    for (const f of ['a.json', 'b.xlsx', 'c.csv', 'd.exe', '.hidden.csv']) writeFileSync(join(dir, f), '');
    const data = ok(await callApi('files.list', { dir, kind: 'data' })) as { entries: Array<{ name: string }> };
    expect(data.entries.map((e) => e.name)).toEqual(['sub', 'b.xlsx', 'c.csv']);
    const studies = ok(await callApi('files.list', { dir, kind: 'study' })) as { entries: Array<{ name: string }> };
    expect(studies.entries.map((e) => e.name)).toEqual(['sub', 'a.json']);
  });
  it('has no dialogs in browser mode and reads only .html memos for the preview', async () => {
    const d = await callApi('dialog.openFile', { purpose: 'data' });
    expect(d.ok).toBe(false);
    const m = await callApi('memo.preview', { path: '/etc/passwd' });
    expect(m.ok).toBe(false);
    if (!m.ok) expect(m.error.problems[0]!.message).toMatch(/not an HTML memo/);
    const opened = await callApi('dialog.openFile', { purpose: 'data' }, { dialogs: { openFile: async () => '/x/y.csv', saveFile: async () => null } });
    expect(opened).toEqual({ ok: true, value: { path: '/x/y.csv' } });
  });
});
