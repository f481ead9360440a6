// Datasets: bit-for-bit round trips over several chunks, listing, deletion, progress, input
// checks, and that a failed import leaves nothing behind. Awkward values are the IEEE 754-2019
// special cases (signed zero, infinities, NaN, the smallest subnormal, the largest finite) and
// the 32-bit two's-complement extremes.

import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CHUNK_ROWS } from '../../main/store/column-codec.ts';
import type { DatasetInput, StoreProgress } from '../../main/store/types.ts';
import { must, openFresh, problemsOf, SHA, simpleDataset, tempWorkspacePath } from './helpers.ts';

const bytesOf = (a: Float64Array | Int32Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

/** More rows than two chunks, so chunk boundaries and the short last chunk are exercised. */
const N = 2 * DEFAULT_CHUNK_ROWS + 17;

function awkwardDataset(): DatasetInput {
  const x = new Float64Array(N);
  for (let i = 0; i < N; i++) x[i] = Math.sin(i) * 1e5;
  const specials = [Number.NaN, Infinity, -Infinity, -0, 0, 5e-324, Number.MAX_VALUE, -Number.MAX_VALUE, 0.1 + 0.2];
  specials.forEach((v, k) => { x[k] = v; x[DEFAULT_CHUNK_ROWS - 1 + k] = v; x[N - 1 - k] = v; });
  // A quiet NaN with a payload, written as bits so no JavaScript number conversion touches it.
  new DataView(x.buffer).setBigUint64(8 * 20, 0x7ff8_0000_dead_beefn, true);

  const n = new Int32Array(N);
  for (let i = 0; i < N; i++) n[i] = (i * 2654435761) | 0;
  n[0] = -2147483648; n[1] = 2147483647; n[2] = 0; n[3] = -1;

  const t: string[] = Array.from({ length: N }, (_, i) => (i % 5 === 0 ? '' : `unit ${i}`));
  const unicode = ['', 'Zoë Ødegård', '北京市', '👩‍👩‍👧', 'e\u0301', '\u200b', '"quoted", comma', 'line\nbreak'];
  unicode.forEach((s, k) => { t[k] = s; t[DEFAULT_CHUNK_ROWS + k] = s; });

  const rowNumbers = Int32Array.from({ length: N }, (_, i) => i + 2);
  return {
    sourceName: 'applicants 2025.xlsx', sheet: 'Applicants', sha256: SHA, importedAt: '2025-03-01T10:00:00.000Z', rowNumbers,
    columns: [
      { name: 'ARREARS', kind: 'f64', values: x },
      { name: 'HH_SIZE', kind: 'i32', values: n },
      { name: 'NOTES', kind: 'text', values: t },
    ],
    notes: { rowsRead: N, excluded: [{ row: 7, reason: 'income missing' }], firstStageF: Number.NaN },
  };
}

describe('datasets', () => {
  it('come back bit for bit across chunks (f64 specials and NaN payloads, i32 extremes, Unicode and empty text)', () => {
    const file = tempWorkspacePath();
    const input = awkwardDataset();
    const ws = openFresh(file);
    const id = must(ws.importDataset(input));
    ws.close();

    const again = openFresh(file);
    const back = must(again.loadDataset(id));
    again.close();
    expect(back.datasetId).toBe(id);
    expect([back.sourceName, back.sheet, back.sha256, back.importedAt]).toEqual([input.sourceName, input.sheet, input.sha256, input.importedAt]);
    expect(bytesOf(back.rowNumbers).equals(bytesOf(input.rowNumbers))).toBe(true);
    expect(back.columns.map((c) => [c.name, c.kind])).toEqual([['ARREARS', 'f64'], ['HH_SIZE', 'i32'], ['NOTES', 'text']]);
    const [x, n, t] = back.columns;
    expect(x!.values).toBeInstanceOf(Float64Array);
    expect(bytesOf(x!.values as Float64Array).equals(bytesOf(input.columns[0]!.values as Float64Array))).toBe(true);
    expect(Object.is((x!.values as Float64Array)[3], -0)).toBe(true);
    expect(n!.values).toBeInstanceOf(Int32Array);
    expect(bytesOf(n!.values as Int32Array).equals(bytesOf(input.columns[1]!.values as Int32Array))).toBe(true);
    expect(t!.values).toEqual(input.columns[2]!.values);
    const notes = back.notes as { rowsRead: number; firstStageF: number; excluded: unknown[] };
    expect(notes.rowsRead).toBe(N);
    expect(Number.isNaN(notes.firstStageF)).toBe(true);
    expect(notes.excluded).toEqual([{ row: 7, reason: 'income missing' }]);
  });

  it('store a dataset of zero rows, and leave absent notes absent', () => {
    const ws = openFresh();
    const empty = { ...simpleDataset(0), sheet: null };
    delete empty.notes;
    const back = must(ws.loadDataset(must(ws.importDataset(empty))));
    expect(back.rowNumbers.length).toBe(0);
    expect(back.columns.map((c) => c.values.length)).toEqual([0, 0, 0]);
    expect(back.sheet).toBeNull();
    expect('notes' in back).toBe(false);
    ws.close();
  });

  it('are listed newest first with their columns, and deleted with all their chunks', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const a = must(ws.importDataset(simpleDataset(5)));
    const b = must(ws.importDataset({ ...simpleDataset(3), sourceName: 'second.csv', sheet: null }));
    const list = must(ws.listDatasets());
    expect(list.map((d) => [d.datasetId, d.sourceName, d.rowCount])).toEqual([[b, 'second.csv', 3], [a, 'applicants.xlsx', 5]]);
    expect(list[1]!.columns).toEqual([{ name: 'HH_INCOME', kind: 'f64' }, { name: 'HH_SIZE', kind: 'i32' }, { name: 'APPLICANT_ID', kind: 'text' }]);

    must(ws.deleteDataset(a));
    expect(must(ws.listDatasets()).map((d) => d.datasetId)).toEqual([b]);
    expect(problemsOf(ws.loadDataset(a))[0]!.message).toMatch(/no dataset with id 1/);
    expect(problemsOf(ws.deleteDataset(a))[0]!.message).toMatch(/no dataset with id 1/);
    ws.close();

    // The cascade only runs with foreign keys on, so this also shows they are on.
    const raw = new Database(file, { readonly: true });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM dataset_chunks WHERE dataset_id = ?').get(a)).toEqual({ n: 0 });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM dataset_columns WHERE dataset_id = ?').get(a)).toEqual({ n: 0 });
    raw.close();
  });

  it('report progress chunk by chunk up to the total', () => {
    const ws = openFresh();
    const seen: StoreProgress[] = [];
    must(ws.importDataset(simpleDataset(N), { onProgress: (p) => seen.push(p) }));
    const chunks = 3; // N rows in 65,536-row chunks
    const total = chunks * (3 + 1); // three columns plus the row numbers
    expect(seen.length).toBe(total);
    expect(seen.map((p) => p.done)).toEqual(Array.from({ length: total }, (_, i) => i + 1));
    expect(seen.every((p) => p.stage === 'store' && p.total === total)).toBe(true);
    ws.close();
  });

  it('leave nothing behind when the import fails part way', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const kept = must(ws.importDataset(simpleDataset(4)));
    expect(() => ws.importDataset(simpleDataset(N), { onProgress: (p) => { if (p.done === 5) throw new Error('stopped by the test'); } })).toThrow('stopped by the test');
    expect(must(ws.listDatasets()).map((d) => d.datasetId)).toEqual([kept]);
    ws.close();
    const raw = new Database(file, { readonly: true });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM datasets').get()).toEqual({ n: 1 });
    expect(raw.prepare('SELECT COUNT(*) AS n FROM dataset_chunks WHERE dataset_id <> ?').get(kept)).toEqual({ n: 0 });
    raw.close();
  });

  it('refuse wrong input with one message per field, storing nothing', () => {
    const ws = openFresh();
    const good = simpleDataset(3);
    const cases: Array<[Partial<DatasetInput> & Record<string, unknown>, string, RegExp]> = [
      [{ sha256: 'abc' }, 'sha256', /64 hexadecimal digits/],
      [{ importedAt: 'yesterday' }, 'importedAt', /ISO 8601/],
      [{ sourceName: '' }, 'sourceName', /missing or empty/],
      [{ sheet: 3 as unknown as string }, 'sheet', /name as text, or null/],
      [{ rowNumbers: [1, 2, 3] as unknown as Int32Array }, 'rowNumbers', /Int32Array/],
      [{ columns: [{ name: 'A', kind: 'f64', values: new Float64Array(2) }] }, 'columns[0].values', /has 2 values but there are 3 rows/],
      [{ columns: [{ name: 'A', kind: 'f64', values: [1, 2, 3] as unknown as Float64Array }] }, 'columns[0].values', /kind "f64", so its values must be a Float64Array/],
      [{ columns: [{ name: 'A', kind: 'i32', values: new Float64Array(3) }] }, 'columns[0].values', /must be an Int32Array/],
      [{ columns: [{ name: 'A', kind: 'text', values: ['a', 2, 'c'] as unknown as string[] }] }, 'columns[0].values[1]', /row 2: 2 is not text/],
      [{ columns: [{ name: 'A', kind: 'f32' as 'f64', values: new Float64Array(3) }] }, 'columns[0].kind', /"f64", "i32" or "text"/],
      [{ columns: [{ name: 'A', kind: 'f64', values: new Float64Array(3) }, { name: 'A', kind: 'f64', values: new Float64Array(3) }] }, 'columns[1].name', /both named "A"/],
      [{ notes: { when: new Date(0) } }, 'notes.when', /ISO 8601/],
    ];
    for (const [change, path, message] of cases) {
      const problems = problemsOf(ws.importDataset({ ...good, ...change } as DatasetInput));
      expect(problems.map((p) => p.path), path).toEqual([path]);
      expect(problems[0]!.message).toMatch(message);
    }
    expect(must(ws.listDatasets())).toEqual([]);
    ws.close();
  });

  it('report a damaged chunk instead of returning wrong numbers', () => {
    const file = tempWorkspacePath();
    const ws = openFresh(file);
    const id = must(ws.importDataset(simpleDataset(N)));
    ws.close();
    const raw = new Database(file);
    raw.prepare('UPDATE dataset_chunks SET data = substr(data, 1, 100) WHERE dataset_id = ? AND series = 0 AND chunk = 1').run(id);
    raw.prepare('DELETE FROM dataset_chunks WHERE dataset_id = ? AND series = 2 AND chunk = 2').run(id);
    raw.close();
    const again = openFresh(file);
    expect(problemsOf(again.loadDataset(id))[0]!.message).toMatch(/Dataset 1 .* is damaged \(column "HH_INCOME": part 2 has the wrong size\)/);
    again.close();
    const raw2 = new Database(file);
    raw2.prepare('DELETE FROM dataset_chunks WHERE dataset_id = ? AND series = 0').run(id);
    raw2.close();
    const third = openFresh(file);
    expect(problemsOf(third.loadDataset(id))[0]!.message).toMatch(/column "HH_INCOME": 0 of 3 parts present/);
    third.close();
  });
});
