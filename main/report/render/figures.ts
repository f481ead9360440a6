// Render every figure of a document to PNG once; the renderers look them up by figure id.

import { Cancelled } from '../../design/propensity.ts';
import type { Document, Figure } from '../model/document.ts';
import { flattenSections } from '../model/format.ts';
import type { ChartPngOptions } from './chart-png.ts';
import { DEFAULT_CHART_SIZE, type ChartSize, type RenderOptions } from './options.ts';

/** chart.js on @napi-rs/canvas, loaded with the first figure drawn: a start that draws none (check, --help) never loads them. */
async function renderChartPng(chart: Figure['chart'], options: ChartPngOptions): Promise<Buffer> {
  return (await import('./chart-png.ts')).renderChartPng(chart, options);
}

export function figuresOf(doc: Document): Figure[] {
  return flattenSections(doc).flatMap(({ section }) => section.blocks.filter((b): b is Figure => b.kind === 'figure'));
}

export async function renderFigures(doc: Document, size: ChartSize = DEFAULT_CHART_SIZE, signal?: AbortSignal): Promise<Map<string, Buffer>> {
  const out = new Map<string, Buffer>();
  for (const f of figuresOf(doc)) {
    if (signal?.aborted) throw new Cancelled();
    out.set(f.id, await renderChartPng(f.chart, { width: size.width, height: size.height, scale: size.scale }));
  }
  return out;
}

/** The figures the options carry, rendering any that are missing. */
export async function figurePngs(doc: Document, opts: RenderOptions): Promise<Map<string, Buffer>> {
  const size = opts.chartSize ?? DEFAULT_CHART_SIZE;
  const out = new Map<string, Buffer>(opts.figures ?? []);
  for (const f of figuresOf(doc)) {
    if (!out.has(f.id)) out.set(f.id, await renderChartPng(f.chart, { width: size.width, height: size.height, scale: size.scale }));
  }
  return out;
}

/** Pixel size from a PNG's IHDR chunk (PNG specification, ISO/IEC 15948:2004, §11.2.2). */
export function pngSize(png: Buffer): { width: number; height: number } {
  if (png.length < 24 || png.readUInt32BE(12) !== 0x49484452) throw new Error('not a PNG image');
  return { width: png.readUInt32BE(16), height: png.readUInt32BE(20) };
}
