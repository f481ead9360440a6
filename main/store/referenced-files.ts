// Data files the workspace knows by path and SHA-256 (FIPS 180-4) without holding their bytes:
// a file beyond one sheet (Parquet, a large CSV) stays where the agency keeps it, and the
// workspace says which file, in which exact version, a streamed evaluation read (schema 5).

import { read, write, type StoreContext } from './context.ts';
import { fail, ok } from './problems.ts';
import type { Checked, Problem, ReferencedFile, ReferencedFileInput } from './types.ts';
import { checkSha256, checkText } from './validate.ts';

const FORMATS = ['parquet', 'csv'] as const;

/** Record the file (or find its record: the same path and hash are recorded once); its id. */
export function referenceFile(ctx: StoreContext, input: ReferencedFileInput): Checked<number> {
  const problems: Problem[] = [];
  const i = input as unknown as Record<string, unknown>;
  checkText(i.path, 'path', 'The file path', problems);
  checkSha256(i.sha256, 'sha256', 'The file hash', problems);
  for (const key of ['bytes', 'rows'] as const) {
    if (!Number.isSafeInteger(i[key]) || (i[key] as number) < 0) problems.push({ path: key, message: `The file's ${key === 'bytes' ? 'size in bytes' : 'row count'} must be a whole number, 0 or more.` });
  }
  if (!FORMATS.includes(i.format as (typeof FORMATS)[number])) problems.push({ path: 'format', message: 'The file format must be "parquet" or "csv".' });
  if (problems.length) return { ok: false, problems };
  return write(ctx, 'record the data file', () => {
    ctx.db.prepare('INSERT OR IGNORE INTO referenced_files (path, sha256, bytes, rows, format, recorded_at) VALUES (?, ?, ?, ?, ?, ?)')
      .run(input.path, input.sha256, input.bytes, input.rows, input.format, ctx.now());
    const row = ctx.db.prepare('SELECT id FROM referenced_files WHERE path = ? AND sha256 = ?').get(input.path, input.sha256) as { id: number } | undefined;
    return row ? ok(row.id) : fail('The data file could not be recorded in the workspace.');
  });
}

export function listReferencedFiles(ctx: StoreContext): Checked<ReferencedFile[]> {
  return read(ctx, 'list the data files', () => {
    const rows = ctx.db.prepare('SELECT id, path, sha256, bytes, rows, format, recorded_at AS recordedAt FROM referenced_files ORDER BY id').all() as ReferencedFile[];
    return ok(rows);
  });
}
