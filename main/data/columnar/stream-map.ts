// The study's columns mapped chunk by chunk: the same rules and the same words as
// map-columns.ts (a row is used, or excluded with its first reason naming the column as the file
// names it; a missing outcome only removes the unit from that outcome), with what must hold over
// the whole file decided before the first chunk: repeated IDs (found by DuckDB), the codes of
// text categories (every distinct text of the file, sorted as map-columns.ts sorts them), whether
// take-up holds amounts, and the cluster codes (given in order of first use, as in memory).
// Pure apart from what the caller hands in.

import type { Checked, Problem } from '../../rules/types.ts';
import type { ColumnSpec, ExclusionGroup, MappedData } from '../map-columns.ts';
import { BOOLEAN_TEXT, failureText, readNumber, type Failure, type Read } from '../map-columns.ts';
import { displayText, findColumn, missingColumnMessage } from '../find-column.ts';
import { newParsedCell, parseCellText } from '../cell-text.ts';
import { CellKind, type RawColumn, type RawTable, type TableNote } from '../types.ts';
import type { ColumnChunk, ColumnRequest } from './duckdb-source.ts';

const MAX_ROWS_LISTED = 1000;

/** Which request holds each role's column. */
export interface StreamPlan {
  requests: ColumnRequest[];
  id: number;
  variables: number[];
  outcomes: number[];
  treatment: number | null;
  decision: number | null;
  cluster: number | null;
  covariates: number[];
  controls: number[];
  /** Header of each request as the file writes it. */
  headers: string[];
  notes: TableNote[];
}

/**
 * Find every column of the study in the file's header (case and spaces forgiven, as in memory);
 * one message per missing column naming the file and the closest header. Joined sources and a
 * take-up "listed in" another file are not read from streamed files (refused with what to do).
 */
export function planStreamColumns(table: RawTable, spec: ColumnSpec): Checked<StreamPlan> {
  const problems: Problem[] = [];
  const requests: ColumnRequest[] = [];
  const headers: string[] = [];
  const loose: string[] = [];
  const want = (name: string, path: string, as: ColumnRequest['as']): number => {
    if (name.trim() === '') {
      problems.push({ path, message: 'The column name is empty. Give the name of a column in the data file.' });
      return -1;
    }
    const found = findColumn(table, name);
    if (found === null) {
      problems.push({ path, message: missingColumnMessage(name, table) });
      return -1;
    }
    const header = table.columns[found.index]!.name;
    if (found.loose) loose.push(`${name} → ${header}`);
    const existing = requests.findIndex((r) => r.name === header && r.as === as);
    if (existing >= 0) return existing;
    requests.push({ name: header, as });
    headers.push(header);
    return requests.length - 1;
  };
  const id = spec.id.trim() === '' ? -1 : want(spec.id, 'columns.id', 'label');
  if (spec.id.trim() === '') problems.push({ path: 'columns.id', message: 'The unit ID column (columns.id) is empty. Give the name of the column that identifies each unit.' });
  const variables = spec.variables.map((v) => want(v.column, v.path, v.type === 'discrete' ? 'text' : 'number'));
  const outcomes = spec.outcomes.map((o) => want(o.column, o.path, 'number'));
  let treatment: number | null = null;
  if (spec.treatment !== undefined) {
    if ('listedIn' in spec.treatment) {
      problems.push({ path: spec.treatment.path, message: `Take-up "listed in" another file cannot be read with a Parquet data file in this version. Add a 0/1 take-up column to ${table.source.fileName} and name it in columns.treatment.` });
    } else treatment = want(spec.treatment.column, spec.treatment.path, 'number');
  }
  const decision = spec.decision ? want(spec.decision.column, spec.decision.path, 'number') : null;
  const cluster = spec.cluster ? want(spec.cluster.column, spec.cluster.path, 'label') : null;
  const covariates = spec.covariates.map((c) => want(c.column, c.path, 'number'));
  const controls = spec.controls.map((c) => want(c.column, c.path, 'number'));
  if (problems.length > 0) return { ok: false, problems };
  const notes: TableNote[] = loose.length ? [{ code: 'column-name-case', message: `Column names matched ignoring case and spaces: ${loose.join('; ')}.` }] : [];
  return { ok: true, value: { requests, id, variables, outcomes, treatment, decision, cluster, covariates, controls, headers, notes } };
}

/** What is decided over the whole file before the first chunk. */
export interface StreamGlobals {
  /** IDs (trimmed text) that appear on more than one row. */
  repeatedIds: Set<string>;
  /** Per variable: the sorted labels of a column of text categories, else null (read as numbers). */
  dictionaries: Array<string[] | null>;
  /** Take-up holds amounts (not only 0/1): decides how a bad cell is described. */
  treatmentAmounts: boolean;
  /** Row number of the first data row (2 under a header line, 1 in Parquet). */
  firstRowNumber: number;
}

/**
 * How a discrete variable's column reads, from its distinct texts: text categories get codes
 * 0..k−1 in sorted order unless some value is a number or all are yes/no (map-columns.ts).
 */
export function categoryDictionary(distinct: readonly string[]): string[] | null {
  const parsed = newParsedCell();
  const labels = new Set<string>();
  let numeric = 0;
  let allBoolean = true;
  for (const raw of distinct) {
    parseCellText(raw, parsed);
    if (parsed.kind === CellKind.Text) {
      const text = raw.trim();
      labels.add(text);
      if (!BOOLEAN_TEXT.test(text)) allBoolean = false;
    } else if (parsed.kind !== CellKind.Blank && parsed.kind !== CellKind.Error) numeric++;
  }
  if (labels.size === 0 || numeric > 0 || allBoolean) return null;
  return [...labels].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
}

function compactCodes(codes: Int32Array, used: readonly number[], n: number): Int32Array {
  const out = new Int32Array(n);
  for (let u = 0; u < n; u++) out[u] = codes[used[u]!]!;
  return out;
}

/** Maps chunks to MappedData (chunk-local units) and keeps the file-wide tallies. */
export class StreamMapper {
  private readonly groups = new Map<string, ExclusionGroup>();
  private readonly clusterCodeOf = new Map<string, number>();
  readonly clusterLabels: string[] = [];
  rowsRead = 0;
  used = 0;
  readonly outcomeMissing: Array<{ count: number; rows: number[]; causes: Map<string, number> }>;
  private readonly codeOf: Array<Map<string, number> | null>;

  constructor(private readonly plan: StreamPlan, private readonly spec: ColumnSpec, private readonly globals: StreamGlobals) {
    this.outcomeMissing = plan.outcomes.map(() => ({ count: 0, rows: [], causes: new Map() }));
    this.codeOf = globals.dictionaries.map((d) => (d ? new Map(d.map((label, code) => [label, code] as const)) : null));
  }

  excluded(): ExclusionGroup[] {
    return [...this.groups.values()];
  }

  private exclude(rowNumber: number, reason: string): void {
    let g = this.groups.get(reason);
    if (g === undefined) {
      g = { reason, count: 0, rows: [] };
      this.groups.set(reason, g);
    }
    g.count++;
    if (g.rows.length < MAX_ROWS_LISTED) g.rows.push(rowNumber);
  }

  /** The chunk's units used, as MappedData (rowNumbers are the file's; cluster codes file-wide). */
  mapChunk(chunk: ColumnChunk): MappedData {
    const { plan, spec, globals } = this;
    const cols = chunk.columns;
    const n0 = chunk.rows;
    const idName = plan.headers[plan.id]!;
    const idCol = cols[plan.id]!;
    const header = (k: number) => plan.headers[k]!;
    type Reader = (r: number) => Read;
    const FAIL = (why: Failure): Read => ({ ok: false, why });
    const variableReaders: Reader[] = plan.variables.map((k, v) => {
      const col = cols[k]!;
      const continuous = spec.variables[v]!.type === 'continuous';
      const codes = this.codeOf[v];
      if (codes) return (r) => (col.kinds[r] === CellKind.Text ? { ok: true, value: codes.get((col.texts?.[r] ?? '').trim())! } : readNumber(col, r, false));
      return (r) => readNumber(col, r, !continuous);
    });
    const amount = globals.treatmentAmounts;
    const treatmentReader: Reader | null = plan.treatment === null ? null : (r) => {
      const got = readNumber(cols[plan.treatment!]!, r, true);
      if (!got.ok) return got.why === 'text' ? FAIL(amount ? 'not-amount' : 'not01') : got;
      if (!Number.isFinite(got.value)) return FAIL(amount ? 'not-amount' : 'not01');
      if (got.value < 0) return FAIL('negative');
      return got;
    };
    const decisionReader: Reader | null = plan.decision === null ? null : (r) => {
      const got = readNumber(cols[plan.decision!]!, r, true);
      if (!got.ok) return got.why === 'text' ? FAIL('not01') : got;
      return got.value === 0 || got.value === 1 ? got : FAIL('not01');
    };
    // `plain`: a column whose Number cells are taken as they are when `accept` says so, skipping the
    // reader (no allocation per cell on the common path); anything else goes through the reader.
    const checks: Array<{ header: string; read: Reader; out: Float64Array; plain: RawColumn | null; accept: (v: number) => boolean }> = [];
    const any = () => true;
    const full = () => new Float64Array(n0);
    const variableOut = plan.variables.map(() => full());
    plan.variables.forEach((k, v) => checks.push({ header: header(k), read: variableReaders[v]!, out: variableOut[v]!, plain: cols[k]!, accept: any }));
    const treatmentOut = treatmentReader ? full() : null;
    if (treatmentReader) checks.push({ header: header(plan.treatment!), read: treatmentReader, out: treatmentOut!, plain: cols[plan.treatment!]!, accept: (v) => v >= 0 && v < Infinity });
    const decisionOut = decisionReader ? full() : null;
    if (decisionReader) checks.push({ header: header(plan.decision!), read: decisionReader, out: decisionOut!, plain: cols[plan.decision!]!, accept: (v) => v === 0 || v === 1 });
    const covariateOut = plan.covariates.map(() => full());
    const controlOut = plan.controls.map(() => full());
    const extra: Array<{ header: string; col: RawColumn; out: Float64Array }> = [
      ...plan.covariates.map((k, j) => ({ header: header(k), col: cols[k]!, out: covariateOut[j]! })),
      ...plan.controls.map((k, j) => ({ header: header(k), col: cols[k]!, out: controlOut[j]! })),
    ];
    const clusterCol = plan.cluster === null ? null : cols[plan.cluster]!;
    const clusterOut = clusterCol ? new Int32Array(n0) : null;

    const used: number[] = [];
    const checkRepeats = globals.repeatedIds.size > 0;
    const rowNumberOf = (r: number) => chunk.offset + r + globals.firstRowNumber;
    rows: for (let r = 0; r < n0; r++) {
      this.rowsRead++;
      const kind = idCol.kinds[r];
      // the ID's text is made only when some ID repeats (a plain number or label is never blank)
      const key = kind === CellKind.Blank || kind === CellKind.Error ? '' : checkRepeats ? displayText(idCol, r) : '-';
      if (key === '') {
        this.exclude(rowNumberOf(r), kind === CellKind.Error ? `${idName} holds an Excel error value` : `${idName} is blank`);
        continue;
      }
      if (checkRepeats && globals.repeatedIds.has(key)) {
        this.exclude(rowNumberOf(r), `duplicate ${idName}`);
        continue;
      }
      for (const check of checks) {
        const plain = check.plain;
        if (plain !== null && plain.kinds[r] === CellKind.Number && check.accept(plain.numbers[r]!)) { check.out[r] = plain.numbers[r]!; continue; }
        const got = check.read(r);
        if (!got.ok) {
          this.exclude(rowNumberOf(r), failureText(got.why, check.header, idName));
          continue rows;
        }
        check.out[r] = got.value;
      }
      if (clusterCol) {
        const ck = clusterCol.kinds[r];
        const label = ck === CellKind.Blank || ck === CellKind.Error ? '' : displayText(clusterCol, r).trim();
        if (label === '') {
          this.exclude(rowNumberOf(r), failureText(ck === CellKind.Error ? 'error' : 'blank', header(plan.cluster!), idName));
          continue;
        }
        let code = this.clusterCodeOf.get(label);
        if (code === undefined) {
          code = this.clusterLabels.length;
          this.clusterLabels.push(label);
          this.clusterCodeOf.set(label, code);
        }
        clusterOut![r] = code;
      }
      for (const e of extra) {
        if (e.col.kinds[r] === CellKind.Number) { e.out[r] = e.col.numbers[r]!; continue; }
        const got = readNumber(e.col, r, true);
        if (!got.ok) {
          this.exclude(rowNumberOf(r), failureText(got.why, e.header, idName));
          continue rows;
        }
        e.out[r] = got.value;
      }
      used.push(r);
    }

    const n = used.length;
    this.used += n;
    // plain loops: typed-array `from` with a mapping function is far slower on a chunk
    const compact = (src: Float64Array) => {
      const out = new Float64Array(n);
      for (let u = 0; u < n; u++) out[u] = src[used[u]!]!;
      return out;
    };
    const rowNumbers = new Int32Array(n);
    for (let u = 0; u < n; u++) rowNumbers[u] = rowNumberOf(used[u]!);
    // IDs are written out only where a unit is listed: fidelity's disagreeing units (with a
    // decision column); otherwise they stay empty text (no per-row string on the common path).
    const ids = new Array<string>(n).fill('');
    if (plan.decision !== null) for (let u = 0; u < n; u++) ids[u] = displayText(idCol, used[u]!);
    const outcomes = plan.outcomes.map((k, o) => {
      const col = cols[k]!;
      const out = new Float64Array(n);
      const tally = this.outcomeMissing[o]!;
      for (let u = 0; u < n; u++) {
        if (col.kinds[used[u]!] === CellKind.Number) { out[u] = col.numbers[used[u]!]!; continue; }
        const got = readNumber(col, used[u]!, true);
        if (got.ok) { out[u] = got.value; continue; }
        out[u] = Number.NaN;
        tally.count++;
        if (tally.rows.length < MAX_ROWS_LISTED) tally.rows.push(rowNumbers[u]!);
        const cause = failureText(got.why, header(k), idName);
        tally.causes.set(cause, (tally.causes.get(cause) ?? 0) + 1);
      }
      return out;
    });
    return {
      rowsRead: n0,
      n,
      ids,
      rowNumbers,
      variables: variableOut.map(compact),
      dictionaries: globals.dictionaries,
      outcomes,
      outcomeMissing: outcomes.map(() => ({ count: 0, rows: [] })),
      treatment: treatmentOut ? compact(treatmentOut) : null,
      decision: decisionOut ? compact(decisionOut) : null,
      cluster: clusterOut ? { codes: compactCodes(clusterOut, used, n), labels: this.clusterLabels } : null,
      covariates: covariateOut.map(compact),
      controls: controlOut.map(compact),
      excluded: [],
      notes: [],
      joins: [],
    };
  }
}
