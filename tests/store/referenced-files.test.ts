// Referenced files (schema 5): a streamed data file known by path and SHA-256, recorded once per
// (path, hash), refused with one message per bad field.

import { describe, expect, it } from 'vitest';
import { must, openFresh, problemsOf, SHA } from './helpers.ts';

describe('referenced files', () => {
  it('records a file once per path and hash, and lists it', () => {
    const ws = openFresh();
    const input = { path: '/data/rebate.parquet', sha256: SHA, bytes: 470_000_000, rows: 20_000_000, format: 'parquet' as const };
    const first = must(ws.referenceFile(input));
    expect(must(ws.referenceFile(input))).toBe(first);
    const other = must(ws.referenceFile({ ...input, sha256: 'b'.repeat(64) }));
    expect(other).not.toBe(first);
    expect(must(ws.listReferencedFiles()).map((f) => [f.id, f.rows, f.format])).toEqual([[first, 20_000_000, 'parquet'], [other, 20_000_000, 'parquet']]);
    ws.close();
  });
  it('refuses a bad hash, a negative size and an unknown format, each named', () => {
    const ws = openFresh();
    const problems = problemsOf(ws.referenceFile({ path: '/x.parquet', sha256: 'abc', bytes: -1, rows: 3, format: 'xlsx' as never }));
    expect(problems.map((p) => p.path)).toEqual(['sha256', 'bytes', 'format']);
    ws.close();
  });
});
