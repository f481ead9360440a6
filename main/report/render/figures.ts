// Render every figure of a document to PNG once; the renderers look them up by figure id.

import { Cancelled } from '../../design/propensity.ts';
import type { Document, Figure } from '../model/document.ts';
import { flattenSections } from '../model/format.ts';
import { DEFAULT_CHART_SIZE, type ChartSize, type RenderOptions } from './options.ts';

/** chart.js on @napi-rs/canvas, loaded with the first figure drawn: a start that draws none (check, --help) never loads them. */
const chartRenderer = async () => (await import('./chart-png.ts')).renderChartPng;

export function figuresOf(doc: Document): Figure[] {
  return flattenSections(doc).flatMap(({ section }) => section.blocks.filter((b): b is Figure => b.kind === 'figure'));
}

/**
 * Draw `figures` one after another on this thread; each PNG's compression runs on the thread pool
 * while the next is drawn (chart-png.ts), and all are awaited together.
 */
async function drawFigures(figures: Figure[], size: ChartSize, signal?: AbortSignal): Promise<Map<string, Buffer>> {
  if (!figures.length) return new Map();
  const render = await chartRenderer();
  if (signal?.aborted) throw new Cancelled();
  const pending = figures.map((f) => render(f.chart, { width: size.width, height: size.height, scale: size.scale }));
  const pngs = await Promise.all(pending);
  if (signal?.aborted) throw new Cancelled();
  return new Map(figures.map((f, i) => [f.id, pngs[i]!]));
}

export async function renderFigures(doc: Document, size: ChartSize = DEFAULT_CHART_SIZE, signal?: AbortSignal): Promise<Map<string, Buffer>> {
  return drawFigures(figuresOf(doc), size, signal);
}

/** The figures the options carry, rendering any that are missing. */
export async function figurePngs(doc: Document, opts: RenderOptions): Promise<Map<string, Buffer>> {
  const missing = figuresOf(doc).filter((f) => !opts.figures?.has(f.id));
  return new Map([...(opts.figures ?? []), ...await drawFigures(missing, opts.chartSize ?? DEFAULT_CHART_SIZE)]);
}

/** Pixel size from a PNG's IHDR chunk (PNG specification, ISO/IEC 15948:2004, §11.2.2). */
export function pngSize(png: Buffer): { width: number; height: number } {
  if (png.length < 24 || png.readUInt32BE(12) !== 0x49484452) throw new Error('not a PNG image');
  return { width: png.readUInt32BE(16), height: png.readUInt32BE(20) };
}
