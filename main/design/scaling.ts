// Distances in the ball are Euclidean in scaled units: each continuous variable is divided by
// its `scale` from the study file, or else by its sample standard deviation (n − 1 divisor)
// over the rows used (docs/study-format.md, "Variables"). Scales are recorded with the results.

import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import type { Checked, Problem } from '../rules/types.ts';

export interface VariableScale {
  key: string;
  column: string;
  scale: number;
  source: 'study' | 'sample-sd';
}

/** Sample standard deviation with the n − 1 divisor, by Welford's one-pass update (B. P. Welford, Technometrics 4(3):419–420, 1962). */
export function sampleSd(x: ArrayLike<number>, n = x.length): number {
  const state = createWelford();
  welfordAdd(state, x, n);
  return welfordSd(state);
}

/** Running count, mean and sum of squared deviations (Welford 1962); rows may arrive in chunks. */
export interface Welford { n: number; mean: number; m2: number }

export function createWelford(): Welford {
  return { n: 0, mean: 0, m2: 0 };
}

/** Continue the update with x[0..n): the same operations, in the same order, as one pass over all rows. */
export function welfordAdd(state: Welford, x: ArrayLike<number>, n = x.length): void {
  let { mean, m2 } = state;
  for (let i = 0; i < n; i++) {
    const v = x[i]!;
    const delta = v - mean;
    mean += delta / (state.n + i + 1);
    m2 += delta * (v - mean);
  }
  state.n += n;
  state.mean = mean;
  state.m2 = m2;
}

export function welfordSd(state: Welford): number {
  return state.n > 1 ? Math.sqrt(state.m2 / (state.n - 1)) : NaN;
}

export function resolveScales(program: CompiledProgram, cols: DesignColumns, basePath = 'program'): Checked<VariableScale[]> {
  return scalesFromSd(program, cols.n, (index) => sampleSd(cols.continuous[index]!, cols.n), basePath);
}

/** The scales given a way to measure each continuous input's sample SD over the n rows used. */
export function scalesFromSd(program: CompiledProgram, n: number, sdOf: (continuousIndex: number) => number, basePath = 'program'): Checked<VariableScale[]> {
  const scales: VariableScale[] = [];
  const problems: Problem[] = [];
  for (const cv of program.continuous) {
    const v = cv.variable;
    if (v.scale !== undefined) {
      scales.push({ key: v.key, column: v.column, scale: v.scale, source: 'study' });
      continue;
    }
    const sd = sdOf(cv.index);
    if (!(sd > 0) || !Number.isFinite(sd)) {
      const index = program.program.variables.indexOf(v);
      problems.push({
        path: `${basePath}.variables[${index}].scale`,
        message:
          n < 2
            ? `Fewer than two usable rows, so the spread of ${v.column} cannot be measured. Give "${v.key}" a "scale" in the study file (the distance, in ${v.unit ?? 'its units'}, that counts as one unit of neighbourhood).`
            : `${v.column} has the same value in every usable row, so its spread is zero and distances along "${v.key}" cannot be scaled. Give the variable a "scale" in the study file.`,
      });
      continue;
    }
    scales.push({ key: v.key, column: v.column, scale: sd, source: 'sample-sd' });
  }
  return problems.length ? { ok: false, problems } : { ok: true, value: scales };
}
