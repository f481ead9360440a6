// The pipeline for one study: read → validate → map → compute APS → estimate → checks → results.
// Each stage is a plain function of its inputs (plus the seed); only reading the data touches
// the file system. Same study, data and seed → the same results, byte for byte.

import { basename } from 'node:path';
import type { Study } from '../contract/study.ts';
import type { ExclusionReason, Results, ResultsCore, Warning } from '../contract/results.ts';
import type { RawTable } from '../data/types.ts';
import { computePropensityParallel } from '../design/parallel/pool.ts';
import { Cancelled, type PropensityResult, type Progress } from '../design/propensity.ts';
import { apsOnGrid } from '../design/grid-band.ts';
import { resolutionWarnings } from '../design/resolution.ts';
import { estimateApsIv, type ApsIvResult } from '../estimate/aps-iv.ts';
import { balanceChecks } from '../estimate/balance.ts';
import { complierProfiles } from '../estimate/compliers.ts';
import { boundaryComposition } from '../estimate/composition.ts';
import { densityChecksForProgram } from '../estimate/density.ts';
import { singleCutoff, tryLocalLinear } from '../estimate/local-linear.ts';
import { headlineDeltaIndex } from '../estimate/headline.ts';
import { holmByDelta } from '../estimate/multiplicity.ts';
import { deltaSensitivity } from '../estimate/sensitivity.ts';
import { thresholdChanges } from '../estimate/threshold-change.ts';
import type { NamedColumn } from '../estimate/types.ts';
import type { PreparedUnits } from './prepare-units.ts';
import { prepareStudy, type PrepareOptions } from './prepare-study.ts';
import { withFindings } from '../report/findings/index.ts';
import type { CompiledProgram } from '../rules/ir.ts';
import type { Checked, Problem } from '../rules/types.ts';
import { describeCondition, describeOffer, describeProgram } from '../rules/wording.ts';
import { criterionShortName, distinctShortNames } from '../rules/short-name.ts';
import type { GridBand } from '../report/run-view.ts';
import { SOFTWARE_VERSION } from '../store/software-version.ts';

export interface RunOptions extends PrepareOptions {
  /** Worker threads for the propensity stage (default: available cores; 0 = this thread). */
  workers?: number;
}

/** What a run produces besides results.json: per-unit columns for units.csv and the memo's figures. */
export interface StudyRun {
  results: Results;
  units: {
    ids: string[];
    z: Float64Array;
    d: Float64Array | null;
    aps: Float64Array[];
  };
  program: CompiledProgram;
  prepared: PreparedUnits;
  propensity: PropensityResult;
  /** The unit file as read (for the workspace). */
  table: RawTable;
  /** SHA-256 of every file read (the unit file and each joined file), by path as the study names it. */
  dataHashes: Record<string, string>;
  /** The APS on synthetic points (the map's grid), with this run's engine, scales and seed. */
  band: GridBand;
  timings: Record<string, number>;
}

/** Run a validated study end to end. Input problems come back as values; faults throw. */
export async function runStudy(study: Study, options: RunOptions): Promise<Checked<StudyRun>> {
  const timings: Record<string, number> = {};
  const clock = () => performance.now();
  let t = clock();
  const lap = (name: string) => { const now = clock(); timings[name] = Math.round(now - t); t = now; };

  const ready = await prepareStudy(study, options);
  if (!ready.ok) return ready;
  const read = ready.value.read;
  const { table, mapped } = read;
  const { program, prepared } = ready.value;
  const { data, cols, z } = prepared;
  lap('prepare');

  const settings = { deltas: study.settings.deltas, draws: study.settings.draws, seed: study.settings.seed };
  const propensity = await computePropensityParallel(program, cols, settings, {
    ...(options.workers !== undefined ? { workers: options.workers } : {}),
    ...(options.onProgress ? { onProgress: options.onProgress } : {}),
    ...(options.signal ? { signal: options.signal } : {}),
  });
  if (!propensity.ok) return propensity;
  const ps = propensity.value;
  lap('propensity');

  // Between stages and between outcomes: a cancel asked for during a stage stops the run here.
  const stopIfCancelled = () => { if (options.signal?.aborted) throw new Cancelled(); };
  stopIfCancelled();
  options.onProgress?.({ stage: 'estimate', done: 0, total: 1 });
  stopIfCancelled();
  const warnings: Warning[] = [...prepared.warnings];
  const clusters = data.cluster ? data.cluster.codes : undefined;
  const offer: NamedColumn = { name: study.columns.decision && prepared.instrument.source === 'recorded-decision' ? study.columns.decision : 'offer (formula)', values: z };
  // a "listed in" treatment is named by the file's name only (a saved study may hold an absolute path)
  const treatmentName = typeof study.columns.treatment === 'string' ? study.columns.treatment : study.columns.treatment ? `the benefit (as listed in ${basename(study.columns.treatment.listedIn)})` : null;
  const treatment: NamedColumn | undefined = data.treatment && treatmentName ? { name: treatmentName, values: data.treatment } : undefined;
  const controls: NamedColumn[] = (study.columns.controls ?? []).map((name, i) => ({ name, values: data.controls[i]! }));
  const covariates: NamedColumn[] = (study.columns.covariates ?? []).map((name, i) => ({ name, values: data.covariates[i]! }));
  const propCols = { deltas: ps.deltas, aps: ps.aps };

  const estimates: ApsIvResult = estimateApsIv({
    outcomes: study.columns.outcomes.map((o, i) => ({ column: o.column, ...(o.label ? { label: o.label } : {}), values: data.outcomes[i]! })),
    offer,
    ...(treatment ? { treatment } : {}),
    ...(study.columns.treatmentPer ? { treatmentPer: study.columns.treatmentPer } : {}),
    propensity: propCols,
    controls,
    ...(clusters ? { clusters } : {}),
    // few clusters: wild cluster bootstrap at the headline delta, seeded from the study's seed
    wildBootstrap: { deltaIndex: headlineDeltaIndex(ps.deltas), seed: settings.seed },
  });
  warnings.push(...estimates.warnings);
  lap('estimate');

  stopIfCancelled();
  options.onProgress?.({ stage: 'checks', done: 0, total: 1 });
  stopIfCancelled();
  const balance = covariates.length ? balanceChecks({ covariates, offer, propensity: propCols, ...(clusters ? { clusters } : {}) }) : { rows: [], joint: [], warnings: [] };
  warnings.push(...balance.warnings);
  const zBinary = Array.prototype.every.call(z, (v: number) => v === 0 || v === 1);
  const dBinary = !data.treatment || Array.prototype.every.call(data.treatment, (v: number) => v === 0 || v === 1);
  const composition = boundaryComposition(program, { deltas: ps.deltas, aps: ps.aps, straddle: ps.straddle });
  warnings.push(...composition.warnings);
  // κ only where the offer probability is a known lottery probability for every unit near the edge
  const lottery = prepared.instrument.source !== 'formula';
  const assignmentKnown = composition.byDelta.map((c) => lottery && c.boundary > 0 && c.lotteryOnly === c.boundary);
  const compliers = covariates.length && zBinary && dBinary
    ? complierProfiles({ covariates, offer: z, ...(data.treatment ? { treatment: data.treatment } : {}), propensity: propCols, controls, ...(clusters ? { clusters } : {}), assignmentKnown })
    : [];
  for (const c of compliers) warnings.push(...c.warnings);
  warnings.push(...resolutionWarnings(program, cols, ps.scales, ps.deltas).map(({ code, message }) => ({ code, message })));
  const density = densityChecksForProgram(program, cols);
  for (const d of density) warnings.push(...d.warnings.map((w) => ({ ...w, message: `${d.description}: ${w.message}` })));

  const cutoff = singleCutoff(program);
  const outcomes = estimates.outcomes.map((o, i) => {
    stopIfCancelled();
    const sensitivity = deltaSensitivity(o.column, o.byDelta);
    warnings.push(...sensitivity.warnings);
    let local = null;
    if (cutoff.applicable) {
      const check = tryLocalLinear({
        running: cols.continuous[cutoff.variable]!,
        cutoff: cutoff.cutoff,
        outcome: data.outcomes[i]!,
        offer: z,
        ...(data.treatment ? { treatment: data.treatment } : {}),
        ...(clusters ? { clusters } : {}),
      });
      if (check.ok) { local = check.value; warnings.push(...local.warnings); }
      else warnings.push({ code: 'local-linear-not-estimable', message: `Outcome "${o.label}": ${check.reason}` });
    }
    return { ...o, sensitivity, localLinear: local };
  });
  const middle = headlineDeltaIndex(ps.deltas);
  const thresholds = thresholdChanges({
    program,
    columns: cols,
    delta: ps.deltas[middle]!,
    aps: ps.aps[middle]!,
    estimates: estimates.outcomes.map((o) => {
      const at = o.byDelta[middle]!;
      return { column: o.column, firstStage: at.firstStage ? { coef: at.firstStage.coef, se: at.firstStage.se } : null, takeUpIsOffer: !treatment, reducedForm: at.reducedForm };
    }),
  });
  warnings.push(...thresholds.warnings);
  lap('checks');

  const rowsExcluded: ExclusionReason[] = [...mapped.excluded, ...prepared.excludedByRule];
  const results: Results = withFindings<ResultsCore>({
    fenceline: 1,
    version: SOFTWARE_VERSION,
    study: {
      title: study.title,
      dataFile: table.source.fileName,
      sheet: table.source.sheet,
      dataSha256: table.source.sha256,
      rowsRead: mapped.rowsRead,
      rowsUsed: data.n,
      rowsExcluded,
      joins: mapped.joins.map((j) => ({ ...j, sha256: read.joinHashes.get(j.source) ?? '' })),
      notes: mapped.notes,
      columnLabels: columnLabels(study),
    },
    program: programBlock(study, program, prepared.instrument.source),
    settings: {
      deltas: ps.deltas.slice(), draws: settings.draws, seed: settings.seed, smallCellMax: study.settings.smallCellMax,
      drawsUsed: ps.drawsUsed, replicates: ps.replicates, workers: null,
      variance: clusters ? 'CR1' : 'HC1', clusterColumn: study.columns.cluster ?? null,
    },
    scales: ps.scales,
    instrument: prepared.instrument,
    estimand: { kind: estimates.estimand, note: estimates.estimandNote, treatmentPer: estimates.treatmentPer },
    fidelity: prepared.fidelity,
    design: {
      byDelta: ps.summary.map((s) => ({ delta: s.delta, boundary: s.boundary, constant: s.constant, exact: s.exact, simulated: s.simulated, maxSimulationSe: s.maxSe,
        corner: s.corner, cornerExact: s.cornerExact, refined: s.refined, refinedAtBound: s.refinedAtBound })),
      composition: composition.byDelta,
      mcSdBound: ps.mcSdBound,
    },
    outcomes,
    multipleOutcomes: outcomes.length > 1 ? holmByDelta(outcomes) : [],
    balance: balance.rows,
    balanceJoint: balance.joint,
    compliers,
    density,
    thresholdChanges: thresholds,
    localLinearNote: cutoff.applicable ? null : `The local-linear cross-check applies to one running variable with one deterministic cut-off; here ${cutoff.reason}.`,
    warnings: dedupe(warnings),
  });
  options.onProgress?.({ stage: 'checks', done: 1, total: 1 });
  stopIfCancelled();
  return {
    ok: true,
    value: {
      results,
      units: { ids: data.ids, z, d: data.treatment, aps: ps.aps },
      program,
      prepared,
      propensity: ps,
      table,
      dataHashes: { [study.data.path]: table.source.sha256, ...Object.fromEntries((study.data.join ?? []).map((j) => [j.path, read.joinHashes.get(j.path) ?? ''])) },
      band: apsOnGrid(program, program.continuous.map((v) => ps.scales.find((s) => s.key === v.key)?.scale ?? 1), settings.seed),
      timings,
    },
  };
}

/** results.json `program`: the rule as run, in words, with its criteria. */
export function programBlock(study: Study, program: CompiledProgram, instrument: 'formula' | 'recorded-decision'): Results['program'] {
  return {
    name: study.program.name,
    unit: study.program.unit ?? 'unit',
    definition: study.program,
    wording: describeProgram(study.program),
    offerWording: describeOffer(study.program.offer, study.program.unit ?? 'unit'),
    offerKind: instrument === 'formula' ? 'deterministic' : 'lottery',
    criteria: criteriaBlock(program.atoms, study.program),
  };
}

export function dedupe(ws: Warning[]): Warning[] {
  const seen = new Set<string>();
  return ws.filter((w) => { const k = `${w.code}\u0000${w.message}`; if (seen.has(k)) return false; seen.add(k); return true; });
}

/** The memo's name for every column it may mention (results.study.columnLabels). */
export function columnLabels(study: Study): Record<string, string> {
  const c = study.columns;
  const out: Record<string, string> = { [c.id]: 'ID' };
  for (const j of study.data.join ?? []) out[j.key] = 'ID';
  if (typeof c.treatment === 'string') out[c.treatment] = 'take-up';
  if (c.decision) out[c.decision] = 'recorded decision';
  if (c.cluster) out[c.cluster] = 'cluster';
  for (const v of study.program.variables) out[v.column] = v.label;
  for (const o of c.outcomes) if (o.label) out[o.column] = o.label;
  return { ...out, ...(c.labels ?? {}) };
}

/** The rule's criteria for results.json: each in full words once, and its short name for every later mention. */
function criteriaBlock(atoms: CompiledProgram['atoms'], p: Study['program']): Results['program']['criteria'] {
  const short = distinctShortNames(atoms.map((a) => criterionShortName(a.condition)));
  return atoms.map((a, i) => ({ atom: a.index, path: a.path, description: describeCondition(a.condition, p), shortName: short[i]!, linear: a.linear, movesWithContinuous: a.dependsOnContinuous }));
}

export type { Problem };
