// What the bundled command line loads (scripts/build-node.mjs, scripts/launch.mjs): `--help` and
// `check` must not load the memo libraries — pdfkit and @napi-rs/canvas (left outside the bundles)
// nor docx, exceljs and chart.js (bundled into chunks that load on first use). Each run goes
// through `npm run cli`'s own launcher with a loader hook that logs every module resolved
// (fixtures/load-log.mjs); a bundled library is recognised in a loaded chunk by the path comment
// esbuild writes above each module it bundles. A run that writes a memo is the control: there the
// same log shows them loaded. A static import of any of them on the way to `check` (in cli.ts,
// api.ts, memo-files.ts …) puts it in a chunk the CLI loads at start, and this test fails.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureNodeBundles } from '../../scripts/build-node.mjs';

const ROOT = join(import.meta.dirname, '..', '..');
const HOOK = join(import.meta.dirname, 'fixtures', 'load-log.mjs');
const STUDY = join(ROOT, 'sample-programs/apprentice-voucher/study.json');
const MEMO_LIBRARIES = ['pdfkit', '@napi-rs/canvas', 'docx', 'exceljs', 'chart.js'];
/** What only a run needs: the workspace store (native, left outside the bundles) and the estimators' distributions (@stdlib, bundled). */
const RUN_LIBRARIES = ['better-sqlite3', '@stdlib'];

/** Run the bundled CLI as `npm run cli` does, with the loader log; the libraries of MEMO_LIBRARIES it loaded. */
function librariesLoaded(args: string[], libraries = MEMO_LIBRARIES): { status: number | null; stderr: string; loaded: string[] } {
  const log = join(mkdtempSync(join(tmpdir(), 'fenceline-loads-')), 'loads.txt');
  const r = spawnSync(process.execPath, ['--import', HOOK, join(ROOT, 'scripts/launch.mjs'), 'cli', ...args], {
    cwd: ROOT, encoding: 'utf8', timeout: 180_000, env: { ...process.env, FENCELINE_LOAD_LOG: log },
  });
  let urls: string[] = [];
  try { urls = readFileSync(log, 'utf8').split('\n').filter(Boolean); } catch { /* nothing logged */ }
  const loaded = new Set<string>();
  for (const url of new Set(urls)) {
    if (!url.startsWith('file:')) continue;
    const file = fileURLToPath(url);
    for (const lib of libraries) if (file.includes(`node_modules/${lib}/`)) loaded.add(lib);
    if (file.includes('/dist-node/')) {
      const text = readFileSync(file, 'utf8');
      for (const lib of libraries) {
        if (new RegExp(`^// \\S*node_modules/${lib.replace('.', '\\.')}/`, 'm').test(text)) loaded.add(lib);
      }
    }
  }
  return { status: r.status, stderr: r.stderr, loaded: [...loaded].sort() };
}

beforeAll(async () => { await ensureNodeBundles({ quiet: true }); }, 120_000);

describe('the bundled command line loads the memo libraries only when it writes a memo', () => {
  it('--help loads none of pdfkit, @napi-rs/canvas, docx, exceljs, chart.js', () => {
    const r = librariesLoaded(['--help']);
    expect(r.status, r.stderr).toBe(0);
    expect(r.loaded).toEqual([]);
  });

  it('check loads none of them', () => {
    const r = librariesLoaded(['check', STUDY, '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    expect(r.loaded).toEqual([]);
  });

  it('check loads neither the workspace store nor the estimators (api/check.ts, pipeline/prepare-study.ts)', () => {
    const r = librariesLoaded(['check', STUDY, '--quiet'], RUN_LIBRARIES);
    expect(r.status, r.stderr).toBe(0);
    expect(r.loaded).toEqual([]);
  });

  it('the control: a run writing every memo format loads all five (so the log does see them)', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'fenceline-memo-')), 'out');
    const r = librariesLoaded(['evaluate', STUDY, '--out', out, '--deltas', '0.1', '--workers', '0', '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    expect(r.loaded).toEqual([...MEMO_LIBRARIES].sort());
    const run = librariesLoaded(['evaluate', STUDY, '--out', `${out}-2`, '--deltas', '0.1', '--workers', '0', '--formats', 'none', '--quiet'], RUN_LIBRARIES);
    expect(run.loaded).toEqual([...RUN_LIBRARIES].sort());
  }, 180_000);
});
