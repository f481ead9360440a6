// Validation of a study file (format 1, docs/study-format.md). Every problem at once, each with
// its JSON path and one plain sentence; defaults filled in for what the file leaves out. Pure:
// the program must already be an object (load.ts reads a separate program file first).

import { DEFAULT_SETTINGS, type JoinSource, type OutcomeColumn, type Study, type StudyColumns, type StudyData, type StudySettings } from '../contract/study.ts';
import { validateSettings } from '../design/settings.ts';
import { describeGiven, fieldPath, getOwn, hasOwn, isPlainObject, quoteText, unknownFieldProblems, type Obj } from '../rules/json-read.ts';
import type { Checked, Problem, Program } from '../rules/types.ts';
import { validateProgram } from '../rules/validate.ts';

export const STUDY_FORMAT_VERSION = 1;

const STUDY_FIELDS = ['fenceline', 'title', 'description', 'program', 'data', 'columns', 'settings'];
const DATA_FIELDS = ['path', 'fileName', 'sheet', 'headerRow', 'join', 'decimal', 'dateColumns', 'stream'];
const JOIN_FIELDS = ['path', 'fileName', 'sheet', 'key', 'headerRow'];
const COLUMN_FIELDS = ['id', 'outcomes', 'treatment', 'treatmentPer', 'decision', 'cluster', 'covariates', 'controls', 'labels'];
const OUTCOME_FIELDS = ['column', 'label'];
const SETTINGS_FIELDS = ['deltas', 'draws', 'seed', 'smallCellMax'];

class Problems {
  readonly list: Problem[] = [];
  add(path: string, message: string): void { this.list.push({ path, message }); }
  addAll(ps: Problem[]): void { this.list.push(...ps); }
}

function text(ps: Problems, o: Obj, key: string, path: string, what: string, required: boolean): string | undefined {
  const p = fieldPath(path, key);
  if (!hasOwn(o, key) || getOwn(o, key) === undefined) {
    if (required) ps.add(p, `${what} is missing: add "${key}" with ${what.toLowerCase()}.`);
    return undefined;
  }
  const v = getOwn(o, key);
  if (typeof v !== 'string' || v.trim() === '') {
    ps.add(p, `${what} must be a non-empty text in quotes; found ${describeGiven(v)}.`);
    return undefined;
  }
  return v;
}

function wholeNumber(ps: Problems, o: Obj, key: string, path: string, what: string, min: number): number | undefined {
  if (!hasOwn(o, key) || getOwn(o, key) === undefined) return undefined;
  const v = getOwn(o, key);
  if (typeof v !== 'number' || !Number.isInteger(v) || v < min) {
    ps.add(fieldPath(path, key), `${what} must be a whole number of at least ${min}; found ${describeGiven(v)}.`);
    return undefined;
  }
  return v;
}

function object(ps: Problems, v: unknown, path: string, what: string, example: string): Obj | undefined {
  if (isPlainObject(v)) return v;
  ps.add(path, v === undefined ? `${what} is missing: ${example}` : `${what} must be an object in braces; found ${describeGiven(v)}. ${example}`);
  return undefined;
}

function textList(ps: Problems, o: Obj, key: string, path: string, what: string): string[] {
  if (!hasOwn(o, key) || getOwn(o, key) === undefined) return [];
  const v = getOwn(o, key);
  const p = fieldPath(path, key);
  if (!Array.isArray(v)) {
    ps.add(p, `${what} must be a list of column names, e.g. ["ARREARS_PRIOR", "RENTER"]; found ${describeGiven(v)}.`);
    return [];
  }
  const out: string[] = [];
  const seen = new Set<string>();
  v.forEach((item, i) => {
    if (typeof item !== 'string' || item.trim() === '') {
      ps.add(`${p}[${i}]`, `each entry of ${what} must be a column name in quotes; found ${describeGiven(item)}.`);
      return;
    }
    const norm = item.trim().toLowerCase();
    if (seen.has(norm)) ps.add(`${p}[${i}]`, `${quoteText(item)} is listed twice in ${what}: keep one.`);
    seen.add(norm);
    out.push(item);
  });
  return out;
}

function validateData(ps: Problems, v: unknown): StudyData | undefined {
  const o = object(ps, v, 'data', 'The data section', 'give the data file, e.g. "data": { "path": "applicants.xlsx", "sheet": "Applicants" }.');
  if (!o) return undefined;
  ps.addAll(unknownFieldProblems(o, 'data', DATA_FIELDS, 'the data section'));
  const path = text(ps, o, 'path', 'data', 'The data file path', true);
  const sheet = text(ps, o, 'sheet', 'data', 'The sheet name', false);
  const headerRow = wholeNumber(ps, o, 'headerRow', 'data', 'The header row', 1);
  const fileName = text(ps, o, 'fileName', 'data', 'The file name', false);
  let join: JoinSource[] | undefined;
  if (hasOwn(o, 'join') && getOwn(o, 'join') !== undefined) {
    const list = getOwn(o, 'join');
    if (!Array.isArray(list)) ps.add('data.join', `data.join must be a list of sources, e.g. [ { "path": "payments.xlsx", "key": "APPLICANT_ID" } ]; found ${describeGiven(list)}.`);
    else {
      join = [];
      list.forEach((item, i) => {
        const jp = `data.join[${i}]`;
        const jo = object(ps, item, jp, 'A joined source', 'give its path and ID column, e.g. { "path": "payments.xlsx", "key": "APPLICANT_ID" }.');
        if (!jo) return;
        ps.addAll(unknownFieldProblems(jo, jp, JOIN_FIELDS, 'a joined source'));
        const jpath = text(ps, jo, 'path', jp, 'The joined file path', true);
        const key = text(ps, jo, 'key', jp, 'The ID column of the joined file', true);
        const jsheet = text(ps, jo, 'sheet', jp, 'The sheet name', false);
        const jheader = wholeNumber(ps, jo, 'headerRow', jp, 'The header row', 1);
        const jname = text(ps, jo, 'fileName', jp, 'The file name', false);
        if (jpath && key) join!.push({ path: jpath, key, ...(jname ? { fileName: jname } : {}), ...(jsheet ? { sheet: jsheet } : {}), ...(jheader ? { headerRow: jheader } : {}) });
      });
    }
  }
  // The decimal mark of numbers written as text: "," reads "1.234,5" as 1234.5 and "1.234" as 1234 in every column.
  let decimal: ',' | '.' | undefined;
  if (hasOwn(o, 'decimal') && getOwn(o, 'decimal') !== undefined) {
    const d = getOwn(o, 'decimal');
    if (d === ',' || d === '.') decimal = d;
    else ps.add('data.decimal', `data.decimal is the decimal mark of the numbers in the data: "," (as in 1.234,5) or "." (as in 1,234.5); found ${describeGiven(d)}.`);
  }
  // Columns that hold dates on purpose: a continuous rule input may be a date only when its column is listed here.
  const dateColumns = textList(ps, o, 'dateColumns', 'data', 'data.dateColumns');
  // Read a .csv chunk by chunk through DuckDB (true), or always in memory (false); default: by size (docs/study-format.md).
  let stream: boolean | undefined;
  if (hasOwn(o, 'stream') && getOwn(o, 'stream') !== undefined) {
    const st = getOwn(o, 'stream');
    if (typeof st === 'boolean') stream = st;
    else ps.add('data.stream', `data.stream is true (read the .csv in chunks, for files beyond one sheet) or false (read it whole); found ${describeGiven(st)}.`);
  }
  if (!path) return undefined;
  return {
    path, ...(fileName ? { fileName } : {}), ...(sheet ? { sheet } : {}), ...(headerRow ? { headerRow } : {}), ...(join ? { join } : {}),
    ...(decimal ? { decimal } : {}), ...(dateColumns?.length ? { dateColumns } : {}), ...(stream !== undefined ? { stream } : {}),
  };
}

function validateColumns(ps: Problems, v: unknown, data: StudyData | undefined): StudyColumns | undefined {
  const o = object(ps, v, 'columns', 'The columns section', 'say which columns play which role, e.g. "columns": { "id": "APPLICANT_ID", "outcomes": [ { "column": "ARREARS_MARCH" } ] }.');
  if (!o) return undefined;
  ps.addAll(unknownFieldProblems(o, 'columns', COLUMN_FIELDS, 'the columns section'));
  const id = text(ps, o, 'id', 'columns', 'The unit ID column', true);

  const outcomes: OutcomeColumn[] = [];
  const rawOutcomes = getOwn(o, 'outcomes');
  if (!Array.isArray(rawOutcomes) || rawOutcomes.length === 0) {
    ps.add('columns.outcomes', `Give at least one outcome column, e.g. "outcomes": [ { "column": "ARREARS_MARCH", "label": "Utility arrears in March (USD)" } ]; found ${describeGiven(rawOutcomes)}.`);
  } else {
    rawOutcomes.forEach((item, i) => {
      const p = `columns.outcomes[${i}]`;
      if (typeof item === 'string' && item.trim() !== '') { outcomes.push({ column: item }); return; }
      const oo = object(ps, item, p, 'An outcome', 'give its column, e.g. { "column": "ARREARS_MARCH", "label": "Arrears in March (USD)" }.');
      if (!oo) return;
      ps.addAll(unknownFieldProblems(oo, p, OUTCOME_FIELDS, 'an outcome'));
      const column = text(ps, oo, 'column', p, 'The outcome column', true);
      const label = text(ps, oo, 'label', p, 'The outcome label', false);
      if (column) outcomes.push({ column, ...(label ? { label } : {}) });
    });
  }

  let treatment: StudyColumns['treatment'];
  if (hasOwn(o, 'treatment') && getOwn(o, 'treatment') !== undefined) {
    const t = getOwn(o, 'treatment');
    if (typeof t === 'string' && t.trim() !== '') treatment = t;
    else if (isPlainObject(t) && typeof getOwn(t, 'listedIn') === 'string') {
      ps.addAll(unknownFieldProblems(t, 'columns.treatment', ['listedIn'], 'a "listed in" treatment'));
      const listedIn = getOwn(t, 'listedIn') as string;
      const joined = (data?.join ?? []).map((j) => j.path);
      if (!joined.includes(listedIn)) {
        ps.add('columns.treatment.listedIn', `${quoteText(listedIn)} is not one of the joined sources in data.join${joined.length ? ` (${joined.map((j) => quoteText(j)).join(', ')})` : ''}: add it there with its ID column, e.g. { "path": ${JSON.stringify(listedIn)}, "key": "APPLICANT_ID" }.`);
      }
      treatment = { listedIn };
    } else {
      ps.add('columns.treatment', `The treatment must be a column name (what each unit received: 0/1 or an amount) or { "listedIn": "payments.xlsx" }; found ${describeGiven(t)}.`);
    }
  }
  let treatmentPer: number | undefined;
  if (hasOwn(o, 'treatmentPer') && getOwn(o, 'treatmentPer') !== undefined) {
    const tp = getOwn(o, 'treatmentPer');
    if (typeof tp !== 'number' || !(tp > 0) || !Number.isFinite(tp)) ps.add('columns.treatmentPer', `treatmentPer must be a positive number (report the effect per this much of the treatment amount, e.g. 1000); found ${describeGiven(tp)}.`);
    else treatmentPer = tp;
    if (treatment === undefined) ps.add('columns.treatmentPer', 'treatmentPer only applies to a treatment amount: give "treatment" too, or remove treatmentPer.');
  }
  const decision = text(ps, o, 'decision', 'columns', 'The recorded decision column', false);
  const cluster = text(ps, o, 'cluster', 'columns', 'The cluster column', false);
  const covariates = textList(ps, o, 'covariates', 'columns', 'columns.covariates');
  const controls = textList(ps, o, 'controls', 'columns', 'columns.controls');
  const labels = columnLabels(ps, o);
  if (!id) return undefined;
  return {
    id,
    outcomes,
    ...(treatment !== undefined ? { treatment } : {}),
    ...(treatmentPer !== undefined ? { treatmentPer } : {}),
    ...(decision ? { decision } : {}),
    ...(cluster ? { cluster } : {}),
    covariates,
    controls,
    ...(labels ? { labels } : {}),
  };
}

/** columns.labels: a name for the memo per column, each a non-empty text. */
function columnLabels(ps: Problems, o: Record<string, unknown>): Record<string, string> | undefined {
  if (!hasOwn(o, 'labels') || getOwn(o, 'labels') === undefined) return undefined;
  const v = getOwn(o, 'labels');
  if (!isPlainObject(v)) {
    ps.add('columns.labels', `The column labels must be pairs of a column name and the name the memo prints for it, e.g. "labels": { "BILL_BEFORE": "Heating bill the winter before (USD)" }; found ${describeGiven(v)}.`);
    return undefined;
  }
  const out: Record<string, string> = {};
  for (const [column, label] of Object.entries(v)) {
    if (typeof label !== 'string' || label.trim() === '') ps.add(`columns.labels.${column}`, `The label of ${quoteText(column)} must be a non-empty text (the name the memo prints for that column); found ${describeGiven(label)}.`);
    else out[column] = label.trim();
  }
  return out;
}

function validateStudySettings(ps: Problems, v: unknown): StudySettings {
  if (v === undefined) return { ...DEFAULT_SETTINGS, deltas: DEFAULT_SETTINGS.deltas.slice() };
  const o = object(ps, v, 'settings', 'The settings section', 'e.g. "settings": { "deltas": [0.05, 0.1, 0.2], "draws": 4000, "seed": 1 }.');
  if (!o) return { ...DEFAULT_SETTINGS };
  ps.addAll(unknownFieldProblems(o, 'settings', SETTINGS_FIELDS, 'the settings'));
  const pick = (key: keyof StudySettings): unknown => (hasOwn(o, key) && getOwn(o, key) !== undefined ? getOwn(o, key) : DEFAULT_SETTINGS[key]);
  const candidate = { deltas: pick('deltas'), draws: pick('draws'), seed: pick('seed') } as { deltas: number[]; draws: number; seed: number };
  const checked = validateSettings(candidate, 'settings');
  if (!checked.ok) ps.addAll(checked.problems);
  else {
    const seen = new Set<number>();
    candidate.deltas.forEach((d, i) => { if (seen.has(d)) ps.add(`settings.deltas[${i}]`, `delta ${d} is listed twice: keep one.`); seen.add(d); });
  }
  const small = pick('smallCellMax');
  if (typeof small !== 'number' || !Number.isInteger(small) || small < 0 || small > 1000) {
    ps.add('settings.smallCellMax', `smallCellMax must be a whole number from 0 to 1,000 (counts from 1 to it are suppressed; the default is 10); found ${describeGiven(small)}.`);
  }
  return { deltas: candidate.deltas, draws: candidate.draws, seed: candidate.seed, smallCellMax: small as number };
}

/** Cross-field checks: roles that need each other, columns in two incompatible roles. */
function crossChecks(ps: Problems, program: Program, columns: StudyColumns): void {
  const random = (q: number) => q > 0 && q < 1;
  if ((random(program.offer.ifEligible) || random(program.offer.ifIneligible)) && !columns.decision) {
    ps.add('columns.decision', 'The offer is random (a lottery), so the recorded decision — who was actually offered — is the instrument: give the column that records it, e.g. "decision": "OFFERED".');
  }
  const norm = (c: string) => c.trim().toLowerCase();
  const inputs = new Map(program.variables.map((v) => [norm(v.column), v.key]));
  columns.outcomes.forEach((o, i) => {
    const key = inputs.get(norm(o.column));
    if (key) ps.add(`columns.outcomes[${i}].column`, `${quoteText(o.column)} is an input to the rule (variable "${key}"), so it cannot also be an outcome: choose a column measured after the decision.`);
    if (typeof columns.treatment === 'string' && norm(columns.treatment) === norm(o.column)) ps.add(`columns.outcomes[${i}].column`, `${quoteText(o.column)} is also the treatment column: an outcome must be a different column.`);
  });
  if (inputs.has(norm(columns.id))) ps.add('columns.id', `${quoteText(columns.id)} is an input to the rule, so it cannot be the unit ID: give the column that identifies each unit.`);
  const outcomeSet = new Set(columns.outcomes.map((o) => norm(o.column)));
  (columns.covariates ?? []).forEach((c, i) => {
    if (outcomeSet.has(norm(c))) ps.add(`columns.covariates[${i}]`, `${quoteText(c)} is an outcome; a covariate for balance checks must be measured before the decision.`);
  });
  (columns.controls ?? []).forEach((c, i) => {
    if (outcomeSet.has(norm(c))) ps.add(`columns.controls[${i}]`, `${quoteText(c)} is an outcome and cannot be a control: controls must be measured before the decision.`);
  });
  const named = new Set([columns.id, columns.decision, columns.cluster, typeof columns.treatment === 'string' ? columns.treatment : undefined, ...(columns.covariates ?? []), ...(columns.controls ?? [])]
    .filter((c): c is string => typeof c === 'string').map(norm));
  for (const column of Object.keys(columns.labels ?? {})) {
    if (inputs.has(norm(column))) ps.add(`columns.labels.${column}`, `${quoteText(column)} is an input to the rule: its name for the memo is the variable's label in the program; remove it from the column labels.`);
    else if (outcomeSet.has(norm(column))) ps.add(`columns.labels.${column}`, `${quoteText(column)} is an outcome: give its name as the outcome's "label" instead, and remove it from the column labels.`);
    else if (!named.has(norm(column))) ps.add(`columns.labels.${column}`, `${quoteText(column)} has a label but no role in this study (not the ID, take-up, decision, cluster, a covariate or a control): give it a role or remove its label.`);
  }
}

export interface StudyValidationOptions {
  /** Where the program came from when the study names a separate file (kept in the result). */
  programPath?: string;
}

/** Validate a parsed study file whose `program` is an object. */
export function validateStudy(input: unknown, options: StudyValidationOptions = {}): Checked<Study> {
  const ps = new Problems();
  if (!isPlainObject(input)) {
    return { ok: false, problems: [{ path: '', message: `A study file must hold one JSON object in braces; found ${describeGiven(input)}.` }] };
  }
  ps.addAll(unknownFieldProblems(input, '', STUDY_FIELDS, 'a study'));
  const version = getOwn(input, 'fenceline');
  if (version === undefined) ps.add('fenceline', 'Say which study-file format this is: add "fenceline": 1 at the top.');
  else if (typeof version === 'number' && version > STUDY_FORMAT_VERSION) ps.add('fenceline', `This study file is written in format ${version}, newer than this version of Fenceline reads (${STUDY_FORMAT_VERSION}). Open it with a newer Fenceline.`);
  else if (version !== STUDY_FORMAT_VERSION) ps.add('fenceline', `"fenceline" must be 1 (the study-file format); found ${describeGiven(version)}.`);
  const title = text(ps, input, 'title', '', 'The title', true);
  const description = text(ps, input, 'description', '', 'The description', false);

  let program: Program | undefined;
  const rawProgram = getOwn(input, 'program');
  if (rawProgram === undefined) ps.add('program', 'The program (the eligibility formula) is missing: give it as an object, or the path of a program file, e.g. "program": "winter-credit-program.json".');
  else if (typeof rawProgram === 'string') ps.add('program', `The program file ${quoteText(rawProgram)} was not read: open the study through Fenceline's study loader, which reads separate program files.`);
  else {
    const checked = validateProgram(rawProgram, 'program');
    if (checked.ok) program = checked.value;
    else ps.addAll(options.programPath ? checked.problems.map((p) => ({ ...p, message: `in ${options.programPath}: ${p.message}` })) : checked.problems);
  }
  const data = validateData(ps, getOwn(input, 'data'));
  const columns = validateColumns(ps, getOwn(input, 'columns'), data);
  const settings = validateStudySettings(ps, getOwn(input, 'settings'));
  if (program && columns) crossChecks(ps, program, columns);

  if (ps.list.length || !title || !program || !data || !columns) {
    return { ok: false, problems: ps.list.length ? ps.list : [{ path: '', message: 'The study file is incomplete.' }] };
  }
  return {
    ok: true,
    value: {
      fenceline: 1,
      title,
      ...(description ? { description } : {}),
      program,
      ...(options.programPath ? { programPath: options.programPath } : {}),
      data,
      columns,
      settings,
    },
  };
}
