// Shared by the streamed-path tests: a study run both ways (in memory from .csv, streamed from
// the same rows written as Parquet by DuckDB itself), and a relative-difference check.

import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { loadStudyFile } from '../../main/studyfile/load.ts';
import { runStudy } from '../../main/pipeline/run-study.ts';
import { streamStudy } from '../../main/pipeline/stream-study.ts';
import type { Results } from '../../main/contract/results.ts';

/** Run SQL statements in a fresh in-memory DuckDB (e.g. COPY ... TO 'x.parquet' (FORMAT parquet)). */
export async function duckdb(...statements: string[]): Promise<void> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  try {
    for (const s of statements) await c.run(s);
  } finally {
    c.closeSync();
    db.closeSync();
  }
}

export function writeStudy(dir: string, name: string, study: object): string {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(study, null, 2));
  return path;
}

export async function inMemory(studyPath: string): Promise<Results> {
  const loaded = loadStudyFile(studyPath);
  if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
  const run = await runStudy(loaded.value.study, { baseDir: loaded.value.baseDir, workers: 0 });
  if (!run.ok) throw new Error(JSON.stringify(run.problems));
  return run.value.results;
}

export async function streamed(studyPath: string, chunkRows: number) {
  const loaded = loadStudyFile(studyPath);
  if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
  return streamStudy(loaded.value.study, { baseDir: loaded.value.baseDir, chunkRows });
}

/** |a − b| ≤ tol·max(|a|, |b|, tiny): relative agreement (null only with null). */
export function relDiff(a: number | null | undefined, b: number | null | undefined): number {
  if (a === null || a === undefined || b === null || b === undefined) return a === b ? 0 : Infinity;
  if (a === b) return 0;
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-300);
}
