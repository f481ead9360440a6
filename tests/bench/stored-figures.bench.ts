// Benchmark of the figures drawn from a stored run (issue 11: the app's map and edge figures
// redraw from the stored run in under a second). Prints figures and ratios; asserts nothing.
//
// Workload: the winter-credit sample program (invented data, about 20,000 units, three deltas),
// evaluated once into a fresh workspace. Then, in the same process: figure.map at each delta and
// with the axes swapped, and figure.edge, each from the stored run; the comparator is the study
// run itself (what a redraw cost before runs were stored).

import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { callApi } from '../../main/api.ts';
import { workspaceLayout } from '../../main/api/host.ts';
import type { EvaluateReport } from '../../main/contract/api.ts';
import { SAMPLES_DIR } from '../../main/resources.ts';

const workspaceDir = mkdtempSync(join(tmpdir(), 'fenceline-bench-figures-'));
const studyPath = join(SAMPLES_DIR, 'winter-credit', 'study.json');

const t0 = performance.now();
const r = await callApi('study.evaluate', { studyPath, outDir: join(workspaceDir, 'runs', 'bench'), formats: [], workspacePath: workspaceLayout(workspaceDir).workspacePath, workers: 0 });
const runSeconds = (performance.now() - t0) / 1000;
if (!r.ok) throw new Error(JSON.stringify(r.error));
const runId = (r.value as EvaluateReport).runId!;

async function timed(label: string, method: string, args: Record<string, unknown>): Promise<number> {
  const start = performance.now();
  const answer = await callApi(method, { runId, ...args }, { workspaceDir });
  const seconds = (performance.now() - start) / 1000;
  if (!answer.ok) throw new Error(`${label}: ${JSON.stringify(answer.error)}`);
  console.log(`${label.padEnd(44)} ${seconds.toFixed(3)} s  (${(seconds / runSeconds).toFixed(3)}× the study run)`);
  return seconds;
}

console.log(`study run (comparator, once)                 ${runSeconds.toFixed(3)} s`);
const times = [
  await timed('figure.map, headline delta (first call)', 'figure.map', {}),
  await timed('figure.map, delta 0.05', 'figure.map', { delta: 0.05 }),
  await timed('figure.map, delta 0.2', 'figure.map', { delta: 0.2 }),
  await timed('figure.map, axes swapped', 'figure.map', { axes: { x: 'age', y: 'income' } }),
  await timed('figure.edge (distance and density)', 'figure.edge', {}),
];
console.log(`slowest redraw ${Math.max(...times).toFixed(3)} s (target < 1 s); ${(Math.max(...times) / runSeconds).toFixed(3)}× the study run`);
