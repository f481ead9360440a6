// Figures of the memo: chart specs (main/report/charts/spec.ts) from the results and the
// per-unit figure data. Captions say what is shown without printing numbers (numbers live in
// the tables, which come from results.json).

import type { Figure } from './document.ts';
import { mapSpec } from './map-spec.ts';
import type { MemoContext } from './memo-context.ts';
import { columnLabel, criterionShort, outcomeName, lowerFirst } from './memo-format.ts';
import { MEMO_CONSTANTS } from './memo-constants.ts';

const DISTANCE_AXIS = { label: 'Distance to the nearest edge of the rule (below 0: not eligible)', unit: 'scaled units' };

export function boundaryMapFigure(ctx: MemoContext): Figure | null {
  const m = ctx.figures.boundaryMap;
  if (!m) return null;
  const { many } = ctx.words;
  return {
    kind: 'figure',
    id: 'fig-boundary-map',
    chart: mapSpec(m),
    caption: `The rule’s offer over ${lowerFirst(m.x.label)} and ${lowerFirst(m.y.label)}: shading shows the chance of an offer, the hatched band the ${many} counted as near the edge at the headline delta, and circles how many ${many} fall in each area (areas with few ${many} are left blank).${m.panel ? ' Other inputs are held at the values named above the map.' : ''}`,
    alt: `A map with ${m.x.label} across and ${m.y.label} up. Shaded areas are where the rule offers the benefit; a hatched band follows the edge of the rule; circles show where ${many} are, with blank areas where there are too few to show.`,
  };
}

export function deltaFigure(ctx: MemoContext, i: number): Figure | null {
  const o = ctx.r.outcomes[i]!;
  const points = o.byDelta.flatMap((b) => (b.estimate !== null && b.ci ? [{ delta: b.delta, estimate: b.estimate, low: b.ci[0], high: b.ci[1] }] : []));
  if (!points.length) return null;
  const name = outcomeName(o);
  const naive = o.naiveOls.estimate;
  return {
    kind: 'figure',
    id: `fig-delta-${i}`,
    chart: {
      kind: 'deltaSensitivity',
      effect: { label: `Effect on ${lowerFirst(name.name)}`, ...(name.unit ? { unit: name.unit } : {}) },
      points,
      ...(naive !== null ? { references: [{ label: 'Naive comparison', value: naive }] } : {}),
    },
    caption: `Estimated effect on ${lowerFirst(name.name)} and its 95% interval at each delta, with the naive comparison of recipients and non-recipients for reference.`,
    alt: `Estimates with their intervals, one per delta, against a line at no effect and a dashed line at the naive comparison.`,
  };
}

export function distanceFigure(ctx: MemoContext, which: number | 'takeUp'): Figure | null {
  const sd = ctx.figures.signedDistance;
  if (!sd) return null;
  const series = which === 'takeUp' ? sd.takeUp : sd.outcomes.find((o) => o.column === ctx.r.outcomes[which]!.column)?.series;
  if (!series || !series.bins.some((b) => b.mean !== null)) return null;
  const o = which === 'takeUp' ? null : ctx.r.outcomes[which]!;
  const name = o ? outcomeName(o) : { name: 'Share receiving the benefit', unit: 'share' };
  const { many } = ctx.words;
  return {
    kind: 'figure',
    id: which === 'takeUp' ? 'fig-takeup-distance' : `fig-outcome-distance-${which}`,
    chart: {
      kind: 'binnedMeans',
      x: DISTANCE_AXIS,
      y: { label: name.name, ...(name.unit ? { unit: name.unit } : {}) },
      sides: { below: 'Not eligible', above: 'Eligible' },
      bins: series.bins,
      fits: series.fits,
      ...(which === 'takeUp' ? { yRange: [0, 1] as [number, number] } : {}),
    },
    caption: which === 'takeUp'
      ? `Share of ${many} receiving the benefit against their distance to the nearest edge of the rule: a jump at the edge means the offer changes who receives it.`
      : `Average ${lowerFirst(name.name)} against the distance to the nearest edge of the rule, with a straight line fitted on each side. Averages over too few ${many} are left out.`,
    alt: which === 'takeUp'
      ? 'Points for the share receiving the benefit on each side of the edge, low on the not-eligible side and higher on the eligible side.'
      : `Points for the average ${lowerFirst(name.name)} in narrow bands of distance on each side of the edge, with fitted lines.`,
  };
}

export function densityFigure(ctx: MemoContext, k: number): Figure | null {
  const d = ctx.figures.density.find((x) => x.check === k);
  const check = ctx.r.density[k];
  if (!d || !check || !d.bins.length) return null;
  const { many } = ctx.words;
  return {
    kind: 'figure',
    id: `fig-density-${k}`,
    chart: {
      kind: 'density',
      x: { label: d.x.label, ...(d.x.unit ? { unit: d.x.unit } : {}) },
      threshold: 0,
      thresholdLabel: 'Limit',
      sides: { below: 'Below the limit', above: 'Above the limit' },
      bins: d.bins,
      yLabel: `${many[0]!.toUpperCase()}${many.slice(1)} per bin`,
    },
    caption: `How many ${many} fall just below and just above the limit of the criterion “${criterionShort(ctx.r, check.atom, ctx.words.one)}” (value minus limit; bins with few ${many} are left blank).`,
    alt: `A histogram of value minus limit around zero, one bar per narrow band.`,
  };
}

export function balanceFigure(ctx: MemoContext): Figure | null {
  const r = ctx.r;
  const covariates = [...new Set(r.balance.map((b) => b.covariate))];
  if (!covariates.length) return null;
  const series: Array<{ name: string; values: Array<number | null> }> = [];
  const all = ctx.figures.balanceAll;
  if (all.length) series.push({ name: 'All units, no adjustment', values: covariates.map((c) => all.find((a) => a.covariate === c)?.standardizedDiff ?? null) });
  for (const delta of r.settings.deltas) {
    series.push({
      name: `Near the edge at delta ${delta}, controlling for the offer probability`,
      values: covariates.map((c) => r.balance.find((b) => b.covariate === c && b.delta === delta)?.standardizedDiff ?? null),
    });
  }
  return {
    kind: 'figure',
    id: 'fig-balance',
    chart: { kind: 'balance', covariates: covariates.map((c) => columnLabel(r, c)), series, band: MEMO_CONSTANTS.BALANCE_BAND },
    caption: 'Differences between offered and not-offered units in characteristics fixed before the offer, in standard deviations; the grey band marks differences usually treated as negligible.',
    alt: 'Points per characteristic and comparison; points inside the grey band around zero show no meaningful difference.',
  };
}
