// Figures for the app's Map screen: the boundary-region map (main/report/boundary-map.ts) for a
// saved study, with the analyst's choices (axes, delta, discrete cell, view) and what the
// screen's pickers offer.
//
// The per-unit arrays a map needs are not kept after a run (results.json holds none), so the
// study is run again here: same study, data and seed, the same numbers as the recorded run. To
// keep a slider move from rerunning the whole study, the run is cached, keyed by the study
// file's absolute path, the SHA-256 of the validated study (rule, columns, settings) and the
// SHA-256 of every data file it reads — a changed rule, setting or data file gives a new key, so
// a stale run is never drawn:
//  - in memory: at most MAX_CACHED_RUNS (two: the study being looked at and one other), only
//    what a map needs (the unit file as read is dropped), for in-process callers (CLI, tests);
//  - in the workspace (map-run-store.ts, same bound), for hosts that run each call on a fresh
//    worker thread (worker-runner.ts), where memory does not outlive the call.
// Two calls for the same key at once share one run. (Reusing a recorded run instead would need
// the per-unit APS arrays in the workspace database, which it does not store.)

import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import type { ApiResult, MapArgs, MapFigure } from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import type { BoundaryMapSpec } from '../report/charts/spec.ts';
import { Cancelled } from '../design/propensity.ts';
import { boundaryMapChoices, boundaryMapData, deltaIndex, discreteCodes, type MapRun } from '../report/boundary-map.ts';
import type { BoundaryMapData } from '../report/model/figure-types.ts';
import type { Problem } from '../rules/types.ts';
import { runStudy } from '../pipeline/run-study.ts';
import { loadAllowedStudy } from './access.ts';
import { refuse, type CallContext } from './context.ts';
import type { HostContext } from './host.ts';
import { loadMapRun, storeMapRun } from './map-run-store.ts';

export const MAX_CACHED_RUNS = 2;

const cached: Array<{ key: string; run: MapRun }> = []; // most recent first
const inFlight = new Map<string, Promise<MapRunAnswer>>();
let runsStarted = 0;

type MapRunAnswer = { ok: true; run: MapRun } | { ok: false; problems: Problem[] } | { ok: false; cancelled: true };

/** For tests and diagnostics: how many runs are cached and how many studies this module has run. */
export function mapRunCacheInfo(): { entries: number; runsStarted: number } {
  return { entries: cached.length, runsStarted };
}

export function clearMapRunCache(): void {
  cached.length = 0;
}

function fileSha256(path: string, signal?: AbortSignal): Promise<string> {
  return new Promise((done, fail) => {
    const hash = createHash('sha256');
    const stream = createReadStream(path, signal ? { signal } : {});
    stream.on('data', (chunk) => hash.update(chunk));
    stream.on('error', fail);
    stream.on('end', () => done(hash.digest('hex')));
  });
}

/** The cache key, or null when a data file cannot be read (the run then says what is wrong). */
async function runKey(studyPath: string, study: Study, baseDir: string, signal?: AbortSignal): Promise<string | null> {
  const at = (p: string) => (isAbsolute(p) ? p : resolve(baseDir, p));
  const files = [study.data.path, ...(study.data.join ?? []).map((j) => j.path)].map(at);
  try {
    const hashes = await Promise.all(files.map((f) => fileSha256(f, signal)));
    const studyHash = createHash('sha256').update(JSON.stringify(study)).digest('hex');
    return [resolve(studyPath), studyHash, ...hashes].join('\n');
  } catch {
    return null;
  }
}

async function computeRun(study: Study, baseDir: string, args: MapArgs, ctx: CallContext): Promise<MapRunAnswer> {
  runsStarted++;
  try {
    const run = await runStudy(study, {
      baseDir,
      ...(ctx.onProgress ? { onProgress: ctx.onProgress } : {}),
      ...(ctx.signal ? { signal: ctx.signal } : {}),
      ...(args.workers !== undefined ? { workers: args.workers } : {}),
    });
    if (!run.ok) return { ok: false, problems: run.problems };
    const { program, prepared, propensity, results } = run.value;
    return { ok: true, run: { program, prepared, propensity, results } };
  } catch (e) {
    if (e instanceof Cancelled) return { ok: false, cancelled: true };
    throw e;
  }
}

function remember(key: string, run: MapRun): void {
  cached.unshift({ key, run });
  cached.length = Math.min(cached.length, MAX_CACHED_RUNS);
}

/** The run behind a map: from the cache (memory, then workspace), from a run under way for the same key, or a new one. */
async function mapRun(studyPath: string, study: Study, baseDir: string, args: MapArgs, ctx: HostContext): Promise<MapRunAnswer> {
  const key = await runKey(studyPath, study, baseDir, ctx.signal);
  if (key === null) return computeRun(study, baseDir, args, ctx);
  const hit = cached.findIndex((c) => c.key === key);
  if (hit >= 0) {
    const [entry] = cached.splice(hit, 1);
    cached.unshift(entry!);
    return { ok: true, run: entry!.run };
  }
  const stored = ctx.workspaceDir ? loadMapRun(ctx.workspaceDir, key, study) : null;
  if (stored) { remember(key, stored); return { ok: true, run: stored }; }
  const pending = inFlight.get(key);
  if (pending) {
    const shared = await pending;
    // The run we waited for was cancelled by its own caller: this caller still wants one.
    if (!shared.ok && 'cancelled' in shared && !ctx.signal?.aborted) return mapRun(studyPath, study, baseDir, args, ctx);
    return shared;
  }
  const started = computeRun(study, baseDir, args, ctx);
  inFlight.set(key, started);
  try {
    const answer = await started;
    if (answer.ok) {
      remember(key, answer.run);
      if (ctx.workspaceDir) {
        try { storeMapRun(ctx.workspaceDir, key, answer.run); } catch { /* a cache only: the next call runs again */ }
      }
    }
    return answer;
  } finally {
    inFlight.delete(key);
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

function mapSpec(map: BoundaryMapData): BoundaryMapSpec {
  return {
    kind: 'boundaryMap',
    title: 'Where the edge of the rule runs',
    ...(map.panel || map.heldFixed.length ? { subtitle: [map.panel, ...map.heldFixed].filter(Boolean).join(' · ') } : {}),
    x: { label: map.x.label, ...(map.x.unit ? { unit: map.x.unit } : {}) },
    y: { label: map.y.label, ...(map.y.unit ? { unit: map.y.unit } : {}) },
    grid: map.grid,
    delta: map.delta,
    ...(map.view === 'binned' ? { counts: map.counts } : { units: { offered: map.units.offered, notOffered: map.units.notOffered } }),
  };
}

function mapNote(map: BoundaryMapData): string | null {
  const held = [map.panel ?? '', ...map.heldFixed];
  if (map.heldFixed.length) held.push(`the shading and the band hold the other continuous input${map.heldFixed.length > 1 ? 's' : ''} at the median named`);
  const sentences = [held.filter(Boolean).join('; ')];
  if (map.view === 'units') {
    const u = map.units;
    sentences.push(`Private view: each mark is one unit of this cell${map.heldFixed.length ? ', whatever its other inputs' : ''} (triangles offered, circles not offered)${u.drawn < u.total ? `; an even sample of ${u.drawn.toLocaleString('en-US')} of ${u.total.toLocaleString('en-US')} units is drawn` : ''}. It is never put in the memo or exported files`);
  }
  const text = sentences.filter(Boolean).join('. ');
  return text ? `${text}.` : null;
}

export async function boundaryMap(args: MapArgs, ctx: HostContext = {}): Promise<ApiResult<MapFigure>> {
  const loaded = loadAllowedStudy(ctx, args.studyPath);
  if (!loaded.ok) return refuse(loaded.problems);
  const { study, baseDir } = loaded.value;
  const early = mapArgProblems(study, args);
  if (early.length) return refuse(early);
  const got = await mapRun(loaded.value.studyPath, study, baseDir, args, ctx);
  if (!got.ok) {
    if ('cancelled' in got) return { ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: 'Drawing the map was cancelled.' }] } };
    return refuse(got.problems);
  }
  const run = got.run;
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
