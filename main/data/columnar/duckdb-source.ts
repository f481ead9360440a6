// Files beyond one sheet: a .parquet file (Apache Parquet, https://parquet.apache.org/docs/) or a
// large .csv read through DuckDB embedded (@duckdb/node-api; Parquet and CSV readers are built
// in, nothing is downloaded). The file is never loaded whole: its columns are listed from the
// schema, and the few columns a study needs arrive in chunks of a fixed number of rows, each
// column as a RawColumn (numbers with NaN, cell kinds, text only where needed) — the shape the
// in-memory readers give, so the column rules of main/data apply unchanged.
//
// Text columns are classified cell by cell with the CSV reader's own rules (cell-text.ts), so a
// value reads the same whether a .csv file goes through the sheet reader or through DuckDB.
// Refusals are one plain message naming the file and what to do; DuckDB's own errors are never
// shown raw.

import { randomUUID } from 'node:crypto';
import { tmpdir } from 'node:os';
import { basename, extname, join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection, type DuckDBResult } from '@duckdb/node-api';
import type { Checked, Problem } from '../../rules/types.ts';
import { newParsedCell, parseCellText } from '../cell-text.ts';
import { columnLetter } from '../locate.ts';
import { dataFileSize, hashFile } from '../read-table.ts';
import { CellKind, type RawColumn, type RawTable } from '../types.ts';

export type ColumnarFormat = 'parquet' | 'csv';

export interface ColumnarColumn {
  name: string;
  /** DuckDB's type name (DOUBLE, BIGINT, VARCHAR, DATE, ...). */
  type: string;
}

export interface ColumnarInfo {
  path: string;
  fileName: string;
  format: ColumnarFormat;
  /** Lower-case hex SHA-256 of the file bytes (FIPS 180-4), read in one streamed pass. */
  sha256: string;
  bytes: number;
  rowCount: number;
  columns: ColumnarColumn[];
}

/**
 * How a column is wanted: as numbers (fast path for numeric types), as text classified cell by
 * cell like a CSV field, or as labels (IDs, clusters: the text as written, never parsed).
 */
export interface ColumnRequest {
  /** The column's name exactly as the file writes it. */
  name: string;
  as: 'number' | 'text' | 'label';
}

export interface ColumnChunk {
  /** 0-based index of the chunk's first row in the file. */
  offset: number;
  rows: number;
  /** One RawColumn per request, in request order. */
  columns: RawColumn[];
}

export const DEFAULT_CHUNK_ROWS = 262_144;

/** DuckDB's memory cap (common practice: leaves the rest of a 2 GB budget to the chunks and the JavaScript heap). */
export const DUCKDB_MEMORY_LIMIT = '512MB';

const NUMERIC = /^(TINYINT|SMALLINT|INTEGER|BIGINT|HUGEINT|UTINYINT|USMALLINT|UINTEGER|UBIGINT|UHUGEINT|FLOAT|DOUBLE|REAL|DECIMAL.*)$/;
const DATES = /^(DATE|TIMESTAMP.*)$/;
const INTEGERS = /^(TINYINT|SMALLINT|INTEGER|BIGINT|HUGEINT|UTINYINT|USMALLINT|UINTEGER|UBIGINT|UHUGEINT)$/;
/** 2^53: whole numbers below it are exact as doubles (IEEE 754 binary64). */
const EXACT_INTEGER_LIMIT = 9007199254740992;

const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;
const quoteText = (text: string) => `'${text.replace(/'/g, "''")}'`;

function refuse(fileName: string, message: string): { ok: false; problems: Problem[] } {
  return { ok: false, problems: [{ path: fileName, message }] };
}

/** An open file: its schema, and chunks of the columns asked for. Close it when done. */
export class ColumnarSource {
  readonly info: ColumnarInfo;
  private readonly instance: DuckDBInstance;
  private readonly connection: DuckDBConnection;
  private readonly from: string;

  constructor(info: ColumnarInfo, instance: DuckDBInstance, connection: DuckDBConnection, from: string) {
    this.info = info;
    this.instance = instance;
    this.connection = connection;
    this.from = from;
  }

  close(): void {
    this.connection.closeSync();
    this.instance.closeSync();
  }

  /** A header-only table (no rows) for the column look-ups and messages of main/data. */
  headerTable(): RawTable {
    return {
      source: { path: this.info.path, fileName: this.info.fileName, format: 'csv', sheet: null, sheets: [], sha256: this.info.sha256, bytes: this.info.bytes },
      headerRow: 1,
      rowCount: 0,
      rowNumbers: new Int32Array(0),
      columns: this.info.columns.map((c, i) => ({ name: c.name, letter: columnLetter(i), numbers: new Float64Array(0), kinds: new Uint8Array(0), texts: null })),
      notes: [],
    };
  }

  private typeOf(name: string): string {
    return this.info.columns.find((c) => c.name === name)?.type ?? 'VARCHAR';
  }

  /** Integer columns whose every value is exact as a double (labels read as numbers: no text to decode). */
  private readonly exactIntegers = new Set<string>();

  private async checkExactIntegers(requests: readonly ColumnRequest[]): Promise<void> {
    for (const r of requests) {
      if (r.as !== 'label' || !INTEGERS.test(this.typeOf(r.name)) || this.exactIntegers.has(r.name)) continue;
      const reader = await this.connection.runAndReadAll(`SELECT coalesce(max(abs(CAST(${quoteIdent(r.name)} AS DOUBLE))), 0) < ${EXACT_INTEGER_LIMIT} AS exact FROM ${this.from}`);
      if (reader.getColumnsJS()[0]?.[0] === true) this.exactIntegers.add(r.name);
    }
  }

  private selectExpression(req: ColumnRequest): { sql: string; kind: 'number' | 'bool' | 'date' | 'text' | 'label' } {
    const col = quoteIdent(req.name);
    const type = this.typeOf(req.name);
    // A whole-number label reads as its number (String(17) is "17", as DuckDB writes it).
    if (req.as === 'label' && this.exactIntegers.has(req.name)) return { sql: `CAST(${col} AS DOUBLE)`, kind: 'number' };
    // A numeric column classified as text would give each cell's own number back: read it as numbers.
    if ((req.as === 'number' || req.as === 'text') && NUMERIC.test(type)) return { sql: `CAST(${col} AS DOUBLE)`, kind: 'number' };
    if (req.as === 'number' && type === 'BOOLEAN') return { sql: `CAST(${col} AS DOUBLE)`, kind: 'bool' };
    if (req.as === 'number' && DATES.test(type)) return { sql: `CAST(date_diff('day', DATE '1970-01-01', CAST(${col} AS DATE)) AS DOUBLE)`, kind: 'date' };
    return { sql: `CAST(${col} AS VARCHAR)`, kind: req.as === 'label' ? 'label' : 'text' };
  }

  /**
   * The requested columns in chunks of `chunkRows` rows (the last one shorter), in file order.
   * Memory: one chunk of the requested columns at a time.
   */
  async *chunks(requests: readonly ColumnRequest[], chunkRows = DEFAULT_CHUNK_ROWS, signal?: AbortSignal): AsyncGenerator<ColumnChunk> {
    await this.checkExactIntegers(requests);
    const exprs = requests.map((r) => this.selectExpression(r));
    const sql = `SELECT ${exprs.map((e, i) => `${e.sql} AS c${i}`).join(', ')} FROM ${this.from}`;
    const result: DuckDBResult = await this.connection.stream(sql);
    const parsed = newParsedCell();
    let offset = 0;
    let fill = 0;
    let current = allocate(requests, exprs, chunkRows);
    for (;;) {
      if (signal?.aborted) return;
      const chunk = await result.fetchChunk();
      if (!chunk || chunk.rowCount === 0) break;
      const rows = chunk.rowCount;
      let start = 0;
      while (start < rows) {
        const take = Math.min(rows - start, chunkRows - fill);
        for (let j = 0; j < exprs.length; j++) {
          const vector = chunk.getColumnVector(j);
          const out = current[j]!;
          const kind = exprs[j]!.kind;
          if (kind === 'label') {
            const texts = out.texts!;
            for (let t = 0; t < take; t++) {
              const raw = vector.getItem(start + t) as string | null;
              const r = fill + t;
              const blank = raw === null || raw === '' || raw.trim() === '';
              out.kinds[r] = blank ? CellKind.Blank : CellKind.Text;
              out.numbers[r] = Number.NaN;
              texts[r] = blank ? undefined : raw;
            }
          } else if (kind === 'text') {
            const texts = out.texts!;
            for (let t = 0; t < take; t++) {
              const raw = vector.getItem(start + t) as string | null;
              const r = fill + t;
              if (raw === null) { out.kinds[r] = CellKind.Blank; out.numbers[r] = Number.NaN; texts[r] = undefined; continue; }
              parseCellText(raw, parsed);
              out.kinds[r] = parsed.kind;
              out.numbers[r] = parsed.value;
              texts[r] = parsed.keepText ? raw : undefined;
            }
          } else {
            const present = kind === 'bool' ? CellKind.Bool : kind === 'date' ? CellKind.Date : CellKind.Number;
            for (let t = 0; t < take; t++) {
              const v = vector.getItem(start + t) as number | null;
              const r = fill + t;
              if (v === null || Number.isNaN(v)) { out.kinds[r] = CellKind.Blank; out.numbers[r] = Number.NaN; }
              else { out.kinds[r] = present; out.numbers[r] = v; }
            }
          }
        }
        fill += take;
        start += take;
        if (fill === chunkRows) {
          yield { offset, rows: fill, columns: current };
          offset += fill;
          fill = 0;
          current = allocate(requests, exprs, chunkRows);
        }
      }
    }
    if (fill > 0 && !signal?.aborted) yield { offset, rows: fill, columns: current.map((c) => trim(c, fill)) };
  }

  /** Rows whose value in `column` (as text, trimmed) appears more than once, as those texts. */
  async repeatedTexts(column: string): Promise<Set<string>> {
    const key = `trim(CAST(${quoteIdent(column)} AS VARCHAR))`;
    const reader = await this.connection.runAndReadAll(`SELECT ${key} AS k FROM ${this.from} WHERE ${key} IS NOT NULL AND ${key} <> '' GROUP BY 1 HAVING count(*) > 1`);
    return new Set(reader.getColumnsJS()[0]?.map((v) => String(v)) ?? []);
  }

  /** The distinct texts (trimmed) of a column, for coding text categories over the whole file. */
  async distinctTexts(column: string, limit = 100_000): Promise<string[]> {
    const key = `trim(CAST(${quoteIdent(column)} AS VARCHAR))`;
    const reader = await this.connection.runAndReadAll(`SELECT DISTINCT ${key} AS k FROM ${this.from} WHERE ${key} IS NOT NULL LIMIT ${limit}`);
    return (reader.getColumnsJS()[0] ?? []).map((v) => String(v));
  }

  /** Whether any value of a numeric column is positive and not 0 or 1 (a take-up amount). */
  async holdsAmounts(column: string): Promise<boolean> {
    const v = `TRY_CAST(${quoteIdent(column)} AS DOUBLE)`;
    const reader = await this.connection.runAndReadAll(`SELECT count(*) AS k FROM ${this.from} WHERE ${v} > 0 AND ${v} <> 1`);
    return Number(reader.getColumnsJS()[0]?.[0] ?? 0) > 0;
  }

  /** The requested columns scanned by DuckDB alone (sum of each), for benchmarks: the read limit. */
  async scanOnly(columns: readonly string[]): Promise<number> {
    const reader = await this.connection.runAndReadAll(`SELECT ${columns.map((c) => `sum(TRY_CAST(${quoteIdent(c)} AS DOUBLE))`).join(' + ')} AS s FROM ${this.from}`);
    return Number(reader.getColumnsJS()[0]?.[0] ?? NaN);
  }
}

function allocate(requests: readonly ColumnRequest[], exprs: ReadonlyArray<{ kind: string }>, rows: number): RawColumn[] {
  return requests.map((r, j) => ({
    name: r.name,
    letter: columnLetter(j),
    numbers: new Float64Array(rows),
    kinds: new Uint8Array(rows),
    texts: exprs[j]!.kind === 'text' || exprs[j]!.kind === 'label' ? new Array<string | undefined>(rows) : null,
  }));
}

function trim(c: RawColumn, rows: number): RawColumn {
  return { ...c, numbers: c.numbers.subarray(0, rows), kinds: c.kinds.subarray(0, rows), texts: c.texts ? c.texts.slice(0, rows) : null };
}

export interface OpenOptions {
  /** Read a .csv through DuckDB (its CSV reader infers the column types). */
  format?: ColumnarFormat;
  signal?: AbortSignal;
}

/**
 * Open a .parquet (or, asked for, a .csv) file: its hash, its columns and its row count. One
 * plain message when the file is missing, not Parquet, or damaged.
 */
export async function openColumnar(path: string, options: OpenOptions = {}): Promise<Checked<ColumnarSource>> {
  const fileName = basename(path);
  const format: ColumnarFormat = options.format ?? (extname(path).toLowerCase() === '.csv' ? 'csv' : 'parquet');
  const sized = await dataFileSize(path, fileName);
  if (!sized.ok) return sized;
  const bytes = sized.value;
  if (bytes === 0) return refuse(fileName, `The file ${fileName} is empty (0 bytes). Ask for the file again.`);
  const from = format === 'parquet' ? `read_parquet(${quoteText(path)})` : `read_csv(${quoteText(path)}, header = true, all_varchar = false)`;
  let instance: DuckDBInstance | null = null;
  let connection: DuckDBConnection | null = null;
  try {
    // Nothing leaves the machine: no extension is installed or loaded at run time.
    // DuckDB's own memory is capped (finding repeated IDs among millions is a large hash table);
    // beyond the cap it spills to a temporary folder of its own, removed when closed.
    instance = await DuckDBInstance.create(':memory:', {
      autoinstall_known_extensions: 'false', autoload_known_extensions: 'false', enable_external_access: 'true',
      memory_limit: DUCKDB_MEMORY_LIMIT, temp_directory: join(tmpdir(), `fenceline-duckdb-${process.pid}-${randomUUID()}`),
    });
    connection = await instance.connect();
    const described = await connection.runAndReadAll(`DESCRIBE SELECT * FROM ${from}`);
    const rows = described.getRowObjectsJS() as Array<{ column_name: unknown; column_type: unknown }>;
    const columns = rows.map((r) => ({ name: String(r.column_name), type: String(r.column_type) }));
    const counted = await connection.runAndReadAll(`SELECT count(*) AS n FROM ${from}`);
    const rowCount = Number(counted.getColumnsJS()[0]?.[0] ?? 0);
    const { sha256 } = await hashFile(path, false, options.signal);
    return { ok: true, value: new ColumnarSource({ path, fileName, format, sha256, bytes, rowCount, columns }, instance, connection, from) };
  } catch {
    connection?.closeSync();
    instance?.closeSync();
    return refuse(fileName, format === 'parquet'
      ? `The file ${fileName} could not be read as Parquet: it is damaged or not a Parquet file. Export it again from its program (as Parquet, or as .csv).`
      : `The file ${fileName} could not be read as comma-separated text. Open it and check that its first line holds the column names, then save it again as CSV UTF-8.`);
  }
}
