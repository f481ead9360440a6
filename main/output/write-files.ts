// Writing a run's files into the output folder so that nothing half-written looks complete:
// every file is first written under a temporary name in the same folder, and only when all of
// them are written are they renamed into place (a rename within one folder is atomic on POSIX
// file systems and on NTFS). Whatever happens — a full disk (ENOSPC) in the middle of a file
// included — every temporary file is removed in a `finally`. A folder that cannot take the files
// (read-only, no permission, a file, a full disk) is an input problem with a plain message, not a
// fault: the analyst chooses another folder.

import { accessSync, constants, existsSync, mkdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { Checked } from '../rules/types.ts';

export interface OutputFile {
  name: string;
  content: string | Uint8Array;
}

export interface WriteOptions {
  /** The function that writes one file (node:fs writeFileSync; tests inject a failing one). */
  writeFile?: (path: string, content: string | Uint8Array) => void;
}

/** A folder that cannot take the files, in the analyst's words (the error's code kept for the log). */
export class OutputFolderError extends Error {
  constructor(message: string, readonly code: string | undefined) {
    super(message);
    this.name = 'OutputFolderError';
  }
}

function folderMessage(dir: string, e: unknown): string {
  const code = (e as NodeJS.ErrnoException).code;
  switch (code) {
    case 'EACCES': case 'EPERM':
      return `The output folder ${dir} cannot be written: you do not have permission. Choose another folder (--out).`;
    case 'EROFS':
      return `The output folder ${dir} is on a read-only disk. Choose another folder (--out).`;
    case 'ENOTDIR': case 'EEXIST':
      return `${dir} is a file, not a folder (or a part of its path is). Choose a folder for the outputs (--out).`;
    case 'ENOSPC': case 'EDQUOT':
      return `The disk holding ${dir} is full; nothing was written. Free some space or choose another folder (--out).`;
    case 'ENAMETOOLONG':
      return `The output folder's path is too long: ${dir}. Choose a shorter one (--out).`;
    default:
      return `The outputs could not be written to ${dir} (${code ?? 'write error'}). Choose another folder (--out).`;
  }
}

/**
 * A recursive mkdir on a read-only disk reports ENOENT (the folder it could not make); the
 * nearest folder that exists says why (EROFS, EACCES).
 */
function whyNoFolder(dir: string, e: unknown): unknown {
  if ((e as NodeJS.ErrnoException).code !== 'ENOENT') return e;
  for (let at = dirname(dir); ; at = dirname(at)) {
    if (existsSync(at)) {
      try { accessSync(at, constants.W_OK); } catch (why) { return why; }
      return e;
    }
    if (dirname(at) === at) return e;
  }
}

/** Write every file or none; a folder problem comes back as a message. */
export function writeOutputFiles(dir: string, files: OutputFile[], options: WriteOptions = {}): Checked<string[]> {
  try {
    return { ok: true, value: writeFilesAtomically(dir, files, options) };
  } catch (e) {
    if (e instanceof OutputFolderError) return { ok: false, problems: [{ path: 'outDir', message: e.message }] };
    throw e;
  }
}

export function writeFilesAtomically(dir: string, files: OutputFile[], options: WriteOptions = {}): string[] {
  const write = options.writeFile ?? ((p: string, c: string | Uint8Array) => writeFileSync(p, c));
  const fsError = (e: unknown) => ((e as NodeJS.ErrnoException)?.code ? new OutputFolderError(folderMessage(dir, e), (e as NodeJS.ErrnoException).code) : e);
  try {
    mkdirSync(dir, { recursive: true });
    if (!statSync(dir).isDirectory()) throw Object.assign(new Error('not a folder'), { code: 'ENOTDIR' });
  } catch (e) {
    throw fsError(whyNoFolder(dir, e));
  }
  const tag = `.fenceline-${process.pid}-${Date.now().toString(36)}`;
  const temps: Array<[string, string]> = [];
  let renamed = 0;
  try {
    for (const f of files) {
      const temp = join(dir, `${tag}-${f.name}.part`);
      // Listed before writing: a write that fails half-way (a full disk) leaves a file to remove.
      temps.push([temp, join(dir, f.name)]);
      write(temp, f.content);
    }
    for (const [temp, final] of temps) { renameSync(temp, final); renamed++; }
  } catch (e) {
    throw fsError(e);
  } finally {
    for (const [temp] of temps.slice(renamed)) {
      try { rmSync(temp, { force: true }); } catch { /* the first error is the one to report */ }
    }
  }
  return temps.map(([, final]) => final);
}
