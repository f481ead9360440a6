// Mapping the study's columns (columns.*, program.variables[].column) to a table's headers and
// turning rows into the arrays the analysis uses. Every data row ends either used or excluded
// with a reason naming the column as the file names it; nothing is dropped silently:
// n + Σ excluded[].count = rowsRead. A missing outcome does not exclude a unit; it only
// removes the unit from that outcome (outcomeMissing). Pure apart from the tables it is given.

import type { Checked, Problem } from '../rules/types.ts';
import { displayText, findColumn, linkKey, missingColumnMessage } from './find-column.ts';
import { decimalCommaColumn, decimalCommaNumber } from './cell-text.ts';
import { countText } from './count-text.ts';
import { DUPLICATE_KEY, findJoinedSource, matchUnits, NO_ROW, type JoinedTable, type JoinSourceRef, type UnitMatch } from './join.ts';
import { listRows } from './locate.ts';
import { CellKind, type RawColumn, type RawTable, type TableNote } from './types.ts';

export interface ColumnSpec {
  /** Unit ID column (columns.id). */
  id: string;
  variables: Array<{ key: string; column: string; type: 'continuous' | 'discrete'; path: string }>;
  outcomes: Array<{ column: string; label?: string; path: string }>;
  treatment?: { column: string; path: string } | { listedIn: JoinSourceRef; path: string };
  decision?: { column: string; path: string };
  cluster?: { column: string; path: string };
  covariates: Array<{ column: string; path: string }>;
  controls: Array<{ column: string; path: string }>;
  /** The study's decimal mark for numbers written as text (data.decimal); absent: found per column. */
  decimal?: ',' | '.';
  /** Columns that hold dates on purpose (data.dateColumns). */
  dateColumns?: string[];
}

export interface ExclusionGroup {
  reason: string;
  count: number;
  /** Spreadsheet row numbers (all, or the first 1,000). */
  rows: number[];
}

export interface JoinReport {
  source: string;
  /** Units (with a usable ID) that have a row in the source. */
  matched: number;
  unmatchedKeys: { count: number; examples: string[] };
  duplicateKeys: { count: number; examples: string[] };
}

export interface MappedData {
  /** Data rows in the unit file. */
  rowsRead: number;
  /** Units used. */
  n: number;
  /** Unit IDs of the units used (text as shown). */
  ids: string[];
  /** Spreadsheet row of each unit used. */
  rowNumbers: Int32Array;
  /** In ColumnSpec.variables order (discrete: numeric codes; text categories coded with `dictionaries`). */
  variables: Float64Array[];
  /** Per variable: labels of coded text categories (code k = labels[k]), else null. */
  dictionaries: Array<string[] | null>;
  /** NaN = missing for that outcome (the unit is kept for the other outcomes). */
  outcomes: Float64Array[];
  outcomeMissing: Array<{ count: number; rows: number[] }>;
  treatment: Float64Array | null;
  decision: Float64Array | null;
  cluster: { codes: Int32Array; labels: string[] } | null;
  covariates: Float64Array[];
  controls: Float64Array[];
  excluded: ExclusionGroup[];
  /** What the analyst should know: import notes of every table, then mapping notes. */
  notes: TableNote[];
  joins: JoinReport[];
}

const MAX_ROWS_LISTED = 1000;
export const BOOLEAN_TEXT = /^(?:yes|no|y|n|true|false)$/i;

function booleanText(text: string): number {
  const t = text.trim().toLowerCase();
  return t === 'yes' || t === 'y' || t === 'true' ? 1 : 0;
}

interface Resolved {
  /** Header as written in the file it was found in. */
  header: string;
  column: RawColumn;
  joined: JoinedTable | null;
  match: UnitMatch | null;
  path: string;
}

export type Failure = 'blank' | 'error' | 'no-result' | 'text' | 'negative' | 'not01' | 'not-amount' | 'no-row' | 'duplicate-key';

/** A read value, or why there is none. */
export type Read = { ok: true; value: number } | { ok: false; why: Failure };

const FAIL = (why: Failure): Read => ({ ok: false, why });

/** Numeric reading of one cell; `booleans` lets yes/no/true/false text count as 1/0. */
export function readNumber(column: RawColumn, r: number, booleans: boolean): Read {
  switch (column.kinds[r]) {
    case CellKind.Number:
    case CellKind.TextNumber:
    case CellKind.Date:
    case CellKind.Bool:
      return { ok: true, value: column.numbers[r]! };
    case CellKind.Blank:
      return FAIL('blank');
    case CellKind.Error:
      return FAIL('error');
    case CellKind.NoResult:
      return FAIL('no-result');
    default: {
      const text = column.texts?.[r] ?? '';
      if (booleans && BOOLEAN_TEXT.test(text.trim())) return { ok: true, value: booleanText(text) };
      return FAIL('text');
    }
  }
}

/** The note on an outcome missing for some units used (rows listed, causes counted). */
export function outcomeMissingNote(label: string, missing: { count: number; rows: number[] }, n: number, causes: ReadonlyMap<string, number>): TableNote {
  const grouped = countText;
  const why = causes.size === 1 ? [...causes.keys()][0]! : [...causes].map(([cause, count]) => `${grouped(count)}: ${cause}`).join('; ');
  // One wording whatever the count: the memo shares this note with the counts taken out, and a
  // singular verb would give a count of one away (docs/method.md, disclosure).
  return { code: 'outcome-missing', message: `Outcome ${label} is missing for ${grouped(missing.count)} of the ${grouped(n)} units used (${why}); they are left out of that outcome only (rows ${listRows(missing.rows, missing.count)}).` };
}

/** Why a row is excluded, in the analyst's words (the column as the file names it). */
export function failureText(why: Failure, header: string, idName: string, source = ''): string {
  switch (why) {
    case 'blank': return `${header} is blank`;
    case 'error': return `${header} holds an Excel error value`;
    case 'no-result': return `${header} is a formula with no saved result`;
    case 'text': return `${header} is not a number`;
    case 'negative': return `${header} is negative`;
    case 'not01': return `${header} is not 0/1`;
    case 'not-amount': return `${header} is not 0/1 or an amount`;
    case 'no-row': return `no row in ${source} for this ${idName}`;
    case 'duplicate-key': return `${idName} appears more than once in ${source}`;
  }
}

function rowIn(res: Resolved, unit: number): number {
  return res.match === null ? unit : res.match.rowOf[unit]!;
}

export function mapStudyColumns(table: RawTable, spec: ColumnSpec, joins: readonly JoinedTable[] = []): Checked<MappedData> {
  const problems: Problem[] = [];
  const notes: TableNote[] = [...table.notes];
  for (const j of joins) {
    for (const note of j.table.notes) {
      notes.push(note.message.includes(j.table.source.fileName) ? note : { code: note.code, message: `${j.source}: ${note.message}` });
    }
  }
  const unitCount = table.rowCount;
  const matches = new Map<JoinedTable, UnitMatch>();

  // ---- 1. find every column --------------------------------------------------------------
  const idFound = spec.id.trim() === '' ? null : findColumn(table, spec.id);
  if (spec.id.trim() === '') problems.push({ path: 'columns.id', message: 'The unit ID column (columns.id) is empty. Give the name of the column that identifies each unit.' });
  else if (idFound === null) problems.push({ path: 'columns.id', message: missingColumnMessage(spec.id, table) });
  const looseMatches: string[] = [];
  if (idFound?.loose) looseMatches.push(`${spec.id} → ${table.columns[idFound.index]!.name}`);

  const pending: Array<() => void> = [];
  const resolve = (name: string, path: string): Resolved | null => {
    if (name.trim() === '') {
      problems.push({ path, message: 'The column name is empty. Give the name of a column in the data file.' });
      return null;
    }
    const here = findColumn(table, name);
    if (here !== null) {
      const column = table.columns[here.index]!;
      if (here.loose) looseMatches.push(`${name} → ${column.name}`);
      return { header: column.name, column, joined: null, match: null, path };
    }
    const found = joins.flatMap((j) => {
      const f = findColumn(j.table, name);
      return f === null ? [] : [{ j, f }];
    });
    if (found.length > 1) {
      problems.push({ path, message: `Column ${name} is in more than one joined file (${found.map((x) => x.j.source).join(', ')}). Rename it in all but one of them so the study says which to use.` });
      return null;
    }
    const first = found[0];
    if (first === undefined) {
      problems.push({ path, message: missingColumnMessage(name, table, joins.map((j) => j.table)) });
      return null;
    }
    const column = first.j.table.columns[first.f.index]!;
    if (first.f.loose) looseMatches.push(`${name} → ${column.name} (${first.j.source})`);
    const res: Resolved = { header: column.name, column, joined: first.j, match: null, path };
    pending.push(() => {
      res.match = matches.get(first.j) ?? null;
    });
    return res;
  };

  const variables = spec.variables.map((v) => resolve(v.column, v.path));
  const outcomes = spec.outcomes.map((o) => resolve(o.column, o.path));
  let treatmentColumn: Resolved | null = null;
  let treatmentList: JoinedTable | null = null;
  if (spec.treatment !== undefined) {
    if ('listedIn' in spec.treatment) {
      const src = findJoinedSource(joins, spec.treatment.listedIn);
      if (src === undefined) {
        const have = joins.length > 0 ? ` The joined files are: ${joins.map((j) => j.source).join(', ')}.` : ' There are none.';
        problems.push({ path: spec.treatment.path, message: `Treatment is "listed in ${spec.treatment.listedIn}", but data.join has no file ${spec.treatment.listedIn}. Add it to data.join with its ID column.${have}` });
      } else treatmentList = src;
    } else treatmentColumn = resolve(spec.treatment.column, spec.treatment.path);
  }
  const decision = spec.decision === undefined ? null : resolve(spec.decision.column, spec.decision.path);
  const cluster = spec.cluster === undefined ? null : resolve(spec.cluster.column, spec.cluster.path);
  const covariates = spec.covariates.map((c) => resolve(c.column, c.path));
  const controls = spec.controls.map((c) => resolve(c.column, c.path));
  // Dates in a continuous rule input are refused unless the study says the column holds dates on
  // purpose: a date read as days since 1970 in an income or score column is almost always a typing slip.
  spec.variables.forEach((v, k) => {
    const res = variables[k];
    if (v.type !== 'continuous' || !res) return;
    if ((spec.dateColumns ?? []).some((d) => d.trim().toLowerCase() === res.header.trim().toLowerCase() || d.trim().toLowerCase() === v.column.trim().toLowerCase())) return;
    let dates = 0, first = -1;
    for (let r = 0; r < res.column.kinds.length; r++) if (res.column.kinds[r] === CellKind.Date) { dates++; if (first < 0) first = r; }
    if (dates === 0) return;
    problems.push({
      path: v.path,
      message: `${res.header} holds ${countText(dates)} date${dates > 1 ? 's' : ''} (such as ${displayText(res.column, first)}), but it is the continuous rule input "${v.key}". If it is a date on purpose, add "${res.header}" to "dateColumns" under data (dates are read as days since 1970-01-01); otherwise correct those cells.`,
    });
  });
  // Numbers written the European way (decimal comma, point or space groups, a percent sign).
  const readWithComma = new Set<RawColumn>();
  for (const res of [...variables.filter((_, k) => spec.variables[k]!.type === 'continuous'), ...outcomes, ...covariates, ...controls]) {
    if (!res || readWithComma.has(res.column) || spec.decimal === '.') continue;
    readWithComma.add(res.column);
    const read = decimalCommaColumn(res.column, spec.decimal === ',');
    if (!read || (read.written === 0 && read.changed === 0)) continue;
    notes.push({
      code: 'decimal-comma',
      message: `${res.header}: numbers written with a decimal comma${read.percent ? ' or a percent sign' : ''} (such as "${read.example}") were read that way (${decimalCommaNumber(read.example).toLocaleString('en-US')}${read.percent ? '; a percentage is read as its number of percent' : ''}). If this column means otherwise, set "decimal": "." under data.`,
    });
  }
  if (problems.length > 0 || idFound === null) return { ok: false, problems };
  if (looseMatches.length > 0) notes.push({ code: 'column-name-case', message: `Column names matched ignoring case and spaces: ${looseMatches.join('; ')}.` });

  // ---- 2. unit IDs and links to the joined files -------------------------------------------
  const idColumn = table.columns[idFound.index]!;
  const idName = idColumn.name;
  const unitKeys: Array<string | null> = new Array<string | null>(unitCount);
  // 1 where the unit's ID appears on more than one row: one Map lookup per unit (the first row of each ID).
  const firstRowOf = new Map<string, number>();
  const duplicated = new Uint8Array(unitCount);
  for (let i = 0; i < unitCount; i++) {
    const k = linkKey(idColumn, i);
    const key = k === '' ? null : k;
    unitKeys[i] = key;
    if (key === null) continue;
    const first = firstRowOf.get(key);
    if (first === undefined) firstRowOf.set(key, i);
    else duplicated[first] = duplicated[i] = 1;
  }
  for (const j of joins) matches.set(j, matchUnits(j, unitKeys));
  for (const p of pending) p();
  for (const j of joins) {
    if (j.blankKeyCount > 0) {
      notes.push({ code: 'join-blank-key', message: `${j.source}: ${j.blankKeyCount} row${j.blankKeyCount > 1 ? 's have' : ' has'} no ${j.table.columns[j.keyColumn]!.name} and cannot be linked to a unit (row${j.blankKeyCount > 1 ? 's' : ''} ${listRows(j.blankKeyRows, j.blankKeyCount)}).` });
    }
  }

  // ---- 3. how each column reads ------------------------------------------------------------
  const reasonText = (res: Resolved | null, why: Failure, header: string): string => failureText(why, header, idName, res?.joined?.source ?? '');

  const linked = (res: Resolved, unit: number): number | Failure => {
    const r = rowIn(res, unit);
    if (r === NO_ROW) return 'no-row';
    if (r === DUPLICATE_KEY) return 'duplicate-key';
    return r;
  };

  type Reader = (unit: number) => Read;
  const numberReader = (res: Resolved, booleans: boolean): Reader => (unit) => {
    const r = linked(res, unit);
    return typeof r === 'string' ? FAIL(r) : readNumber(res.column, r, booleans);
  };

  const dictionaries: Array<string[] | null> = [];
  const variableReaders: Reader[] = variables.map((res, k) => {
    const v = spec.variables[k]!;
    const col = res!.column;
    if (v.type === 'continuous') {
      dictionaries.push(null);
      return numberReader(res!, false);
    }
    // Discrete: numeric codes as they are; a column of text categories gets codes 0..k-1 in
    // sorted order; a column of yes/no text reads as 1/0.
    let numeric = 0;
    const labels = new Set<string>();
    let allBoolean = true;
    for (let r = 0; r < col.kinds.length; r++) {
      const kind = col.kinds[r];
      if (kind === CellKind.Text) {
        const text = (col.texts?.[r] ?? '').trim();
        labels.add(text);
        if (!BOOLEAN_TEXT.test(text)) allBoolean = false;
      } else if (kind === CellKind.Number || kind === CellKind.TextNumber || kind === CellKind.Date || kind === CellKind.Bool) numeric++;
    }
    if (labels.size === 0 || numeric > 0 || allBoolean) {
      dictionaries.push(null);
      if (labels.size > 0 && numeric > 0 && !allBoolean) {
        notes.push({ code: 'mixed-categories', message: `${res!.header} mixes numbers and text; units with text in it are excluded.` });
      }
      if (labels.size > 0 && allBoolean) notes.push({ code: 'yes-no', message: `${res!.header}: yes/no (true/false) read as 1/0.` });
      return numberReader(res!, true);
    }
    const sorted = [...labels].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
    dictionaries.push(sorted);
    const codeOf = new Map(sorted.map((label, code) => [label, code] as const));
    notes.push({ code: 'categories-coded', message: `${res!.header}: text categories coded as numbers: ${sorted.slice(0, 12).map((l, c) => `${l} = ${c}`).join(', ')}${sorted.length > 12 ? ` and ${sorted.length - 12} more` : ''}.` });
    return (unit) => {
      const r = linked(res!, unit);
      if (typeof r === 'string') return FAIL(r);
      if (col.kinds[r] === CellKind.Text) return { ok: true, value: codeOf.get((col.texts?.[r] ?? '').trim())! };
      return readNumber(col, r, false);
    };
  });

  let treatmentReader: Reader | null = null;
  if (treatmentColumn !== null) {
    const res = treatmentColumn;
    // 0/1 or a non-negative amount; which one decides how a bad cell is described.
    let amount = false;
    for (let r = 0; r < res.column.kinds.length && !amount; r++) {
      const got = readNumber(res.column, r, true);
      if (got.ok && got.value !== 0 && got.value !== 1 && got.value > 0) amount = true;
    }
    if (amount) notes.push({ code: 'treatment-amount', message: `${res.header} holds amounts, not only 0/1: the estimate is per unit of ${res.header}.` });
    const inner = numberReader(res, true);
    treatmentReader = (unit) => {
      const got = inner(unit);
      if (!got.ok) return got.why === 'text' ? FAIL(amount ? 'not-amount' : 'not01') : got;
      if (!Number.isFinite(got.value)) return FAIL(amount ? 'not-amount' : 'not01');
      if (got.value < 0) return FAIL('negative');
      return got;
    };
  } else if (treatmentList !== null) {
    const match = matches.get(treatmentList)!;
    // 1 if the unit's ID appears in that source (on one row or several), else 0.
    treatmentReader = (unit) => ({ ok: true, value: match.rowOf[unit] === NO_ROW ? 0 : 1 });
  }

  let decisionReader: Reader | null = null;
  if (decision !== null) {
    const inner = numberReader(decision, true);
    decisionReader = (unit) => {
      const got = inner(unit);
      if (!got.ok) return got.why === 'text' ? FAIL('not01') : got;
      return got.value === 0 || got.value === 1 ? got : FAIL('not01');
    };
  }

  const clusterLabels: string[] = [];
  const clusterCodeOf = new Map<string, number>();
  type ClusterRead = { ok: true; label: string } | { ok: false; why: Failure };
  const clusterReader: ((unit: number) => ClusterRead) | null = cluster === null ? null : (unit) => {
    const r = linked(cluster, unit);
    if (typeof r === 'string') return { ok: false, why: r };
    const kind = cluster.column.kinds[r];
    if (kind === CellKind.Blank) return { ok: false, why: 'blank' };
    if (kind === CellKind.Error) return { ok: false, why: 'error' };
    if (kind === CellKind.NoResult) return { ok: false, why: 'no-result' };
    const label = displayText(cluster.column, r).trim();
    return label === '' ? { ok: false, why: 'blank' } : { ok: true, label };
  };

  const covariateReaders = covariates.map((res) => numberReader(res!, true));
  const controlReaders = controls.map((res) => numberReader(res!, true));

  // ---- 4. each row: used, or excluded with its first reason -------------------------------
  const checks: Array<{ res: Resolved | null; header: string; read: Reader; out: Float64Array }> = [];
  const full = () => new Float64Array(unitCount);
  const variableOut = variables.map(() => full());
  variables.forEach((res, k) => checks.push({ res, header: res!.header, read: variableReaders[k]!, out: variableOut[k]! }));
  const treatmentOut = treatmentReader === null ? null : full();
  if (treatmentReader !== null) checks.push({ res: treatmentColumn, header: treatmentColumn?.header ?? '', read: treatmentReader, out: treatmentOut! });
  const decisionOut = decisionReader === null ? null : full();
  if (decisionReader !== null) checks.push({ res: decision, header: decision!.header, read: decisionReader, out: decisionOut! });
  const clusterOut = clusterReader === null ? null : new Array<string>(unitCount);
  const covariateOut = covariates.map(() => full());
  const controlOut = controls.map(() => full());

  const groups = new Map<string, ExclusionGroup>();
  const exclude = (unit: number, reason: string) => {
    let g = groups.get(reason);
    if (g === undefined) {
      g = { reason, count: 0, rows: [] };
      groups.set(reason, g);
    }
    g.count++;
    if (g.rows.length < MAX_ROWS_LISTED) g.rows.push(table.rowNumbers[unit]!);
  };

  // Covariates and controls are checked after the cluster, in the order the study lists them.
  const extra: Array<[Reader, Float64Array, Resolved]> = [
    ...covariateReaders.map((r, k) => [r, covariateOut[k]!, covariates[k]!] as [Reader, Float64Array, Resolved]),
    ...controlReaders.map((r, k) => [r, controlOut[k]!, controls[k]!] as [Reader, Float64Array, Resolved]),
  ];
  const used: number[] = [];
  rows: for (let i = 0; i < unitCount; i++) {
    const key = unitKeys[i];
    if (key === null || key === undefined) {
      const kind = idColumn.kinds[i];
      exclude(i, kind === CellKind.Error ? `${idName} holds an Excel error value` : kind === CellKind.NoResult ? `${idName} is a formula with no saved result` : `${idName} is blank`);
      continue;
    }
    if (duplicated[i] === 1) {
      exclude(i, `duplicate ${idName}`);
      continue;
    }
    for (const check of checks) {
      const got = check.read(i);
      if (!got.ok) {
        exclude(i, reasonText(check.res, got.why, check.header));
        continue rows;
      }
      check.out[i] = got.value;
    }
    if (clusterReader !== null) {
      const got = clusterReader(i);
      if (!got.ok) {
        exclude(i, reasonText(cluster, got.why, cluster!.header));
        continue;
      }
      clusterOut![i] = got.label;
    }
    for (const [read, out, res] of extra) {
      const got = read(i);
      if (!got.ok) {
        exclude(i, reasonText(res, got.why, res.header));
        continue rows;
      }
      out[i] = got.value;
    }
    used.push(i);
  }

  // ---- 5. the arrays of the units used ----------------------------------------------------
  const n = used.length;
  const compact = (src: Float64Array) => {
    const out = new Float64Array(n);
    for (let k = 0; k < n; k++) out[k] = src[used[k]!]!;
    return out;
  };
  const rowNumbers = new Int32Array(n);
  const ids: string[] = new Array<string>(n);
  for (let k = 0; k < n; k++) {
    rowNumbers[k] = table.rowNumbers[used[k]!]!;
    ids[k] = displayText(idColumn, used[k]!);
  }

  const outcomeArrays: Float64Array[] = [];
  const outcomeMissing: Array<{ count: number; rows: number[] }> = [];
  outcomes.forEach((res, o) => {
    const read = numberReader(res!, true);
    const out = new Float64Array(n);
    const missing = { count: 0, rows: [] as number[] };
    const causes = new Map<string, number>();
    for (let k = 0; k < n; k++) {
      const got = read(used[k]!);
      if (got.ok) {
        out[k] = got.value;
        continue;
      }
      out[k] = Number.NaN;
      missing.count++;
      if (missing.rows.length < MAX_ROWS_LISTED) missing.rows.push(rowNumbers[k]!);
      const cause = reasonText(res, got.why, res!.header);
      causes.set(cause, (causes.get(cause) ?? 0) + 1);
    }
    if (missing.count > 0) notes.push(outcomeMissingNote(spec.outcomes[o]!.label ?? res!.header, missing, n, causes));
    outcomeArrays.push(out);
    outcomeMissing.push(missing);
  });

  let clusterResult: MappedData['cluster'] = null;
  if (clusterOut !== null) {
    const codes = new Int32Array(n);
    for (let k = 0; k < n; k++) {
      const label = clusterOut[used[k]!]!;
      let code = clusterCodeOf.get(label);
      if (code === undefined) {
        code = clusterLabels.length;
        clusterLabels.push(label);
        clusterCodeOf.set(label, code);
      }
      codes[k] = code;
    }
    clusterResult = { codes, labels: clusterLabels };
  }

  const joinReports: JoinReport[] = joins.map((j) => {
    const m = matches.get(j)!;
    return { source: j.source, matched: m.matched, unmatchedKeys: m.unmatchedKeys, duplicateKeys: m.duplicateKeys };
  });
  joinReports.forEach((r, i) => {
    // name the joined file's own key column (e.g. CASE_NO), which may differ from the unit file's ID
    const j = joins[i]!;
    const key = j.table.columns[j.keyColumn]!.name;
    if (r.unmatchedKeys.count > 0) notes.push({ code: 'join-unmatched', message: `${r.source}: ${r.unmatchedKeys.count} ${key} value${r.unmatchedKeys.count > 1 ? 's match' : ' matches'} no unit (such as ${r.unmatchedKeys.examples.slice(0, 3).join(', ')}).` });
    if (r.duplicateKeys.count > 0) notes.push({ code: 'join-duplicates', message: `${r.source}: ${r.duplicateKeys.count} ${key} value${r.duplicateKeys.count > 1 ? 's appear' : ' appears'} on more than one row (such as ${r.duplicateKeys.examples.slice(0, 3).join(', ')}).` });
  });

  return {
    ok: true,
    value: {
      rowsRead: unitCount,
      n,
      ids,
      rowNumbers,
      variables: variableOut.map(compact),
      dictionaries,
      outcomes: outcomeArrays,
      outcomeMissing,
      treatment: treatmentOut === null ? null : compact(treatmentOut),
      decision: decisionOut === null ? null : compact(decisionOut),
      cluster: clusterResult,
      covariates: covariateOut.map(compact),
      controls: controlOut.map(compact),
      excluded: [...groups.values()],
      notes,
      joins: joinReports,
    },
  };
}
