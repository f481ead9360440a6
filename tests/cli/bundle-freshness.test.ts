// When `npm run cli`/`npm run serve` rebuild their bundles first (scripts/build-node.mjs,
// bundlesAreFresh): a build into a scratch folder is fresh; it goes stale when a recorded input's
// time or size differs from the file's now (an edit; a copy that keeps an older time), when an
// input is gone, when an input was modified after the build began, when a chunk or an entry is
// missing, and when the checkout has moved. The sources themselves are not touched: the
// manifest's record is changed instead, which is the same comparison seen from the other side.

import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildNodeBundles, bundlesAreFresh, NODE_ENTRIES } from '../../scripts/build-node.mjs';

interface Manifest { root: string; startedAt: number; chunks: string[]; inputs: Record<string, [number, number]> }

const outDir = join(mkdtempSync(join(tmpdir(), 'fenceline-bundles-')), 'dist-node');
const manifestPath = join(outDir, 'inputs.json');
let original = '';
const edit = (change: (m: Manifest) => void) => {
  const m = JSON.parse(original) as Manifest;
  change(m);
  writeFileSync(manifestPath, JSON.stringify(m));
};

beforeAll(async () => {
  await buildNodeBundles({ outDir, quiet: true });
  original = readFileSync(manifestPath, 'utf8');
}, 120_000);

describe('bundlesAreFresh', () => {
  it('a build just made is fresh, and it records the sources it read (main/cli.ts, electron.config.ts) and no library file one by one', () => {
    writeFileSync(manifestPath, original);
    expect(bundlesAreFresh({ outDir })).toBe(true);
    const inputs = Object.keys((JSON.parse(original) as Manifest).inputs);
    expect(inputs).toEqual(expect.arrayContaining(['main/cli.ts', 'main/api.ts', 'electron.config.ts', 'package.json']));
    for (const f of inputs.filter((i) => i.includes('node_modules/'))) expect(f).toMatch(/node_modules\/(\.package-lock\.json|(@[^/]+\/)?[^/]+\/package\.json)$/);
    for (const e of NODE_ENTRIES) expect(existsSync(join(outDir, e.out)), e.out).toBe(true);
  });

  it('stale when a source\'s time differs from the recorded one, either way', () => {
    edit((m) => { m.inputs['main/cli.ts']![0] -= 1000; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
    edit((m) => { m.inputs['main/cli.ts']![0] += 1000; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
  });

  it('stale when a source\'s size differs (same time)', () => {
    edit((m) => { m.inputs['main/report/memo-files.ts']![1] += 1; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
  });

  it('stale when an input is gone, or was modified after the build began', () => {
    edit((m) => { m.inputs['main/no-longer-here.ts'] = [1, 1]; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
    edit((m) => { m.startedAt = m.inputs['main/cli.ts']![0]; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
  });

  it('stale when the checkout moved, or a chunk of the build is missing', () => {
    edit((m) => { m.root = '/somewhere/else'; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
    edit((m) => { m.chunks = [...m.chunks, 'chunk-GONE.js']; });
    expect(bundlesAreFresh({ outDir })).toBe(false);
    writeFileSync(manifestPath, original);
    expect(bundlesAreFresh({ outDir })).toBe(true);
  });

  it('stale when an entry or the manifest is missing', () => {
    writeFileSync(manifestPath, original);
    rmSync(join(outDir, 'worker.js'));
    expect(bundlesAreFresh({ outDir })).toBe(false);
    rmSync(manifestPath);
    expect(bundlesAreFresh({ outDir })).toBe(false);
  });
});
