// A limit table with a gap (issue "Hardened", §5): the rows whose value has no entry are named
// by that value and counted — as an exclusion reason and a warning in the check report and in
// results.json — and a division by zero is reported apart from a missing table entry. The
// winter-credit sample's rule (limits by household size 1–3, then 35,000 + 7,000 per person) with
// its "else" removed leaves sizes 4 and up without a limit.

import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { singleFileStudy, writeSingleFileStudy } from '../serve/single-file-study.ts';

type Report = { rowsExcluded: Array<{ reason: string; count: number; rows: number[] }>; notes: Array<{ code: string; message: string }> };

function studyWithout(dir: string, edit: (rule: any) => void) {
  writeSingleFileStudy(dir, 3000);
  const s = singleFileStudy() as any;
  const program = JSON.parse(JSON.stringify(s.program));
  edit(program.rule);
  writeFileSync(join(dir, 'study.json'), JSON.stringify({ ...s, program }));
  return join(dir, 'study.json');
}

/** Household sizes in the CSV, counted independently of the pipeline. */
function sizeCounts(dir: string): Map<number, number> {
  const lines = readFileSync(join(dir, 'applicants.csv'), 'utf8').trim().split('\r\n');
  const at = lines[0]!.split(',').indexOf('HH_SIZE');
  const counts = new Map<number, number>();
  for (const l of lines.slice(1)) { const v = Number(l.split(',')[at]); counts.set(v, (counts.get(v) ?? 0) + 1); }
  return counts;
}

describe('a limit table with a gap', () => {
  it('names each household size without a limit, with its row count, as exclusion and warning', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-gap-'));
    const studyPath = studyWithout(dir, (rule) => { delete rule.all[0].limit.else; });
    const counts = sizeCounts(dir);
    const r = await callApi('study.check', { studyPath });
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    const report = r.value as Report;
    const gaps = report.rowsExcluded.filter((e) => /has no entry for/.test(e.reason));
    const sizes = [...counts.keys()].filter((k) => k > 3).sort((a, b) => a - b);
    expect(sizes.length).toBeGreaterThan(0);
    expect(gaps.map((g) => g.reason)).toEqual(sizes.map((k) => `the limit of "income ≤ limit by size" has no entry for people in household ${k}`));
    expect(gaps.map((g) => g.count)).toEqual(sizes.map((k) => counts.get(k)));
    const warnings = report.notes.filter((n) => n.code === 'limit-table-gap');
    expect(warnings[0]!.message).toBe(`${gaps[0]!.reason}: ${counts.get(sizes[0]!)!.toLocaleString('en-US')} rows are left out. Add an entry for it, or an 'any other value' limit.`);
    expect(report.rowsExcluded.some((e) => /division by zero/.test(e.reason))).toBe(false);

    const out = join(dir, 'out');
    const e = await callApi('study.evaluate', { studyPath, outDir: out, formats: [], overrides: { draws: 200, deltas: [0.1] } });
    if (!e.ok) throw new Error(JSON.stringify(e.error));
    const results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
    expect(results.warnings.filter((w: { code: string }) => w.code === 'limit-table-gap')).toHaveLength(sizes.length);
    expect(results.study.rowsExcluded.filter((x: { reason: string }) => /has no entry for/.test(x.reason)).map((x: { count: number }) => x.count)).toEqual(sizes.map((k) => counts.get(k)));
  }, 120_000);

  it('reports a division by zero apart from a missing entry', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-gap-'));
    // income / (size - 1) <= 6000: size 1 divides by zero; the table keeps its else.
    const studyPath = studyWithout(dir, (rule) => { rule.all[1].any[1].value = 'income / (size - 1)'; });
    const counts = sizeCounts(dir);
    const r = await callApi('study.check', { studyPath });
    if (!r.ok) throw new Error(JSON.stringify(r.error));
    const report = r.value as Report;
    const zero = report.rowsExcluded.filter((e) => /division by zero/.test(e.reason));
    expect(report.rowsExcluded.some((e) => /has no entry/.test(e.reason))).toBe(false);
    expect(zero).toHaveLength(1);
    // Every criterion is evaluated for every unit (the instrument needs all of them): all size-1 rows.
    expect(zero[0]!.count).toBe(counts.get(1));
  }, 120_000);
});
