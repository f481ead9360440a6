// The study being edited in the app: a study-file object (format 1, docs/study-format.md)
// whose parts may still be incomplete or wrong. The main side validates it (program.check,
// data.check, study.save); here it is only made complete enough for the forms to show, and
// tidied into a study file before it is sent.

import type { Study } from '../../main/contract/study.ts';
import type { Condition, Program, Variable } from '../../main/contract/program.ts';

export type StudyDraft = Study;

export const DEFAULT_DRAFT_SETTINGS = { deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1, smallCellMax: 10 };

const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);
const text = (v: unknown, fallback = ''): string => (typeof v === 'string' ? v : fallback);

/** A new variable row: its label is typed first; its short name follows the label (keyFromLabel). */
export const blankVariable = (): Variable => ({ key: '', label: '', type: 'continuous', column: '' });

/**
 * A new program: one empty variable row and one empty criterion to fill in, shown as incomplete
 * until they are. The offer defaults to the plain rule (eligible: offered; not: not offered),
 * shown on the form.
 */
export function blankProgram(): Program {
  return { name: '', unit: '', variables: [blankVariable()], rule: { all: [{ value: '', op: '<=', limit: '' }] }, offer: { ifEligible: 1, ifIneligible: 0 } };
}

/** "Annual income (USD)" → "annual_income": a short name usable in calculations, unique among `taken`. */
export function keyFromLabel(label: string, taken: readonly string[] = []): string {
  let base = label.toLowerCase().normalize('NFKD').replace(/\([^)]*\)/g, ' ').replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '').slice(0, 30).replace(/_+$/, '');
  if (base === '') return '';
  if (/^[0-9]/.test(base)) base = `v_${base}`;
  if (base === 'min' || base === 'max') base = `${base}_value`;
  let key = base;
  for (let n = 2; taken.includes(key); n++) key = `${base}_${n}`;
  return key;
}

export function blankStudy(): StudyDraft {
  return {
    fenceline: 1,
    title: '',
    program: blankProgram(),
    data: { path: '' },
    columns: { id: '', outcomes: [], covariates: [], controls: [] },
    settings: { ...DEFAULT_DRAFT_SETTINGS, deltas: [...DEFAULT_DRAFT_SETTINGS.deltas] },
  };
}

/** Any opened study (valid or not) made complete enough to edit: missing parts become blanks. */
export function normalizeDraft(raw: unknown): StudyDraft {
  const d = blankStudy();
  // An opened study gets no rows it did not have.
  d.program.variables = [];
  d.program.rule = { all: [] };
  if (!isObject(raw)) return d;
  d.title = text(raw.title);
  if (typeof raw.description === 'string') d.description = raw.description;
  if (isObject(raw.program)) {
    const p = raw.program;
    d.program = {
      name: text(p.name),
      unit: text(p.unit),
      variables: Array.isArray(p.variables) ? (p.variables.filter(isObject) as unknown as Variable[]) : [],
      rule: (isObject(p.rule) ? p.rule : { all: [] }) as unknown as Condition,
      offer: isObject(p.offer) ? { ifEligible: p.offer.ifEligible as number, ifIneligible: p.offer.ifIneligible as number } : { ifEligible: 1, ifIneligible: 0 },
    };
  }
  if (isObject(raw.data)) d.data = { ...(raw.data as unknown as Study['data']), path: text(raw.data.path) };
  if (isObject(raw.columns)) {
    const c = raw.columns;
    d.columns = {
      ...(c as unknown as Study['columns']),
      id: text(c.id),
      outcomes: Array.isArray(c.outcomes) ? (c.outcomes.filter(isObject) as unknown as Study['columns']['outcomes']) : [],
      covariates: Array.isArray(c.covariates) ? c.covariates.filter((x): x is string => typeof x === 'string') : [],
      controls: Array.isArray(c.controls) ? c.controls.filter((x): x is string => typeof x === 'string') : [],
    };
  }
  if (isObject(raw.settings)) d.settings = { ...d.settings, ...(raw.settings as Partial<Study['settings']>) };
  return d;
}

/** Remove what the forms leave blank, so the validators see only what the analyst gave. */
export function tidyProgram(p: Program): Program {
  const variables = p.variables.map((v) => {
    const out: Record<string, unknown> = { ...v };
    for (const k of ['unit', 'scale', 'range', 'values'] as const) {
      const x = out[k];
      if (x === '' || x === null || x === undefined || (Array.isArray(x) && x.length === 0)) delete out[k];
    }
    return out as unknown as Variable;
  });
  const out: Program = { ...p, variables, rule: tidyCondition(p.rule) };
  if (!out.unit) delete out.unit;
  return out;
}

function tidyCondition(c: Condition): Condition {
  if ('all' in c) return { ...c, all: c.all.map(tidyCondition) };
  if ('any' in c) return { ...c, any: c.any.map(tidyCondition) };
  if ('atLeast' in c) return { ...c, of: c.of.map(tidyCondition) };
  if ('not' in c) return { ...c, not: tidyCondition(c.not) };
  const out = { ...c } as Record<string, unknown>;
  if (out.label === '') delete out.label;
  if (isObject(out.limit) && (out.limit.else === '' || out.limit.else === null || out.limit.else === undefined)) {
    const { else: _none, ...rest } = out.limit;
    out.limit = rest;
  }
  return out as unknown as Condition;
}

/** The draft as a study file object. */
export function toStudyFile(d: StudyDraft): Study {
  const data: Study['data'] = { path: d.data.path.trim() };
  if (d.data.fileName) data.fileName = d.data.fileName;
  if (d.data.sheet) data.sheet = d.data.sheet;
  if (d.data.headerRow) data.headerRow = d.data.headerRow;
  if (d.data.join?.length) data.join = d.data.join;
  const c = d.columns;
  const columns: Study['columns'] = { id: c.id, outcomes: c.outcomes.map((o) => (o.label ? { column: o.column, label: o.label } : { column: o.column })) };
  if (c.treatment !== undefined && c.treatment !== '') columns.treatment = c.treatment;
  if (c.treatmentPer) columns.treatmentPer = c.treatmentPer;
  if (c.decision) columns.decision = c.decision;
  if (c.cluster) columns.cluster = c.cluster;
  columns.covariates = c.covariates ?? [];
  columns.controls = c.controls ?? [];
  // Names for the memo of the columns that hold a role that takes one (a column taken out of its
  // role keeps its name in the draft, so putting it back does not lose what was typed).
  const named = new Set([c.id, c.decision, c.cluster, typeof c.treatment === 'string' ? c.treatment : undefined, ...columns.covariates, ...columns.controls]);
  const labels = Object.fromEntries(Object.entries(c.labels ?? {}).filter(([column, label]) => named.has(column) && typeof label === 'string' && label.trim() !== ''));
  if (Object.keys(labels).length) columns.labels = labels;
  // An untitled study takes its program's name as its title.
  const out: Study = { fenceline: 1, title: d.title.trim() || d.program.name.trim(), program: tidyProgram(d.program), data, columns, settings: d.settings };
  if (d.description) out.description = d.description;
  return out;
}

/** A folder-friendly name: "Winter energy credit (2025)" → "winter-energy-credit-2025". */
export function slug(title: string): string {
  const s = title.toLowerCase().normalize('NFKD').replace(/[^\p{L}\p{N}]+/gu, '-').replace(/^-+|-+$/g, '').slice(0, 60);
  return s || 'study';
}
