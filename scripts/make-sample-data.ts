// Writes the invented data files of the sample programs (npx tsx scripts/make-sample-data.ts).
// The files are committed; this script documents and reproduces them.
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { winterCreditRows } from '../main/data/synthetic/winter-credit.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

function toCsv(rows: Array<Record<string, string | number>>): string {
  const headers = Object.keys(rows[0]!);
  const esc = (v: string | number) => (typeof v === 'string' && /[",\n\r]/.test(v) ? `"${v.replace(/"/g, '""')}"` : String(v));
  return [headers.join(','), ...rows.map((r) => headers.map((h) => esc(r[h]!)).join(','))].join('\r\n') + '\r\n';
}

const rows = winterCreditRows(20000, 2026);
writeFileSync(join(root, 'sample-programs/winter-credit/applicants.csv'), toCsv(rows as unknown as Array<Record<string, string | number>>));
console.log(`wrote ${rows.length} invented households to sample-programs/winter-credit/applicants.csv`);
