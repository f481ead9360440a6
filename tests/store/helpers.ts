// Shared helpers for the workspace tests: a fresh folder per test, unwrapping Checked results,
// and a small dataset with awkward values.

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach } from 'vitest';
import type { Checked, DatasetInput } from '../../main/store/types.ts';
import { openWorkspace } from '../../main/store/workspace.ts';

const made: string[] = [];
afterEach(() => {
  while (made.length > 0) rmSync(made.pop()!, { recursive: true, force: true });
});

/** A new empty folder, removed after the test. */
export function tempDir(): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-store-test-'));
  made.push(dir);
  return dir;
}

export function tempWorkspacePath(): string {
  return join(tempDir(), 'test.fenceline');
}

export function must<T>(r: Checked<T>): T {
  if (!r.ok) throw new Error('expected success, got: ' + r.problems.map((p) => `[${p.path}] ${p.message}`).join(' | '));
  return r.value;
}

export function problemsOf<T>(r: Checked<T>): Array<{ path: string; message: string }> {
  if (r.ok) throw new Error('expected problems, got success');
  return r.problems;
}

/** A clock that advances one second per call from 2025-01-01T00:00:00Z. */
export function steppingClock(): () => Date {
  let t = Date.UTC(2025, 0, 1);
  return () => new Date((t += 1000));
}

export function openFresh(path = tempWorkspacePath()) {
  return must(openWorkspace(path, { softwareVersion: '0.1.0-test', now: steppingClock() }));
}

export const SHA = '0123456789abcdef'.repeat(4);

/** `n` rows with one column of each kind; values from a plain formula so they are easy to check. */
export function simpleDataset(n: number): DatasetInput {
  const income = new Float64Array(n);
  const size = new Int32Array(n);
  const id: string[] = [];
  const rowNumbers = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    income[i] = i * 1.5 - 7;
    size[i] = (i % 7) - 3;
    id.push(`ID-${i}`);
    rowNumbers[i] = i + 2;
  }
  return {
    sourceName: 'applicants.xlsx', sheet: 'Applicants', sha256: SHA, importedAt: '2025-03-01T10:00:00.000Z', rowNumbers,
    columns: [
      { name: 'HH_INCOME', kind: 'f64', values: income },
      { name: 'HH_SIZE', kind: 'i32', values: size },
      { name: 'APPLICANT_ID', kind: 'text', values: id },
    ],
  };
}

/** A clock the test sets by hand. */
export function manualClock(start: string): { now: () => Date; set: (iso: string) => void } {
  let t = new Date(start);
  return { now: () => t, set: (iso) => { t = new Date(iso); } };
}
