// Helpers for the reference tests: read the fixture csv/json files and compare numbers.
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures');

/** Read a fixture csv of numbers (header row, comma-separated) into named Float64Array columns.
 * Number() is correctly rounded, so every value is the double the reference computations used. */
export function readNumericCsv(relPath: string, textColumns: readonly string[] = []): Record<string, Float64Array> {
  const text = readFileSync(join(FIXTURES, relPath), 'utf8').trim();
  const lines = text.split(/\r?\n/);
  const header = lines[0]!.split(',').map((h) => h.trim());
  const out: Record<string, Float64Array> = {};
  header.forEach((h) => {
    if (!textColumns.includes(h)) out[h] = new Float64Array(lines.length - 1);
  });
  lines.slice(1).forEach((line, i) => {
    const cells = line.split(',');
    header.forEach((h, j) => {
      if (textColumns.includes(h)) return;
      const v = Number(cells[j]);
      if (!Number.isFinite(v)) throw new Error(`${relPath}: row ${i + 2}, column ${h} is not a number`);
      out[h]![i] = v;
    });
  });
  return out;
}

export function readJson<T = any>(relPath: string): T {
  return JSON.parse(readFileSync(join(FIXTURES, relPath), 'utf8')) as T;
}

/** Log relative error: the number of agreeing significant digits (NIST StRD convention),
 * −log10(|c − t|/|t|), or −log10|c − t| when t = 0; capped at 15. */
export function lre(computed: number, certified: number): number {
  const diff = Math.abs(computed - certified);
  if (diff === 0) return 15;
  const v = certified === 0 ? -Math.log10(diff) : -Math.log10(diff / Math.abs(certified));
  return Math.min(15, v);
}

/** |a − b| / max(|a|, |b|) (0 when both are 0): the measure used by the reference READMEs. */
export function relDiff(a: number, b: number): number {
  const m = Math.max(Math.abs(a), Math.abs(b));
  return m === 0 ? 0 : Math.abs(a - b) / m;
}
