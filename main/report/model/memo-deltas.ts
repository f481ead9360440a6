// A list of deltas in running text ("0.05, 0.10 and 0.20"), each number read from
// settings.deltas so the memo tests can trace it.

import type { Inline } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { DELTA } from './memo-format.ts';
import { num, text } from './memo-source.ts';

export function deltaList(ctx: Pick<MemoContext, 'r'>, deltas: readonly number[]): Inline[] {
  const runs: Inline[] = [];
  deltas.forEach((d, i) => {
    const j = ctx.r.settings.deltas.indexOf(d);
    if (i) runs.push(text(i === deltas.length - 1 ? ' and ' : ', '));
    runs.push(j >= 0 ? num(ctx.r, `settings.deltas[${j}]`, DELTA) : text('another'));
  });
  return runs;
}
