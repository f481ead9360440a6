// The one error the regression core raises for input it cannot use. The message is written for
// the analyst (what is wrong, where, what to do); `code` lets callers map it to an exit status.

export type EstimateInputErrorCode =
  | 'length-mismatch'
  | 'not-finite'
  | 'duplicate-name'
  | 'too-few-units'
  | 'bad-option'
  | 'bad-clusters'
  | 'not-identified'
  | 'leverage-one'
  | 'no-variation';

export class EstimateInputError extends Error {
  readonly code: EstimateInputErrorCode;
  constructor(code: EstimateInputErrorCode, message: string) {
    super(message);
    this.name = 'EstimateInputError';
    this.code = code;
  }
}
