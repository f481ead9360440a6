// Disclosure control that holds (docs/method.md, "Disclosure control"): an adversarial audit of
// every memo (disclosure-audit.ts) — no count from 1 to N printed, none pinned by the relations
// between printed counts (a linear program per hidden count, Cox 1980) — on the fixture study, on
// crafted results with small cells in many places (disclosure-craft.ts), and on every sample
// program; and a search of the rendered text (pdftotext of the PDF, the HTML text, the DOCX XML,
// the XLSX cells) for small numbers next to count words, row numbers and singular tells.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { figureData } from '../../main/report/figure-data.ts';
import type { Document } from '../../main/report/model/document.ts';
import { NO_FIGURES } from '../../main/report/model/figure-types.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { renderMemoDocument } from '../../main/report/memo-files.ts';
import { loadStudyFile } from '../../main/studyfile/load.ts';
import { runStudy } from '../../main/pipeline/run-study.ts';
import { auditDisclosure, simplexMin, smallCountsInText } from './disclosure-audit.ts';
import { craftSmallCells } from './disclosure-craft.ts';
import { runFixture } from './memo-fixture.ts';
import { canRun } from './poppler.ts';
import { readZip } from './zip-read.ts';

const CREATED = { createdAt: '2025-03-12T09:30:00Z' };
const ROOT = join(__dirname, '../..');

/** The text of every rendered format, for the search. */
async function renderedTexts(doc: Document): Promise<Record<string, string>> {
  const out = new Map((await renderMemoDocument(doc, ['pdf', 'html', 'docx', 'xlsx'])).map((f) => [f.name, f.content as Buffer | string]));
  const texts: Record<string, string> = {};
  const html = String(out.get('memo.html'));
  texts.html = html.replace(/<style[\s\S]*?<\/style>/g, '').replace(/<[^>]+>/g, ' ').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&').replace(/&#39;/g, "'").replace(/&quot;/g, '"');
  texts.docx = readZip(out.get('memo.docx') as Buffer).get('word/document.xml')!.toString('utf8').replace(/<[^>]+>/g, ' ');
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(out.get('tables.xlsx') as unknown as ArrayBuffer);
  const cells: string[] = [];
  wb.eachSheet((ws) => ws.eachRow((row) => row.eachCell((c) => cells.push(String(c.text ?? c.value)))));
  texts.xlsx = cells.join('\n');
  if (canRun('pdftotext')) {
    const dir = mkdtempSync(join(tmpdir(), 'fenceline-disclosure-'));
    writeFileSync(join(dir, 'memo.pdf'), out.get('memo.pdf')!);
    texts.pdf = execFileSync('/usr/bin/pdftotext', [join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' });
  }
  return texts;
}

function textLeaks(r: Results, doc: Document, texts: Record<string, string>): string[] {
  return Object.entries(texts).flatMap(([fmt, t]) => smallCountsInText(t, r.settings.smallCellMax, doc.suppression.smallMark, [r.program.unit]).map((x) => `${fmt}: ${x}`));
}

describe('the simplex method used by the audit', () => {
  it('solves a textbook linear program', () => {
    // Chvátal (1983), Linear Programming, ch. 2: max 5x1 + 4x2 + 3x3 subject to
    // 2x1 + 3x2 + x3 ≤ 5, 4x1 + x2 + 2x3 ≤ 11, 3x1 + 4x2 + 2x3 ≤ 8, x ≥ 0; optimum 13 at (2, 0, 1).
    const A = [[2, 3, 1, 1, 0, 0], [4, 1, 2, 0, 1, 0], [3, 4, 2, 0, 0, 1]];
    expect(simplexMin(A, [5, 11, 8], [-5, -4, -3, 0, 0, 0])).toEqual({ status: 'optimal', value: -13 });
    // Equalities with negative right-hand sides, an infeasible and an unbounded one.
    expect(simplexMin([[1, -1]], [-3], [1, 0])).toEqual({ status: 'optimal', value: 0 });
    expect(simplexMin([[1, 1]], [-1], [1, 1])).toEqual({ status: 'infeasible' });
    expect(simplexMin([[1, -1]], [2], [0, -1])).toEqual({ status: 'unbounded' });
  });
});

describe('the audit', () => {
  let base: Results;
  let fixtureDoc: Document;
  beforeAll(async () => {
    const run = await runFixture();
    base = JSON.parse(JSON.stringify(run.results));
    fixtureDoc = buildMemo(base, figureData(run), CREATED);
  }, 120_000);

  it('finds leaks in a memo that hides nothing (so it can fail)', () => {
    let found = 0;
    for (let seed = 1; seed <= 5; seed++) {
      const r = craftSmallCells(base, seed);
      const open = buildMemo({ ...r, settings: { ...r.settings, smallCellMax: 0 } }, NO_FIGURES, CREATED);
      const leaks = auditDisclosure(r, open);
      expect(leaks.some((l) => l.why === 'printed')).toBe(true);
      found += leaks.length;
    }
    expect(found).toBeGreaterThan(20);
  });

  it('finds a hidden count pinned by a difference between nested deltas', () => {
    const r = craftSmallCells(base, 3);
    const n = r.outcomes[0]!.byDelta.map((b) => b.n);
    // Print every count but the one difference: the audit must still work it out.
    const open = buildMemo({ ...r, settings: { ...r.settings, smallCellMax: 0 } }, NO_FIGURES, CREATED);
    const names = auditDisclosure(r, open).map((l) => l.count);
    if (n[1]! - n[0]! >= 1 && n[1]! - n[0]! <= 10) expect(names).toContain('added between outcomes[0].byDelta[0].n and outcomes[0].byDelta[1].n');
    expect(names.some((x) => x.startsWith('added between'))).toBe(true);
  });

  it('the fixture memo leaks nothing', () => {
    expect(auditDisclosure(base, fixtureDoc)).toEqual([]);
  });

  it('crafted results with small cells in many places leak nothing', () => {
    for (let seed = 1; seed <= 25; seed++) {
      const r = craftSmallCells(base, seed);
      const leaks = auditDisclosure(r, buildMemo(r, NO_FIGURES, CREATED));
      expect(leaks, `seed ${seed}`).toEqual([]);
    }
  });

  it('the rendered fixture memo and a crafted one print no small count, row number or singular tell', async () => {
    expect(textLeaks(base, fixtureDoc, await renderedTexts(fixtureDoc))).toEqual([]);
    const r = craftSmallCells(base, 7);
    const doc = buildMemo(r, NO_FIGURES, CREATED);
    expect(textLeaks(r, doc, await renderedTexts(doc))).toEqual([]);
  }, 120_000);

  it('the search finds what it looks for', () => {
    const t = 'Outcome Y is missing for 1 of the 15994 units used (1: Y is blank); they are left out (rows 9105). payments.xlsx: ≤10 row has no ID. 3 households have no score.';
    expect(smallCountsInText(t, 10, '≤10', ['household']).length).toBe(5);
  });
});

describe('the sample programs', () => {
  const folders = readdirSync(join(ROOT, 'sample-programs')).filter((f) => !f.startsWith('.')).sort();
  for (const folder of folders) {
    it(`${folder}: the memo and its rendered text leak no small count`, async () => {
      const loaded = loadStudyFile(join(ROOT, 'sample-programs', folder, 'study.json'));
      if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
      // Fewer draws keep the test quick; the counts near the edge do not depend on them.
      const study = { ...loaded.value.study, settings: { ...loaded.value.study.settings, draws: 200 } };
      const run = await runStudy(study, { baseDir: loaded.value.baseDir, workers: 0 });
      if (!run.ok) throw new Error(JSON.stringify(run.problems));
      const r: Results = JSON.parse(JSON.stringify(run.value.results));
      const doc = buildMemo(r, figureData(run.value), CREATED);
      expect(auditDisclosure(r, doc)).toEqual([]);
      expect(textLeaks(r, doc, await renderedTexts(doc))).toEqual([]);
    }, 180_000);
  }
});
