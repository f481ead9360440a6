// The desktop app's bundles (scripts/build-electron.mjs, electron.config.ts), built here without
// the Electron runtime: every entry is written, the sandboxed preload is CommonJS that requires
// nothing but `electron`, the main bundle leaves Electron and the native modules outside, and the
// bundled job worker runs a whole sample study in plain Node — starting the bundled propensity
// worker beside it, reading the sample folder, writing a PDF through the external pdfkit.

import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import config from '../../electron.config.ts';
import { buildElectron } from '../../scripts/build-electron.mjs';
import { callApi } from '../../main/api.ts';
import { createWorkerRunner } from '../../main/host/worker-runner.ts';
import type { EvaluateReport } from '../../main/contract/api.ts';

const dist = join(import.meta.dirname, '..', '..', config.outDir);
const read = (out: string) => readFileSync(join(dist, out), 'utf8');

beforeAll(async () => { await buildElectron({ renderer: false, quiet: true }); }, 60_000);

describe('the bundles', () => {
  it('exist for main, preload and both workers, as electron.config.ts names them', () => {
    const outs = config.entries.filter((e) => e.target !== 'renderer').map((e) => e.out);
    expect(outs).toEqual(expect.arrayContaining(['main.js', 'preload.js', 'worker.js', 'job-worker.js']));
    for (const out of outs) expect(existsSync(join(dist, out)), out).toBe(true);
  });

  it('ship no source maps (they would hand out the sources)', () => {
    const outs = config.entries.filter((e) => e.target !== 'renderer').map((e) => e.out);
    for (const out of outs) {
      expect(existsSync(join(dist, `${out}.map`)), out).toBe(false);
      expect(read(out), out).not.toMatch(/sourceMappingURL/);
    }
  });

  it('the preload is CommonJS and requires nothing but electron (a sandboxed preload can load nothing else)', () => {
    const text = read('preload.js');
    const required = [...text.matchAll(/\brequire\s*\(\s*([^)]*)\)/g)].map((m) => m[1]!.trim());
    expect(required.length).toBeGreaterThan(0);
    expect(new Set(required)).toEqual(new Set(['"electron"']));
    expect(text).not.toMatch(/^\s*(import|export)\s/m);
    expect(text).toContain('exposeInMainWorld');
  });

  it('main is an ES module that imports Electron and the native modules from outside the bundle', () => {
    const text = read('main.js');
    expect(text).toMatch(/from\s*"electron"/);
    expect(text).toMatch(/["']better-sqlite3["']/);
    expect(text).toContain('job-worker.js');
  });
});

describe('the bundled job worker, in plain Node', () => {
  it('runs the demo study and writes its memo, with the bundled propensity worker beside it', async () => {
    const runner = createWorkerRunner({ workerUrl: pathToFileURL(join(dist, 'job-worker.js')) });
    const outDir = join(mkdtempSync(join(tmpdir(), 'fenceline-bundle-')), 'out');
    const r = await callApi('demo.run', { outDir, formats: ['pdf'], workers: 2 }, { runInWorker: runner });
    expect(r, JSON.stringify(!r.ok && r.error)).toMatchObject({ ok: true });
    const report = (r as { value: EvaluateReport }).value;
    expect(report.results.study.rowsUsed).toBeGreaterThan(10_000);
    expect(readFileSync(join(outDir, 'memo.pdf')).subarray(0, 5).toString('latin1')).toBe('%PDF-');
  });
});
