// The exception a long stage throws when its signal is aborted; in a module of its own so that a
// caller that only catches it (api/check.ts) loads none of the propensity stage.

export class Cancelled extends Error {
  constructor() { super('The computation was cancelled.'); this.name = 'Cancelled'; }
}
