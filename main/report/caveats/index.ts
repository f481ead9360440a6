// Every caveat writer, in the order the memo prints them.

import type { Results } from '../../contract/results.ts';
import { coarseVariableCaveat } from './coarse.ts';
import { manipulationCaveat } from './density.ts';
import { exclusionCaveat } from './exclusions.ts';
import { imbalanceCaveat } from './balance.ts';
import { weakInstrumentCaveat } from './instrument.ts';
import { localEstimateCaveat } from './local.ts';
import { overrideCaveat } from './overrides.ts';
import { sensitivityCaveat } from './sensitivity.ts';
import type { Caveat, CaveatContext, CaveatWriter } from './types.ts';

export type { Caveat, CaveatContext, CaveatWriter } from './types.ts';

export const CAVEAT_WRITERS: ReadonlyArray<{ id: string; write: CaveatWriter }> = [
  { id: 'local-estimate', write: localEstimateCaveat },
  { id: 'weak-instrument', write: weakInstrumentCaveat },
  { id: 'imbalance', write: imbalanceCaveat },
  { id: 'manipulation', write: manipulationCaveat },
  { id: 'delta-sensitivity', write: sensitivityCaveat },
  { id: 'overrides', write: overrideCaveat },
  { id: 'exclusions', write: exclusionCaveat },
  { id: 'coarse-variable', write: coarseVariableCaveat },
];

/** The caveats that apply to these results. */
export function writeCaveats(results: Results, ctx: CaveatContext): Caveat[] {
  return CAVEAT_WRITERS.map((w) => w.write(results, ctx)).filter((c): c is Caveat => c !== null);
}
