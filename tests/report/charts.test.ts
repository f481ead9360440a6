// Chart specs → chart.js configs → PNG. Palette values from Okabe & Ito (2008), "Color Universal
// Design", as reprinted in Wong (2011), Nature Methods 8:441 (RGB triples). Luminance with the
// ITU-R BT.709 luma coefficients (0.2126, 0.7152, 0.0722).

import { beforeAll, describe, expect, it } from 'vitest';
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { chartConfig } from '../../main/report/charts/config.ts';
import { OKABE_ITO, SERIES, probabilityFill } from '../../main/report/charts/palette.ts';
import { axisTitle, type ChartSpec } from '../../main/report/charts/spec.ts';
import { renderChartPng } from '../../main/report/render/chart-png.ts';
import { pngSize } from '../../main/report/render/figures.ts';
import { sampleDocument } from './sample-document.ts';
import { figuresOf } from '../../main/report/render/figures.ts';

const specs: ChartSpec[] = figuresOf(sampleDocument().doc).map((f) => f.chart);

function rgb(css: string): [number, number, number] {
  const hex = /^#([0-9a-f]{6})$/i.exec(css);
  if (hex) { const n = parseInt(hex[1]!, 16); return [n >> 16, (n >> 8) & 255, n & 255]; }
  const m = /rgb\((\d+), (\d+), (\d+)\)/.exec(css);
  if (!m) throw new Error(`not a colour: ${css}`);
  return [Number(m[1]), Number(m[2]), Number(m[3])];
}
const luma = ([r, g, b]: [number, number, number]) => 0.2126 * r + 0.7152 * g + 0.0722 * b;

describe('palette (Okabe & Ito 2008)', () => {
  it('uses the published RGB values', () => {
    expect(rgb(OKABE_ITO.orange)).toEqual([230, 159, 0]);
    expect(rgb(OKABE_ITO.skyBlue)).toEqual([86, 180, 233]);
    expect(rgb(OKABE_ITO.bluishGreen)).toEqual([0, 158, 115]);
    expect(rgb(OKABE_ITO.blue)).toEqual([0, 114, 178]);
    expect(rgb(OKABE_ITO.vermillion)).toEqual([213, 94, 0]);
    expect(rgb(OKABE_ITO.reddishPurple)).toEqual([204, 121, 167]);
  });
  it('never tells series apart by colour alone: every series has its own dash and point shape', () => {
    expect(new Set(SERIES.map((s) => s.point)).size).toBe(SERIES.length);
    expect(new Set(SERIES.map((s) => s.dash.join(','))).size).toBe(SERIES.length);
  });
  it('shades offer probability with falling lightness, so grayscale keeps the order', () => {
    const l = [0, 0.25, 0.5, 0.75, 1].map((p) => luma(rgb(probabilityFill(p))));
    for (let i = 1; i < l.length; i++) expect(l[i]!).toBeLessThan(l[i - 1]!);
    expect(l[0]! - l[4]!).toBeGreaterThan(60); // a visible step from "never" to "always offered"
  });
});

describe('chart.js configurations', () => {
  it('covers all five chart kinds in the sample', () => {
    expect(new Set(specs.map((s) => s.kind))).toEqual(new Set(['deltaSensitivity', 'binnedMeans', 'density', 'balance', 'boundaryMap']));
  });
  it('titles axes from labels and units', () => {
    for (const spec of specs) {
      const cfg = chartConfig(spec);
      const scales = (cfg.options as { scales: Record<string, { title: { text: string } }> }).scales;
      if (spec.kind === 'binnedMeans' || spec.kind === 'boundaryMap') {
        expect(scales['x']!.title.text).toBe(axisTitle(spec.x));
        expect(scales['y']!.title.text).toBe(axisTitle(spec.y));
      }
      if (spec.kind === 'deltaSensitivity') expect(scales['y']!.title.text).toBe('Effect on March arrears (USD)');
      if (spec.kind === 'density') expect(scales['x']!.title.text).toBe('Annual household income (USD)');
    }
  });
  it('draws no hidden bin (null means stay blank)', () => {
    const spec = specs.find((s) => s.kind === 'binnedMeans')!;
    const cfg = chartConfig(spec);
    const points = cfg.data.datasets.flatMap((d) => d.data as Array<{ y: unknown }>);
    expect(points.every((p) => p.y !== null)).toBe(true);
    expect(points.length).toBe(19 + 4); // 20 bins, one hidden, + 2 fitted lines of 2 points
  });
  it('says that the ±0.1 balance band is common practice', () => {
    const spec = specs.find((s) => s.kind === 'balance')!;
    const labels = chartConfig(spec).data.datasets.map((d) => d.label);
    expect(labels.some((l) => /±0\.1 \(common practice\)/.test(l ?? ''))).toBe(true);
  });
});

describe('PNG rendering', () => {
  let pngs: Buffer[] = [];
  beforeAll(async () => {
    pngs = await Promise.all(specs.map((s) => renderChartPng(s, { width: 400, height: 250, scale: 1.5 })));
  });
  it('has the requested pixel size', () => {
    for (const p of pngs) expect(pngSize(p)).toEqual({ width: 600, height: 375 });
  });
  it('is not blank: a decoder (skia, via loadImage) finds many non-background pixels', async () => {
    for (const p of pngs) {
      const img = await loadImage(p);
      const c = createCanvas(img.width, img.height);
      const ctx = c.getContext('2d');
      ctx.drawImage(img, 0, 0);
      const d = ctx.getImageData(0, 0, img.width, img.height).data;
      let ink = 0;
      for (let i = 0; i < d.length; i += 4) if (d[i]! < 200 || d[i + 1]! < 200 || d[i + 2]! < 200) ink++;
      expect(ink / (img.width * img.height)).toBeGreaterThan(0.01);
      // and the background is white, not transparent
      expect([d[3], d[0], d[1], d[2]]).toEqual([255, 255, 255, 255]);
    }
  });
});
