// Child process for kill.test.ts (not a test itself): imports a large dataset into the
// workspace given as argv[2], prints "halfway" once half the chunks are written, then slows
// down so the parent's SIGKILL lands inside the import transaction. Prints "finished" if the
// import ever completes (which the test treats as a failure to interrupt).

import { openWorkspace } from '../../main/store/workspace.ts';

const file = process.argv[2];
if (file === undefined) throw new Error('usage: kill-import-child.ts <workspace file>');

const ROWS = 1_000_000; // half the chunks (36 MB) exceed SQLite's page cache, so part reaches the WAL file
const COLUMNS = 8;
const rowNumbers = new Int32Array(ROWS);
for (let i = 0; i < ROWS; i++) rowNumbers[i] = i + 2;
const columns = Array.from({ length: COLUMNS }, (_, c) => {
  const v = new Float64Array(ROWS);
  for (let i = 0; i < ROWS; i++) v[i] = c * ROWS + i;
  return { name: `X${c}`, kind: 'f64' as const, values: v };
});

const opened = openWorkspace(file);
if (!opened.ok) {
  process.stdout.write('open failed: ' + JSON.stringify(opened.problems) + '\n');
  process.exit(2);
}
const pause = new Int32Array(new SharedArrayBuffer(4));
let signalled = false;
const result = opened.value.importDataset(
  { sourceName: 'big.csv', sheet: null, sha256: 'f'.repeat(64), importedAt: '2025-03-01T10:00:00Z', rowNumbers, columns },
  {
    onProgress: ({ done, total }) => {
      if (!signalled && done >= total / 2) {
        signalled = true;
        process.stdout.write('halfway\n'); // a pipe: written synchronously on POSIX
      }
      if (signalled) Atomics.wait(pause, 0, 0, 100); // sleep 100 ms per remaining chunk
    },
  },
);
process.stdout.write(result.ok ? 'finished\n' : 'failed\n');
opened.value.close();
