// What `check` and `evaluate` share: a validated study's data read, its columns mapped and its
// units prepared for the rule. Kept apart from the run (run-study.ts) so that `check` loads the
// data readers and the rule, and none of the estimators, the propensity workers or the store.

import { isAbsolute, resolve } from 'node:path';
import type { Study } from '../contract/study.ts';
import { countText } from '../data/count-text.ts';
import { readJoins } from '../data/join.ts';
import { mapStudyColumns, type ColumnSpec, type MappedData } from '../data/map-columns.ts';
import { readTable } from '../data/read-table.ts';
import type { RawTable } from '../data/types.ts';
import type { Progress } from '../design/propensity.ts';
import { describeAtom } from '../estimate/composition.ts';
import { lowerValidatedProgram } from '../rules/compile.ts';
import type { CompiledProgram } from '../rules/ir.ts';
import type { Checked } from '../rules/types.ts';
import { prepareUnits, type PreparedUnits } from './prepare-units.ts';

export interface PrepareOptions {
  /** Folder that relative data paths are resolved against (the study file's folder). */
  baseDir: string;
  onProgress?: (p: Progress) => void;
  signal?: AbortSignal;
}

/** The study's column roles in the shape the data layer maps. */
export function columnSpec(study: Study): ColumnSpec {
  const c = study.columns;
  return {
    id: c.id,
    variables: study.program.variables.map((v, i) => ({ key: v.key, column: v.column, type: v.type, path: `program.variables[${i}].column` })),
    outcomes: c.outcomes.map((o, i) => ({ column: o.column, ...(o.label ? { label: o.label } : {}), path: `columns.outcomes[${i}].column` })),
    ...(c.treatment === undefined
      ? {}
      : { treatment: typeof c.treatment === 'string' ? { column: c.treatment, path: 'columns.treatment' } : { listedIn: c.treatment.listedIn, path: 'columns.treatment.listedIn' } }),
    ...(c.decision ? { decision: { column: c.decision, path: 'columns.decision' } } : {}),
    ...(c.cluster ? { cluster: { column: c.cluster, path: 'columns.cluster' } } : {}),
    covariates: (c.covariates ?? []).map((column, i) => ({ column, path: `columns.covariates[${i}]` })),
    controls: (c.controls ?? []).map((column, i) => ({ column, path: `columns.controls[${i}]` })),
    ...(study.data.decimal ? { decimal: study.data.decimal } : {}),
    ...(study.data.dateColumns ? { dateColumns: study.data.dateColumns } : {}),
  };
}

export interface ReadStudyData {
  table: RawTable;
  joinHashes: Map<string, string>;
  mapped: MappedData;
}

/** Read the unit file and every joined source, and map the study's columns. */
export async function readStudyData(study: Study, options: PrepareOptions): Promise<Checked<ReadStudyData>> {
  const at = (p: string) => (isAbsolute(p) ? p : resolve(options.baseDir, p));
  const progress = options.onProgress ? (p: { done: number; total: number }) => options.onProgress!({ stage: 'import', done: p.done, total: p.total }) : undefined;
  const table = await readTable(at(study.data.path), {
    ...(study.data.sheet ? { sheet: study.data.sheet } : {}),
    ...(study.data.headerRow ? { headerRow: study.data.headerRow } : {}),
    ...(options.signal ? { signal: options.signal } : {}),
    ...(progress ? { onProgress: progress } : {}),
  });
  if (!table.ok) return table;
  const joins = await readJoins(study.data.join ?? [], options.baseDir, {
    ...(options.signal ? { signal: options.signal } : {}),
    ...(progress ? { onProgress: progress } : {}),
  });
  if (!joins.ok) return joins;
  const mapped = mapStudyColumns(table.value, columnSpec(study), joins.value);
  if (!mapped.ok) return mapped;
  const joinHashes = new Map(joins.value.map((j) => [j.source, j.table.source.sha256]));
  return { ok: true, value: { table: table.value, joinHashes, mapped: mapped.value } };
}

const input = (path: string, message: string): Checked<never> => ({ ok: false, problems: [{ path, message }] });

/** What `check` and `evaluate` share: the data read, mapped and prepared for the rule. */
export interface PreparedStudy {
  read: ReadStudyData;
  program: CompiledProgram;
  prepared: PreparedUnits;
}

/** The largest exclusion reasons, for a message ("1,204 HH_INCOME is not a number; 3 ..."). */
export function topReasons(excluded: ReadonlyArray<{ reason: string; count: number }>, max = 3): string {
  const sorted = [...excluded].sort((a, b) => b.count - a.count);
  const shown = sorted.slice(0, max).map((e) => `${countText(e.count)} ${e.reason}`);
  if (sorted.length > max) shown.push(`and ${sorted.length - max} other reason${sorted.length - max === 1 ? '' : 's'}`);
  return shown.join('; ');
}

/**
 * Read, map and prepare the study's units: the stages `check` and `evaluate` share, so `check`
 * never says "ready" for a study `evaluate` would refuse. Refuses, with what to do, when no row is
 * usable, when the rule can be evaluated for no unit, and when the design cannot identify an
 * effect at all (a deterministic rule with no continuous input puts no unit near its edge at any
 * delta: the APS is 0 or 1 for everyone — Narita and Yata's design needs a continuous input or a
 * lottery).
 */
export async function prepareStudy(study: Study, options: PrepareOptions): Promise<Checked<PreparedStudy>> {
  const read = await readStudyData(study, options);
  if (!read.ok) return read;
  const { table, mapped } = read.value;
  if (mapped.n === 0) {
    return input(study.data.path, `0 usable rows: no row of ${table.source.fileName} could be used (${countText(mapped.rowsRead)} read): ${topReasons(mapped.excluded)}. Fix the data or the column names in the study.`);
  }
  const program = lowerValidatedProgram(study.program);
  const describe = (atom: number) => describeAtom(program, atom);
  const prepared = prepareUnits(program, mapped, study.program.variables.map((v) => v.key), describe);
  if (prepared.data.n === 0) {
    return input('program.rule', `0 usable rows: the rule cannot be evaluated for any unit (${topReasons([...mapped.excluded, ...prepared.excludedByRule])}). Check the lookup tables (a limit for every value) and divisions.`);
  }
  if (program.continuous.length === 0 && prepared.offerProbability.every((p) => p === 0 || p === 1)) {
    return input('program.variables', 'This rule has no continuous input (every input is a category or a count held fixed), and it offers the benefit with certainty or not at all, so no unit can sit near its edge at any delta and the design cannot estimate an effect. What would: a criterion on a continuous input (an income, a score, an age in days), or a lottery among the eligible.');
  }
  return { ok: true, value: { read: read.value, program, prepared } };
}

