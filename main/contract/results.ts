// results.json (docs/cli.md): everything the memo says, as data. Types only, shared with the
// renderer. The keys CLI.md requires are here with the meanings it gives; the rest extends them.

import type { VariableScale } from '../design/scaling.ts';
import type { OutcomeEstimates } from '../estimate/aps-iv.ts';
import type { BalanceJoint, BalanceRow } from '../estimate/balance.ts';
import type { ComplierProfile } from '../estimate/compliers.ts';
import type { DeltaComposition } from '../estimate/composition.ts';
import type { ProgramDensityCheck } from '../estimate/density.ts';
import type { LocalLinearResult } from '../estimate/local-linear.ts';
import type { HolmRow } from '../estimate/multiplicity.ts';
import type { SensitivityResult } from '../estimate/sensitivity.ts';
import type { ThresholdChangeResult } from '../estimate/threshold-change.ts';
import type { Program } from '../rules/types.ts';

export interface Warning { code: string; message: string }

export interface ExclusionReason { reason: string; count: number; rows: number[] }

export interface StudyBlock {
  title: string;
  dataFile: string;
  sheet: string | null;
  dataSha256: string;
  rowsRead: number;
  rowsUsed: number;
  rowsExcluded: ExclusionReason[];
  joins: Array<{ source: string; sha256: string; matched: number; unmatchedKeys: { count: number; examples: string[] }; duplicateKeys: { count: number; examples: string[] } }>;
  notes: Array<{ code: string; message: string }>;
  /** The name the memo prints for each column it mentions: a rule input's variable label, the
   * study's column labels (columns.labels), else a word for the column's role ("ID", "take-up"). */
  columnLabels?: Record<string, string>;
}

export interface ProgramBlock {
  name: string;
  unit: string;
  /** The program as run (study file format 1). */
  definition: Program;
  /** The whole rule in plain language. */
  wording: string;
  offerWording: string;
  /** Deterministic (offer 1/0) or a lottery. */
  offerKind: 'deterministic' | 'lottery';
  /** Each criterion: `description` in full words (printed once), `shortName` for every later mention
   * (the analyst's label, else the criterion written with the variables' keys; main/rules/short-name.ts). */
  criteria: Array<{ atom: number; path: string; description: string; shortName?: string; linear: boolean; movesWithContinuous: boolean }>;
}

export interface Fidelity {
  compared: number;
  agree: number;
  disagree: number;
  /** IDs of units whose recorded decision differs from the formula (first 1,000). */
  disagreeIds: string[];
  /** Recorded as offered although the formula says not eligible (or offer probability 0). */
  offeredAgainstRule: number;
  /** Recorded as not offered although the formula says eligible (or offer probability 1). */
  refusedAgainstRule: number;
  /** How the comparison was made, in words. */
  basis: string;
}

export interface DesignDelta {
  delta: number;
  boundary: number;
  constant: number;
  /** Exact in closed form or by numerical integration to a stated error (exact corners included). */
  exact: number;
  simulated: number;
  /** Largest stated error among simulated units and exact corners. */
  maxSimulationSe: number;
  /** Units whose APS lies strictly between the rule's offer probabilities with two or more criteria crossing their ball. */
  corner: number;
  /** Of the corner units, those computed exactly (the rest were simulated). */
  cornerExact: number;
  /** Simulated units whose first estimate was exactly 0 or 1 and that were given more points (up to 64 times the draws). */
  refined: number;
  /** Of those, units still at exactly 0 or 1 after the most points. */
  refinedAtBound: number;
}

export interface OutcomeResults extends OutcomeEstimates {
  sensitivity: SensitivityResult;
  localLinear: LocalLinearResult | null;
}

/** The headline delta and why it was chosen (main/estimate/headline.ts). */
export interface Headline {
  delta: number;
  why: string;
  /** Index of the headline delta in settings.deltas. */
  index: number;
}

/** Where the estimate's comparison comes from, at the headline delta (from the boundary composition). */
export interface DesignFinding {
  /** "edge": every boundary unit sits near a limit; "lottery": every one is there by the draw alone; "none": no boundary unit. */
  kind: 'edge' | 'lottery' | 'edge and lottery' | 'none';
  /** Shares of the boundary units at the headline delta: near a limit of the rule / offered by a draw far from any limit. */
  edgeShare: number;
  lotteryShare: number;
  delta: number;
  /** Boundary units at the headline delta (design.composition). */
  boundary: number;
}

/** One interval's verdict on zero. "excludes": zero is outside; "covers": zero is inside or on its end. */
export type ZeroVerdict = 'excludes' | 'covers';

export interface OutcomeFinding {
  column: string;
  label: string;
  effect: 'distinguishable' | 'not distinguishable' | 'not estimable';
  /** Plain words: which interval covers zero, at which delta. */
  because: string;
  delta: number;
  /** Each interval read at the headline delta; null when it was not computed or does not apply. */
  usual: ZeroVerdict | null;
  /** The weak-instrument-robust Anderson–Rubin set. */
  anderson: ZeroVerdict | null;
  /** The tF interval: read only when the first-stage F is below 104.7 (null otherwise). */
  tf: ZeroVerdict | null;
  /** The wild cluster bootstrap interval, when the results carry one at the headline delta. */
  bootstrap: ZeroVerdict | null;
  /** The intervals (by name) that cover zero at the headline delta. */
  coveringZero: Array<'usual' | 'Anderson–Rubin' | 'tF' | 'bootstrap'>;
  /** Other deltas whose usual 95% interval covers zero. */
  coversZeroElsewhere: number[];
  /** Deltas with no estimate. */
  notEstimableAt: number[];
  /** Mean outcome of the not-offered units near the edge at the headline delta (null when not carried). */
  baseline: { mean: number; n: number } | null;
  /** Clusters at the headline delta, when clustered; few below 50, then the note says what that means. */
  clusters: { count: number; few: boolean; note: string } | null;
}

export interface InstrumentFinding {
  verdict: 'strong' | 'adequate' | 'weak' | 'none';
  /** Every delta where some outcome's first-stage F is below 10. */
  weakAt: number[];
  /** Every delta where some outcome's F is below 104.7 (the tF interval is the one to read there). */
  belowFullAt: number[];
  /** Smallest F and where. */
  minF: number | null;
  minFDelta: number | null;
}

export interface BalanceFlag {
  covariate: string;
  delta: number;
  standardizedDiff: number | null;
  p: number | null;
  adjustedP: number | null;
  /** "large difference": |standardized difference| > 0.25; "adjusted p": Holm-adjusted p < 0.05; "unadjusted p only": p < 0.05 before adjustment only. */
  why: Array<'large difference' | 'adjusted p' | 'unadjusted p only'>;
}

export interface BalanceFinding {
  verdict: 'not checked' | 'balanced' | 'differences to read' | 'imbalance';
  /** Per-characteristic tests run (every delta), adjusted together by Holm (1979). */
  tests: number;
  flagged: BalanceFlag[];
  /** Joint tests run (one per delta) and those below 0.05 after Holm adjustment across deltas. */
  jointTests: number;
  jointRejectedAt: number[];
  /** Advice that fits the flags: read a smaller delta only when the smallest delta is clean. */
  advice: 'none' | 'read the smaller delta' | 'check the inputs and characteristics';
}

export interface DensityFinding {
  path: string;
  description: string;
  atom: number;
  p: number | null;
  verdict: 'jump' | 'weak sign of sorting' | 'no jump' | 'did not run';
}

export interface ManipulationFinding {
  verdict: 'not tested' | 'no jump' | 'weak sign of sorting' | 'jump';
  /** Density tests attempted and those that produced a p-value. */
  tests: number;
  ran: number;
  limits: DensityFinding[];
}

export interface SensitivityFinding {
  column: string;
  /** Always descriptive: the estimates at different deltas come from nested samples, so no test of their difference is made. */
  estimates: Array<{ delta: number; estimate: number | null }>;
  range: [number, number] | null;
  signChanges: boolean;
  /** Pairs where one delta's estimate lies outside the other's 95% interval (descriptive, not a test). */
  outside: Array<{ delta: number; outsideIntervalOf: number }>;
}

export interface FidelityFinding {
  verdict: 'not compared' | 'follows the formula' | 'differs from the formula';
  share: number | null;
}

export interface LocalLinearFinding {
  column: string;
  bandwidth: number;
  /** Units with positive kernel weight, and their share of the units with this outcome. */
  units: number;
  share: number;
  /** The bandwidth takes in most of the data: the check is close to a global fit. */
  nearGlobal: boolean;
}

/** Every verdict the app, the memo and the command line word (CLI.md format 1.1 `findings`). */
export interface Findings {
  design: DesignFinding;
  outcomes: OutcomeFinding[];
  instrument: InstrumentFinding;
  balance: BalanceFinding;
  manipulation: ManipulationFinding;
  sensitivity: SensitivityFinding[];
  fidelity: FidelityFinding;
  localLinear: LocalLinearFinding[];
}

export interface Results {
  fenceline: 1;
  version: string;
  study: StudyBlock;
  program: ProgramBlock;
  settings: {
    deltas: number[]; draws: number; seed: number; smallCellMax: number;
    drawsUsed: number; replicates: number; workers: number | null;
    variance: 'HC1' | 'CR1'; clusterColumn: string | null;
  };
  scales: VariableScale[];
  instrument: { source: 'formula' | 'recorded-decision'; note: string };
  estimand: { kind: 'treatment' | 'offer'; note: string; treatmentPer: number };
  fidelity: Fidelity | null;
  design: { byDelta: DesignDelta[]; composition: DeltaComposition[]; mcSdBound: number };
  outcomes: OutcomeResults[];
  multipleOutcomes: HolmRow[];
  balance: BalanceRow[];
  balanceJoint: BalanceJoint[];
  compliers: ComplierProfile[];
  density: ProgramDensityCheck[];
  thresholdChanges: ThresholdChangeResult | null;
  localLinearNote: string | null;
  warnings: Warning[];
  headline: Headline;
  findings: Findings;
  /** Present only when the data file was streamed (a .parquet file, or a .csv read through DuckDB):
   * how it was read and which parts of the usual results were not computed (docs/study-format.md). */
  streamed?: StreamedBlock;
}

/** How a streamed run read its file (results.json `streamed`, an extension of format 1). */
export interface StreamedBlock {
  /** 'parquet' or 'csv' (read by DuckDB embedded). */
  format: 'parquet' | 'csv';
  /** Rows per chunk, and the passes over the file (0: scales and exclusions, 1: moments, 2: robust variances). */
  chunkRows: number;
  passes: number;
  /** The parts of results.json that a streamed run leaves empty, each with why. */
  notComputed: Array<{ key: string; why: string }>;
  /** Checks computed on a seeded uniform subsample of the units used (reservoir sampling, Vitter 1985):
   * its size, out of how many units, the seed, which results keys come from it, and whether it is every unit. */
  subsample: { size: number; of: number; seed: number; figures: string[]; every: boolean } | null;
  /** Which outputs were written (results.json only) and why the memo was not. */
  note: string;
}

/** Results before the findings are written (main/report/findings states them from the rest). */
export type ResultsCore = Omit<Results, 'headline' | 'findings'>;
