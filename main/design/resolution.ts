// How finely each continuous input is recorded, against the neighbourhood's radius.
//
// The APS treats a continuous input as if nearby values were possible. When the data record it
// on a coarse grid (ages in whole years, incomes in thousands) and the ball's radius δ·scale is no
// larger than the grid step, a unit sitting exactly on a cut-off gets 0 < APS < 1 while its
// neighbours one step away have APS 0 or 1: the boundary sample then holds only one side of that
// cut-off and the comparison is no longer local (the discrete-running-variable problem; D. S. Lee
// and D. Card, "Regression discontinuity inference with specification error", J. Econometrics
// 142(2):655–674, 2008). Fenceline measures the grid step and warns per delta.

import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import type { VariableScale } from './scaling.ts';

export interface ResolutionWarning {
  code: 'coarse-variable';
  message: string;
  variable: string;
  column: string;
  step: number;
  deltas: number[];
}

/** Smallest positive gap between distinct finite values (Infinity with fewer than two values). */
export function gridStep(values: ArrayLike<number>, n = values.length): number {
  // the finite values, copied and sorted (a plain loop: Float64Array.from with a mapper and filter
  // with a callback cost more than the sort on large columns)
  const finite = new Float64Array(n);
  let m = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i]!;
    if (Number.isFinite(v)) finite[m++] = v;
  }
  const sorted = finite.subarray(0, m).sort();
  let step = Infinity;
  for (let i = 1; i < sorted.length; i++) {
    const gap = sorted[i]! - sorted[i - 1]!;
    if (gap > 0 && gap < step) step = gap;
  }
  return step;
}

const fmt = (v: number) => v.toLocaleString('en-US', { maximumSignificantDigits: 4 });

export function resolutionWarnings(program: CompiledProgram, cols: DesignColumns, scales: VariableScale[], deltas: readonly number[]): ResolutionWarning[] {
  const out: ResolutionWarning[] = [];
  program.continuous.forEach((cv, j) => {
    const step = gridStep(cols.continuous[j]!, cols.n);
    if (!Number.isFinite(step)) return;
    const scale = scales[j]!.scale;
    const affected = deltas.filter((d) => d * scale <= step);
    if (!affected.length) return;
    const unit = cv.variable.unit ? ` ${cv.variable.unit}` : '';
    const needed = step / scale;
    out.push({
      code: 'coarse-variable',
      variable: cv.key,
      column: cv.variable.column,
      step,
      deltas: affected,
      message:
        `${cv.variable.column} is recorded in steps of ${fmt(step)}${unit}, but at delta ${affected.join(', ')} the neighbourhood reaches only ±${fmt(affected[0]! * scale)}${unit}: ` +
        `units exactly on a cut-off of "${cv.variable.label}" count as near the edge while their neighbours one step away do not, so the comparison there is one-sided and may be biased. ` +
        `Use deltas above ${fmt(needed)} (so the neighbourhood spans neighbouring values), or record the variable more finely.`,
    });
  });
  return out;
}
