// Runs: what was run, on which data, with which software and seed, and what came out.

import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import type { RunInput } from '../../main/store/types.ts';
import { must, openFresh, problemsOf, SHA, tempWorkspacePath } from './helpers.ts';

const study = { fenceline: 1, title: 'Winter credit', settings: { deltas: [0.05, 0.1], draws: 4000, seed: 7 } };

function runOf(studyId: number, studyVersion: number): RunInput {
  return {
    studyId, studyVersion, studyJson: study, settings: study.settings, seed: 7, softwareVersion: '0.1.0', dataSha256: SHA,
    results: {
      estimates: [{ delta: 0.05, effect: -123.4, se: 56.7, n: 812 }, { delta: 0.1, effect: -101.2, se: Number.NaN, n: 0 }],
      warnings: ['Few units near the edge at delta = 0.05.'],
      firstStage: { f: Infinity },
    },
    timings: { import: 1.25, propensity: 12.5, estimate: 0.03 },
    startedAt: '2025-03-01T10:00:00.000Z', finishedAt: '2025-03-01T10:00:14.000Z',
  };
}

describe('runs', () => {
  it('come back exactly as recorded, after reopening', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const { studyId } = must(ws.saveStudy({ name: 'Winter credit', study }));
    const input = runOf(studyId, 1);
    const runId = must(ws.recordRun(input));
    ws.close();

    const again = openFresh(file);
    const back = must(again.getRun(runId));
    again.close();
    const { recordedAt, runId: id, status, studySha256, dataHashes, outDir, files, hasUnits, ...rest } = back;
    expect(id).toBe(runId);
    // recordRun records results only: a finished run with no files and no per-unit columns
    expect({ status, studySha256, dataHashes, outDir, files, hasUnits }).toEqual({ status: 'complete', studySha256: '', dataHashes: {}, outDir: '', files: [], hasUnits: false });
    expect(recordedAt).toMatch(/^2025-01-01T00:00:\d\d\.000Z$/);
    expect(rest).toEqual(input); // toEqual treats NaN as equal to NaN
    const est = (back.results as { estimates: Array<{ se: number }> }).estimates;
    expect(Number.isNaN(est[1]!.se)).toBe(true);
    expect((back.results as { firstStage: { f: number } }).firstStage.f).toBe(Infinity);
  });

  it('are listed newest first, for one study or all', () => {
    const ws = openFresh();
    const a = must(ws.saveStudy({ name: 'A', study })).studyId;
    const b = must(ws.saveStudy({ name: 'B', study })).studyId;
    must(ws.saveStudy({ studyId: a, name: 'A', study }));
    const r1 = must(ws.recordRun(runOf(a, 1)));
    const r2 = must(ws.recordRun(runOf(b, 1)));
    const r3 = must(ws.recordRun(runOf(a, 2)));
    expect(must(ws.listRuns()).map((r) => r.runId)).toEqual([r3, r2, r1]);
    const forA = must(ws.listRuns(a));
    expect(forA.map((r) => [r.runId, r.studyVersion])).toEqual([[r3, 2], [r1, 1]]);
    expect(forA[0]).toMatchObject({ seed: 7, softwareVersion: '0.1.0', dataSha256: SHA, startedAt: '2025-03-01T10:00:00.000Z' });
    expect('results' in forA[0]!).toBe(false);
    ws.close();
  });

  it('must point at a saved study version', () => {
    const ws = openFresh();
    const { studyId } = must(ws.saveStudy({ name: 'A', study }));
    expect(problemsOf(ws.recordRun(runOf(studyId, 2)))[0]).toMatchObject({ path: 'studyVersion', message: expect.stringMatching(/no version 2 of study 1; save the study first/) });
    expect(problemsOf(ws.recordRun(runOf(99, 1)))[0]!.message).toMatch(/no version 1 of study 99/);
    expect(must(ws.listRuns())).toEqual([]);
    ws.close();
  });

  it('refuse wrong fields with their paths', () => {
    const ws = openFresh();
    const { studyId } = must(ws.saveStudy({ name: 'A', study }));
    const good = runOf(studyId, 1);
    const cases: Array<[Partial<RunInput>, string, RegExp]> = [
      [{ seed: 1.5 }, 'seed', /whole number/],
      [{ timings: { propensity: -1 } }, 'timings.propensity', /zero or more/],
      [{ timings: [] as unknown as Record<string, number> }, 'timings', /table of stage names/],
      [{ finishedAt: '2025-03-01T09:59:59Z' }, 'finishedAt', /finished .* before it started/],
      [{ startedAt: '1 March' }, 'startedAt', /ISO 8601/],
      [{ dataSha256: 'x' }, 'dataSha256', /64 hexadecimal/],
      [{ softwareVersion: '' }, 'softwareVersion', /missing or empty/],
      [{ studyId: 0 }, 'studyId', /whole-number id of a saved study/],
      [{ results: { aps: new Float64Array(3) } }, 'results.aps', /Float64Array/],
    ];
    for (const [change, path, message] of cases) {
      const problems = problemsOf(ws.recordRun({ ...good, ...change }));
      expect(problems.map((p) => p.path), path).toEqual([path]);
      expect(problems[0]!.message).toMatch(message);
    }
    expect(problemsOf(ws.getRun(5))[0]!.message).toMatch(/no run with id 5/);
    expect(problemsOf(ws.listRuns(-1))[0]!.path).toBe('studyId');
    ws.close();
  });
});

describe('stored runs (schema 4): recorded before their files, immutable once finished', () => {
  const units = () => ({
    rowNumbers: Int32Array.from([2, 3, 5]),
    columns: [
      { name: 'id', kind: 'text' as const, values: ['A-1', 'A-2', 'A-4'] },
      { name: 'aps:0', kind: 'f64' as const, values: Float64Array.from([0, 0.25, Number.NaN]) },
      { name: 'straddle:0', kind: 'i32' as const, values: Int32Array.from([0, 1, -1]) },
    ],
  });
  const begin = (ws: ReturnType<typeof openFresh>) => {
    const { studyId } = must(ws.saveStudy({ name: 'Winter credit', study }));
    return must(ws.beginRun({ ...runOf(studyId, 1), studySha256: SHA, dataHashes: { 'roster.xlsx': SHA }, outDir: '/tmp/out', units: units() }));
  };

  it('a run begun is "writing" with its per-unit columns; finished, it lists its files', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const runId = begin(ws);
    expect(must(ws.getRun(runId))).toMatchObject({ status: 'writing', files: [], hasUnits: true, outDir: '/tmp/out', dataHashes: { 'roster.xlsx': SHA } });
    must(ws.finishRun(runId, ['/tmp/out/results.json']));
    ws.close();
    const again = openFresh(file);
    expect(must(again.getRun(runId))).toMatchObject({ status: 'complete', files: ['/tmp/out/results.json'] });
    const back = must(again.loadRunUnits(runId));
    expect(back.rowNumbers).toEqual(Int32Array.from([2, 3, 5]));
    expect(back.columns).toEqual(units().columns);
    // the run's columns are not listed among the analyst's imported datasets
    expect(must(again.listDatasets())).toEqual([]);
    expect(must(again.listRuns()).map((r) => r.status)).toEqual(['complete']);
    again.close();
  });

  it('a finished run cannot be changed, finished again, removed, nor its columns deleted', () => {
    const ws = openFresh();
    const runId = begin(ws);
    must(ws.finishRun(runId, []));
    expect(problemsOf(ws.finishRun(runId, ['x']))[0]!.message).toMatch(/not waiting to be finished/);
    expect(problemsOf(ws.discardUnfinishedRun(runId))[0]!.message).toMatch(/finished or absent/);
    const raw = ws.path;
    ws.close();
    const db = new Database(raw);
    expect(() => db.prepare("UPDATE runs SET results = '{}' WHERE id = ?").run(runId)).toThrow(/cannot be changed/);
    expect(() => db.prepare('DELETE FROM runs WHERE id = ?').run(runId)).toThrow(/cannot be deleted/);
    expect(() => db.prepare("DELETE FROM datasets WHERE role = 'run-units'").run()).toThrow(/cannot be deleted/);
    db.close();
  });

  it('an unfinished run may only be finished, or removed with its columns', () => {
    const ws = openFresh();
    const runId = begin(ws);
    const raw = ws.path;
    ws.close();
    const db = new Database(raw);
    expect(() => db.prepare("UPDATE runs SET results = '{}' WHERE id = ?").run(runId)).toThrow(/only be marked finished/);
    db.close();
    const again = openFresh(raw);
    must(again.discardUnfinishedRun(runId));
    expect(problemsOf(again.getRun(runId))[0]!.message).toMatch(/no run with id/);
    expect(problemsOf(again.loadRunUnits(runId))[0]!.message).toMatch(/no per-unit columns/);
    again.close();
  });
});
