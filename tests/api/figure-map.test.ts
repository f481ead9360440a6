// figure.map through callApi, as the Map screen calls it: the analyst's choices are checked
// (their types by the registry's Shapes, their fit to the study here, each refusal at its field
// in plain words), the pickers get what they need, and the run behind the map is cached so a
// slider move does not run the study again. The fixture's rule is written out in
// tests/report/memo-fixture.ts; suppression follows docs/method.md §7 (counts 1–10 hidden).

import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { clearMapRunCache, MAX_CACHED_RUNS, mapRunCacheInfo } from '../../main/api/figures.ts';
import { MAX_STORED_RUNS, mapRunDir } from '../../main/api/map-run-store.ts';
import type { MapFigure } from '../../main/contract/api.ts';
import { fixtureCsv, writeFixture } from '../report/memo-fixture.ts';
import { writeThreeInputFixture } from '../report/map-fixture.ts';

let studyPath: string;
beforeAll(() => { clearMapRunCache(); studyPath = writeFixture(2500); });

const map = (args: Record<string, unknown>) => callApi('figure.map', { studyPath, workers: 0, ...args });
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
    const before = mapRunCacheInfo().runsStarted;
    const problems = await refusal(args);
    expect(problems).toEqual([{ path, message: expect.stringMatching(message) }]);
    expect(mapRunCacheInfo().runsStarted).toBe(before);
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
    const r = await callApi('figure.map', { studyPath: writeThreeInputFixture(800), workers: 0, axes: { x: 'y', y: 'w' } });
    expect(r.ok).toBe(true);
    const f = (r as { value: MapFigure }).value;
    expect(f.note).toMatch(/Need score held at [\d.]+ points \(median near the edge\); the shading and the band hold the other continuous input at the median named\./);
    expect(f.discrete).toEqual([]);
  });
});

describe('the run behind the map is cached', () => {
  it('runs the study once for several choices, again when the data change, and keeps at most two runs', async () => {
    clearMapRunCache();
    const start = mapRunCacheInfo().runsStarted;
    await figure({});
    await Promise.all([figure({ delta: 0.05 }), figure({ axes: { x: 'age', y: 'income' } })]);
    await figure({ delta: 0.2, view: 'units' });
    expect(mapRunCacheInfo().runsStarted - start).toBe(1);
    // Same path, new data: a new run (an edited workbook is never drawn from a stale run).
    const csv = join(dirname(studyPath), 'cases.csv');
    const old = readFileSync(csv, 'utf8');
    writeFileSync(csv, fixtureCsv(2500, 12));
    const again = await figure({});
    expect(mapRunCacheInfo().runsStarted - start).toBe(2);
    writeFileSync(csv, old);
    await figure({});
    expect(mapRunCacheInfo().runsStarted - start).toBe(2); // the first data's run is still cached
    expect(again.spec).not.toBeNull();
    await callApi('figure.map', { studyPath: writeThreeInputFixture(300), workers: 0 });
    expect(mapRunCacheInfo().entries).toBe(MAX_CACHED_RUNS);
  });
});

describe('the run is also kept in the workspace, for hosts that answer each call on a fresh thread', () => {
  it('a call with an empty memory cache draws from the stored run, the same map, without running the study', async () => {
    const workspaceDir = mkdtempSync(join(tmpdir(), 'fenceline-ws-'));
    clearMapRunCache();
    const start = mapRunCacheInfo().runsStarted;
    const args = { studyPath, workers: 0, delta: 0.05, view: 'binned' };
    const first = await callApi('figure.map', args, { workspaceDir });
    expect(mapRunCacheInfo().runsStarted - start).toBe(1);
    clearMapRunCache(); // as a new worker thread starts with nothing in memory
    const second = await callApi('figure.map', args, { workspaceDir });
    expect(mapRunCacheInfo().runsStarted - start).toBe(1);
    expect(second).toEqual(first);
    // A damaged file is not trusted: it is removed and the study runs again.
    const [file] = readdirSync(mapRunDir(workspaceDir));
    writeFileSync(join(mapRunDir(workspaceDir), file!), 'not a run');
    clearMapRunCache();
    const third = await callApi('figure.map', args, { workspaceDir });
    expect(mapRunCacheInfo().runsStarted - start).toBe(2);
    expect(third).toEqual(first);
    // At most two runs are kept.
    for (const n of [300, 301]) await callApi('figure.map', { studyPath: writeThreeInputFixture(n), workers: 0 }, { workspaceDir });
    expect(readdirSync(mapRunDir(workspaceDir)).filter((f) => f.endsWith('.run'))).toHaveLength(MAX_STORED_RUNS);
  });
});
