import { EstimateInputError } from '../../main/estimate/errors.ts';

/** Run f and return the EstimateInputError it throws (fails the test if it throws anything else or nothing). */
export function inputErrorOf(f: () => unknown): EstimateInputError {
  try {
    f();
  } catch (e) {
    if (e instanceof EstimateInputError) return e;
    throw e;
  }
  throw new Error('expected an EstimateInputError, but the call succeeded');
}
