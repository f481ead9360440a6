// `evaluate` on a study whose data file is Parquet takes the streamed path: results.json only
// (with its `streamed` block), and with a workspace the file is recorded by path and SHA-256
// (schema 5, referenced_files), never copied in. A .csv with "stream": true goes the same way.

import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { checkStudy } from '../../main/api/check.ts';
import { openWorkspace } from '../../main/store/workspace.ts';
import { duckdb, inventedRowsSql, inventedStudy, writeStudy } from './helpers.ts';

describe('evaluate with a streamed data file', () => {
  it('writes results.json and records the Parquet file by path and hash in the workspace', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-stream-api-'));
    const parquet = join(dir, 'rebate.parquet');
    await duckdb(`COPY (${inventedRowsSql(5_000, 3)}) TO '${parquet}' (FORMAT parquet)`);
    const studyPath = writeStudy(dir, 'study.json', inventedStudy('rebate.parquet'));
    const workspacePath = join(dir, 'work.fenceline');
    const r = await evaluateStudy({ studyPath, outDir: join(dir, 'out'), formats: ['pdf'], workspacePath });
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    expect(r.value.files.map((f) => f.split('/').pop())).toEqual(['results.json']);
    expect(r.value.runId).toBeNull();
    expect(existsSync(join(dir, 'out', 'memo.pdf'))).toBe(false);
    const written = JSON.parse(readFileSync(join(dir, 'out', 'results.json'), 'utf8'));
    const sha = createHash('sha256').update(readFileSync(parquet)).digest('hex');
    expect(written.study.dataSha256).toBe(sha);
    expect(written.streamed.format).toBe('parquet');
    expect(written.warnings.map((w: { code: string }) => w.code)).toContain('streamed-run-not-stored');
    const ws = openWorkspace(workspacePath);
    if (!ws.ok) throw new Error(JSON.stringify(ws.problems));
    const files = ws.value.listReferencedFiles();
    ws.value.close();
    expect(files.ok && files.value.map((f) => [f.path, f.sha256, f.rows, f.format])).toEqual([[parquet, sha, 5_000, 'parquet']]);
  }, 120_000);

  it('streams a .csv when the study asks ("stream": true)', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-stream-api-'));
    await duckdb(`COPY (${inventedRowsSql(3_000, 4)}) TO '${join(dir, 'rebate.csv')}' (FORMAT csv, HEADER)`);
    const study = inventedStudy('rebate.csv');
    const studyPath = writeStudy(dir, 'study.json', { ...study, data: { path: 'rebate.csv', stream: true } });
    const r = await evaluateStudy({ studyPath, outDir: join(dir, 'out'), formats: [] });
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    expect(r.value.results.streamed?.format).toBe('csv');
    expect(r.value.results.study.rowsExcluded.find((e) => e.reason === 'INCOME is blank')?.rows[0]).toBe(2);
  }, 120_000);

  it('check reads a Parquet file in one pass and reports what the in-memory check reports for the same rows', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-stream-api-'));
    await duckdb(
      `CREATE TABLE rebate AS ${inventedRowsSql(4_000, 6)}`,
      `COPY rebate TO '${join(dir, 'rebate.parquet')}' (FORMAT parquet)`,
      `COPY rebate TO '${join(dir, 'rebate.csv')}' (FORMAT csv, HEADER)`,
    );
    const streamedCheck = await checkStudy({ studyPath: writeStudy(dir, 'p.json', inventedStudy('rebate.parquet')) });
    const memoryCheck = await checkStudy({ studyPath: writeStudy(dir, 'c.json', inventedStudy('rebate.csv')) });
    if (!streamedCheck.ok || !memoryCheck.ok) throw new Error('check refused');
    const a = memoryCheck.value;
    const b = streamedCheck.value;
    expect([b.rowsRead, b.rowsUsed, b.eligible, b.outcomesMissing]).toEqual([a.rowsRead, a.rowsUsed, a.eligible, a.outcomesMissing]);
    expect(b.rowsExcluded.map((e) => [e.reason, e.count])).toEqual(a.rowsExcluded.map((e) => [e.reason, e.count]));
    expect(b.dataFile).toBe('rebate.parquet');
  }, 120_000);
});
