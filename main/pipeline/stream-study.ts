// The pipeline for a file beyond one sheet (a .parquet file, or a .csv read through DuckDB):
// the same stages as run-study.ts on chunks of rows, with memory bounded by the chunk (and by the
// clusters), never by the file. Three passes over the file:
//   0. map and prepare every chunk (the same exclusions, counted with their reasons), and measure
//      each continuous input's sample SD over the rows used (Welford's update continued across
//      chunks: the same operations, in the same order, as the in-memory pass) — the APS needs the
//      scales before its first unit;
//   1. map and prepare again, compute every unit's APS with the design code of the in-memory path
//      (a unit's APS depends only on its own inputs, the scales and the seed: the quasi-random
//      points are one set per study, never drawn per row), and accumulate the cross-products of
//      each regression (main/estimate/cross-products.ts);
//   2. the same APS again, and the robust variances' meat with the pass-1 coefficients.
// The numbers equal the in-memory ones up to rounding (tests/stream/). What needs every unit at
// once — the density tests, the local-linear cross-check, complier profiles, threshold changes,
// the wild cluster bootstrap, the per-unit columns and the memo's figures — is not computed here;
// results.json `streamed` says so, item by item.

import { extname, isAbsolute, resolve } from 'node:path';
import type { ExclusionReason, Fidelity, Results, ResultsCore, StreamedBlock, Warning } from '../contract/results.ts';
import type { Study } from '../contract/study.ts';
import { categoryDictionary, planStreamColumns, StreamMapper, type StreamGlobals } from '../data/columnar/stream-map.ts';
import type { ColumnarSource } from '../data/columnar/duckdb-source.ts';
import type { MappedData } from '../data/map-columns.ts';
import { outcomeMissingNote } from '../data/map-columns.ts';
import { computeApsBlock, type ApsColumns } from '../design/aps.ts';
import { ballPointSet } from '../design/ball-points.ts';
import { Cancelled, summarize, validateSettings, type DeltaSummary, type Progress } from '../design/propensity.ts';
import { createWelford, scalesFromSd, welfordAdd, welfordSd } from '../design/scaling.ts';
import { APS_NAME, apsUndefinedWarning, estimandNoteFor, missingOutcomeWarning, type ComparisonEstimate, type DeltaEstimate } from '../estimate/aps-iv.ts';
import { boundaryComposition, describeAtom, type DeltaComposition } from '../estimate/composition.ts';
import { addMeatRows, addRows } from '../estimate/cross-products.ts';
import { densityChecksForProgram } from '../estimate/density.ts';
import { singleCutoff, tryLocalLinear } from '../estimate/local-linear.ts';
import { createReservoir, offerRows, reservoirColumns } from '../estimate/reservoir.ts';
import {
  addBalanceRows, balanceAfterPass1, balanceAfterPass2, comparisonAfterPass1, comparisonAfterPass2, countSampleRows, createBalanceSample,
  createMomentSample, headlineAfterPass1, headlineAfterPass2, type HeadlineContext, type MomentSample,
} from '../estimate/moment-estimates.ts';
import { holmByDelta } from '../estimate/multiplicity.ts';
import { deltaSensitivity } from '../estimate/sensitivity.ts';
import { withFindings } from '../report/findings/index.ts';
import { lowerValidatedProgram } from '../rules/compile.ts';
import type { Checked } from '../rules/types.ts';
import { SOFTWARE_VERSION } from '../store/software-version.ts';
import { limitGapWarning, prepareUnits, type PreparedUnits } from './prepare-units.ts';
import { columnSpec, topReasons } from './prepare-study.ts';
import { columnLabels, dedupe, programBlock } from './run-study.ts';

/** Rows per chunk by default (common practice: large enough that DuckDB's 2,048-row vectors and the per-chunk work amortize, small enough to stay a few tens of MB). */
export const STREAM_CHUNK_ROWS = 262_144;

/** CSV files at least this large are streamed (common practice: beyond what a sheet of 1,048,576 rows usually weighs). */
export { STREAM_CSV_BYTES, isStreamedStudy } from './stream-route.ts';

export interface StreamOptions {
  baseDir: string;
  onProgress?: (p: Progress) => void;
  signal?: AbortSignal;
  /** Rows per chunk (default 262,144). */
  chunkRows?: number;
  /** Units in the seeded subsample for the density tests and the local-linear cross-check (default 200,000). */
  subsample?: number;
}

export interface StreamedRun {
  results: Results;
  /** SHA-256 of the data file, by the path the study names it. */
  dataHashes: Record<string, string>;
  /** The file as read: its absolute path, size and row count (the workspace references it, never copies it). */
  file: { path: string; bytes: number; rows: number; format: 'parquet' | 'csv' };
  timings: Record<string, number>;
}

const refuse = (path: string, message: string): Checked<never> => ({ ok: false, problems: [{ path, message }] });

const NOT_COMPUTED: StreamedBlock['notComputed'] = [
  { key: 'compliers', why: 'complier profiles are not yet accumulated for streamed files' },
  { key: 'thresholdChanges', why: 'small threshold changes recompute the APS for every unit at each change' },
  { key: 'outcomes[].byDelta[].wildBootstrap', why: 'the wild cluster bootstrap resamples every unit' },
  { key: 'warnings (resolution)', why: 'whether an input is recorded more coarsely than the neighbourhood is judged from the spacing of all its values' },
  { key: 'units.csv', why: 'one row per unit of a file beyond one sheet is not written; the per-unit APS can be recomputed from the study and the seed' },
];

/** Units kept for the checks that need them at once (common practice: enough for the density test's bins and the local-linear bandwidth). */
export const STREAM_SUBSAMPLE = 200_000;

const MEMO_NOTE = 'memo formats for streamed files: not written in this version. results.json holds every estimate (effect, first stage, reduced form, HC1 or CR1 standard errors, Anderson–Rubin set, tF interval) for every outcome and delta; the memo\'s figures need per-unit columns, which a streamed run does not keep.';

interface PassContext {
  source: ColumnarSource;
  study: Study;
  plan: ReturnType<typeof planStreamColumns> extends Checked<infer P> ? P : never;
  globals: StreamGlobals;
  program: ReturnType<typeof lowerValidatedProgram>;
  keys: string[];
  chunkRows: number;
  signal: AbortSignal | undefined;
  onProgress: ((p: Progress) => void) | undefined;
}

/** One pass over the file: each chunk mapped and prepared, handed to `use`. */
async function pass(ctx: PassContext, stage: string, use: (prepared: PreparedUnits, mapped: MappedData) => void): Promise<StreamMapper> {
  const spec = columnSpec(ctx.study);
  const mapper = new StreamMapper(ctx.plan, spec, ctx.globals);
  const describe = (atom: number) => describeAtom(ctx.program, atom);
  const total = ctx.source.info.rowCount;
  ctx.onProgress?.({ stage, done: 0, total });
  for await (const chunk of ctx.source.chunks(ctx.plan.requests, ctx.chunkRows, ctx.signal)) {
    if (ctx.signal?.aborted) throw new Cancelled();
    const mapped = mapper.mapChunk(chunk);
    if (mapped.n > 0) use(prepareUnits(ctx.program, mapped, ctx.keys, describe), mapped);
    ctx.onProgress?.({ stage, done: chunk.offset + chunk.rows, total });
  }
  if (ctx.signal?.aborted) throw new Cancelled();
  return mapper;
}

/** Merge exclusion groups by reason (counts added, the first 1,000 rows kept). */
function mergeExclusions(into: Map<string, ExclusionReason>, groups: readonly ExclusionReason[]): void {
  for (const g of groups) {
    const have = into.get(g.reason);
    if (!have) { into.set(g.reason, { reason: g.reason, count: g.count, rows: g.rows.slice(0, 1000) }); continue; }
    have.count += g.count;
    for (const r of g.rows) if (have.rows.length < 1000) have.rows.push(r);
  }
}

function mergeFidelity(into: Fidelity | null, f: Fidelity | null): Fidelity | null {
  if (!f) return into;
  if (!into) return { ...f, disagreeIds: f.disagreeIds.slice() };
  into.compared += f.compared;
  into.agree += f.agree;
  into.disagree += f.disagree;
  into.offeredAgainstRule += f.offeredAgainstRule;
  into.refusedAgainstRule += f.refusedAgainstRule;
  for (const id of f.disagreeIds) if (into.disagreeIds.length < 1000) into.disagreeIds.push(id);
  return into;
}

function mergeSummary(into: DeltaSummary[] | null, s: DeltaSummary[]): DeltaSummary[] {
  if (!into) return s.map((d) => ({ ...d, straddlingByAtom: d.straddlingByAtom.slice() }));
  into.forEach((d, k) => {
    const c = s[k]!;
    d.constant += c.constant; d.exact += c.exact; d.simulated += c.simulated; d.undefined += c.undefined; d.boundary += c.boundary;
    d.maxSe = Math.max(d.maxSe, c.maxSe); d.corner += c.corner; d.cornerExact += c.cornerExact; d.refined += c.refined; d.refinedAtBound += c.refinedAtBound;
    c.straddlingByAtom.forEach((v, a) => { d.straddlingByAtom[a] = d.straddlingByAtom[a]! + v; });
  });
  return into;
}

function mergeComposition(into: DeltaComposition[] | null, c: DeltaComposition[]): DeltaComposition[] {
  if (!into) return c.map((d) => ({ ...d, atoms: d.atoms.map((a) => ({ ...a })) }));
  into.forEach((d, k) => {
    const e = c[k]!;
    d.boundary += e.boundary; d.several += e.several; d.lotteryOnly += e.lotteryOnly;
    d.atoms.forEach((a, j) => { a.straddling += e.atoms[j]!.straddling; a.only += e.atoms[j]!.only; });
  });
  return into;
}

/** Indices of rows r < n with keep(r). */
function rowsWhere(n: number, keep: (r: number) => boolean, out: Int32Array): number {
  let count = 0;
  for (let r = 0; r < n; r++) if (keep(r)) out[count++] = r;
  return count;
}

/** Open the study's streamed file (refusing what a streamed file cannot do) and run `work` on it; the file is closed after. */
async function withStreamedFile<T>(study: Study, options: StreamOptions, work: (source: ColumnarSource) => Promise<Checked<T>>): Promise<Checked<T>> {
  if ((study.data.join ?? []).length > 0) {
    return refuse('data.join', 'Joined files (data.join) cannot be read with a streamed data file in this version. Put the columns the study needs into one Parquet file (a database or DuckDB can join them), or use a sheet-sized .xlsx or .csv.');
  }
  // Settings the in-memory reader honours but the streamed one does not read are refused, not ignored.
  if (study.data.decimal !== undefined) {
    return refuse('data.decimal', 'The decimal mark setting (data.decimal) is not read for a streamed data file in this version: numbers in a Parquet file carry their own type, and a streamed .csv reads "." as the decimal mark. Remove the setting (converting the column first if it uses commas), or use a sheet-sized .xlsx or .csv.');
  }
  if ((study.data.dateColumns ?? []).length > 0) {
    return refuse('data.dateColumns', 'Date columns (data.dateColumns) are not read for a streamed data file in this version. Store those dates as numbers (days since 1970-01-01) in the file and remove the setting, or use a sheet-sized .xlsx or .csv.');
  }
  const path = isAbsolute(study.data.path) ? study.data.path : resolve(options.baseDir, study.data.path);
  const format = extname(path).toLowerCase() === '.csv' ? 'csv' : 'parquet';
  // DuckDB (a native module) loads only when a streamed file is read: `check` and `--help` never load it.
  const { openColumnar } = await import('../data/columnar/duckdb-source.ts');
  const opened = await openColumnar(path, { format, ...(options.signal ? { signal: options.signal } : {}) });
  if (!opened.ok) return opened;
  try {
    return await work(opened.value);
  } finally {
    opened.value.close();
  }
}

/** Run a validated study whose data file is streamed. Input problems come back as values; faults throw. */
export async function streamStudy(study: Study, options: StreamOptions): Promise<Checked<StreamedRun>> {
  const timings: Record<string, number> = {};
  let t = performance.now();
  const lap = (name: string) => { const now = performance.now(); timings[name] = Math.round(now - t); t = now; };
  return withStreamedFile(study, options, (source) => streamOpened(study, source, options, timings, lap));
}

/** What `check` reports for a streamed file: pass 0 only (the same stages as evaluate's first pass). */
export interface StreamedCheck {
  dataFile: string;
  rowsRead: number;
  rowsUsed: number;
  rowsExcluded: ExclusionReason[];
  outcomesMissing: Array<{ column: string; count: number }>;
  fidelity: Fidelity | null;
  eligible: number;
  notes: Array<{ code: string; message: string }>;
}

export async function checkStreamed(study: Study, options: StreamOptions): Promise<Checked<StreamedCheck>> {
  return withStreamedFile(study, options, async (source) => {
    const ctx = await passContext(study, source, options);
    if (!ctx.ok) return ctx;
    const first = await firstPass(ctx.value);
    if (!first.ok) return first;
    const f = first.value;
    return {
      ok: true,
      value: {
        dataFile: source.info.fileName,
        rowsRead: f.mapper.rowsRead,
        rowsUsed: f.n,
        rowsExcluded: [...f.mapper.excluded(), ...f.byRule.values()],
        outcomesMissing: study.columns.outcomes.map((o, i) => ({ column: o.column, count: f.missing[i]! })),
        fidelity: f.fidelity,
        eligible: f.eligible,
        notes: [...ctx.value.plan.notes, ...f.notes],
      },
    };
  });
}

/** The study's columns found in the file, what holds over the whole file, the compiled rule. */
async function passContext(study: Study, source: ColumnarSource, options: StreamOptions): Promise<Checked<PassContext>> {
  const info = source.info;
  const spec = columnSpec(study);
  const planned = planStreamColumns(source.headerTable(), spec);
  if (!planned.ok) return planned;
  const plan = planned.value;
  const dictionaries: Array<string[] | null> = [];
  for (let v = 0; v < spec.variables.length; v++) {
    const header = plan.headers[plan.variables[v]!]!;
    const type = info.columns.find((c) => c.name === header)?.type ?? '';
    dictionaries.push(spec.variables[v]!.type === 'discrete' && type === 'VARCHAR' ? categoryDictionary(await source.distinctTexts(header)) : null);
  }
  const globals: StreamGlobals = {
    repeatedIds: await source.repeatedTexts(plan.headers[plan.id]!),
    dictionaries,
    treatmentAmounts: plan.treatment !== null ? await source.holdsAmounts(plan.headers[plan.treatment]!) : false,
    firstRowNumber: info.format === 'csv' ? 2 : 1,
  };
  const program = lowerValidatedProgram(study.program);
  const keys = study.program.variables.map((v) => v.key);
  return { ok: true, value: { source, study, plan, globals, program, keys, chunkRows: options.chunkRows ?? STREAM_CHUNK_ROWS, signal: options.signal, onProgress: options.onProgress } };
}

interface FirstPass {
  mapper: StreamMapper;
  byRule: Map<string, ExclusionReason>;
  fidelity: Fidelity | null;
  instrument: PreparedUnits['instrument'];
  /** Units used (after the rule's exclusions), those the rule makes eligible, missing outcomes among them. */
  n: number;
  eligible: number;
  missing: number[];
  sd: ReturnType<typeof createWelford>[];
  notes: Array<{ code: string; message: string }>;
}

/** Pass 0: every chunk mapped and prepared; exclusions, the rule's verdicts, the inputs' spread. Refuses as prepareStudy does. */
async function firstPass(ctx: PassContext): Promise<Checked<FirstPass>> {
  const { program, study } = ctx;
  const sd = program.continuous.map(() => createWelford());
  const byRule = new Map<string, ExclusionReason>();
  const state = { fidelity: null as Fidelity | null, instrument: null as PreparedUnits['instrument'] | null, n: 0, eligible: 0, allCertain: true };
  const missing = study.columns.outcomes.map(() => 0);
  const mapper = await pass(ctx, 'import', (prepared) => {
    mergeExclusions(byRule, prepared.excludedByRule);
    state.fidelity = mergeFidelity(state.fidelity, prepared.fidelity);
    state.instrument ??= prepared.instrument;
    state.n += prepared.data.n;
    for (let i = 0; i < prepared.eligible.length; i++) state.eligible += prepared.eligible[i]!;
    prepared.data.outcomes.forEach((y, o) => { for (let i = 0; i < y.length; i++) if (!Number.isFinite(y[i]!)) missing[o]!++; });
    for (let i = 0; i < prepared.offerProbability.length && state.allCertain; i++) {
      const p = prepared.offerProbability[i]!;
      if (p !== 0 && p !== 1) state.allCertain = false;
    }
    program.continuous.forEach((cv, j) => welfordAdd(sd[j]!, prepared.cols.continuous[cv.index]!, prepared.cols.n));
  });
  const mappingExcluded = mapper.excluded();
  if (mapper.used === 0) {
    return refuse(study.data.path, `0 usable rows: no row of ${ctx.source.info.fileName} could be used (${mapper.rowsRead.toLocaleString('en-US')} read): ${topReasons(mappingExcluded)}. Fix the data or the column names in the study.`);
  }
  if (state.n === 0) {
    return refuse('program.rule', `0 usable rows: the rule cannot be evaluated for any unit (${topReasons([...mappingExcluded, ...byRule.values()])}). Check the lookup tables (a limit for every value) and divisions.`);
  }
  if (program.continuous.length === 0 && state.allCertain) {
    return refuse('program.variables', 'This rule has no continuous input (every input is a category or a count held fixed), and it offers the benefit with certainty or not at all, so no unit can sit near its edge at any delta and the design cannot estimate an effect. What would: a criterion on a continuous input (an income, a score, an age in days), or a lottery among the eligible.');
  }
  const notes: Array<{ code: string; message: string }> = [];
  mapper.outcomeMissing.forEach((m, o) => {
    const label = study.columns.outcomes[o]!.label ?? study.columns.outcomes[o]!.column;
    if (m.count > 0) notes.push(outcomeMissingNote(label, m, mapper.used, m.causes));
  });
  for (const g of byRule.values()) if (g.reason.startsWith('the limit of ')) notes.push(limitGapWarning(g.reason, g.count));
  return { ok: true, value: { mapper, byRule, fidelity: state.fidelity, instrument: state.instrument!, n: state.n, eligible: state.eligible, missing, sd, notes } };
}

async function streamOpened(study: Study, source: ColumnarSource, options: StreamOptions, timings: Record<string, number>, lap: (name: string) => void): Promise<Checked<StreamedRun>> {
  const info = source.info;
  const settings = { deltas: study.settings.deltas, draws: study.settings.draws, seed: study.settings.seed };
  const checkedSettings = validateSettings(settings);
  if (!checkedSettings.ok) return checkedSettings;
  const context = await passContext(study, source, options);
  if (!context.ok) return context;
  const ctx = context.value;
  const { plan, program } = ctx;
  lap('open');

  // ---- pass 0: exclusions, the rule's verdicts, the scales ---------------------------------
  const first = await firstPass(ctx);
  if (!first.ok) return first;
  const { mapper: pass0, byRule, fidelity, instrument, n, sd } = first.value;
  const mappingExcluded = pass0.excluded();
  const scales = scalesFromSd(program, n, (index) => welfordSd(sd[program.continuous.findIndex((c) => c.index === index)]!));
  if (!scales.ok) return scales;
  const scaleValues = scales.value.map((s) => s.scale);
  const points = ballPointSet(program.continuous.length, settings.draws, settings.seed);
  lap('pass 0');

  // ---- the regressions ----------------------------------------------------------------------
  const c = study.columns;
  const clusterCount = c.cluster ? pass0.clusterLabels.length : null;
  const deltas = settings.deltas;
  const per = c.treatmentPer ?? 1;
  const hasTreatment = plan.treatment !== null;
  const estimand: 'treatment' | 'offer' = hasTreatment ? 'treatment' : 'offer';
  const offerName = c.decision && instrument.source === 'recorded-decision' ? c.decision : 'offer (formula)';
  const dName = hasTreatment ? (c.treatment as string) : offerName;
  const controlNames = c.controls ?? [];
  const outcomes = c.outcomes.map((o) => ({ column: o.column, label: o.label ?? o.column }));
  const responses = (o: number) => [outcomes[o]!.column, ...(hasTreatment ? [dName] : [])];
  const headline = deltas.map(() => outcomes.map((_, o) => createMomentSample([APS_NAME, ...controlNames, offerName], responses(o), clusterCount)));
  const naive = outcomes.map((o) => createMomentSample([dName], [o.column], clusterCount));
  const noAps = outcomes.map((_, o) => createMomentSample([...controlNames, offerName], responses(o), clusterCount));
  const covariateNames = c.covariates ?? [];
  const balance = covariateNames.length ? deltas.map((delta) => createBalanceSample(delta, [APS_NAME, offerName], covariateNames, clusterCount)) : [];
  const boundaryCount = deltas.map(() => 0);
  const apsUndefined = deltas.map(() => 0);
  const missing = outcomes.map(() => 0);
  const merged: { summary: DeltaSummary[] | null; composition: DeltaComposition[] | null; compositionWarnings: Warning[] } = { summary: null, composition: null, compositionWarnings: [] };

  type Visit = (s: MomentSample, columns: Float64Array[], idx: Int32Array, count: number, clusters: Int32Array | undefined) => void;
  type BalanceVisit = (b: (typeof balance)[number], columns: Float64Array[], idx: Int32Array, count: number, clusters: Int32Array | undefined) => void;
  /** Every regression's rows in one chunk, handed to `visit` (balance's to `visitBalance`); pass 1 also counts. */
  const visitChunk = (prepared: PreparedUnits, aps: ApsColumns, visit: Visit, visitBalance: BalanceVisit, counting: boolean) => {
    const data = prepared.data;
    const m = data.n;
    const z = prepared.z;
    const d = hasTreatment ? (per === 1 ? data.treatment! : Float64Array.from(data.treatment!, (v) => v / per)) : z;
    const clusters = data.cluster?.codes;
    const idx = new Int32Array(m);
    if (counting) {
      deltas.forEach((_, k) => {
        const a = aps.aps[k]!;
        for (let r = 0; r < m; r++) {
          const p = a[r]!;
          if (p > 0 && p < 1) boundaryCount[k]!++;
          else if (Number.isNaN(p)) apsUndefined[k]!++;
        }
      });
    }
    balance.forEach((b, k) => {
      const a = aps.aps[k]!;
      const count = rowsWhere(m, (r) => a[r]! > 0 && a[r]! < 1, idx);
      visitBalance(b, [a, z, ...data.covariates], idx, count, clusters);
    });
    outcomes.forEach((_, o) => {
      const y = data.outcomes[o]!;
      const tail = hasTreatment ? [y, d] : [y];
      let count = rowsWhere(m, (r) => Number.isFinite(y[r]!), idx);
      if (counting) missing[o]! += m - count;
      visit(naive[o]!, [d, y], idx, count, clusters);
      visit(noAps[o]!, [...data.controls, z, ...tail], idx, count, clusters);
      deltas.forEach((_, k) => {
        const a = aps.aps[k]!;
        count = rowsWhere(m, (r) => Number.isFinite(y[r]!) && a[r]! > 0 && a[r]! < 1, idx);
        visit(headline[k]![o]!, [a, ...data.controls, z, ...tail], idx, count, clusters);
      });
    });
  };
  const apsOf = (prepared: PreparedUnits) => computeApsBlock(program, prepared.cols, scaleValues, settings, points);
  // The subsample for the checks that need the units at once: [continuous..., discrete..., outcomes..., Z, D?, cluster?].
  const subsampleSize = options.subsample ?? STREAM_SUBSAMPLE;
  const reservoir = createReservoir(subsampleSize, program.continuous.length + program.discrete.length + outcomes.length + 1 + (hasTreatment ? 1 : 0) + (clusterCount !== null ? 1 : 0), settings.seed);
  const offerToReservoir = (prepared: PreparedUnits) => {
    const data = prepared.data;
    offerRows(reservoir, [
      ...prepared.cols.continuous, ...prepared.cols.discrete, ...data.outcomes, prepared.z,
      ...(hasTreatment ? [data.treatment!] : []), ...(clusterCount !== null ? [Float64Array.from(data.cluster!.codes)] : []),
    ], data.n);
  };

  // ---- pass 1: APS and cross-products -------------------------------------------------------
  await pass(ctx, 'propensity', (prepared) => {
    const aps = apsOf(prepared);
    merged.summary = mergeSummary(merged.summary, summarize(program, aps));
    offerToReservoir(prepared);
    const composed = boundaryComposition(program, aps);
    if (merged.composition === null) merged.compositionWarnings = composed.warnings; // they depend on the program only
    merged.composition = mergeComposition(merged.composition, composed.byDelta);
    visitChunk(prepared, aps, (s, columns, idx, count, clusters) => {
      addRows(s.moments, columns, idx, count);
      countSampleRows(s, columns, idx, count, clusters);
    }, addBalanceRows, true);
  });
  lap('pass 1');

  const level = 0.95;
  const headlineCtx = (k: number, o: number): HeadlineContext => ({
    delta: deltas[k]!, label: outcomes[o]!.label, offerName, estimand, level, boundaryCount: boundaryCount[k]!, controls: controlNames.length, clustered: clusterCount !== null,
  });
  const after1 = headline.map((row, k) => row.map((s, o) => headlineAfterPass1(s, headlineCtx(k, o))));
  const naiveDone = naive.map((s, o) => comparisonAfterPass1(s, outcomes[o]!.label, 'naive comparison'));
  const noApsDone = noAps.map((s, o) => comparisonAfterPass1(s, outcomes[o]!.label, 'comparison without the APS'));
  const balanceWarnings: Warning[] = [];
  for (const b of balance) balanceAfterPass1(b, clusterCount !== null, balanceWarnings);

  // ---- pass 2: the robust variances' meat ---------------------------------------------------
  await pass(ctx, 'estimate', (prepared) => {
    const meat: Visit = (s, columns, idx, count, clusters) => {
      if (s.fit && s.meat) addMeatRows(s.meat, s.fit, columns, idx, count, clusters);
    };
    visitChunk(prepared, apsOf(prepared), meat, (b, columns, idx, count, clusters) => meat(b.sample, columns, idx, count, clusters), false);
  });
  lap('pass 2');

  const warnings: Warning[] = [{ code: 'streamed-file', message: `${info.fileName} was read in chunks (a file beyond one sheet): ${MEMO_NOTE} Not computed: ${NOT_COMPUTED.map((x) => x.key).join(', ')} (results.json "streamed").` }];
  const ruleExcluded = [...byRule.values()];
  for (const g of ruleExcluded) if (g.reason.startsWith('the limit of ')) warnings.push(limitGapWarning(g.reason, g.count));
  deltas.forEach((delta, k) => { if (apsUndefined[k]! > 0) warnings.push(apsUndefinedWarning(delta, apsUndefined[k]!)); });
  outcomes.forEach((o, i) => { if (missing[i]! > 0) warnings.push(missingOutcomeWarning(o.label, missing[i]!)); });
  const comparisonOf = (done: ComparisonEstimate | null, s: MomentSample, label: string, what: string) => done ?? comparisonAfterPass2(s, label, what, clusterCount !== null);
  const outcomeResults = outcomes.map((o, i) => {
    const byDelta: DeltaEstimate[] = deltas.map((_, k) => after1[k]![i]!.done ?? headlineAfterPass2(headline[k]![i]!, headlineCtx(k, i), after1[k]![i]!.clustered));
    const naiveOls = comparisonOf(naiveDone[i]!, naive[i]!, o.label, 'naive comparison');
    const ivNoControl = comparisonOf(noApsDone[i]!, noAps[i]!, o.label, 'comparison without the APS');
    for (const w of [...naiveOls.warnings, ...ivNoControl.warnings, ...byDelta.flatMap((b) => b.warnings)]) warnings.push(w);
    const sensitivity = deltaSensitivity(o.column, byDelta);
    warnings.push(...sensitivity.warnings);
    return { column: o.column, label: o.label, missing: missing[i]!, byDelta, naiveOls, ivNoControl, sensitivity, localLinear: null as (typeof localLinear)[number] };
  });

  const balanced = balance.map((b) => balanceAfterPass2(b, level, clusterCount !== null, balanceWarnings));

  // ---- the checks on the subsample: density at each limit, the local-linear cross-check ------
  const sample = reservoirColumns(reservoir);
  const m = sample[0]?.length ?? 0;
  let at = 0;
  const take = (count: number) => { const out = sample.slice(at, at + count); at += count; return out; };
  const sampleCols = { n: m, continuous: take(program.continuous.length), discrete: take(program.discrete.length) };
  const sampleOutcomes = take(outcomes.length);
  const [sampleZ] = take(1);
  const sampleD = hasTreatment ? take(1)[0] : undefined;
  const sampleClusters = clusterCount !== null ? Int32Array.from(take(1)[0]!) : undefined;
  const density = densityChecksForProgram(program, sampleCols);
  const checkWarnings: Warning[] = [];
  for (const d of density) checkWarnings.push(...d.warnings.map((w) => ({ ...w, message: `${d.description}: ${w.message}` })));
  const cutoff = singleCutoff(program);
  const localLinear = outcomes.map((o, i) => {
    if (!cutoff.applicable) return null;
    const check = tryLocalLinear({
      running: sampleCols.continuous[cutoff.variable]!, cutoff: cutoff.cutoff, outcome: sampleOutcomes[i]!, offer: sampleZ!,
      ...(sampleD ? { treatment: sampleD } : {}), ...(sampleClusters ? { clusters: sampleClusters } : {}),
    });
    if (check.ok) { checkWarnings.push(...check.value.warnings); return check.value; }
    checkWarnings.push({ code: 'local-linear-not-estimable', message: `Outcome "${o.label}": ${check.reason}` });
    return null;
  });
  outcomeResults.forEach((o, i) => { o.localLinear = localLinear[i]!; });
  warnings.push(...balanceWarnings, ...merged.compositionWarnings, ...checkWarnings);
  const notes = [...plan.notes, ...first.value.notes.filter((x) => x.code === 'outcome-missing')];
  const sums: DeltaSummary[] = merged.summary ?? [];
  const composed: DeltaComposition[] = (merged.composition ?? []).map((d) => ({ ...d, atoms: d.atoms.map((a) => ({ ...a, share: d.boundary > 0 ? a.straddling / d.boundary : 0 })) }));
  const drawsUsed = points.replicates * points.perReplicate;
  const { ifEligible, ifIneligible } = program.offer;
  const figures = ['density', ...(cutoff.applicable ? ['outcomes[].localLinear'] : [])];
  const streamed: StreamedBlock = {
    format: info.format, chunkRows: ctx.chunkRows, passes: 3, notComputed: NOT_COMPUTED,
    subsample: { size: m, of: n, seed: settings.seed, figures, every: m === n }, note: MEMO_NOTE,
  };
  const results: Results = withFindings<ResultsCore & { streamed: StreamedBlock }>({
    fenceline: 1,
    version: SOFTWARE_VERSION,
    study: {
      title: study.title,
      dataFile: info.fileName,
      sheet: null,
      dataSha256: info.sha256,
      rowsRead: pass0.rowsRead,
      rowsUsed: n,
      rowsExcluded: [...mappingExcluded, ...ruleExcluded],
      joins: [],
      notes,
      columnLabels: columnLabels(study),
    },
    program: programBlock(study, program, instrument.source),
    settings: {
      deltas: deltas.slice(), draws: settings.draws, seed: settings.seed, smallCellMax: study.settings.smallCellMax,
      drawsUsed, replicates: points.replicates, workers: null,
      variance: clusterCount !== null ? 'CR1' : 'HC1', clusterColumn: c.cluster ?? null,
    },
    scales: scales.value,
    instrument,
    estimand: { kind: estimand, note: estimandNoteFor(estimand, dName, per), treatmentPer: per },
    fidelity,
    design: {
      byDelta: sums.map((s) => ({ delta: s.delta, boundary: s.boundary, constant: s.constant, exact: s.exact, simulated: s.simulated, maxSimulationSe: s.maxSe,
        corner: s.corner, cornerExact: s.cornerExact, refined: s.refined, refinedAtBound: s.refinedAtBound })),
      composition: composed,
      mcSdBound: (Math.abs(ifEligible - ifIneligible) * 0.5) / Math.sqrt(drawsUsed),
    },
    outcomes: outcomeResults,
    multipleOutcomes: outcomeResults.length > 1 ? holmByDelta(outcomeResults) : [],
    balance: balanced.flatMap((b) => b.rows),
    balanceJoint: balanced.map((b) => b.joint),
    compliers: [],
    density,
    thresholdChanges: null,
    localLinearNote: cutoff.applicable ? null : `The local-linear cross-check applies to one running variable with one deterministic cut-off; here ${cutoff.reason}.`,
    warnings: dedupe(warnings),
    streamed,
  });
  lap('results');
  return {
    ok: true,
    value: {
      results,
      dataHashes: { [study.data.path]: info.sha256 },
      file: { path: info.path, bytes: info.bytes, rows: info.rowCount, format: info.format },
      timings,
    },
  };
}
