// Figures for the app's screens, drawn from a stored run (main/pipeline/stored-run.ts): the
// boundary-region map (main/report/boundary-map.ts) with the analyst's choices (axes, delta,
// discrete cell, view) and what the screen's pickers offer. The run's per-unit columns are kept
// with the run in the workspace, so nothing is run again to draw: a slider move reads the stored
// columns and recomputes only the map's grid.

import type { ApiResult, EdgeFigures, EdgeFiguresArgs, MapArgs, MapFigure } from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import { boundaryMapChoices, boundaryMapData, deltaIndex, discreteCodes, type MapRun } from '../report/boundary-map.ts';
import { mapNote, mapSpec } from '../report/map-figure.ts';
import { densityData, signedDistanceData } from '../report/figure-data.ts';
import { edgeFigures } from '../report/model/edge-figures.ts';
import type { RunView } from '../report/run-view.ts';
import { openStoredRun } from '../pipeline/record.ts';
import type { Checked, Problem } from '../rules/types.ts';
import { openWorkspace } from '../store/workspace.ts';
import { refuse } from './context.ts';
import { NO_WORKSPACE, workspaceLayout, type HostContext } from './host.ts';

/** The stored run behind a figure, read from the host's workspace. */
export function storedRunView(runId: number, ctx: HostContext): Checked<{ view: RunView; study: Study }> {
  if (!ctx.workspaceDir) return { ok: false, problems: [{ path: '', message: NO_WORKSPACE }] };
  const opened = openWorkspace(workspaceLayout(ctx.workspaceDir).workspacePath);
  if (!opened.ok) return opened;
  try {
    const run = openStoredRun(opened.value, runId);
    if (!run.ok) return { ok: false, problems: run.problems.map((p) => ({ ...p, path: 'args.runId' })) };
    return { ok: true, value: { view: run.value.view, study: run.value.studyJson as Study } };
  } finally {
    opened.value.close();
  }
}

const listKeys = (vars: ReadonlyArray<{ key: string; label: string }>) => vars.map((v) => `${v.label} (${v.key})`).join(', ');

/** Problems with the analyst's choices that the study alone can show (before any run). */
export function mapArgProblems(study: Study, args: MapArgs): Problem[] {
  const problems: Problem[] = [];
  const vars = study.program.variables;
  const continuous = vars.filter((v) => v.type === 'continuous');
  const discrete = vars.filter((v) => v.type === 'discrete');
  if (args.axes) {
    for (const side of ['x', 'y'] as const) {
      const key = args.axes[side];
      if (!continuous.some((v) => v.key === key)) {
        problems.push({
          path: `args.axes.${side}`,
          message: continuous.length
            ? `"${key}" is not a continuous input of this program, so it cannot go on the map's ${side === 'x' ? 'across' : 'up'} axis. Choose one of: ${listKeys(continuous)}.`
            : `This program has no continuous input to put on the map's axes.`,
        });
      }
    }
    if (!problems.length && args.axes.x === args.axes.y) {
      problems.push({ path: 'args.axes.y', message: `The map needs two different inputs on its axes; both are "${args.axes.x}". Choose another input for the up axis.` });
    }
  }
  if (args.delta !== undefined && deltaIndex(study.settings.deltas, args.delta) < 0) {
    problems.push({ path: 'args.delta', message: `Delta ${args.delta} is not one of this study's deltas (${study.settings.deltas.join(', ')}). Choose one of them, or add it to the study's settings and run again.` });
  }
  const seen = new Set<string>();
  (args.cell ?? []).forEach((c, i) => {
    if (!discrete.some((v) => v.key === c.key)) {
      problems.push({
        path: `args.cell[${i}].key`,
        message: discrete.length
          ? `"${c.key}" is not a discrete input of this program. Choose one of: ${listKeys(discrete)}.`
          : `This program has no discrete input, so there is no value to choose.`,
      });
    } else if (seen.has(c.key)) {
      problems.push({ path: `args.cell[${i}].key`, message: `"${c.key}" is chosen twice; give one value for each discrete input.` });
    }
    seen.add(c.key);
  });
  return problems;
}

/** Problems with the chosen discrete values that need the run (the codes the data holds). */
function cellValueProblems(run: MapRun, args: MapArgs): Problem[] {
  const problems: Problem[] = [];
  (args.cell ?? []).forEach((c, i) => {
    const j = run.program.discrete.findIndex((v) => v.key === c.key);
    if (j < 0) return;
    const codes = discreteCodes(run, j);
    if (!codes.includes(c.value)) {
      const label = run.program.discrete[j]!.variable.label ?? c.key;
      problems.push({ path: `args.cell[${i}].value`, message: `${label} has no value ${c.value} in this study's data or declared values. Choose one of: ${codes.join(', ')}.` });
    }
  });
  return problems;
}

export async function boundaryMap(args: MapArgs, ctx: HostContext = {}): Promise<ApiResult<MapFigure>> {
  const stored = storedRunView(args.runId, ctx);
  if (!stored.ok) return refuse(stored.problems);
  const { view: run, study } = stored.value;
  const early = mapArgProblems(study, args);
  if (early.length) return refuse(early);
  const late = cellValueProblems(run, args);
  if (late.length) return refuse(late);
  const view = args.view ?? 'binned';
  const { map, note } = boundaryMapData(run, {
    view,
    ...(args.axes ? { axes: args.axes } : {}),
    ...(args.delta !== undefined ? { delta: args.delta } : {}),
    ...(args.cell ? { cell: args.cell } : {}),
  });
  const choices = boundaryMapChoices(run, args.delta);
  const deltas = choices.deltas;
  const delta = map?.delta ?? (args.delta !== undefined ? deltas[deltaIndex(deltas, args.delta)]! : choices.headlineDelta);
  return {
    ok: true,
    value: {
      spec: map ? mapSpec(map) : null,
      note: map ? mapNote(map) : note,
      deltas,
      headlineDelta: choices.headlineDelta,
      drawn: {
        axes: map ? { x: map.x.key, y: map.y.key } : null,
        delta,
        cell: map?.cell ?? [...(args.cell ?? [])],
        view,
      },
      continuous: choices.continuous,
      discrete: choices.discrete,
    },
  };
}

/** The edge figures of a stored run (distance and density; binned, small cells hidden), as the memo draws them. */
export async function edgeFiguresOfRun(args: EdgeFiguresArgs, ctx: HostContext = {}): Promise<ApiResult<EdgeFigures>> {
  const stored = storedRunView(args.runId, ctx);
  if (!stored.ok) return refuse(stored.problems);
  const run = stored.value.view;
  const figures = edgeFigures(run.results, { signedDistance: signedDistanceData(run), density: densityData(run) });
  return { ok: true, value: { figures: figures.map((f) => ({ id: f.id, spec: f.chart, caption: f.caption, alt: f.alt })) } };
}
