// Figures for the app's Map screen: the memo's boundary-region map (main/report/figure-data.ts)
// for a saved study. The per-unit arrays a map needs are not kept after a run, so the study is
// run again here (same study, data and seed: the same numbers as the recorded run).

import type { ApiResult, MapArgs, MapFigure } from '../contract/api.ts';
import type { BoundaryMapSpec } from '../report/charts/spec.ts';
import { Cancelled } from '../design/propensity.ts';
import { boundaryMapData } from '../report/figure-data.ts';
import { runStudy } from '../study.ts';
import { loadStudyFile } from '../studyfile/load.ts';
import { refuse, type CallContext } from './context.ts';

export async function boundaryMap(args: MapArgs, ctx: CallContext = {}): Promise<ApiResult<MapFigure>> {
  const loaded = loadStudyFile(args.studyPath);
  if (!loaded.ok) return refuse(loaded.problems);
  let run;
  try {
    run = await runStudy(loaded.value.study, { baseDir: loaded.value.baseDir, ...ctx, ...(args.workers !== undefined ? { workers: args.workers } : {}) });
  } catch (e) {
    if (e instanceof Cancelled) return { ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: e.message }] } };
    throw e;
  }
  if (!run.ok) return refuse(run.problems);
  const { map, note } = boundaryMapData(run.value);
  const deltas = run.value.results.settings.deltas;
  if (!map) return { ok: true, value: { spec: null, note, deltas } };
  const spec: BoundaryMapSpec = {
    kind: 'boundaryMap',
    title: 'Where the edge of the rule runs',
    ...(map.panel || map.heldFixed.length ? { subtitle: [map.panel, ...map.heldFixed].filter(Boolean).join(' · ') } : {}),
    x: { label: map.x.label, ...(map.x.unit ? { unit: map.x.unit } : {}) },
    y: { label: map.y.label, ...(map.y.unit ? { unit: map.y.unit } : {}) },
    grid: map.grid,
    delta: map.delta,
    counts: map.counts,
  };
  return { ok: true, value: { spec, note: [map.panel, ...map.heldFixed].filter(Boolean).join('; ') || null, deltas } };
}
