// Chart spec → chart.js configuration. No Node imports: the app's live charts use this module too.
// The caller registers chart.js's controllers (Chart.register(...registerables)) and owns the canvas.

import type { ChartConfiguration, Plugin } from 'chart.js';
import type {
  BalanceSpec, BinnedMeansSpec, BoundaryMapSpec, ChartSpec, DeltaSensitivitySpec, DensitySpec, Side,
} from './spec.ts';
import { axisTitle } from './spec.ts';
import { INK, REFERENCE, SIDE_STYLE, probabilityFill, seriesStyle } from './palette.ts';
import { referencePlugin, shadedGridPlugin, whiskerPlugin } from './plugins.ts';

export interface ChartConfigOptions {
  /** Font family for every text (the PNG renderer registers DejaVu Sans under this name). */
  fontFamily?: string;
  /** Base font size in CSS pixels. */
  fontSize?: number;
  /** Live charts in the app resize with their container; documents draw at a fixed size. */
  responsive?: boolean;
}

/** chart.js's configuration type is generic over chart types; a mixed chart is typed loosely here. */
export type AnyChartConfig = ChartConfiguration;

const DEFAULTS = { fontFamily: 'DejaVu Sans', fontSize: 14, responsive: false };

export function chartConfig(spec: ChartSpec, options: ChartConfigOptions = {}): AnyChartConfig {
  const o = { ...DEFAULTS, ...options };
  switch (spec.kind) {
    case 'deltaSensitivity': return deltaSensitivityConfig(spec, o);
    case 'binnedMeans': return binnedMeansConfig(spec, o);
    case 'density': return densityConfig(spec, o);
    case 'balance': return balanceConfig(spec, o);
    case 'boundaryMap': return boundaryMapConfig(spec, o);
  }
}

type Opts = typeof DEFAULTS;

function baseOptions(spec: ChartSpec, o: Opts, xTitle: string, yTitle: string): Record<string, unknown> {
  const font = { family: o.fontFamily, size: o.fontSize };
  const axis = (title: string) => ({
    title: { display: true, text: title, color: INK.text, font: { ...font, size: o.fontSize } },
    ticks: { color: INK.text, font: { ...font, size: o.fontSize - 1 } },
    grid: { color: INK.grid },
    border: { color: INK.axis },
  });
  return {
    responsive: o.responsive,
    maintainAspectRatio: false,
    animation: false,
    font,
    color: INK.text,
    scales: { x: axis(xTitle), y: axis(yTitle) },
    plugins: {
      title: spec.title
        ? { display: true, text: spec.title, color: INK.text, font: { ...font, size: o.fontSize + 2, weight: 'bold' } }
        : { display: false },
      subtitle: spec.subtitle
        ? { display: true, text: spec.subtitle, color: INK.text, font: { ...font, size: o.fontSize - 1 }, padding: { bottom: 6 } }
        : { display: false },
      legend: {
        display: true,
        position: 'bottom',
        labels: { usePointStyle: true, color: INK.text, font: { ...font, size: o.fontSize - 1 }, padding: 14 },
      },
      tooltip: { enabled: o.responsive },
    },
  };
}

function cfg(type: string, datasets: unknown[], options: Record<string, unknown>, plugins: Plugin[], labels?: unknown[]): AnyChartConfig {
  return { type, data: labels ? { labels, datasets } : { datasets }, options, plugins } as unknown as AnyChartConfig;
}

function pointDataset(label: string, data: unknown[], i: number | SeriesKey, extra: Record<string, unknown> = {}) {
  const s = typeof i === 'number' ? seriesStyle(i) : SIDE_STYLE[i];
  return {
    type: 'scatter',
    label,
    data,
    pointStyle: s.point,
    pointRadius: 5,
    pointHoverRadius: 6,
    pointBackgroundColor: s.color,
    pointBorderColor: s.color,
    borderColor: s.color,
    backgroundColor: s.color,
    showLine: false,
    ...extra,
  };
}

type SeriesKey = Side;

function fitDataset(label: string, points: Array<{ x: number; y: number }>, side: Side) {
  const s = SIDE_STYLE[side];
  return {
    type: 'line',
    label,
    data: points,
    borderColor: s.color,
    backgroundColor: s.color,
    borderDash: s.dash.length ? s.dash : [],
    borderWidth: 2.5,
    pointRadius: 0,
    pointStyle: 'line',
    fill: false,
    tension: 0,
  };
}

function deltaSensitivityConfig(spec: DeltaSensitivitySpec, o: Opts): AnyChartConfig {
  const labels = spec.points.map((p) => String(p.delta));
  const s = seriesStyle(0);
  const datasets: unknown[] = [
    pointDataset('Estimate', spec.points.map((p, i) => ({ x: labels[i], y: p.estimate })), 0, { pointRadius: 6 }),
    // An empty dataset gives the whiskers (drawn by a plugin) their legend entry.
    { type: 'line', label: '95% interval', data: [], borderColor: s.color, backgroundColor: s.color, pointStyle: 'line', borderWidth: 2 },
  ];
  const all = spec.points.flatMap((p) => [p.low, p.high]).concat((spec.references ?? []).map((r) => r.value), [0]);
  const pad = (Math.max(...all) - Math.min(...all)) * 0.08 || 1;
  const options = baseOptions(spec, o, 'Ball radius delta (in scaled units of the formula inputs)', axisTitle(spec.effect));
  const scales = options['scales'] as Record<string, Record<string, unknown>>;
  scales['x'] = { ...scales['x'], type: 'category', offset: true };
  scales['y'] = { ...scales['y'], suggestedMin: Math.min(...all) - pad, suggestedMax: Math.max(...all) + pad };
  const refs = [
    { kind: 'line' as const, axis: 'y' as const, value: 0, label: 'No effect', solid: true },
    ...(spec.references ?? []).map((r) => ({ kind: 'line' as const, axis: 'y' as const, value: r.value, label: r.label })),
  ];
  return cfg('scatter', datasets, options, [
    referencePlugin(refs, o.fontFamily, o.fontSize - 2),
    whiskerPlugin(spec.points.map((p, i) => ({ index: i, low: p.low, high: p.high })), s.color),
  ], labels);
}

function binnedMeansConfig(spec: BinnedMeansSpec, o: Opts): AnyChartConfig {
  const datasets: unknown[] = [];
  for (const side of ['below', 'above'] as const) {
    const data = spec.bins.filter((b) => b.side === side && b.mean !== null).map((b) => ({ x: b.x, y: b.mean }));
    datasets.push(pointDataset(`${spec.sides[side]}: bin means`, data, side));
  }
  for (const f of spec.fits ?? []) datasets.push(fitDataset(`${spec.sides[f.side]}: fitted line`, f.points, f.side));
  const options = baseOptions(spec, o, axisTitle(spec.x), axisTitle(spec.y));
  const scales = options['scales'] as Record<string, Record<string, unknown>>;
  scales['x'] = { ...scales['x'], type: 'linear' };
  scales['y'] = { ...scales['y'], type: 'linear', ...(spec.yRange ? { min: spec.yRange[0], max: spec.yRange[1] } : {}) };
  const refs = [{ kind: 'line' as const, axis: 'x' as const, value: 0, label: 'Edge', solid: true }];
  return cfg('scatter', datasets, options, [referencePlugin(refs, o.fontFamily, o.fontSize - 2)]);
}

function densityConfig(spec: DensitySpec, o: Opts): AnyChartConfig {
  const datasets: unknown[] = [];
  for (const side of ['below', 'above'] as const) {
    const s = SIDE_STYLE[side];
    const bins = spec.bins.filter((b) => (side === 'below' ? b.to <= spec.threshold : b.from >= spec.threshold));
    datasets.push({
      type: 'bar',
      label: `${spec.sides[side]}: units per bin`,
      data: bins.filter((b) => b.count !== null).map((b) => ({ x: (b.from + b.to) / 2, y: b.count })),
      backgroundColor: side === 'below' ? 'rgba(0, 114, 178, 0.28)' : 'rgba(213, 94, 0, 0.22)',
      borderColor: s.color,
      borderWidth: 1,
      barPercentage: 1,
      categoryPercentage: 1,
      grouped: false,
      pointStyle: 'rect',
    });
  }
  for (const f of spec.fits ?? []) datasets.push(fitDataset(`${spec.sides[f.side]}: fitted density`, f.points, f.side));
  const xs = spec.bins.flatMap((b) => [b.from, b.to]);
  const options = baseOptions(spec, o, axisTitle(spec.x), spec.yLabel ?? 'Units per bin');
  const scales = options['scales'] as Record<string, Record<string, unknown>>;
  scales['x'] = { ...scales['x'], type: 'linear', offset: false, min: Math.min(...xs), max: Math.max(...xs) };
  scales['y'] = { ...scales['y'], type: 'linear', beginAtZero: true };
  const refs = [{ kind: 'line' as const, axis: 'x' as const, value: spec.threshold, label: spec.thresholdLabel ?? 'Threshold', solid: true }];
  return cfg('bar', datasets, options, [referencePlugin(refs, o.fontFamily, o.fontSize - 2)]);
}

function balanceConfig(spec: BalanceSpec, o: Opts): AnyChartConfig {
  const band = spec.band ?? 0.1;
  const datasets = spec.series.map((s, i) => pointDataset(
    s.name,
    s.values.flatMap((v, j) => (v === null ? [] : [{ x: v, y: spec.covariates[j] }])),
    i,
    { pointRadius: 6 },
  ));
  datasets.push({
    type: 'line', label: `Reference band ±${band} (common practice)`, data: [],
    borderColor: REFERENCE.line, backgroundColor: REFERENCE.band, borderDash: [...REFERENCE.dash], pointStyle: 'rect',
  } as unknown as ReturnType<typeof pointDataset>);
  const values = spec.series.flatMap((s) => s.values.filter((v): v is number => v !== null));
  const reach = Math.max(band * 2, ...values.map((v) => Math.abs(v))) * 1.1;
  const options = baseOptions(spec, o, spec.xLabel ?? 'Standardized difference (offered minus not offered, in standard deviations)', '');
  const scales = options['scales'] as Record<string, Record<string, unknown>>;
  scales['x'] = { ...scales['x'], type: 'linear', min: -reach, max: reach };
  scales['y'] = { ...scales['y'], type: 'category', labels: spec.covariates, offset: true, title: { display: false } };
  const refs = [
    { kind: 'band' as const, axis: 'x' as const, from: -band, to: band },
    { kind: 'line' as const, axis: 'x' as const, value: 0, solid: true },
  ];
  return cfg('scatter', datasets, options, [referencePlugin(refs, o.fontFamily, o.fontSize - 2)]);
}

const TEXTURE_INK = 'rgba(0, 50, 90, 0.75)';
/** The pattern of a map cell by its offer probability (exported for the tests). */
export function offerTexture(p: number): 'dot' | 'plus' | 'none' {
  return !(p > 0) ? 'none' : p >= 1 ? 'dot' : 'plus';
}

function boundaryMapConfig(spec: BoundaryMapSpec, o: Opts): AnyChartConfig {
  const g = spec.grid;
  const fill = g.probability.map((row) => row.map((p) => probabilityFill(p)));
  // Shape as well as lightness (never colour alone): dots where the offer is certain, plus signs where it is a chance.
  const texture = g.probability.map((row) => row.map((p) => offerTexture(p)));
  const c = spec.counts;
  const legendSwatch = (label: string, color: string, extra: Record<string, unknown> = {}) => ({
    type: 'scatter', label, data: [], pointStyle: 'rect', pointBackgroundColor: color, backgroundColor: color,
    borderColor: INK.axis, pointBorderColor: INK.axis, ...extra,
  });
  const unitDatasets = spec.units
    ? [
      // Private view: offered and not offered differ in shape (triangle / circle) as well as colour (SIDE_STYLE).
      pointDataset('Offered (a unit)', spec.units.offered, 'above', { pointRadius: 3, pointHoverRadius: 5, pointBackgroundColor: 'rgba(213, 94, 0, 0.7)', pointBorderColor: 'rgba(26, 26, 26, 0.8)', pointBorderWidth: 0.5 }),
      pointDataset('Not offered (a unit)', spec.units.notOffered, 'below', { pointRadius: 2.5, pointHoverRadius: 5, pointBackgroundColor: 'rgba(0, 114, 178, 0.35)', pointBorderColor: 'rgba(0, 60, 100, 0.7)', pointBorderWidth: 0.5 }),
    ]
    : [];
  const datasets: unknown[] = [
    // The markers are drawn by the grid plugin (their size follows the cell size in pixels);
    // this empty dataset gives them a legend entry.
    ...(c ? [legendSwatch('Units: circle area shows the count per bin; bins with few units are blank', 'rgba(255, 255, 255, 0.85)', {
      pointStyle: 'circle', borderColor: INK.text, pointBorderColor: INK.text,
    })] : []),
    ...unitDatasets,
    legendSwatch('Offer probability 0 (plain)', probabilityFill(0)),
    legendSwatch('Offer probability between 0 and 1 (plus signs)', probabilityFill(0.5), { pointStyle: 'cross', borderColor: TEXTURE_INK, pointBorderColor: TEXTURE_INK, pointBorderWidth: 2 }),
    legendSwatch('Offer probability 1 (dots)', probabilityFill(1), { pointStyle: 'circle', pointBackgroundColor: TEXTURE_INK, backgroundColor: TEXTURE_INK }),
    legendSwatch(`Boundary band (delta = ${spec.delta}), hatched`, 'rgba(0,0,0,0.35)', { pointStyle: 'crossRot', borderColor: INK.text, pointBorderColor: INK.text }),
  ];
  const options = baseOptions(spec, o, axisTitle(spec.x), axisTitle(spec.y));
  const scales = options['scales'] as Record<string, Record<string, unknown>>;
  const xAll = [...g.xEdges, ...(c?.xEdges ?? [])];
  const yAll = [...g.yEdges, ...(c?.yEdges ?? [])];
  scales['x'] = { ...scales['x'], type: 'linear', min: Math.min(...xAll), max: Math.max(...xAll), grid: { display: false } };
  scales['y'] = { ...scales['y'], type: 'linear', min: Math.min(...yAll), max: Math.max(...yAll), grid: { display: false } };
  return cfg('scatter', datasets, options, [
    shadedGridPlugin({
      xEdges: g.xEdges, yEdges: g.yEdges, fill, hatch: g.inBand, hatchColor: 'rgba(0, 0, 0, 0.45)', texture, textureColor: TEXTURE_INK,
      ...(c ? { markers: { xEdges: c.xEdges, yEdges: c.yEdges, values: c.values, fill: 'rgba(255, 255, 255, 0.85)', stroke: INK.text } } : {}),
    }),
  ]);
}
