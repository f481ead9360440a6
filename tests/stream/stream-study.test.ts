// The streamed path (main/pipeline/stream-study.ts) against the in-memory path on the same rows:
// an invented file with a known effect written by DuckDB itself as Parquet and as .csv, chunks of
// 7,777 rows (not a divisor of the row count). The in-memory path is the reference here (it is
// itself checked against R, statsmodels and mpmath in tests/reference); the accumulated normal
// equations are checked against those outside references directly in cross-products.test.ts.

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { fixtureCsv, fixtureStudy } from '../report/memo-fixture.ts';
import { duckdb, inMemory, INVENTED_EFFECT, inventedRowsSql, inventedStudy, relDiff, streamed, writeStudy } from './helpers.ts';

const ROWS = 20_000;
const TOL = 1e-9;

function expectSameEstimates(a: Results, b: Results): void {
  expect(b.study.rowsUsed).toBe(a.study.rowsUsed);
  expect(b.scales.map((s) => s.scale)).toEqual(a.scales.map((s) => s.scale));
  expect(b.design.byDelta).toEqual(a.design.byDelta);
  expect(b.settings.variance).toBe(a.settings.variance);
  expect(b.balance.length).toBe(a.balance.length);
  a.balance.forEach((x, j) => {
    const y = b.balance[j]!;
    expect([y.covariate, y.delta, y.n, y.clusters]).toEqual([x.covariate, x.delta, x.n, x.clusters]);
    for (const key of ['diff', 'se', 'p', 'standardizedDiff', 'meanOffered', 'meanNotOffered'] as const) expect(relDiff(y[key], x[key])).toBeLessThan(TOL);
  });
  a.balanceJoint.forEach((x, k) => {
    const y = b.balanceJoint[k]!;
    expect([y.n, y.df, y.variance, y.clusters, y.tested]).toEqual([x.n, x.df, x.variance, x.clusters, x.tested]);
    expect(relDiff(y.statistic, x.statistic)).toBeLessThan(TOL);
    expect(relDiff(y.p, x.p)).toBeLessThan(TOL);
  });
  expect(b.findings.balance.verdict).toBe(a.findings.balance.verdict);
  // With every unit in the subsample (fewer than 200,000), the density tests and the local-linear
  // cross-check see the same units in the same order as in memory.
  expect(b.streamed?.subsample?.every).toBe(true);
  expect(b.density.map((d) => [d.path, d.n])).toEqual(a.density.map((d) => [d.path, d.n]));
  a.density.forEach((x, j) => {
    expect(relDiff(b.density[j]!.logDifference, x.logDifference)).toBeLessThan(TOL);
    expect(relDiff(b.density[j]!.p, x.p)).toBeLessThan(TOL);
  });
  expect(b.localLinearNote).toBe(a.localLinearNote);
  a.outcomes.forEach((o, i) => {
    const s = b.outcomes[i]!;
    expect(s.missing).toBe(o.missing);
    for (const [x, y] of [[o.naiveOls, s.naiveOls], [o.ivNoControl, s.ivNoControl]] as const) {
      expect(y.n).toBe(x.n);
      expect(relDiff(y.estimate, x.estimate)).toBeLessThan(TOL);
      expect(relDiff(y.se, x.se)).toBeLessThan(TOL);
    }
    o.byDelta.forEach((x, k) => {
      const y = s.byDelta[k]!;
      expect([y.n, y.offered, y.estimable, y.clusters, y.variance]).toEqual([x.n, x.offered, x.estimable, x.clusters, x.variance]);
      expect(relDiff(y.estimate, x.estimate)).toBeLessThan(TOL);
      expect(relDiff(y.se, x.se)).toBeLessThan(TOL);
      expect(relDiff(y.firstStage?.coef, x.firstStage?.coef)).toBeLessThan(TOL);
      expect(relDiff(y.firstStage?.se, x.firstStage?.se)).toBeLessThan(TOL);
      expect(relDiff(y.firstStage?.F, x.firstStage?.F)).toBeLessThan(TOL);
      expect(relDiff(y.reducedForm?.coef, x.reducedForm?.coef)).toBeLessThan(TOL);
      expect(relDiff(y.reducedForm?.se, x.reducedForm?.se)).toBeLessThan(TOL);
      expect(relDiff(y.ci?.[0], x.ci?.[0])).toBeLessThan(TOL);
      expect(relDiff(y.arCi?.[0]?.[0], x.arCi?.[0]?.[0])).toBeLessThan(TOL);
      expect(relDiff(y.baseline?.mean, x.baseline?.mean)).toBeLessThan(TOL);
      expect(y.controls).toEqual(x.controls);
    });
    expect(s.localLinear === null).toBe(o.localLinear === null);
    if (o.localLinear && s.localLinear) {
      expect(relDiff(s.localLinear.bandwidth, o.localLinear.bandwidth)).toBeLessThan(TOL);
      expect(relDiff(s.localLinear.estimate, o.localLinear.estimate)).toBeLessThan(TOL);
      expect(relDiff(s.localLinear.se, o.localLinear.se)).toBeLessThan(TOL);
    }
  });
}

describe('streamed Parquet = in-memory .csv, invented file with a known effect', () => {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-stream-'));
  let memory: Results;
  let stream: Results;
  beforeAll(async () => {
    await duckdb(
      `CREATE TABLE rebate AS ${inventedRowsSql(ROWS, 11)}`,
      `COPY rebate TO '${join(dir, 'rebate.parquet')}' (FORMAT parquet)`,
      `COPY rebate TO '${join(dir, 'rebate.csv')}' (FORMAT csv, HEADER)`,
    );
    memory = await inMemory(writeStudy(dir, 'csv.json', inventedStudy('rebate.csv')));
    const run = await streamed(writeStudy(dir, 'parquet.json', inventedStudy('rebate.parquet')), 7_777);
    if (!run.ok) throw new Error(JSON.stringify(run.problems));
    stream = run.value.results;
  }, 300_000);

  it('gives the same effect, CR1 standard errors and first stage to 1e-9 (controls and clusters)', () => {
    expect(stream.settings.variance).toBe('CR1');
    expect(stream.scales[0]!.source).toBe('sample-sd');
    expect(stream.outcomes[0]!.byDelta.every((b) => b.estimable && b.clusters === 97 && b.controls.includes('AGE'))).toBe(true);
    expect(stream.balance.map((r) => r.covariate)).toEqual(['PRIOR', 'PRIOR', 'PRIOR']);
    expect(stream.balanceJoint.every((j) => j.statistic !== null && j.variance === 'CR1')).toBe(true);
    expectSameEstimates(memory, stream);
  });

  it('counts the rows with NULLs by reason (Parquet rows are numbered from 1, .csv lines from 2)', () => {
    const blank = stream.study.rowsExcluded.find((e) => e.reason === 'INCOME is blank')!;
    expect(blank.count).toBe(Math.ceil(ROWS / 1009));
    expect(blank.rows.slice(0, 3)).toEqual([1, 1010, 2019]);
    expect(stream.study.rowsExcluded.map((e) => [e.reason, e.count])).toEqual(memory.study.rowsExcluded.map((e) => [e.reason, e.count]));
    expect(stream.study.rowsRead).toBe(ROWS);
    expect(stream.outcomes[0]!.missing).toBeGreaterThan(30);
    expect(stream.study.notes.some((n) => n.code === 'outcome-missing')).toBe(true);
  });

  it('recovers the invented effect (simulation with a known true effect)', () => {
    const at = stream.outcomes[0]!.byDelta[2]!;
    expect(Math.abs(at.estimate! - INVENTED_EFFECT)).toBeLessThan(4 * at.se!);
  });

  it('says what a streamed run does not compute', () => {
    expect(stream.streamed?.notComputed.map((x) => x.key)).toContain('compliers');
    expect(stream.streamed?.subsample).toEqual({ size: stream.study.rowsUsed, of: stream.study.rowsUsed, seed: 7, figures: ['density'], every: true });
    expect(stream.streamed?.note).toMatch(/^memo formats for streamed files/);
    expect(stream.warnings[0]!.code).toBe('streamed-file');
  });

  it('does not depend on the chunk size', async () => {
    const other = await streamed(join(dir, 'parquet.json'), 50_000);
    if (!other.ok) throw new Error(JSON.stringify(other.problems));
    expectSameEstimates(stream, other.value.results);
  }, 120_000);

  it('gives the local-linear cross-check of a single cut-off (every unit in the subsample) as in memory', async () => {
    const single = (path: string) => {
      const study = inventedStudy(path);
      study.program.rule = { value: 'income', op: '<=', limit: 26000 } as never;
      return study;
    };
    const a = await inMemory(writeStudy(dir, 'single-csv.json', single('rebate.csv')));
    const run = await streamed(writeStudy(dir, 'single-parquet.json', single('rebate.parquet')), 7_777);
    if (!run.ok) throw new Error(JSON.stringify(run.problems));
    const b = run.value.results;
    expect(a.outcomes[0]!.localLinear).not.toBeNull();
    expect(b.streamed?.subsample?.figures).toEqual(['density', 'outcomes[].localLinear']);
    expectSameEstimates(a, b);
  }, 120_000);

  it('refuses a missing column with one message naming the file and the closest column', async () => {
    const study = inventedStudy('rebate.parquet');
    study.columns.outcomes = [{ column: 'OUTCOMES', label: 'x' }];
    const run = await streamed(writeStudy(dir, 'missing.json', study), 7_777);
    expect(run.ok).toBe(false);
    if (run.ok) return;
    expect(run.problems).toHaveLength(1);
    expect(run.problems[0]!.path).toBe('columns.outcomes[0].column');
    expect(run.problems[0]!.message).toBe('No column OUTCOMES in rebate.parquet; did you mean OUTCOME?');
  });

  it.each([
    ['data.decimal', { decimal: ',' as const }, /decimal mark setting \(data\.decimal\) is not read for a streamed data file/],
    ['data.dateColumns', { dateColumns: ['INCOME'] }, /Date columns \(data\.dateColumns\) are not read for a streamed data file/],
  ])('refuses %s, which the streamed reader does not read, instead of ignoring it', async (path, extra, message) => {
    const study = inventedStudy('rebate.parquet');
    study.data = { ...study.data, ...extra };
    const run = await streamed(writeStudy(dir, `setting-${path}.json`, study), 7_777);
    expect(run.ok).toBe(false);
    if (run.ok) return;
    expect(run.problems).toEqual([{ path, message: expect.stringMatching(message) }]);
  });

    it('refuses a file that is not Parquet in plain words', async () => {
    writeFileSync(join(dir, 'fake.parquet'), 'ID,INCOME\n1,2\n');
    const run = await streamed(writeStudy(dir, 'fake.json', inventedStudy('fake.parquet')), 7_777);
    expect(run.ok).toBe(false);
    if (!run.ok) expect(run.problems[0]!.message).toMatch(/^The file fake\.parquet could not be read as Parquet/);
  });
});

describe('streamed Parquet = in-memory .csv on the memo fixture (HC1, recorded decisions, a limit table, two continuous inputs)', () => {
  it('gives the same estimates and fidelity to 1e-9', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-stream-'));
    writeFileSync(join(dir, 'cases.csv'), fixtureCsv(4000));
    await duckdb(`COPY (SELECT * FROM read_csv('${join(dir, 'cases.csv')}')) TO '${join(dir, 'cases.parquet')}' (FORMAT parquet)`);
    const memory = await inMemory(writeStudy(dir, 'csv.json', fixtureStudy()));
    const run = await streamed(writeStudy(dir, 'parquet.json', { ...fixtureStudy(), data: { path: 'cases.parquet' } }), 777);
    if (!run.ok) throw new Error(JSON.stringify(run.problems));
    const stream = run.value.results;
    expect(stream.settings.variance).toBe('HC1');
    expect(stream.outcomes[0]!.byDelta.every((b) => b.estimable && b.firstStage !== null)).toBe(true);
    expectSameEstimates(memory, stream);
    expect(stream.fidelity).toEqual(memory.fidelity);
    expect(stream.design.composition).toEqual(memory.design.composition);
    expect(stream.findings.outcomes).toEqual(memory.findings.outcomes);
  }, 120_000);
});
