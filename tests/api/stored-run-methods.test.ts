// The methods that read a stored run by its id: workspace.run (with its fingerprint and files),
// figure.edge, run.exportMemo — none runs the study again (the data file is deleted first) — and
// study.fingerprint, which the screens compare with the run's to say "out of date".

import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { workspaceLayout } from '../../main/api/host.ts';
import type { EdgeFigures, EvaluateReport, RunExportedMemo, StudyFingerprint, WorkspaceRun } from '../../main/contract/api.ts';
import { writeFixture } from '../report/memo-fixture.ts';

const workspaceDir = mkdtempSync(join(tmpdir(), 'fenceline-stored-'));
const ctx = { workspaceDir };
let studyPath: string;
let report: EvaluateReport;

const value = <T>(r: { ok: boolean }): T => {
  expect(r, JSON.stringify(r)).toMatchObject({ ok: true });
  return (r as unknown as { value: T }).value;
};

beforeAll(async () => {
  studyPath = writeFixture(2500);
  report = value<EvaluateReport>(await callApi('study.evaluate', {
    studyPath, outDir: join(dirname(studyPath), 'run'), formats: ['html'], workspacePath: workspaceLayout(workspaceDir).workspacePath, workers: 0,
  }));
  rmSync(join(dirname(studyPath), 'cases.csv')); // from here on, running the study again would fail
}, 120_000);

describe('a stored run', () => {
  it('reopens complete, with its files and the fingerprint of the study as run', async () => {
    const run = value<WorkspaceRun>(await callApi('workspace.run', { runId: report.runId! }, ctx));
    expect(run.status).toBe('complete');
    expect(run.hasUnits).toBe(true);
    expect(run.files.map((f) => f.split(/[\\/]/).pop()).sort()).toEqual(['memo.html', 'results.json', 'units.csv']);
    for (const f of run.files) expect(existsSync(f)).toBe(true);
    expect(run.studySha256).toMatch(/^[0-9a-f]{64}$/);
    const study = JSON.parse(readFileSync(studyPath, 'utf8'));
    const same = value<StudyFingerprint>(await callApi('study.fingerprint', { study, baseDir: dirname(studyPath) }));
    expect(same.sha256).toBe(run.studySha256);
    // the same study with its keys in another order: the same fingerprint
    const reordered = Object.fromEntries(Object.entries(study).reverse());
    expect(value<StudyFingerprint>(await callApi('study.fingerprint', { study: reordered, baseDir: dirname(studyPath) })).sha256).toBe(run.studySha256);
    // a limit changed: another fingerprint (the screens then say the results are out of date)
    const edited = structuredClone(study);
    edited.settings = { ...edited.settings, seed: (edited.settings?.seed ?? 1) + 1 };
    expect(value<StudyFingerprint>(await callApi('study.fingerprint', { study: edited, baseDir: dirname(studyPath) })).sha256).not.toBe(run.studySha256);
    expect(value<StudyFingerprint>(await callApi('study.fingerprint', { study: { title: 'not a study' } })).sha256).toBeNull();
  });

  it('draws its edge figures from the stored columns, binned, small bins hidden', async () => {
    const { figures } = value<EdgeFigures>(await callApi('figure.edge', { runId: report.runId! }, ctx));
    const kinds = figures.map((f) => f.spec.kind);
    expect(kinds).toContain('binnedMeans');
    expect(kinds).toContain('density');
    for (const f of figures) {
      if (f.spec.kind === 'density') for (const b of f.spec.bins) expect(b.count === null || b.count === 0 || b.count > 10).toBe(true);
      expect(f.alt.length).toBeGreaterThan(10);
    }
  });

  it('writes its memo again into another folder without running the study', async () => {
    const outDir = join(mkdtempSync(join(tmpdir(), 'fenceline-export-')), 'memo');
    const done = value<RunExportedMemo>(await callApi('run.exportMemo', { runId: report.runId!, outDir, formats: ['html', 'xlsx'] }, ctx));
    expect(done.files.map((f) => f.split(/[\\/]/).pop()).sort()).toEqual(['memo.html', 'tables.xlsx']);
    const original = readFileSync(report.files.find((f) => f.endsWith('memo.html'))!, 'utf8');
    const again = readFileSync(join(outDir, 'memo.html'), 'utf8');
    // the same memo but for its date line
    const strip = (html: string) => html.replace(/\d{1,2} [A-Z][a-z]+ \d{4}/g, 'DATE').replace(/"20\d\d-[^"]*"/g, '"T"');
    expect(strip(again)).toBe(strip(original));
  });
});

describe('the app session kept in the workspace', () => {
  it('hands back what was saved, as it was; none before; a fresh folder has none', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-session-'));
    expect(value(await callApi('session.load', {}, { workspaceDir: dir }))).toEqual({ state: null, savedAt: null });
    const state = { step: 'rule', draft: { title: 'Edited, not saved', program: { rule: { all: [] } } }, runId: 3 };
    value(await callApi('session.save', { state }, { workspaceDir: dir }));
    const back = value<{ state: unknown; savedAt: string }>(await callApi('session.load', {}, { workspaceDir: dir }));
    expect(back.state).toEqual(state);
    expect(back.savedAt).toMatch(/^\d{4}-\d\d-\d\dT/);
  });
  it('refuses a state too large to keep, in plain words', async () => {
    const r = await callApi('session.save', { state: { blob: 'x'.repeat(6 * 2 ** 20) } }, { workspaceDir: mkdtempSync(join(tmpdir(), 'fenceline-session-')) });
    expect(r.ok ? '' : r.error.problems[0]!.message).toMatch(/too large to keep/);
  });
});
