// Browser mode from its bundles (scripts/build-node.mjs → dist-node/, started by scripts/launch.mjs
// as `npm run serve` does): the server prints its address and answers the api with the sample
// folder found from dist-node/ as from the sources; the bundled job worker runs a whole sample
// study in plain Node, starting the bundled propensity workers beside it (dist-node/worker.js)
// and loading the memo renderers' chunks on first use.

import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureNodeBundles, NODE_OUT_DIR } from '../../scripts/build-node.mjs';
import { callApi } from '../../main/api.ts';
import { createWorkerRunner } from '../../main/host/worker-runner.ts';
import type { EvaluateReport } from '../../main/contract/api.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const scratch = () => mkdtempSync(join(tmpdir(), 'fenceline-bundled-'));

beforeAll(async () => { await ensureNodeBundles({ quiet: true }); }, 120_000);

describe('npm run serve, from the bundles', () => {
  it('prints the address and answers the api (the sample programs found from dist-node/)', async () => {
    const child = spawn(process.execPath, [join(ROOT, 'scripts/launch.mjs'), 'serve', '--port', '0', '--workspace', join(scratch(), 'ws')], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    try {
      const url = await new Promise<string>((resolve, reject) => {
        let out = '';
        let err = '';
        child.stdout.on('data', (d: Buffer) => { out += d; const line = out.split('\n'); if (line.length > 1) resolve(line[0]!); });
        child.stderr.on('data', (d: Buffer) => { err += d; });
        child.on('exit', (code) => reject(new Error(`the server stopped (exit ${code}): ${err}`)));
      });
      const token = url.split('#token=')[1]!;
      const base = url.split('/#')[0]!;
      const r = await fetch(`${base}/api/call`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-fenceline-token': token }, body: JSON.stringify({ method: 'samples.list', args: {} }) });
      const body = await r.json() as { ok: boolean; value: { samples: Array<{ id: string }> } };
      expect(body.ok).toBe(true);
      expect(body.value.samples.map((s) => s.id)).toContain('winter-credit');
    } finally {
      child.kill('SIGTERM');
    }
  }, 60_000);
});

describe('the bundled server finds its job worker beside itself', () => {
  it('serve.js starts dist-node/job-worker.js (worker-runner.ts: the built file beside the module, else the tsx entry)', () => {
    // serve.js and the chunks it imports at start (from the build's manifest), all in dist-node/
    const manifest = JSON.parse(readFileSync(join(ROOT, NODE_OUT_DIR, 'inputs.json'), 'utf8')) as { entries: Record<string, { static: string[] }> };
    const files = ['serve.js', ...manifest.entries['serve.js']!.static.filter((f) => f.startsWith(`${NODE_OUT_DIR}/`)).map((f) => f.slice(NODE_OUT_DIR.length + 1))];
    const text = files.map((f) => readFileSync(join(ROOT, NODE_OUT_DIR, f), 'utf8')).join('\n');
    expect(text).toContain('new URL("./job-worker.js", import.meta.url)');
    expect(existsSync(join(ROOT, NODE_OUT_DIR, 'job-worker.js'))).toBe(true);
  });
});

describe('the bundled job worker, in plain Node', () => {
  it('runs the demo study and writes its memo, with the bundled propensity workers beside it', async () => {
    const runner = createWorkerRunner({ workerUrl: pathToFileURL(join(ROOT, NODE_OUT_DIR, 'job-worker.js')) });
    const outDir = join(scratch(), 'out');
    const r = await callApi('demo.run', { outDir, formats: ['pdf', 'xlsx'], workers: 2 }, { runInWorker: runner });
    expect(r, JSON.stringify(!r.ok && r.error)).toMatchObject({ ok: true });
    expect((r as { value: EvaluateReport }).value.results.study.rowsUsed).toBeGreaterThan(10_000);
    expect(readFileSync(join(outDir, 'memo.pdf')).subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(readFileSync(join(outDir, 'tables.xlsx')).subarray(0, 2).toString('latin1')).toBe('PK');
  }, 180_000);
});
