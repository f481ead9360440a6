// Chart spec → PNG, by chart.js drawing on an @napi-rs/canvas canvas in Node. The DejaVu Sans
// fonts shipped with the dejavu-fonts-ttf package are registered once, so the PNG looks the same
// on every machine (no system fonts are consulted).

import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { createCanvas, GlobalFonts } from '@napi-rs/canvas';
import { Chart, registerables, type Plugin } from 'chart.js';
import type { ChartSpec } from '../charts/spec.ts';
import { chartConfig } from '../charts/config.ts';
import { encodeRgbPng } from './png-rgb.ts';

const require = createRequire(import.meta.url);

/** Folder of the DejaVu TTF files (also embedded by the PDF renderer). */
export function dejavuFontDir(): string {
  return join(dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf');
}

export const CHART_FONT_FAMILY = 'DejaVu Sans';

let ready = false;
function setup(): void {
  if (ready) return;
  Chart.register(...registerables);
  const dir = dejavuFontDir();
  GlobalFonts.registerFromPath(join(dir, 'DejaVuSans.ttf'), CHART_FONT_FAMILY);
  GlobalFonts.registerFromPath(join(dir, 'DejaVuSans-Bold.ttf'), CHART_FONT_FAMILY);
  Chart.defaults.font.family = CHART_FONT_FAMILY;
  ready = true;
}

export interface ChartPngOptions {
  /** Size in CSS pixels (the chart's layout size). */
  width: number;
  height: number;
  /** Device pixels per CSS pixel: the PNG is width·scale × height·scale. */
  scale?: number;
  /** Base font size in CSS pixels. */
  fontSize?: number;
  background?: string;
}

const whiteBackground = (color: string): Plugin => ({
  id: 'fencelineBackground',
  beforeDraw(chart) {
    const { ctx } = chart;
    ctx.save();
    ctx.globalCompositeOperation = 'destination-over';
    ctx.fillStyle = color;
    ctx.fillRect(0, 0, chart.width, chart.height);
    ctx.restore();
  },
});

/**
 * The chart drawn and its pixels read before this returns (synchronously); only the compression is
 * left to the promise, so figures drawn one after another compress side by side.
 */
export function renderChartPng(spec: ChartSpec, opts: ChartPngOptions): Promise<Buffer> {
  try {
    return drawAndEncode(spec, opts);
  } catch (e) {
    return Promise.reject(e);
  }
}

function drawAndEncode(spec: ChartSpec, opts: ChartPngOptions): Promise<Buffer> {
  setup();
  const scale = opts.scale ?? 2;
  if (!(opts.width > 0 && opts.height > 0 && scale > 0)) {
    throw new RangeError(`chart size must be positive, got ${opts.width}×${opts.height} at scale ${scale}`);
  }
  // The canvas starts at the layout size; chart.js multiplies it by devicePixelRatio itself.
  const canvas = createCanvas(Math.round(opts.width), Math.round(opts.height));
  const config = chartConfig(spec, { fontFamily: CHART_FONT_FAMILY, fontSize: opts.fontSize ?? 14, responsive: false });
  config.options = { ...config.options, devicePixelRatio: scale };
  config.plugins = [whiteBackground(opts.background ?? '#ffffff'), ...(config.plugins ?? [])];
  // chart.js accepts any 2-D context; the napi-rs context implements the parts it uses.
  const chart = new Chart(canvas.getContext('2d') as unknown as ConstructorParameters<typeof Chart>[0], config);
  try {
    // The background plugin makes every pixel opaque, so the PNG is written without alpha.
    return encodeRgbPng(canvas.data(), canvas.width, canvas.height);
  } finally {
    chart.destroy();
  }
}
