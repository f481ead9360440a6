// figure.map through callApi, as the Map screen calls it: the map of a stored run (the run's
// per-unit columns are kept in the workspace), the analyst's choices checked (their types by the
// registry's Shapes, their fit to the study here, each refusal at its field in plain words), and
// the pickers get what they need. Nothing runs the study again: the data file can be gone. The
// fixture's rule is written out in tests/report/memo-fixture.ts; suppression follows
// docs/method.md §7 (counts 1–10 hidden).

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { workspaceLayout } from '../../main/api/host.ts';
import type { EvaluateReport, MapFigure } from '../../main/contract/api.ts';
import { runStudy } from '../../main/pipeline/run-study.ts';
import { boundaryMapData } from '../../main/report/boundary-map.ts';
import { loadStudyFile } from '../../main/studyfile/load.ts';
import { writeFixture } from '../report/memo-fixture.ts';
import { writeThreeInputFixture } from '../report/map-fixture.ts';

let studyPath: string;
let runId: number;
const workspaceDir = mkdtempSync(join(tmpdir(), 'fenceline-ws-'));
const ctx = { workspaceDir };

/** Evaluate a study into the test workspace and return its run id. */
async function recordRun(path: string): Promise<number> {
  const r = await callApi('study.evaluate', { studyPath: path, outDir: join(dirname(path), 'out'), formats: [], workspacePath: workspaceLayout(workspaceDir).workspacePath, workers: 0 });
  expect(r, JSON.stringify(r.ok ? '' : r.error)).toMatchObject({ ok: true });
  return (r as { value: EvaluateReport }).value.runId!;
}

beforeAll(async () => { studyPath = writeFixture(2500); runId = await recordRun(studyPath); }, 120_000);

const map = (args: Record<string, unknown>) => callApi('figure.map', { runId, ...args }, ctx);
const figure = async (args: Record<string, unknown>): Promise<MapFigure> => {
  const r = await map(args);
  expect(r, JSON.stringify(r.ok ? '' : r.error)).toMatchObject({ ok: true });
  return (r as { value: MapFigure }).value;
};
const refusal = async (args: Record<string, unknown>) => {
  const r = await map(args);
  expect(r.ok).toBe(false);
  return r.ok ? [] : r.error.problems;
};

describe('figure.map refuses choices of the wrong shape before any work', () => {
  it.each([
    [{ axes: { x: 'income' } }, 'args.axes.y', /missing/],
    [{ axes: ['income', 'age'] }, 'args.axes', /must be an object/],
    [{ delta: '0.1' }, 'args.delta', /must be a number/],
    [{ cell: [{ key: 'size', value: 'two' }] }, 'args.cell[0].value', /must be a number/],
    [{ cell: { size: 2 } }, 'args.cell', /must be a list/],
    [{ view: 'points' }, 'args.view', /one of binned, units/],
    [{ colour: 'red' }, 'args.colour', /no field "colour"/],
  ])('%j → %s', async (args, path, message) => {
    const problems = await refusal(args);
    expect(problems).toEqual([{ path, message: expect.stringMatching(message) }]);
  });
});

describe('figure.map refuses choices that do not fit the study, at their field', () => {
  it.each([
    [{ axes: { x: 'size', y: 'age' } }, 'args.axes.x', /"size" is not a continuous input .*Annual household income \(income\), Age of oldest member \(age\)/],
    [{ axes: { x: 'age', y: 'age' } }, 'args.axes.y', /two different inputs/],
    [{ delta: 0.3 }, 'args.delta', /not one of this study's deltas \(0\.05, 0\.1, 0\.2\)/],
    [{ cell: [{ key: 'income', value: 1 }] }, 'args.cell[0].key', /"income" is not a discrete input .*People in household \(size\)/],
    [{ cell: [{ key: 'size', value: 2 }, { key: 'size', value: 3 }] }, 'args.cell[1].key', /chosen twice/],
    [{ cell: [{ key: 'size', value: 9 }] }, 'args.cell[0].value', /People in household has no value 9 .*Choose one of: 1, 2, 3, 4/],
  ])('%j → %s', async (args, path, message) => {
    expect(await refusal(args)).toEqual([{ path, message: expect.stringMatching(message) }]);
  });
});

describe('figure.map draws the chosen map and says what the pickers offer', () => {
  it('by default: the memo’s choices, binned counts, small bins blank', async () => {
    const f = await figure({});
    expect(f.drawn).toEqual({ axes: { x: 'income', y: 'age' }, delta: 0.1, cell: [{ key: 'size', value: expect.any(Number) }], view: 'binned' });
    expect(f.deltas).toEqual([0.05, 0.1, 0.2]);
    expect(f.headlineDelta).toBe(0.1);
    expect(f.continuous).toEqual([
      { key: 'income', label: 'Annual household income', unit: 'USD' },
      { key: 'age', label: 'Age of oldest member', unit: 'years' },
    ]);
    expect(f.discrete).toHaveLength(1);
    expect(f.discrete[0]!.values.map((v) => v.value)).toEqual([1, 2, 3, 4]);
    for (const v of f.discrete[0]!.values) expect(v.nearEdge === null || v.nearEdge === 0 || v.nearEdge > 10).toBe(true);
    expect(f.spec!.units).toBeUndefined();
    for (const v of f.spec!.counts!.values.flat()) if (v !== null) expect(v === 0 || v > 10).toBe(true);
  });
  it('with the axes swapped, another delta and another household size', async () => {
    const f = await figure({ axes: { x: 'age', y: 'income' }, delta: 0.2, cell: [{ key: 'size', value: 3 }] });
    expect(f.drawn).toMatchObject({ axes: { x: 'age', y: 'income' }, delta: 0.2, cell: [{ key: 'size', value: 3 }] });
    expect(f.spec!.x.label).toBe('Age of oldest member');
    expect(f.spec!.delta).toBe(0.2);
    expect(f.spec!.subtitle).toBe('People in household: 3');
  });
  it('the private view carries points, not counts, and says it is private', async () => {
    const f = await figure({ view: 'units' });
    expect(f.drawn.view).toBe('units');
    expect(f.spec!.counts).toBeUndefined();
    expect(f.spec!.units!.offered.length + f.spec!.units!.notOffered.length).toBeGreaterThan(0);
    expect(f.note).toMatch(/Private view: each mark is one unit .*never put in the memo or exported files/);
  });
  it('with three continuous inputs the third is held at its median, and the note says so', async () => {
    const r = await callApi('figure.map', { runId: await recordRun(writeThreeInputFixture(800)), axes: { x: 'y', y: 'w' } }, ctx);
    expect(r.ok).toBe(true);
    const f = (r as { value: MapFigure }).value;
    expect(f.note).toMatch(/Need score held at [\d.]+ points \(median near the edge\); the shading and the band hold the other continuous input at the median named\./);
    expect(f.discrete).toEqual([]);
  });
});

describe('the map is drawn from the stored run', () => {
  it('is the same map as from the run just computed, without the data file and without running the study', async () => {
    const loaded = loadStudyFile(studyPath);
    if (!loaded.ok) throw new Error('fixture study');
    const fresh = await runStudy(loaded.value.study, { baseDir: loaded.value.baseDir, workers: 0 });
    if (!fresh.ok) throw new Error('fixture run');
    const expected = boundaryMapData(fresh.value, { delta: 0.05, view: 'units' }).map!;
    rmSync(join(dirname(studyPath), 'cases.csv')); // a re-run would now fail: the map must come from the workspace
    const f = await figure({ delta: 0.05, view: 'units' });
    expect(f.spec!.units).toEqual({ offered: expected.units.offered, notOffered: expected.units.notOffered });
    expect(f.spec!.grid).toEqual(expected.grid);
  });
  it('refuses a run that is not in the workspace, at its field', async () => {
    expect(await refusal({ runId: 999 })).toEqual([{ path: 'args.runId', message: expect.stringMatching(/no run with id 999/) }]);
  });
});
