// Property: whatever bytes arrive — random, or a valid CSV / workbook with some damage — the
// importer either imports them, and then every data row is used or excluded
// (n + excluded = rowsRead), or refuses them with plain messages. Never a thrown exception,
// an unhandled rejection or a hang.

import { describe, expect, it, beforeAll } from 'vitest';
import fc from 'fast-check';
import { mapStudyColumns, type ColumnSpec } from '../../main/data/map-columns.ts';
import { readTable } from '../../main/data/read-table.ts';
import type { RawTable } from '../../main/data/types.ts';
import { inflateRawSync } from 'node:zlib';
import { readCentralDirectory } from '../../main/data/zip-check.ts';
import { makeZip, tempDir, uniqueName, writeFile, xlsxBytes, type ZipPart } from './helpers.ts';

const dir = tempDir();
const HANG_MS = 5000;

function withTimeout<T>(p: Promise<T>): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const hang = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`import did not finish within ${HANG_MS} ms`)), HANG_MS);
  });
  return Promise.race([p, hang]).finally(() => clearTimeout(timer));
}

function specFor(t: RawTable): ColumnSpec {
  const names = t.columns.map((c) => c.name);
  return {
    id: names[0]!,
    variables: names[1] === undefined ? [] : [{ key: 'x', column: names[1], type: 'continuous', path: 'program.variables[0].column' }],
    outcomes: names[2] === undefined ? [] : [{ column: names[2], path: 'columns.outcomes[0].column' }],
    ...(names[3] === undefined ? {} : { decision: { column: names[3], path: 'columns.decision' } }),
    covariates: names[4] === undefined ? [] : [{ column: names[4], path: 'columns.covariates[0]' }],
    controls: [],
  };
}

const tally = { imported: 0, refused: 0 };

async function importOrRefuse(bytes: Uint8Array, ext: string): Promise<void> {
  const path = writeFile(dir, uniqueName(ext), bytes);
  const got = await withTimeout(readTable(path));
  if (got.ok) tally.imported++;
  else tally.refused++;
  if (!got.ok) {
    expect(got.problems.length).toBeGreaterThan(0);
    for (const p of got.problems) {
      expect(typeof p.message).toBe('string');
      expect(p.message.length).toBeGreaterThan(10);
      expect(p.message).not.toMatch(/\n\s+at |TypeError|undefined/);
    }
    return;
  }
  const t = got.value;
  expect(t.rowCount).toBeGreaterThan(0);
  for (const c of t.columns) {
    expect(c.numbers.length).toBe(t.rowCount);
    expect(c.kinds.length).toBe(t.rowCount);
  }
  const m = mapStudyColumns(t, specFor(t));
  if (!m.ok) {
    expect(m.problems.length).toBeGreaterThan(0);
    return;
  }
  expect(m.value.n + m.value.excluded.reduce((s, g) => s + g.count, 0)).toBe(m.value.rowsRead);
  expect(m.value.rowsRead).toBe(t.rowCount);
}

const validCsv = 'Title line\n\nID,INCOME,OUTCOME,OFFERED,COV\nA1,"1,200",5,yes,1\nA2,300,,no,0\n"A3","$4",7,1,"x"\nA2,9,9,0,1\n';

/** A mutation of bytes: flip, insert (quotes, commas, line breaks likely), delete, or cut. */
const mutation = fc.oneof(
  fc.record({ kind: fc.constant('flip' as const), at: fc.nat(), bits: fc.integer({ min: 1, max: 255 }) }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), byte: fc.constantFrom(0x22, 0x2c, 0x0a, 0x0d, 0x00, 0x23, 0xff, 0x41) }),
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('cut' as const), at: fc.nat() }),
);
type Mutation = typeof mutation extends fc.Arbitrary<infer M> ? M : never;

function mutate(bytes: Uint8Array, steps: Mutation[]): Uint8Array {
  let b = Array.from(bytes);
  for (const m of steps) {
    if (b.length === 0) break;
    const at = m.at % b.length;
    if (m.kind === 'flip') b[at] = b[at]! ^ m.bits;
    else if (m.kind === 'insert') b.splice(at, 0, m.byte);
    else if (m.kind === 'delete') b.splice(at, 1);
    else b = b.slice(0, at);
  }
  return new Uint8Array(b);
}

describe('the importer never crashes', () => {
  let workbook: Uint8Array;
  beforeAll(async () => {
    workbook = await xlsxBytes({
      Applicants: [['Applicants'], [], ['ID', 'INCOME', 'OUTCOME', 'OFFERED', 'COV'], ['A1', 1200, 5, 'yes', 1], ['A2', 300, null, 'no', 0], ['A3', '$4', 7, 1, 'x']],
    });
  });

  it('on random bytes named .csv', async () => {
    await fc.assert(fc.asyncProperty(fc.uint8Array({ maxLength: 300 }), (bytes) => importOrRefuse(bytes, '.csv')), { numRuns: 120, seed: 4180 });
  });

  it('on random printable CSV-like text', async () => {
    const text = fc.string({ unit: fc.constantFrom('a', '1', ',', '"', '\n', '\r', ' ', '$', '#', '-', '.', 'é'), maxLength: 200 });
    await fc.assert(fc.asyncProperty(text, (s) => importOrRefuse(Buffer.from(s), '.csv')), { numRuns: 150, seed: 7 });
  });

  it('on mutated valid CSV files', async () => {
    const base = Buffer.from(validCsv);
    await fc.assert(fc.asyncProperty(fc.array(mutation, { minLength: 1, maxLength: 6 }), (steps) => importOrRefuse(mutate(base, steps), '.csv')), { numRuns: 150, seed: 11 });
  });

  it('on mutated, truncated and random workbook bytes', async () => {
    tally.imported = 0;
    tally.refused = 0;
    await importOrRefuse(workbook, '.xlsx');
    await fc.assert(fc.asyncProperty(fc.array(mutation, { minLength: 1, maxLength: 4 }), (steps) => importOrRefuse(mutate(workbook, steps), '.xlsx')), { numRuns: 80, seed: 29 });
    await fc.assert(fc.asyncProperty(fc.uint8Array({ maxLength: 200 }), (bytes) => importOrRefuse(Uint8Array.from([0x50, 0x4b, 0x03, 0x04, ...bytes]), '.xlsx')), { numRuns: 40, seed: 3 });
    // The property saw both outcomes (the valid workbook at least imports).
    expect(tally.imported).toBeGreaterThan(0);
    expect(tally.refused).toBeGreaterThan(0);
  });

  it('on workbooks whose XML is damaged inside an intact zip (XML parser errors become messages)', async () => {
    const path = writeFile(dir, uniqueName('.xlsx'), workbook);
    const entries = await readCentralDirectory(path, workbook.length);
    const parts: ZipPart[] = entries.map((e) => {
      const raw = workbook.subarray(e.dataStart, e.dataStart + e.compressedSize);
      return { name: e.name, data: e.method === 8 ? new Uint8Array(inflateRawSync(raw)) : new Uint8Array(raw), deflate: e.method === 8 };
    });
    const targets = parts.map((p, i) => [p.name, i] as const).filter(([n]) => /xl\/(worksheets\/sheet1|sharedStrings|workbook|styles)\.xml$|rels$/.test(n)).map(([, i]) => i);
    expect(targets.length).toBeGreaterThanOrEqual(4);
    tally.imported = 0;
    tally.refused = 0;
    await fc.assert(fc.asyncProperty(fc.constantFrom(...targets), fc.array(mutation, { minLength: 1, maxLength: 3 }), (target, steps) => {
      const damaged = parts.map((p, i) => (i === target ? { ...p, data: mutate(p.data, steps) } : p));
      return importOrRefuse(makeZip(damaged), '.xlsx');
    }), { numRuns: 80, seed: 101 });
    expect(tally.imported).toBeGreaterThan(0);
    expect(tally.refused).toBeGreaterThan(0);
  });
});
