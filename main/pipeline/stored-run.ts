// A run's per-unit columns in and out of the workspace. What a figure or an export needs of a run
// (report/run-view.ts) is stored with the run (store/runs.ts beginRun, the existing column codec),
// so a reopened run draws its map and writes its memo from the same numbers, without running the
// study again. Columns are named by role; the program is compiled again from the study as run
// (compiling is deterministic).

import type { Results } from '../contract/results.ts';
import type { Study } from '../contract/study.ts';
import { apsOnGrid } from '../design/grid-band.ts';
import type { RunView } from '../report/run-view.ts';
import { lowerValidatedProgram } from '../rules/compile.ts';
import type { Checked } from '../rules/types.ts';
import type { DatasetColumn, DatasetColumnInput, StoredDataset } from '../store/types.ts';

/** The columns a stored run keeps, one value per unit used, in the order of the run's units. */
export function runUnitColumns(view: RunView): { rowNumbers: Int32Array; columns: DatasetColumnInput[] } {
  const { program, prepared, propensity } = view;
  const f64 = (name: string, values: Float64Array): DatasetColumnInput => ({ name, kind: 'f64', values });
  const columns: DatasetColumnInput[] = [
    { name: 'id', kind: 'text', values: prepared.data.ids },
    f64('z', prepared.z),
    ...(prepared.data.treatment ? [f64('d', prepared.data.treatment)] : []),
    f64('eligible', Float64Array.from(prepared.eligible)),
    ...program.continuous.map((v, j) => f64(`continuous:${v.key}`, prepared.cols.continuous[j]!)),
    ...program.discrete.map((v, j) => f64(`discrete:${v.key}`, prepared.cols.discrete[j]!)),
    ...prepared.data.outcomes.map((o, i) => f64(`outcome:${i}`, o)),
    ...prepared.data.covariates.map((c, i) => f64(`covariate:${i}`, c)),
    ...propensity.aps.map((a, k) => f64(`aps:${k}`, a)),
    ...propensity.straddle.map((s, k): DatasetColumnInput => ({ name: `straddle:${k}`, kind: 'i32', values: new Int32Array(s.buffer, s.byteOffset, s.length) })),
  ];
  return { rowNumbers: prepared.data.rowNumbers, columns };
}

/** The run as the figures read it, from its stored results, study and per-unit columns. */
export function runViewFromStored(studyJson: unknown, results: Results, units: Pick<StoredDataset, 'columns' | 'rowNumbers'>): Checked<RunView> {
  const study = studyJson as Study;
  const program = lowerValidatedProgram(study.program);
  const byName = new Map<string, DatasetColumn>(units.columns.map((c) => [c.name, c]));
  const missing: string[] = [];
  const f64 = (name: string): Float64Array => {
    const c = byName.get(name);
    if (c && c.kind === 'f64') return c.values;
    missing.push(name);
    return new Float64Array(0);
  };
  const idColumn = byName.get('id');
  const ids = idColumn && idColumn.kind === 'text' ? idColumn.values : (missing.push('id'), []);
  const deltas = results.settings.deltas;
  const straddle = deltas.map((_, k) => {
    const c = byName.get(`straddle:${k}`);
    if (c && c.kind === 'i32') return new Uint32Array(c.values.buffer, c.values.byteOffset, c.values.length);
    missing.push(`straddle:${k}`);
    return new Uint32Array(0);
  });
  const view: RunView = {
    program,
    results,
    prepared: {
      cols: { n: ids.length, continuous: program.continuous.map((v) => f64(`continuous:${v.key}`)), discrete: program.discrete.map((v) => f64(`discrete:${v.key}`)) },
      z: f64('z'),
      eligible: Uint8Array.from(f64('eligible')),
      data: {
        ids,
        rowNumbers: units.rowNumbers,
        treatment: byName.has('d') ? f64('d') : null,
        outcomes: results.outcomes.map((_, i) => f64(`outcome:${i}`)),
        covariates: (study.columns.covariates ?? []).map((_, i) => f64(`covariate:${i}`)),
      },
    },
    propensity: { aps: deltas.map((_, k) => f64(`aps:${k}`)), straddle },
    band: apsOnGrid(program, program.continuous.map((v) => results.scales.find((s) => s.key === v.key)?.scale ?? 1), results.settings.seed),
  };
  if (missing.length) {
    return { ok: false, problems: [{ path: 'runId', message: `The stored run lacks some of its per-unit columns (${missing.slice(0, 5).join(', ')}); the workspace may be damaged. Run the study again.` }] };
  }
  return { ok: true, value: view };
}
