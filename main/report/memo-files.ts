// The memo files of one run: the document built once from the results and the figure data,
// the figures rendered to PNG once and shared by every format, then each chosen format rendered
// (file names from docs/cli.md: memo.pdf, memo.html, memo.docx, tables.xlsx). Progress: stage
// 'memo', one step for the figures and one per format.

import { Cancelled } from '../design/propensity.ts';
import type { OutputFormat, ProgressEvent } from '../contract/api.ts';
import type { Results } from '../contract/results.ts';
import type { OutputFile } from '../output/write-files.ts';
import { showsIndividualUnits } from './charts/spec.ts';
import type { Document } from './model/document.ts';
import type { FigureData } from './model/figure-types.ts';
import { buildMemo, type MemoOptions } from './model/memo.ts';
import { MEMO_FILE_NAMES } from './memo-names.ts';
import { figuresOf, renderFigures } from './render/figures.ts';

// Each renderer and the library behind it (pdfkit, docx, exceljs) is loaded on first use, so a
// start that writes no memo (check, --help, a run with --formats none) loads none of them.
const RENDERERS: Readonly<Record<OutputFormat, (doc: Document, figures: Map<string, Buffer>) => Promise<Buffer | string>>> = {
  pdf: async (doc, figures) => (await import('./render/pdf.ts')).renderPdf(doc, { figures }),
  html: async (doc, figures) => (await import('./render/html.ts')).renderHtml(doc, { figures }),
  docx: async (doc, figures) => (await import('./render/docx.ts')).renderDocx(doc, { figures }),
  xlsx: async (doc) => (await import('./render/xlsx.ts')).renderXlsx(doc),
};

export interface MemoFilesOptions extends MemoOptions {
  onProgress?: (p: ProgressEvent) => void;
  /** Cancel between figures and between formats (a cancelled run writes nothing). */
  signal?: AbortSignal;
}

/**
 * The memo and every export show units as binned counts with small cells hidden (docs/method.md
 * §7); the map's individual-units view is the analyst's private view in the app only. A fault if
 * it reaches here (the types keep it out of FigureData; this holds for untyped callers too).
 */
export class PrivateViewRefused extends Error {
  constructor(where: string) {
    super(`${where} shows individual units (the app's private map view); memos and exported files show binned counts only.`);
    this.name = 'PrivateViewRefused';
  }
}

function refusePrivateFigures(figures: FigureData): void {
  const map = figures.boundaryMap as (FigureData['boundaryMap'] & { view?: string; units?: unknown }) | null;
  if (map && (map.view !== 'binned' || map.units !== undefined)) throw new PrivateViewRefused('The boundary-region map');
}

function refusePrivateDocument(doc: Document): void {
  for (const f of figuresOf(doc)) if (showsIndividualUnits(f.chart)) throw new PrivateViewRefused(`Figure "${f.id}"`);
}

/** Render an already built memo document in the chosen formats. */
export async function renderMemoDocument(doc: Document, formats: readonly OutputFormat[], onProgress?: (p: ProgressEvent) => void, signal?: AbortSignal): Promise<OutputFile[]> {
  refusePrivateDocument(doc);
  const chosen = [...new Set(formats)];
  if (!chosen.length) return [];
  const needFigures = chosen.some((f) => f !== 'xlsx') && figuresOf(doc).length > 0;
  const total = chosen.length + (needFigures ? 1 : 0);
  let done = 0;
  onProgress?.({ stage: 'memo', done, total });
  const figures = needFigures ? await renderFigures(doc, undefined, signal) : new Map<string, Buffer>();
  if (needFigures) onProgress?.({ stage: 'memo', done: ++done, total });
  const files: OutputFile[] = [];
  for (const f of chosen) {
    if (signal?.aborted) throw new Cancelled();
    files.push({ name: MEMO_FILE_NAMES[f], content: await RENDERERS[f](doc, figures) });
    onProgress?.({ stage: 'memo', done: ++done, total });
  }
  return files;
}

/** Build the memo from the results and figure data and render it in the chosen formats. */
export async function memoFiles(results: Results, figures: FigureData, formats: readonly OutputFormat[], opts: MemoFilesOptions): Promise<OutputFile[]> {
  refusePrivateFigures(figures);
  if (!formats.length) return [];
  const doc = buildMemo(results, figures, { createdAt: opts.createdAt, ...(opts.author ? { author: opts.author } : {}) });
  return renderMemoDocument(doc, formats, opts.onProgress, opts.signal);
}
