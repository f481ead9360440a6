// Datasets in the workspace: column chunks as BLOBs (see column-codec.ts), never one SQL row per
// cell, so a million rows of twenty columns is about 300 rows of SQL and reloads in one pass.
// An import is one transaction and the dataset row carries complete = 1 only when its last chunk
// is in: a killed or failed import leaves nothing visible.

import { chunkCount, chunkRange, decodeNumericChunkInto, decodeTextChunk, DEFAULT_CHUNK_ROWS, encodeNumericChunk, encodeTextChunk, MAX_TEXT_CHUNK_UNITS } from './column-codec.ts';
import { read, write, type StoreContext } from './context.ts';
import { decodeJson, encodeJson } from './json-column.ts';
import { fail, fileLabel, ok } from './problems.ts';
import type { Checked, ColumnKind, DatasetColumn, DatasetInput, DatasetSummary, ImportOptions, Problem, StoredDataset } from './types.ts';
import { checkSha256, checkText, checkTimestamp, isPositiveId, preview } from './validate.ts';

/** Chunk series that holds the source row numbers; columns use their position 0, 1, ... */
export const ROW_NUMBER_SERIES = -1;

const KINDS: readonly ColumnKind[] = ['f64', 'i32', 'text'];
const KIND_WORDS: Record<ColumnKind, string> = {
  f64: 'a Float64Array (numbers)',
  i32: 'an Int32Array (whole numbers)',
  text: 'a list of text values',
};

interface ValidColumn { name: string; kind: ColumnKind; values: Float64Array | Int32Array | string[] }

function valuesMatchKind(kind: ColumnKind, values: unknown): boolean {
  if (kind === 'f64') return values instanceof Float64Array;
  if (kind === 'i32') return values instanceof Int32Array;
  return Array.isArray(values);
}

/** Check every field of an import; returns the columns when all is well. */
function validateImport(meta: DatasetInput, opts: ImportOptions | undefined, problems: Problem[]): ValidColumn[] {
  const m = meta as unknown as Record<string, unknown>;
  if (m === null || typeof m !== 'object') {
    problems.push({ path: '', message: 'The dataset to store is missing; give its description and columns.' });
    return [];
  }
  checkText(m.sourceName, 'sourceName', 'The name of the source file', problems);
  if (m.sheet !== null && typeof m.sheet !== 'string') {
    problems.push({ path: 'sheet', message: `The sheet must be its name as text, or null for a file without sheets (got ${preview(m.sheet)}).` });
  }
  checkSha256(m.sha256, 'sha256', "The source file's fingerprint", problems);
  checkTimestamp(m.importedAt, 'importedAt', 'The import time', problems);
  if (opts?.onProgress !== undefined && typeof opts.onProgress !== 'function') {
    problems.push({ path: 'onProgress', message: 'The progress callback must be a function; leave it out if progress is not needed.' });
  }
  const rowNumbers = m.rowNumbers;
  const rowCount = rowNumbers instanceof Int32Array ? rowNumbers.length : -1;
  if (rowCount < 0) {
    problems.push({ path: 'rowNumbers', message: `The source row numbers must be an Int32Array with one entry per unit (got ${preview(rowNumbers)}).` });
  }
  if (!Array.isArray(m.columns)) {
    problems.push({ path: 'columns', message: `The columns must be a list (got ${preview(m.columns)}).` });
    return [];
  }
  const seen = new Set<string>();
  const valid: ValidColumn[] = [];
  m.columns.forEach((c: unknown, i: number) => {
    const at = `columns[${i}]`;
    const col = c as Record<string, unknown> | null;
    if (col === null || typeof col !== 'object') {
      problems.push({ path: at, message: 'This column is missing its name, kind and values.' });
      return;
    }
    if (!checkText(col.name, `${at}.name`, 'The column name', problems)) return;
    const name = col.name as string;
    if (seen.has(name)) {
      problems.push({ path: `${at}.name`, message: `Two columns are both named "${name}"; give each column its own name.` });
      return;
    }
    seen.add(name);
    if (!KINDS.includes(col.kind as ColumnKind)) {
      problems.push({ path: `${at}.kind`, message: `Column "${name}" has kind ${preview(col.kind)}; the kind must be "f64", "i32" or "text".` });
      return;
    }
    const kind = col.kind as ColumnKind;
    const values = col.values;
    if (!valuesMatchKind(kind, values)) {
      problems.push({ path: `${at}.values`, message: `Column "${name}" is of kind "${kind}", so its values must be ${KIND_WORDS[kind]} (got ${preview(values)}).` });
      return;
    }
    const typed = values as Float64Array | Int32Array | unknown[];
    if (rowCount >= 0 && typed.length !== rowCount) {
      problems.push({ path: `${at}.values`, message: `Column "${name}" has ${typed.length} values but there are ${rowCount} rows; every column needs one value per row.` });
      return;
    }
    if (kind === 'text') {
      const list = typed as unknown[];
      let units = 0;
      for (let r = 0; r < list.length; r++) {
        const cell = list[r];
        if (typeof cell !== 'string') {
          problems.push({ path: `${at}.values[${r}]`, message: `Column "${name}", row ${r + 1}: ${preview(cell)} is not text; a text column holds text only (use "" for an empty cell).` });
          return;
        }
        if (r % DEFAULT_CHUNK_ROWS === 0) units = 0;
        units += cell.length;
        if (units > MAX_TEXT_CHUNK_UNITS) {
          const first = r - (r % DEFAULT_CHUNK_ROWS) + 1;
          problems.push({ path: `${at}.values`, message: `Column "${name}" holds more text than Fenceline can store: rows ${first} to ${r + 1} alone exceed ${MAX_TEXT_CHUNK_UNITS.toLocaleString('en-US')} characters. Leave out or shorten the very long cells.` });
          return;
        }
      }
    }
    valid.push({ name, kind, values: values as ValidColumn['values'] });
  });
  return valid;
}

export function importDataset(ctx: StoreContext, meta: DatasetInput, opts?: ImportOptions): Checked<number> {
  const problems: Problem[] = [];
  const columns = validateImport(meta, opts, problems);
  const notes = meta?.notes === undefined ? null : encodeJson(meta.notes, 'notes');
  if (notes !== null && !notes.ok) problems.push(...notes.problems);
  if (problems.length > 0 || (notes !== null && !notes.ok)) return { ok: false, problems };
  const notesText = notes === null ? null : notes.value;

  const rowCount = meta.rowNumbers.length;
  const chunkRows = DEFAULT_CHUNK_ROWS;
  const chunks = chunkCount(rowCount, chunkRows);
  const total = chunks * (columns.length + 1);
  const onProgress = opts?.onProgress;

  return write(ctx, `store the dataset from "${meta.sourceName}"`, () => {
    const datasetId = Number(ctx.db.prepare(
      `INSERT INTO datasets (source_name, sheet, sha256, imported_at, stored_at, row_count, chunk_rows, notes, complete, role)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, 0, ?)`,
    ).run(meta.sourceName, meta.sheet, meta.sha256.toLowerCase(), meta.importedAt, ctx.now(), rowCount, chunkRows, notesText, opts?.role ?? 'source').lastInsertRowid);

    const insertColumn = ctx.db.prepare('INSERT INTO dataset_columns (dataset_id, position, name, kind) VALUES (?, ?, ?, ?)');
    columns.forEach((c, position) => insertColumn.run(datasetId, position, c.name, c.kind));

    const insertChunk = ctx.db.prepare('INSERT INTO dataset_chunks (dataset_id, series, chunk, data) VALUES (?, ?, ?, ?)');
    let done = 0;
    const series: Array<{ index: number; values: ValidColumn['values'] }> = [
      { index: ROW_NUMBER_SERIES, values: meta.rowNumbers },
      ...columns.map((c, position) => ({ index: position, values: c.values })),
    ];
    for (const s of series) {
      for (let k = 0; k < chunks; k++) {
        const [start, end] = chunkRange(k, rowCount, chunkRows);
        const bytes = Array.isArray(s.values) ? encodeTextChunk(s.values, start, end) : encodeNumericChunk(s.values, start, end);
        insertChunk.run(datasetId, s.index, k, bytes);
        done++;
        onProgress?.({ stage: 'store', done, total });
      }
    }
    ctx.db.prepare('UPDATE datasets SET complete = 1 WHERE id = ?').run(datasetId);
    return ok(datasetId);
  });
}

interface DatasetRow {
  id: number; source_name: string; sheet: string | null; sha256: string; imported_at: string; stored_at: string;
  row_count: number; chunk_rows: number; notes: string | null;
}

function noSuchDataset<T>(ctx: StoreContext, id: unknown): Checked<T> {
  return fail(`There is no dataset with id ${preview(id)} in the workspace ${fileLabel(ctx.file)}. Pick one from the list of stored datasets, or import the data again.`, 'datasetId');
}

function damaged<T>(ctx: StoreContext, id: number, what: string): Checked<T> {
  return fail(`Dataset ${id} in the workspace ${fileLabel(ctx.file)} is damaged (${what}). Delete it and import the data again from its source file.`, 'datasetId');
}

export function loadDataset(ctx: StoreContext, datasetId: unknown): Checked<StoredDataset> {
  if (!isPositiveId(datasetId)) return noSuchDataset(ctx, datasetId);
  return read(ctx, 'load the dataset', () => {
    // One read transaction, so a concurrent delete cannot leave us with half the chunks.
    const load = ctx.db.transaction((): Checked<StoredDataset> => {
      const row = ctx.db.prepare('SELECT * FROM datasets WHERE id = ? AND complete = 1').get(datasetId) as DatasetRow | undefined;
      if (row === undefined) return noSuchDataset(ctx, datasetId);
      const cols = ctx.db.prepare('SELECT position, name, kind FROM dataset_columns WHERE dataset_id = ? ORDER BY position').all(datasetId) as Array<{ position: number; name: string; kind: ColumnKind }>;
      const n = row.row_count;
      const chunks = chunkCount(n, row.chunk_rows);

      const rowNumbers = new Int32Array(n);
      const targets = new Map<number, { label: string; values: Float64Array | Int32Array | string[] }>();
      targets.set(ROW_NUMBER_SERIES, { label: 'source row numbers', values: rowNumbers });
      const columns: DatasetColumn[] = cols.map((c) => {
        const column: DatasetColumn = c.kind === 'f64' ? { name: c.name, kind: 'f64', values: new Float64Array(n) }
          : c.kind === 'i32' ? { name: c.name, kind: 'i32', values: new Int32Array(n) }
          : { name: c.name, kind: 'text', values: new Array<string>(n) };
        if (c.position !== targets.size - 1) return column; // a gap in positions is caught below
        targets.set(c.position, { label: `column "${c.name}"`, values: column.values });
        return column;
      });
      if (targets.size !== cols.length + 1) return damaged(ctx, datasetId, 'its column list has gaps');

      const seen = new Map<number, number>();
      const stmt = ctx.db.prepare('SELECT series, chunk, data FROM dataset_chunks WHERE dataset_id = ? ORDER BY series, chunk').raw(true);
      for (const r of stmt.iterate(datasetId) as IterableIterator<[number, number, Uint8Array]>) {
        const [seriesIndex, k, blob] = r;
        const target = targets.get(seriesIndex);
        const expected = seen.get(seriesIndex) ?? 0;
        if (target === undefined) return damaged(ctx, datasetId, `it holds data for a column that is not listed (${seriesIndex})`);
        if (k !== expected) return damaged(ctx, datasetId, `${target.label}: part ${expected + 1} of ${chunks} is missing`);
        const [start, end] = chunkRange(k, n, row.chunk_rows);
        if (Array.isArray(target.values)) {
          const strings = decodeTextChunk(blob, end - start);
          if (strings === null) return damaged(ctx, datasetId, `${target.label}: part ${k + 1} is unreadable`);
          for (let i = 0; i < strings.length; i++) target.values[start + i] = strings[i]!;
        } else if (!decodeNumericChunkInto(target.values, start, end - start, blob)) {
          return damaged(ctx, datasetId, `${target.label}: part ${k + 1} has the wrong size`);
        }
        seen.set(seriesIndex, k + 1);
      }
      for (const [seriesIndex, target] of targets) {
        const got = seen.get(seriesIndex) ?? 0;
        if (got !== chunks) return damaged(ctx, datasetId, `${target.label}: ${got} of ${chunks} parts present`);
      }

      const out: StoredDataset = {
        datasetId, sourceName: row.source_name, sheet: row.sheet, sha256: row.sha256, importedAt: row.imported_at,
        rowNumbers, columns,
      };
      if (row.notes !== null) out.notes = decodeJson(row.notes);
      return ok(out);
    });
    return load.deferred();
  });
}

export function listDatasets(ctx: StoreContext): Checked<DatasetSummary[]> {
  return read(ctx, 'list the stored datasets', () => {
    // The per-unit columns of runs are datasets too (role 'run-units'), reached through their run.
    const rows = ctx.db.prepare("SELECT * FROM datasets WHERE complete = 1 AND role = 'source' ORDER BY stored_at DESC, id DESC").all() as DatasetRow[];
    const cols = ctx.db.prepare(
      `SELECT c.dataset_id, c.name, c.kind FROM dataset_columns c JOIN datasets d ON d.id = c.dataset_id
        WHERE d.complete = 1 AND d.role = 'source' ORDER BY c.dataset_id, c.position`,
    ).all() as Array<{ dataset_id: number; name: string; kind: ColumnKind }>;
    const byDataset = new Map<number, Array<{ name: string; kind: ColumnKind }>>();
    for (const c of cols) {
      const list = byDataset.get(c.dataset_id) ?? [];
      list.push({ name: c.name, kind: c.kind });
      byDataset.set(c.dataset_id, list);
    }
    return ok(rows.map((r) => ({
      datasetId: r.id, sourceName: r.source_name, sheet: r.sheet, sha256: r.sha256, importedAt: r.imported_at,
      storedAt: r.stored_at, rowCount: r.row_count, columns: byDataset.get(r.id) ?? [],
    })));
  });
}

export function deleteDataset(ctx: StoreContext, datasetId: unknown): Checked<void> {
  if (!isPositiveId(datasetId)) return noSuchDataset(ctx, datasetId);
  return write(ctx, 'delete the dataset', () => {
    // Columns and chunks go with it (ON DELETE CASCADE); freed pages are reused by later imports.
    const changes = ctx.db.prepare('DELETE FROM datasets WHERE id = ?').run(datasetId).changes;
    if (changes === 0) return noSuchDataset(ctx, datasetId);
    return ok(undefined);
  });
}
