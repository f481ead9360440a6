// data.join: further sources linked to the units by their ID (study format, "Several files").
// Each source is read with readTable, its key column found by name, and indexed by key; rows
// with a blank key and keys found more than once are counted for the report.

import { dirname, isAbsolute, resolve } from 'node:path';
import type { Checked, Problem } from '../rules/types.ts';
import { findColumn, linkKey, missingColumnMessage, displayText } from './find-column.ts';
import { readTable } from './read-table.ts';
import type { RawTable, ReadTableOptions } from './types.ts';

/** One entry of `data.join` in the study file. */
export interface JoinSpec {
  /** The file as written in the study (relative to the study file). */
  path: string;
  sheet?: string;
  /** Name of the column holding the unit ID in this file. */
  key: string;
  headerRow?: number;
}

/** How the study names a joined source (the `path` of its `data.join` entry), e.g. "payments.xlsx". */
export type JoinSourceRef = string;

const EXAMPLES = 10;
const MAX_ROWS_LISTED = 1000;

export interface JoinedTable {
  /** The source as written in the study, e.g. "payments.xlsx". */
  source: JoinSourceRef;
  /** JSON path of its entry in the study, e.g. "data.join[0]". */
  jsonPath: string;
  table: RawTable;
  /** Index of the key column in table.columns. */
  keyColumn: number;
  /** Link key → first table row with that key. */
  rowByKey: Map<string, number>;
  /** Link key → number of rows, for keys on more than one row. */
  duplicateKeys: Map<string, number>;
  /** Display text of each duplicate key (for examples). */
  duplicateExamples: string[];
  /** Rows with no key (blank or an Excel error): spreadsheet rows (first 1,000) and count. */
  blankKeyRows: number[];
  blankKeyCount: number;
}

/** Index a table already read by its key column. Pure apart from the table it is given. */
export function indexJoinedTable(source: JoinSourceRef, jsonPath: string, key: string, table: RawTable): Checked<JoinedTable> {
  const found = findColumn(table, key);
  if (found === null) return { ok: false, problems: [{ path: `${jsonPath}.key`, message: missingColumnMessage(key, table) }] };
  const column = table.columns[found.index]!;
  const rowByKey = new Map<string, number>();
  const duplicateKeys = new Map<string, number>();
  const duplicateExamples: string[] = [];
  const blankKeyRows: number[] = [];
  let blankKeyCount = 0;
  for (let r = 0; r < table.rowCount; r++) {
    const k = linkKey(column, r);
    if (k === null || k === '') {
      blankKeyCount++;
      if (blankKeyRows.length < MAX_ROWS_LISTED) blankKeyRows.push(table.rowNumbers[r]!);
      continue;
    }
    if (!rowByKey.has(k)) {
      rowByKey.set(k, r);
      continue;
    }
    const seen = duplicateKeys.get(k);
    if (seen === undefined && duplicateExamples.length < EXAMPLES) duplicateExamples.push(displayText(column, r));
    duplicateKeys.set(k, (seen ?? 1) + 1);
  }
  return {
    ok: true,
    value: { source, jsonPath, table, keyColumn: found.index, rowByKey, duplicateKeys, duplicateExamples, blankKeyRows, blankKeyCount },
  };
}

/**
 * Read and index every joined source. `baseDir` is the study file's folder (paths in a study
 * are relative to it). All problems of all sources are reported together.
 */
export async function readJoins(
  specs: readonly JoinSpec[],
  baseDir: string,
  opts: Pick<ReadTableOptions, 'signal' | 'onProgress' | 'maxUncompressedBytes'> & { jsonPath?: string } = {},
): Promise<Checked<JoinedTable[]>> {
  const problems: Problem[] = [];
  const joined: JoinedTable[] = [];
  const base = opts.jsonPath ?? 'data.join';
  for (let i = 0; i < specs.length; i++) {
    const spec = specs[i]!;
    const jsonPath = `${base}[${i}]`;
    const full = isAbsolute(spec.path) ? spec.path : resolve(baseDir, spec.path);
    const read = await readTable(full, {
      ...(spec.sheet !== undefined ? { sheet: spec.sheet } : {}),
      ...(spec.headerRow !== undefined ? { headerRow: spec.headerRow } : {}),
      ...(opts.signal !== undefined ? { signal: opts.signal } : {}),
      ...(opts.onProgress !== undefined ? { onProgress: opts.onProgress } : {}),
      ...(opts.maxUncompressedBytes !== undefined ? { maxUncompressedBytes: opts.maxUncompressedBytes } : {}),
    });
    if (!read.ok) {
      problems.push(...read.problems);
      continue;
    }
    const indexed = indexJoinedTable(spec.path, jsonPath, spec.key, read.value);
    if (!indexed.ok) problems.push(...indexed.problems);
    else joined.push(indexed.value);
  }
  return problems.length > 0 ? { ok: false, problems } : { ok: true, value: joined };
}

/** The joined source a study names (exact, else the same file name in any case). */
export function findJoinedSource(joins: readonly JoinedTable[], ref: JoinSourceRef): JoinedTable | undefined {
  const name = (p: string) => p.replace(/\\/g, '/').split('/').pop()!.toLowerCase();
  return joins.find((j) => j.source === ref) ?? joins.find((j) => name(j.source) === name(ref));
}

/** Where each unit's row is in a joined source: ≥ 0 a row, NO_ROW, or DUPLICATE_KEY. */
export const NO_ROW = -1;
export const DUPLICATE_KEY = -2;

export interface UnitMatch {
  rowOf: Int32Array;
  /** Units (with a usable ID) that have a row in the source. */
  matched: number;
  unmatchedKeys: { count: number; examples: string[] };
  duplicateKeys: { count: number; examples: string[] };
}

/** Match the units' link keys (null = no usable ID) to a joined source. */
export function matchUnits(joined: JoinedTable, unitKeys: ReadonlyArray<string | null>): UnitMatch {
  const rowOf = new Int32Array(unitKeys.length).fill(NO_ROW);
  const unitSet = new Set<string>();
  let matched = 0;
  for (let i = 0; i < unitKeys.length; i++) {
    const k = unitKeys[i];
    if (k === null || k === undefined) continue;
    unitSet.add(k);
    const r = joined.rowByKey.get(k);
    if (r === undefined) continue;
    matched++;
    rowOf[i] = joined.duplicateKeys.has(k) ? DUPLICATE_KEY : r;
  }
  const keyColumn = joined.table.columns[joined.keyColumn]!;
  let unmatched = 0;
  const examples: string[] = [];
  for (const [k, r] of joined.rowByKey) {
    if (unitSet.has(k)) continue;
    unmatched++;
    if (examples.length < EXAMPLES) examples.push(displayText(keyColumn, r));
  }
  return {
    rowOf,
    matched,
    unmatchedKeys: { count: unmatched, examples },
    duplicateKeys: { count: joined.duplicateKeys.size, examples: joined.duplicateExamples },
  };
}

/** The folder of a study file, for `readJoins(specs, studyFolder(studyPath))`. */
export function studyFolder(studyPath: string): string {
  return dirname(resolve(studyPath));
}
