// A process killed in the middle of an import must leave a consistent workspace with no part
// of the dataset visible: SQLite's WAL commit is atomic (https://www.sqlite.org/wal.html,
// "Atomic Commit"), and the import is one transaction that sets complete = 1 last.

import Database from 'better-sqlite3';
import { spawn } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { must, openFresh, simpleDataset, tempWorkspacePath } from './helpers.ts';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '..', '..');

function runChildAndKillAtHalfway(file: string): Promise<{ output: string; signal: NodeJS.Signals | null }> {
  return new Promise((resolvePromise, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', join(here, 'kill-import-child.ts'), file], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    let errors = '';
    const timer = setTimeout(() => { child.kill('SIGKILL'); reject(new Error('child never reached halfway: ' + errors)); }, 12_000);
    child.stdout.setEncoding('utf8');
    child.stdout.on('data', (chunk: string) => {
      output += chunk;
      if (output.includes('halfway')) child.kill('SIGKILL');
    });
    child.stderr.on('data', (chunk: Buffer) => { errors += chunk.toString(); });
    child.on('error', reject);
    child.on('exit', (_code, signal) => { clearTimeout(timer); resolvePromise({ output, signal }); });
  });
}

describe('an import killed half way', () => {
  it('leaves no partial dataset and a file that passes the integrity check', async () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const kept = must(ws.importDataset(simpleDataset(1000)));
    ws.close();

    const { output, signal } = await runChildAndKillAtHalfway(file);
    expect(signal).toBe('SIGKILL');
    expect(output).toContain('halfway');
    expect(output).not.toContain('finished'); // the kill did land inside the import
    // Half the chunks (36 MB) overflowed the page cache into the write-ahead log, uncommitted.
    expect(existsSync(file + '-wal')).toBe(true);
    expect(statSync(file + '-wal').size).toBeGreaterThan(5_000_000);


    const again = openFresh(file);
    expect(must(again.listDatasets()).map((d) => d.datasetId)).toEqual([kept]);
    const back = must(again.loadDataset(kept));
    expect(Array.from(back.columns[0]!.values as Float64Array).slice(0, 3)).toEqual([-7, -5.5, -4]);
    must(again.checkIntegrity());
    again.close();

    const raw = new Database(file, { readonly: true });
    expect(raw.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(raw.prepare('SELECT COUNT(*) AS n FROM datasets').get()).toEqual({ n: 1 });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM dataset_chunks WHERE dataset_id <> ?').get(kept)).toEqual({ n: 0 });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM dataset_columns WHERE dataset_id <> ?').get(kept)).toEqual({ n: 0 });
    raw.close();
  }, 15_000);
});
