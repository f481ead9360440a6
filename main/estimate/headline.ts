// The headline delta: the one neighbourhood size whose estimate the product leads with. One
// definition for the pipeline (threshold projections, the few-cluster bootstrap) and for the
// findings that the screens, the memo and the command line word.
//
// Rule (common practice, no published default exists for delta — docs/method.md §1): the middle
// of the study's deltas, sorted ascending as the study file requires; with an even count, the
// upper of the two middle ones (index ⌊k/2⌋), so a study with two deltas leads with the larger.

export interface HeadlineChoice {
  index: number;
  delta: number;
  why: string;
}

export function headlineDeltaIndex(deltas: readonly number[]): number {
  return Math.floor(deltas.length / 2);
}

export function headlineDelta(deltas: readonly number[]): HeadlineChoice {
  const index = headlineDeltaIndex(deltas);
  const why = deltas.length === 1
    ? 'the only delta of the study'
    : deltas.length % 2 === 1
      ? 'the middle of the study\'s deltas'
      : 'the upper of the two middle deltas of the study';
  return { index, delta: deltas[index]!, why };
}
