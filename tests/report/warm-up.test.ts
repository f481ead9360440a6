// The document an idle job worker renders to warm the memo renderers up (main/report/warm-up.ts):
// every format renders it (a refusal would only be logged by the worker, so it is caught here).
import { describe, expect, it } from 'vitest';
import { renderMemoDocument } from '../../main/report/memo-files.ts';
import { warmMemoRenderers, warmUpDocument } from '../../main/report/warm-up.ts';

describe('warm-up document', () => {
  it('renders in every memo format', async () => {
    const files = await renderMemoDocument(warmUpDocument(), ['pdf', 'html', 'docx', 'xlsx']);
    expect(files.map((f) => f.name)).toEqual(['memo.pdf', 'memo.html', 'memo.docx', 'tables.xlsx']);
    for (const f of files) expect(f.content.length).toBeGreaterThan(500);
  });

  it('stops before the next format once asked', async () => {
    let steps = 0;
    await warmMemoRenderers(['html', 'xlsx', 'pdf'], () => steps++ >= 1);
    expect(steps).toBe(2); // asked before html (go on), then before xlsx (stop)
  });
});
