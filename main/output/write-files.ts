// Writing a run's files into the output folder so that nothing half-written looks complete:
// every file is first written under a temporary name in the same folder, and only when all of
// them are written are they renamed into place (a rename within one folder is atomic on POSIX
// file systems and on NTFS). On failure the temporary files are removed.

import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export interface OutputFile {
  name: string;
  content: string | Uint8Array;
}

export function writeFilesAtomically(dir: string, files: OutputFile[]): string[] {
  mkdirSync(dir, { recursive: true });
  const tag = `.fenceline-${process.pid}-${Date.now().toString(36)}`;
  const temps: Array<[string, string]> = [];
  try {
    for (const f of files) {
      const temp = join(dir, `${tag}-${f.name}.part`);
      writeFileSync(temp, f.content);
      temps.push([temp, join(dir, f.name)]);
    }
    for (const [temp, final] of temps) renameSync(temp, final);
  } catch (e) {
    for (const [temp] of temps) rmSync(temp, { force: true });
    throw e;
  }
  return temps.map(([, final]) => final);
}
