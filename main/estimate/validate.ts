// Input checks shared by the estimators. Each problem gets one message naming the column and the
// unit (its position in the estimation sample, counting from 1) and saying what to do.

import { EstimateInputError } from './errors.ts';
import type { NamedColumn, RegressionOptions, VarianceType } from './types.ts';
import { VARIANCE_TYPES } from './variance.ts';

/** The name used for the added column of ones. */
export const INTERCEPT_NAME = '(intercept)';

/** Check that every column has n finite values and that names are distinct and non-empty. */
export function checkColumns(columns: readonly { role: string; column: NamedColumn }[], n: number): void {
  const seen = new Set<string>();
  for (const { role, column } of columns) {
    const name = column.name;
    if (typeof name !== 'string' || name.trim() === '') {
      throw new EstimateInputError('bad-option', `A ${role} column has no name; give every column a name so results can refer to it.`);
    }
    if (seen.has(name)) {
      throw new EstimateInputError('duplicate-name', `The column "${name}" is used twice in the model; each column may appear once (as outcome, treatment, instrument or control).`);
    }
    if (name === INTERCEPT_NAME) {
      throw new EstimateInputError('duplicate-name', `A column may not be called "${INTERCEPT_NAME}": that name is reserved for the constant added to the model. Rename the column.`);
    }
    seen.add(name);
    const v = column.values;
    if (!(v instanceof Float64Array)) {
      throw new EstimateInputError('bad-option', `The ${role} column "${name}" must hold numbers (a Float64Array).`);
    }
    if (v.length !== n) {
      throw new EstimateInputError(
        'length-mismatch',
        `The ${role} column "${name}" has ${v.length} values but the outcome has ${n}; every column needs one value per unit.`,
      );
    }
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(v[i]!)) {
        throw new EstimateInputError(
          'not-finite',
          `The ${role} column "${name}" has no usable number for unit ${i + 1} of the estimation sample (${String(v[i])}); exclude that unit or fill in the value before estimating.`,
        );
      }
    }
  }
}

/** Resolve the variance type from the options (CR1 with clusters, else HC1) and check consistency. */
export function resolveVariance(options: RegressionOptions, allowed: readonly VarianceType[] = VARIANCE_TYPES): VarianceType {
  const type = options.variance ?? (options.clusters ? 'CR1' : 'HC1');
  if (!VARIANCE_TYPES.includes(type)) {
    throw new EstimateInputError('bad-option', `Unknown standard-error type "${String(type)}"; use one of ${VARIANCE_TYPES.join(', ')}.`);
  }
  if (!allowed.includes(type)) {
    throw new EstimateInputError('bad-option', `Standard errors of type ${type} are not available for this estimator; use one of ${allowed.join(', ')}.`);
  }
  if (type === 'CR1' && !options.clusters) {
    throw new EstimateInputError('bad-option', 'CR1 (cluster-robust) standard errors need a cluster id for every unit; give the cluster column or choose HC1.');
  }
  if (type !== 'CR1' && options.clusters) {
    throw new EstimateInputError('bad-option', `Cluster ids were given but the standard errors asked for are ${type}; choose CR1 to use the clusters, or leave the cluster ids out.`);
  }
  return type;
}
