// The boundary-region map's options: axes, delta, discrete cell, view. Outside checks: the
// fixture's rule written out by hand (memo-fixture.ts) for the offer grid; point-to-line distance
// in scaled units (closed-form geometry) for the band; the textbook median (middle order
// statistic, or the mean of the two middle ones) for inputs held fixed; the small-cell policy of
// docs/method.md §7 (US CMS: counts 1–10 hidden) for the binned view.

import { beforeAll, describe, expect, it } from 'vitest';
import { chartConfig } from '../../main/report/charts/config.ts';
import type { BoundaryMapSpec } from '../../main/report/charts/spec.ts';
import { boundaryMapData, figureData } from '../../main/report/figure-data.ts';
import { memoFiles, PrivateViewRefused, renderMemoDocument } from '../../main/report/memo-files.ts';
import type { Figure } from '../../main/report/model/document.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { figuresOf } from '../../main/report/render/figures.ts';
import { runStudy, type StudyRun } from '../../main/pipeline/run-study.ts';
import { loadStudyFile } from '../../main/studyfile/load.ts';
import { runFixture } from './memo-fixture.ts';
import { SUM_LIMIT, writeThreeInputFixture } from './map-fixture.ts';

let run: StudyRun;
let run3: StudyRun;
beforeAll(async () => {
  run = await runFixture(3000);
  const loaded = loadStudyFile(writeThreeInputFixture());
  if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
  const r = await runStudy(loaded.value.study, { baseDir: loaded.value.baseDir, workers: 0 });
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  run3 = r.value;
}, 90_000);

const mid = (e: number[], i: number) => (e[i]! + e[i + 1]!) / 2;
// The fixture's rule (memo-fixture.ts): income ≤ limit by size, and age ≥ 65 or income per person ≤ 7,000.
const LIMITS = [22000, 29000, 36000, 43000];
const offered = (income: number, age: number, size: number) => (income <= LIMITS[size - 1]! && (age >= 65 || income / size <= 7000) ? 1 : 0);
const col = (r: StudyRun, key: string) => {
  const j = r.program.continuous.findIndex((v) => v.key === key);
  if (j >= 0) return r.prepared.cols.continuous[j]!;
  return r.prepared.cols.discrete[r.program.discrete.findIndex((v) => v.key === key)]!;
};

describe('axes', () => {
  it('swapping the axes swaps the grid’s axes and transposes the shading', () => {
    const a = boundaryMapData(run, { mapCells: 24 }).map!;
    const b = boundaryMapData(run, { mapCells: 24, axes: { x: 'age', y: 'income' } }).map!;
    expect([a.x.key, a.y.key]).toEqual(['income', 'age']);
    expect([b.x.key, b.y.key]).toEqual(['age', 'income']);
    expect(b.x.label).toBe('Age of oldest member');
    expect(b.grid.xEdges).toEqual(a.grid.yEdges);
    expect(b.grid.yEdges).toEqual(a.grid.xEdges);
    const size = b.cell[0]!.value;
    let agree = 0;
    let cells = 0;
    b.grid.probability.forEach((row, iy) => row.forEach((p, ix) => {
      expect(p).toBe(a.grid.probability[ix]![iy]!);
      expect(p).toBe(offered(mid(b.grid.yEdges, iy), mid(b.grid.xEdges, ix), size));
      cells++;
      if (b.grid.inBand[iy]![ix] === a.grid.inBand[ix]![iy]) agree++;
    }));
    // The band comes from Monte Carlo balls whose points meet the axes in another order: nearly the same cells.
    expect(agree / cells).toBeGreaterThan(0.95);
  });
});

describe('delta', () => {
  it('a larger delta widens the band, which holds every cell close to a deciding edge and none far from all edges', () => {
    const size = 2;
    const limit = LIMITS[size - 1]!;
    const banded: number[] = [];
    for (const delta of [0.05, 0.1, 0.2]) {
      // Cells about 0.07 scaled units wide, so the narrowest band spans more than one.
      const m = boundaryMapData(run, { mapCells: 100, delta, cell: [{ key: 'size', value: size }] }).map!;
      expect(m.delta).toBe(delta);
      let count = 0;
      let forced = 0;
      m.grid.inBand.forEach((row, iy) => row.forEach((inBand, ix) => {
        const x = mid(m.grid.xEdges, ix);
        const y = mid(m.grid.yEdges, iy);
        // Distances in scaled units (income / 10,000, age / 10) to each criterion's line.
        const dIncome = Math.abs(x - limit) / 10000;
        const dAge = Math.abs(y - 65) / 10;
        const dPerPerson = Math.abs(x / size - 7000) / (10000 / size);
        if (inBand) { count++; expect(Math.min(dIncome, dAge, dPerPerson)).toBeLessThanOrEqual(delta + 1e-9); }
        // Age well past 65: the income limit alone decides, so a ball crossing it well (centre within delta/2) is in the band.
        if (dIncome < delta / 2 && (y - 65) / 10 > delta) { forced++; expect(inBand).toBe(true); }
      }));
      expect(forced).toBeGreaterThan(0);
      banded.push(count);
    }
    expect(banded[0]!).toBeGreaterThan(0);
    expect(banded[1]!).toBeGreaterThan(banded[0]!);
    expect(banded[2]!).toBeGreaterThan(banded[1]!);
  });
});

describe('discrete cell', () => {
  it.each([1, 3])('draws the chosen household size %i with its own income limit', (size) => {
    const m = boundaryMapData(run, { mapCells: 20, cell: [{ key: 'size', value: size }] }).map!;
    expect(m.cell).toEqual([{ key: 'size', value: size }]);
    expect(m.panel).toBe(`People in household: ${size}`);
    m.grid.probability.forEach((row, iy) => row.forEach((p, ix) => expect(p).toBe(offered(mid(m.grid.xEdges, ix), mid(m.grid.yEdges, iy), size))));
  });
  it('in the binned view a bin with 1 to 10 units is blank, and one with more shows its count', () => {
    const m = boundaryMapData(run, { cell: [{ key: 'size', value: 1 }], countCells: [12, 10] }).map!;
    expect(m.view).toBe('binned');
    const { xEdges, yEdges, values } = m.counts;
    const raw = values.map((row) => row.map(() => 0));
    const income = col(run, 'income'), age = col(run, 'age'), size = col(run, 'size');
    const nx = xEdges.length - 1, ny = yEdges.length - 1;
    for (let r = 0; r < run.prepared.cols.n; r++) {
      if (size[r] !== 1) continue;
      const ix = Math.floor(((income[r]! - xEdges[0]!) / (xEdges[nx]! - xEdges[0]!)) * nx);
      const iy = Math.floor(((age[r]! - yEdges[0]!) / (yEdges[ny]! - yEdges[0]!)) * ny);
      if (ix >= 0 && iy >= 0 && ix < nx && iy < ny) raw[iy]![ix]!++;
    }
    let small = 0, large = 0;
    raw.forEach((row, iy) => row.forEach((c, ix) => {
      const shown = values[iy]![ix]!;
      if (c >= 1 && c <= 10) { small++; expect(shown).toBeNull(); }
      else { if (c > 10) large++; expect(shown).toBe(c); }
    }));
    expect(small).toBeGreaterThan(0);
    expect(large).toBeGreaterThan(0);
  });
});

describe('the private units view', () => {
  it('shows each unit of the cell inside the plot as a point, offered apart from not offered', () => {
    const m = boundaryMapData(run, { view: 'units', cell: [{ key: 'size', value: 2 }] }).map!;
    expect(m.view).toBe('units');
    expect('counts' in m).toBe(false);
    const income = col(run, 'income'), age = col(run, 'age'), size = col(run, 'size');
    const [x0, x1] = [m.grid.xEdges[0]!, m.grid.xEdges.at(-1)!];
    const [y0, y1] = [m.grid.yEdges[0]!, m.grid.yEdges.at(-1)!];
    const want = { offered: [] as string[], notOffered: [] as string[] };
    for (let r = 0; r < run.prepared.cols.n; r++) {
      if (size[r] !== 2 || income[r]! < x0 || income[r]! > x1 || age[r]! < y0 || age[r]! > y1) continue;
      (run.prepared.z[r] === 1 ? want.offered : want.notOffered).push(`${income[r]},${age[r]}`);
    }
    const got = (pts: Array<{ x: number; y: number }>) => pts.map((p) => `${p.x},${p.y}`).sort();
    expect(got(m.units.offered)).toEqual(want.offered.sort());
    expect(got(m.units.notOffered)).toEqual(want.notOffered.sort());
    expect(m.units.total).toBe(want.offered.length + want.notOffered.length);
    expect(m.units.drawn).toBe(m.units.total);
  });
  it('draws an even sample when there are more units than points allowed', () => {
    const all = boundaryMapData(run, { view: 'units' }).map!;
    const few = boundaryMapData(run, { view: 'units', maxPoints: 100 }).map!;
    expect(few.units.total).toBe(all.units.total);
    expect(few.units.drawn).toBeLessThanOrEqual(100);
    expect(few.units.drawn).toBeGreaterThanOrEqual(50);
    expect(few.units.offered.length + few.units.notOffered.length).toBe(few.units.drawn);
  });
  it('the chart tells offered from not offered by shape and by colour, and draws no count circles', () => {
    const m = boundaryMapData(run, { view: 'units', maxPoints: 200 }).map!;
    const spec: BoundaryMapSpec = { kind: 'boundaryMap', x: m.x, y: m.y, grid: m.grid, delta: m.delta, units: { offered: m.units.offered, notOffered: m.units.notOffered } };
    const datasets = chartConfig(spec).data.datasets as unknown as Array<{ label: string; pointStyle: string; pointBackgroundColor: string; data: unknown[] }>;
    const on = datasets.find((d) => d.label === 'Offered (a unit)')!;
    const off = datasets.find((d) => d.label === 'Not offered (a unit)')!;
    expect(on.data.length + off.data.length).toBe(m.units.drawn);
    expect(on.pointStyle).not.toBe(off.pointStyle);
    expect(on.pointBackgroundColor).not.toBe(off.pointBackgroundColor);
    expect(datasets.some((d) => /circle area shows the count/.test(d.label))).toBe(false);
  });
});

describe('three continuous inputs', () => {
  it('holds the third at its median near the edge (named in the note) and shades the rule there', () => {
    const m = boundaryMapData(run3, { mapCells: 20, axes: { x: 'x', y: 'y' } }).map!;
    const k = run3.results.settings.deltas.indexOf(m.delta);
    const aps = run3.propensity.aps[k]!;
    const w = col(run3, 'w');
    const near: number[] = [];
    for (let r = 0; r < w.length; r++) if (aps[r]! > 0 && aps[r]! < 1) near.push(w[r]!);
    near.sort((a, b) => a - b);
    const h = near.length >> 1;
    const median = near.length % 2 ? near[h]! : (near[h - 1]! + near[h]!) / 2;
    expect(m.heldFixed).toHaveLength(1);
    const shown = /^Waiting score held at ([\d.,]+) points \(median near the edge\)$/.exec(m.heldFixed[0]!);
    expect(shown).not.toBeNull();
    expect(Number(shown![1]!.replace(/,/g, ''))).toBeCloseTo(median, 1);
    m.grid.probability.forEach((row, iy) => row.forEach((p, ix) => {
      const sum = mid(m.grid.xEdges, ix) + mid(m.grid.yEdges, iy) + median;
      if (Math.abs(sum - SUM_LIMIT) > 1e-9) expect(p).toBe(sum <= SUM_LIMIT ? 1 : 0);
    }));
  });
});

describe('memo code paths never carry the units view', () => {
  it('the memo’s figure data is the binned view', () => {
    const f = figureData(run, { mapCells: 20 });
    expect(f.boundaryMap!.view).toBe('binned');
    expect('units' in f.boundaryMap!).toBe(false);
  });
  it('memo-files refuses figure data whose map shows individual units, in any format or none', async () => {
    const figures = { ...figureData(run, { mapCells: 20 }), boundaryMap: boundaryMapData(run, { view: 'units', mapCells: 20 }).map as never };
    for (const formats of [['html'], ['pdf', 'docx', 'xlsx'], []] as const) {
      await expect(memoFiles(run.results, figures, formats, { createdAt: '2025-01-01T00:00:00Z' })).rejects.toThrow(PrivateViewRefused);
    }
  });
  it('rendering refuses a memo document with a map of individual units', async () => {
    const doc = buildMemo(run.results, figureData(run, { mapCells: 20 }), { createdAt: '2025-01-01T00:00:00Z' });
    const fig = figuresOf(doc).find((f) => f.id === 'fig-boundary-map') as Figure;
    expect(fig).toBeDefined();
    (fig.chart as BoundaryMapSpec).units = { offered: [{ x: 1, y: 1 }], notOffered: [] };
    await expect(renderMemoDocument(doc, ['html'])).rejects.toThrow(/binned counts only/);
  });
});

describe('options that do not fit the run are faults here (the api words them for the analyst)', () => {
  it.each([
    [{ axes: { x: 'size', y: 'age' } }, /not a continuous input/],
    [{ axes: { x: 'age', y: 'age' } }, /must be different/],
    [{ delta: 0.3 }, /not one of the run's deltas/],
    [{ cell: [{ key: 'income', value: 1 }] }, /not a discrete input/],
  ])('%j', (opts, message) => {
    expect(() => boundaryMapData(run, opts)).toThrow(message);
  });
});
