// What the figures read of one run: the rule, the results, and the per-unit columns. A run just
// computed (pipeline/run-study.ts) has this shape, and so has a stored run read back from the
// workspace (pipeline/stored-run.ts): the screens and the memo draw from the same values either
// way, and nothing is run again to draw or to export. Types only.

import type { Results } from '../contract/results.ts';
import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';

export interface RunView {
  program: CompiledProgram;
  results: Results;
  prepared: {
    /** The rule's inputs, per unit (continuous and discrete, in the program's order). */
    cols: DesignColumns;
    /** The instrument: offered (1) or not (0). */
    z: Float64Array;
    /** The rule's own verdict (1 eligible). */
    eligible: Uint8Array;
    data: {
      ids: string[];
      /** Spreadsheet row of each unit in the unit file (for the analyst's own files only). */
      rowNumbers: Int32Array;
      treatment: Float64Array | null;
      outcomes: Float64Array[];
      covariates: Float64Array[];
    };
  };
  propensity: {
    /** APS per delta (in the order of results.settings.deltas). */
    aps: Float64Array[];
    /** Bit i set: the unit's ball crosses criterion i, per delta. */
    straddle: Uint32Array[];
  };
  /** The APS on the map's grid, from the design layer (see GridBand). */
  band: GridBand;
}

/**
 * The offer probability averaged over the ball at `delta` for synthetic points (the map's grid):
 * computed by the design layer and handed in by the caller, so report/ never computes an APS.
 */
export type GridBand = (grid: DesignColumns, delta: number, draws: number) => Float64Array;
