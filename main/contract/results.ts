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
  criteria: Array<{ atom: number; path: string; description: string; linear: boolean; movesWithContinuous: boolean }>;
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
}
