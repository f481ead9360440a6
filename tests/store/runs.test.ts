// Runs: what was run, on which data, with which software and seed, and what came out.

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
    const { recordedAt, runId: id, ...rest } = back;
    expect(id).toBe(runId);
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
