// A run killed at any step of its final write leaves either a complete recorded run with all its
// files, or a run recorded as 'writing' (shown as incomplete) — never result files with no run,
// never a complete run with a file missing (pipeline/record.ts: record first, write, then finish).

import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { openWorkspace } from '../../main/store/workspace.ts';
import { writeFixture } from '../report/memo-fixture.ts';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '..', '..');
const studyPath = writeFixture(1500);

/** Run the child and SIGKILL it when it announces point `k` (never, for k = 0). */
function runAndKillAt(k: number, outDir: string, workspacePath: string): Promise<{ output: string; killed: boolean }> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, ['--import', 'tsx', join(here, 'kill-write-child.ts'), studyPath, outDir, workspacePath], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    let errors = '';
    let killed = false;
    const timer = setTimeout(() => { child.kill('SIGKILL'); fail(new Error(`child did not finish: ${errors}`)); }, 90_000);
    child.stdout.setEncoding('utf8');
    child.stdout.on('data', (chunk: string) => {
      output += chunk;
      if (k > 0 && !killed && output.includes(`point ${k} `)) { killed = true; child.kill('SIGKILL'); }
    });
    child.stderr.on('data', (c: Buffer) => { errors += c.toString(); });
    child.on('exit', () => { clearTimeout(timer); done({ output, killed }); });
  });
}

function invariant(outDir: string, workspacePath: string) {
  const finals = existsSync(outDir) ? readdirSync(outDir).filter((f) => !f.endsWith('.part')) : [];
  const opened = openWorkspace(workspacePath);
  if (!opened.ok) throw new Error(JSON.stringify(opened.problems));
  const ws = opened.value;
  try {
    expect(ws.checkIntegrity().ok).toBe(true);
    const runs = ws.listRuns();
    if (!runs.ok) throw new Error('runs');
    if (finals.length) expect(runs.value.length).toBe(1); // files on disk always have their run
    for (const r of runs.value) {
      const full = ws.getRun(r.runId);
      if (!full.ok) throw new Error('run');
      if (full.value.status === 'complete') for (const f of full.value.files) expect(existsSync(f)).toBe(true);
      expect(full.value.hasUnits).toBe(true);
    }
    return { finals, statuses: runs.value.map((r) => r.status) };
  } finally {
    ws.close();
  }
}

describe('a run killed during its final write', () => {
  it('leaves a complete run or one marked as writing, at every step', async () => {
    const base = mkdtempSync(join(tmpdir(), 'fenceline-killw-'));
    const whole = await runAndKillAt(0, join(base, 'whole'), join(base, 'whole.fenceline'));
    const steps = whole.output.split('\n').filter((l) => l.startsWith('point ')).length;
    expect(whole.output).toMatch(/finished run 1/);
    expect(steps).toBe(8); // 4 files (results.json, units.csv, memo.html, tables.xlsx): written, then renamed
    expect(invariant(join(base, 'whole'), join(base, 'whole.fenceline'))).toEqual({ finals: expect.any(Array), statuses: ['complete'] });
    // The first and last temporary write, the first and last rename into place.
    for (const k of [1, steps / 2, steps / 2 + 1, steps]) {
      const out = join(base, `k${k}`);
      const { killed } = await runAndKillAt(k, out, join(base, `k${k}.fenceline`));
      expect(killed).toBe(true);
      const { finals, statuses } = invariant(out, join(base, `k${k}.fenceline`));
      expect(statuses).toEqual(['writing']); // killed before it could be marked complete
      // each point is announced before its step: up to the first rename nothing is in place yet;
      // killed before the last rename, all files but one are
      expect(finals.length).toBe(k <= steps / 2 + 1 ? 0 : k - steps / 2 - 1);
    }
  }, 300_000);
});
