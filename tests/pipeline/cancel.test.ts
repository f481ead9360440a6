// Cancel means cancel: aborted in any stage — reading the workbook, the propensity stage,
// estimation, the checks, rendering the memo — a run answers "cancelled" within a second, writes
// no result file and records no run.

import { existsSync, mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import type { ProgressEvent } from '../../main/contract/api.ts';
import { openWorkspace } from '../../main/store/workspace.ts';
import { SAMPLES_DIR } from '../../main/resources.ts';

// The demo sample: a roster workbook joined to a payment list and an outcome file (invented data).
const studyPath = join(SAMPLES_DIR, 'winter-credit', 'study.json');

async function cancelAt(stage: string) {
  const outDir = join(mkdtempSync(join(tmpdir(), 'fenceline-cancel-out-')), 'run');
  const workspacePath = join(mkdtempSync(join(tmpdir(), 'fenceline-cancel-ws-')), 'w.fenceline');
  const controller = new AbortController();
  let abortedAt = 0;
  const seen: string[] = [];
  const onProgress = (p: ProgressEvent) => {
    if (!seen.includes(p.stage)) seen.push(p.stage);
    if (p.stage === stage && !controller.signal.aborted) { abortedAt = performance.now(); controller.abort(); }
  };
  const r = await evaluateStudy({ studyPath, outDir, formats: ['pdf', 'html', 'docx', 'xlsx'], workspacePath, workers: 0 }, { signal: controller.signal, onProgress });
  const answeredAfter = performance.now() - abortedAt;
  const ws = openWorkspace(workspacePath);
  const runs = ws.ok ? ws.value.listRuns() : null;
  if (ws.ok) ws.value.close();
  return { r, answeredAfter, seen, files: existsSync(outDir) ? readdirSync(outDir) : [], runs: runs?.ok ? runs.value : [] };
}

describe('cancelling a run', () => {
  it.each(['import', 'propensity', 'estimate', 'checks', 'memo'])('during "%s": cancelled within a second, no file, no run', async (stage) => {
    const { r, answeredAfter, seen, files, runs } = await cancelAt(stage);
    expect(seen).toContain(stage);
    expect(r.ok ? 'finished' : r.error.kind).toBe('cancelled');
    expect(answeredAfter).toBeLessThan(1000);
    expect(files).toEqual([]);
    expect(runs).toEqual([]);
  }, 60_000);
});
