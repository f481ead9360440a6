// Always (when an effect was estimated): the estimate is about the units compared — near the
// formula's edge, offered by the draw, or both (findings.design) — and is no forecast for units far from the limits or for large changes of the rule.
// With the small-change projection (main/estimate/threshold-change.ts), the range of changes
// the data support: a projection is supported only while every unit it would switch lies in the
// boundary band of the headline delta.

import type { Results } from '../../contract/results.ts';
import { num, stateRun, text } from '../model/memo-source.ts';
import { DELTA, effectOf, limitName, unitWords } from '../model/memo-format.ts';
import type { Inline } from '../model/document.ts';
import { para, type Caveat, type CaveatContext } from './types.ts';

export interface SupportedRange {
  path: string;
  description: string;
  group?: string;
  /** Scenario index of the largest supported lowering / raising of this limit (null: none). */
  down: number | null;
  up: number | null;
  /** Scenario index of the smallest change that is not supported (null: every change is). */
  firstUnsupported: number | null;
}

/** Per limit: the largest supported change each way and the smallest unsupported one. */
export function supportedRange(r: Results): SupportedRange[] {
  const scenarios = r.thresholdChanges?.scenarios ?? [];
  const byLimit = new Map<string, SupportedRange>();
  const size = (i: number | null) => (i === null ? -1 : Math.abs(scenarios[i]!.relativeChange));
  scenarios.forEach((s, i) => {
    const e = byLimit.get(s.path) ?? { path: s.path, description: s.description, ...(s.group !== undefined ? { group: s.group } : {}), down: null, up: null, firstUnsupported: null };
    if (s.valid) {
      if (s.relativeChange < 0 && size(i) > size(e.down)) e.down = i;
      if (s.relativeChange > 0 && size(i) > size(e.up)) e.up = i;
    } else if (e.firstUnsupported === null || size(i) < size(e.firstUnsupported)) {
      e.firstUnsupported = i;
    }
    byLimit.set(s.path, e);
  });
  return [...byLimit.values()];
}

export function localEstimateCaveat(r: Results, ctx: CaveatContext): Caveat | null {
  const estimable = r.outcomes.some((o) => o.byDelta.some((b) => b.estimable));
  if (!estimable) return null;
  const { many } = unitWords(r);
  const k = ctx.headline;
  const kind = r.findings.design.kind;
  const who = kind === 'lottery' ? `${many} whose offer was left to the draw` : kind === 'edge and lottery' ? `${many} near the edge of the rule or whose offer was left to the draw` : `${many} near the edge of the rule`;
  const far = kind === 'lottery' ? `${many} the rule always or never offers` : `${many} far from the limits`;
  const body = [
    para(
      text(`The effect is measured for ${who}: at the headline delta, `),
      stateRun(ctx.ledger.get(`design.byDelta[${k}].boundary`), `design.byDelta[${k}].boundary`),
      text(` of `),
      stateRun(ctx.ledger.get('study.rowsUsed'), 'study.rowsUsed'),
      text(` ${many}. It says what ${effectOf(r)} does for them. It is not a forecast for ${far}, whose circumstances differ, nor for a large change of the rule, which would reach such ${many}.`),
    ),
  ];
  const tc = r.thresholdChanges;
  if (tc && tc.scenarios.length) {
    const ranges = supportedRange(r);
    const supported = ranges.filter((x) => x.down !== null || x.up !== null);
    body.push(para(
      text('Small changes of a limit can be projected from the estimate (see the table of projected effects below) while every '),
      text(`${r.program.unit} the change would switch lies near the edge at delta `),
      num(r, 'thresholdChanges.delta', DELTA),
      text(supported.length
        ? '. The data support these changes:'
        : '. None of the changes tried stays within that range: the data support no projection of a change of the rule.'),
    ));
    const sizeOf = (i: number | null) => (i === null ? null : Math.abs(tc.scenarios[i]!.relativeChange));
    const same = supported.length === ranges.length && ranges.length > 1 && ranges.every((x) =>
      sizeOf(x.down) === sizeOf(ranges[0]!.down) && sizeOf(x.up) === sizeOf(ranges[0]!.up) && x.down !== null && x.up !== null);
    if (same) {
      // One sentence for all limits when each is supported over the same range.
      const x = ranges[0]!;
      const items: Inline[] = [text('For every limit of the rule: lowering it by up to '), sizeRun(r, x.down!), text(' or raising it by up to '), sizeRun(r, x.up!), text('.')];
      const worst = ranges.filter((y) => y.firstUnsupported !== null);
      if (worst.length) items.push(text(' Larger changes tried would switch ' + many + ' who are not near the edge (see the table), so they are not supported.'));
      body.push(para(...items));
    }
    for (const x of same ? [] : supported) {
      const items: Inline[] = [text(`${limitName(r, x, unitWords(r).one)}: `)];
      const ways: Inline[][] = [];
      if (x.down !== null) ways.push([text('lowering it by up to '), sizeRun(r, x.down)]);
      if (x.up !== null) ways.push([text('raising it by up to '), sizeRun(r, x.up)]);
      ways.forEach((w, j) => { if (j) items.push(text(' or ')); items.push(...w); });
      if (x.firstUnsupported !== null) {
        const j = x.firstUnsupported;
        items.push(text('; a change of '), sizeRun(r, j), text(' would switch '),
          stateRun(ctx.ledger.get(`thresholdChanges.scenarios[${j}].switchersOutsideBand`), `thresholdChanges.scenarios[${j}].switchersOutsideBand`),
          text(` ${many} who are not near the edge, so it is not supported`));
      }
      items.push(text('.'));
      body.push(para(...items));
    }
  }
  return { id: 'local-estimate', title: `The estimate is about ${who}`, tone: 'limitation', body };
}

/** |relative change| as a percentage. */
function sizeRun(r: Results, i: number): Inline {
  const path = `thresholdChanges.scenarios[${i}].relativeChange`;
  const v = r.thresholdChanges!.scenarios[i]!.relativeChange;
  return { kind: 'number', value: Math.abs(v), format: { style: 'percent', decimals: 0 }, source: `abs(${path})` };
}
