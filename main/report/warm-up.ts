// A small document rendered in every memo format by an idle job worker (main/host/job-worker.ts,
// "warm"), so that the next run's memo finds its libraries loaded, its fonts parsed and their code
// compiled: a job worker is a fresh thread, and the first memo rendered in one took about twice as
// long as the next (docs/benchmarks.md, "The app's run"). Nothing here is written anywhere; the
// document's words and numbers are placeholders of our own, not results.

import type { OutputFormat } from '../contract/api.ts';
import { DOCUMENT_FORMAT, type Document } from './model/document.ts';
import { suppressionLegend } from './model/suppress.ts';
import { renderMemoDocument } from './memo-files.ts';

/** One block of each kind the renderers lay out most: a paragraph, a table, a list, a figure. */
export function warmUpDocument(): Document {
  const word = (text: string) => ({ kind: 'text' as const, text });
  return {
    format: DOCUMENT_FORMAT,
    title: { title: 'Warm-up', dateLine: 'Warm-up', createdAt: '2026-01-01T00:00:00Z', provenance: ['Warm-up'] },
    suppression: suppressionLegend(10),
    sections: [{
      id: 'warm-up',
      heading: 'Warm-up',
      blocks: [
        { kind: 'paragraph', runs: [word('Warm-up text, '), { kind: 'number', value: 1234.5, format: { style: 'decimal', decimals: 1, unit: 'USD' } }, word('.')] },
        {
          kind: 'table', id: 'warm-up-table', caption: 'Warm-up table',
          columns: [{ header: 'Row', align: 'left' }, { header: 'Value', align: 'right', format: { style: 'integer' } }],
          rows: [{ cells: [{ kind: 'text', text: 'A' }, { kind: 'number', value: 12 }] }, { cells: [{ kind: 'text', text: 'B' }, { kind: 'number', value: 34 }] }],
        },
        { kind: 'list', items: [[word('Warm-up item')]] },
        {
          kind: 'figure', id: 'warm-up-figure', caption: 'Warm-up figure', alt: 'Warm-up figure',
          chart: { kind: 'deltaSensitivity', effect: { label: 'Effect', unit: 'USD' }, points: [{ delta: 0.1, estimate: 1, low: 0, high: 2 }, { delta: 0.2, estimate: 1.5, low: 1, high: 2 }] },
        },
      ],
    }],
    footnotes: [],
  };
}

/**
 * Render the warm-up document in `formats`, one format at a time, stopping before the next step
 * once `stop()` says so (a call has arrived and takes the thread).
 */
export async function warmMemoRenderers(formats: readonly OutputFormat[], stop: () => boolean): Promise<void> {
  const doc = warmUpDocument();
  for (const f of formats) {
    if (stop()) return;
    await renderMemoDocument(doc, [f]);
  }
}
