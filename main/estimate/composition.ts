// Boundary composition: which criterion of the formula identifies the estimate. A unit has
// 0 < APS < 1 because some criterion can change value within its ball (its inputs sit near that
// criterion's cut-off) or because the offer is a lottery. Counting, at each delta, the boundary
// units whose ball each criterion crosses (the propensity stage's straddle masks, main/design)
// tells the memo whose situation the estimate speaks for: with "income ≤ limit AND age ≥ 65",
// an estimate identified mostly by the income cut-off says little about the age cut-off.

import type { CompiledProgram } from '../rules/ir.ts';
import { criterionShortName } from '../rules/short-name.ts';
import type { EstimateWarning } from './types.ts';

/** The per-unit arrays of a PropensityResult this needs. */
export interface StraddleColumns {
  deltas: readonly number[];
  aps: readonly Float64Array[];
  /** Bit a set when atom a (a < 32) can change value on the unit's ball. */
  straddle: readonly Uint32Array[];
}

export interface AtomComposition {
  atom: number;
  /** JSON path of the criterion, e.g. program.rule.all[0]. */
  path: string;
  /** The criterion in words: its label, or `value op limit`. */
  description: string;
  /** Boundary units whose ball this criterion crosses. */
  straddling: number;
  /** straddling / boundary units. */
  share: number;
  /** Boundary units whose ball crosses this criterion and no other. */
  only: number;
}

export interface DeltaComposition {
  delta: number;
  /** Units with 0 < APS < 1 (among those included). */
  boundary: number;
  atoms: AtomComposition[];
  /** Boundary units whose ball crosses two or more criteria (corners of the formula). */
  several: number;
  /** Boundary units whose ball crosses no criterion: 0 < APS < 1 from the lottery alone. */
  lotteryOnly: number;
}

export interface CompositionResult {
  byDelta: DeltaComposition[];
  warnings: EstimateWarning[];
}

const MASK_BITS = 32;

export function describeAtom(program: CompiledProgram, index: number): string {
  return criterionShortName(program.atoms[index]!.condition);
}

/** Composition of the boundary sample at each delta. `include` (1 = use) restricts the units, e.g. to those with an outcome. */
export function boundaryComposition(program: CompiledProgram, propensity: StraddleColumns, include?: Uint8Array): CompositionResult {
  const warnings: EstimateWarning[] = [];
  const atomCount = program.atoms.length;
  const tracked = Math.min(atomCount, MASK_BITS);
  if (atomCount > MASK_BITS) {
    warnings.push({
      code: 'composition-partial',
      message: `The formula has ${atomCount} criteria; the boundary composition covers the first ${MASK_BITS} only.`,
    });
  }
  const byDelta = propensity.deltas.map((delta, k): DeltaComposition => {
    const aps = propensity.aps[k]!;
    const mask = propensity.straddle[k]!;
    const straddling = new Array<number>(tracked).fill(0);
    const only = new Array<number>(tracked).fill(0);
    let boundary = 0;
    let several = 0;
    let lotteryOnly = 0;
    for (let i = 0; i < aps.length; i++) {
      if (include && !include[i]) continue;
      const p = aps[i]!;
      if (!(p > 0 && p < 1)) continue;
      boundary++;
      const bits = mask[i]! >>> 0;
      if (bits === 0) {
        lotteryOnly++;
        continue;
      }
      let count = 0;
      let last = -1;
      for (let a = 0; a < tracked; a++)
        if (bits & (1 << a)) {
          straddling[a]!++;
          count++;
          last = a;
        }
      if (count === 1) only[last]!++;
      else if (count > 1) several++;
    }
    return {
      delta,
      boundary,
      atoms: straddling.map((s, a) => ({
        atom: a,
        path: program.atoms[a]!.path,
        description: describeAtom(program, a),
        straddling: s,
        share: boundary > 0 ? s / boundary : 0,
        only: only[a]!,
      })),
      several,
      lotteryOnly,
    };
  });
  return { byDelta, warnings };
}
