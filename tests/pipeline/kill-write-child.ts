// Child process for kill-write.test.ts: evaluates a study into a workspace, announcing each step
// of the final write (every file written under its temporary name, every rename into place) on
// stdout and pausing there, so the parent can kill it at exactly that point.
// Usage: node --import tsx kill-write-child.ts <study.json> <outDir> <workspace file>

import fs from 'node:fs';
import { syncBuiltinESMExports } from 'node:module';
import { evaluateStudy } from '../../main/api/evaluate.ts';

const [studyPath, outDir, workspacePath] = process.argv.slice(2) as [string, string, string];
const pause = new Int32Array(new SharedArrayBuffer(4));
let point = 0;
const announce = (what: string) => {
  point++;
  process.stdout.write(`point ${point} ${what}\n`);
  Atomics.wait(pause, 0, 0, 400); // hold still so the parent's kill lands here
};
const write = fs.writeFileSync;
const rename = fs.renameSync;
fs.writeFileSync = ((...args: Parameters<typeof write>) => { if (String(args[0]).startsWith(outDir)) announce('write'); return write(...args); }) as typeof write;
fs.renameSync = ((...args: Parameters<typeof rename>) => { if (String(args[1]).startsWith(outDir)) announce('rename'); return rename(...args); }) as typeof rename;
syncBuiltinESMExports();

const r = await evaluateStudy({ studyPath, outDir, formats: ['html', 'xlsx'], workspacePath, workers: 0 });
process.stdout.write(r.ok ? `finished run ${r.value.runId}\n` : `refused ${JSON.stringify(r.error)}\n`);
