// Outputs never replace inputs: before a run's files are written, every output path is compared
// with the study's inputs (the study and program files, the data files it names, the workspace
// database) after resolving symbolic links and, where the file system ignores letter case, without
// regard to case — so `--out` set to the study's own folder cannot overwrite its units.csv, and a
// study named results.json in the output folder is not replaced by the results.

import { realpathSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { Problem } from '../rules/types.ts';

const CASE_INSENSITIVE = process.platform === 'win32' || process.platform === 'darwin';

/**
 * An absolute path with every existing part's symbolic links resolved (the rest appended as
 * typed). realpath (native) also returns an existing file's own letter case on a case-insensitive
 * file system; the lower-casing covers names that do not exist yet.
 */
export function canonicalPath(p: string): string {
  let abs = resolve(p);
  const tail: string[] = [];
  for (;;) {
    try {
      abs = join(realpathSync.native(abs), ...tail.reverse());
      break;
    } catch {
      const parent = dirname(abs);
      if (parent === abs) { abs = join(abs, ...tail.reverse()); break; }
      tail.push(basename(abs));
      abs = parent;
    }
  }
  return CASE_INSENSITIVE ? abs.toLowerCase() : abs;
}

export interface RunInput {
  path: string;
  /** What the file is to the study, for the message ("the data file", "the study file"). */
  role: string;
}

/** One problem naming every output that would replace an input (none: an empty list). */
export function inputClashes(outDir: string, outputNames: readonly string[], inputs: readonly RunInput[]): Problem[] {
  const byPath = new Map(inputs.map((i) => [canonicalPath(i.path), i]));
  const hits = outputNames.flatMap((name) => {
    const input = byPath.get(canonicalPath(join(outDir, name)));
    return input ? [`${name} would replace ${input.role} ${resolve(input.path)}`] : [];
  });
  if (!hits.length) return [];
  return [{ path: 'outDir', message: `The output folder holds the study's own files: ${hits.join('; ')}. Nothing was written. Choose another output folder (--out).` }];
}
